// Package track finds bees in field video and follows each one through the
// clip: it reads the video (Source), separates dark moving insects from a
// swaying, flickering meadow (a selective running-Gaussian background
// model), measures every candidate (Detection) and links the detections
// into one track per bee (package link: Kalman filter, Hungarian
// assignment, coasting, gap closing).
//
// # Video input
//
// Open reads any clip OpenCV's FFmpeg backend reads. Frame times come from
// the container (CAP_PROP_POS_MSEC after each frame), so variable frame
// rate phone video keeps its true timing; where the container has no
// usable time for a frame, it is extrapolated at the nominal rate. An FPS
// override replaces container times by Index/fps. A clip that ends before
// the duration its container declares ends with *TruncatedError after
// the decodable frames; an unreadable file gives a one-line *OpenError.
// Frames stream through one reused image: memory does not depend on clip
// length.
//
// # Segmentation
//
// Each frame is converted to grey and reduced by an integer factor k
// (area averaging) so that a bee is about WorkBeeLengthPX pixels long:
// k = max(1, floor(BodyLengthMM * PXPerMM / WorkBeeLengthPX)). Every
// pixel of this working image has a running Gaussian background, mean mu
// and variance var, in the spirit of the per-pixel Gaussian model of
// Pfinder (Wren et al. 1997) on grey levels, updated as exponential
// running averages with the true time step dt of each frame,
// a = 1 - exp(-dt/tau):
//
//	var <- (1-a) var + a min((mu - x)^2, 60^2)    (all pixels not under a bee)
//	mu  <- (1-a) mu  + a x                        (selectively, see below)
//
// with a floor var >= (MinContrastGrey/ThresholdSigma)^2. A fresh model
// starts as a cumulative average, a = max(a, 1/(n+1)) after n frames: the
// mean for its first second, the variance until its own rate takes over.
//
// Selective update (Koller et al. 1994): background pixels are
// learned with tau = BackgroundTauS; dark foreground with the much longer
// ForegroundTauS; pixels within ProtectBL body lengths of a confirmed
// track's predicted and matched position not at all, so a bee that sits
// on a flower for minutes is never absorbed. A track is protected once it
// has moved ProtectAfterBL body lengths from where it started, when it
// starts within a body length of the frame border or within reach of a
// detection there in the last second (flying in), or when it
// takes over the detections of a protected track (the linker sometimes
// starts a new track on a bee that brakes to land): a bee arrives flying,
// while a false track at the edge of a swaying flower stays put and must
// not shield itself from the background.
//
// Foreground: the bee is dark against almost everything it flies over,
// so the test is signed, d = mu - g x > ThresholdSigma sqrt(var): only
// pixels darker than the background count. This rejects the bright ghost
// a bee leaves where it sat in the first frame, glints and sunlit petals.
// Where the ground is itself about as dark as a bee (a dark flower
// centre), darkness cannot show the bee; there, within a body length of
// where a confirmed track is expected, a cell also counts when its colour
// differs from its learned colour after allowing for a change of
// brightness (the chromaticity distortion of Horprasert et al. 1999, over
// MinChromaGrey; see chroma in segment.go). Shadows and light changes
// leave it unchanged, a bee's coloured bands do not.
// g is a global gain per frame, mean(mu)/mean(x) over the previous frame's
// background pixels, which removes flicker and illumination drift before
// differencing.
//
// Vegetation: the per-pixel variance, learned from foreground pixels too
// (clamped), makes swaying grass and flower edges need a large change to
// count. Temporal persistence adds to it: each pixel's frequency of being
// dark foreground over the last ActivityTauS is kept, and pixels above
// MaxActivity are left out, except where a confirmed bee is expected. A
// passing bee covers a pixel for a frame or two; a swaying edge returns
// every sway period.
//
// Disturbances: a frame in which more than DisturbedFrac of the analysed
// area differs from the background in either direction (camera bumped,
// exposure jump, a damaged frame) gives no detections and is not learned;
// after ResetAfterS of such frames the background restarts from the
// current frame.
//
// Camera shake (Settings.Stabilize): the translation of each working
// image against a key frame is estimated by phase correlation (Kuglin &
// Hines 1975, two rounds for sub-pixel accuracy) and undone before
// differencing; detections are reported in the coordinates of the frame
// as recorded.
//
// Region of interest: an optional mask image (white = analyse).
//
// # Detections
//
// The dark foreground is closed with a 3x3 square and labelled into
// 8-connected blobs; blobs far outside the expected bee area (an ellipse
// BL long and 0.45 BL wide, BL = body length in px) are dropped. Each
// remaining blob is measured at full resolution in a window around it,
// with the background interpolated from the working scale. A shadow dims
// the ground by a fraction, I >= rho b, while a bee's body is dark
// whatever it covers (the brightness-ratio test for shadow pixels of
// Cucchiara et al. 2003, rho = ShadowRatio). Each pixel's weight is its
// body coverage,
//
//	w = clamp((rho b - I) / (rho b - I_body), 0, 1),
//
// I_body the 10th percentile of I over the blob's pixels with I < rho b
// (when there are none, the learned body grey: a running average of I_body
// over clearly seen tracked bees; w = 0 while that is still unknown): 1
// inside the body, 0 in a shadow, a share of the soft edge. On "blind"
// ground, as dark as a bee (rho b - body grey < MinContrastGrey) within a
// body length of a confirmed track's prediction, two things change. A
// pixel whose colour differs from the cell's colour background also
// counts as body: w = max(w, cw), cw = clamp((CD - t_c) / t_c, 0, 1), CD
// its chromaticity distortion and t_c = max(ThresholdSigma sqrt(var_CD),
// MinChromaGrey). And b is the darkest of the four working cells it is
// interpolated from, not the interpolated value, so that a bee's shadow
// on a dark rim (where interpolation makes the ground look brighter than
// it is) does not count as body. The position is the
// w-weighted (intensity-weighted) centroid; the ellipse has full axes 4
// sqrt(lambda) of the weighted second-moment matrix (exact for a uniform
// ellipse) and its major axis's angle counter-clockwise on screen from +x,
// in [0, 180); area and box count the foreground pixels. Then:
//
//   - Fragments of one bee (cut in two by a dark flower centre) are
//     merged: centroids within 0.8 BL and a merged ellipse at most 1.3 BL
//     long.
//   - A blob of more than 1.3 expected areas that holds the predicted
//     positions of several confirmed tracks (bees touching) is split
//     among them by weighted k-means started at the predictions (Lloyd
//     1982).
//   - Detections smaller than MinAreaFrac, longer than MaxLengthBL,
//     thinner than MinWidthBL, more elongated than MaxElongation, or
//     with too few body pixels (a shadow alone) are dropped.
//
// Finish drops tracks that never move MinTravelBL from their first
// detection (flicker in place; a bee arrives and leaves flying).
//
// # Units
//
// Positions, lengths and areas are pixels of the full frame (pixel
// centres at integer coordinates, OpenCV's convention); times are seconds
// from the first frame; grey levels are of 0..255; angles are degrees.
//
// References:
//
//   - Wren, C. R., Azarbayejani, A., Darrell, T. & Pentland, A. P. (1997).
//     Pfinder: real-time tracking of the human body. IEEE Transactions on
//     Pattern Analysis and Machine Intelligence 19(7), 780-785.
//   - Koller, D., Weber, J., Huang, T., Malik, J., Ogasawara, G., Rao, B.
//     & Russell, S. (1994). Towards robust automatic traffic scene
//     analysis in real-time. Proc. 12th International Conference on
//     Pattern Recognition, vol. 1, 126-131.
//   - Cucchiara, R., Grana, C., Piccardi, M. & Prati, A. (2003). Detecting
//     moving objects, ghosts, and shadows in video streams. IEEE
//     Transactions on Pattern Analysis and Machine Intelligence 25(10),
//     1337-1342.
//   - Horprasert, T., Harwood, D. & Davis, L. S. (1999). A statistical
//     approach for real-time robust background subtraction and shadow
//     detection. Proc. IEEE ICCV'99 FRAME-RATE Workshop.
//   - Lloyd, S. P. (1982). Least squares quantization in PCM. IEEE
//     Transactions on Information Theory 28(2), 129-137.
//   - Kuglin, C. D. & Hines, D. C. (1975). The phase correlation image
//     alignment method. Proc. IEEE International Conference on Cybernetics
//     and Society, 163-165.
//   - Bernardin, K. & Stiefelhagen, R. (2008). Evaluating multiple object
//     tracking performance: the CLEAR MOT metrics. EURASIP Journal on
//     Image and Video Processing 2008, 246309 (scores used by the tests).
//   - Ristani, E., Solera, F., Zou, R., Cucchiara, R. & Tomasi, C. (2016).
//     Performance measures and a data set for multi-target, multi-camera
//     tracking. ECCV 2016 Workshops, LNCS 9914, 17-35 (IDF1, used by the
//     tests).
package track
