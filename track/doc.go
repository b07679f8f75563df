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
// the container (CAP_PROP_POS_MSEC after each frame), so variable-frame-
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
// and variance var, as in the Pfinder model of Wren et al. (1997),
// updated as exponential running averages with the true time step
// dt of each frame, a = 1 - exp(-dt/tau):
//
//	var <- (1-a) var + a min((mu - x)^2, 60^2)    (all pixels not under a bee)
//	mu  <- (1-a) mu  + a x                        (selectively, see below)
//
// with a floor var >= (MinContrastGrey/ThresholdSigma)^2. The first
// second is a cumulative average (a = max(a, 1/(n+1))).
//
// Selective update (Koller et al. 1994): background pixels are
// learned with tau = BackgroundTauS; dark foreground with the much longer
// ForegroundTauS; pixels within ProtectBL body lengths of a confirmed
// track's predicted and matched position not at all, so a bee that sits
// on a flower for minutes is never absorbed. A track is protected once it
// has moved ProtectAfterBL body lengths from where it started: a bee
// arrives flying, while a false track at the edge of a swaying flower
// stays put and must not shield itself from the background.
//
// Foreground: the bee is dark against almost everything it flies over,
// so the test is signed, d = mu - g x > ThresholdSigma sqrt(var): only
// pixels darker than the background count. This rejects the bright ghost
// a bee leaves where it sat in the first frame, glints and sunlit petals.
// The per-pixel variance makes swaying grass and flower edges, whose
// pixels keep changing, need a large change to count. g is a global gain
// per frame, mean(mu)/mean(x) over the previous frame's background pixels,
// which removes flicker and illumination drift before differencing.
//
// Disturbances: a frame in which more than DisturbedFrac of the analysed
// area differs from the background in either direction (camera bumped,
// exposure jump, a damaged frame) gives no detections and is not learned;
// after ResetAfterS of such frames the background restarts from the
// current frame.
//
// Camera shake (Settings.Stabilize): the translation of each working
// image against the background is estimated by phase correlation (Kuglin
// & Hines 1975) and undone before differencing; detections are reported
// in the coordinates of the frame as recorded.
//
// Region of interest: an optional mask image (white = analyse).
//
// # Detections
//
// The dark foreground is closed with a 3x3 square, labelled into
// 8-connected blobs, and blobs outside [MinAreaFrac, MaxAreaFrac] times the
// expected bee area (an ellipse BL long and 0.45 BL wide, BL = body
// length in px) are dropped. Each remaining blob is measured at full
// resolution in a window around it: the background is interpolated from
// the working scale, and each pixel's weight is w = max(0, rho b - I), how
// much darker it is than a shadow could make it (the brightness-ratio
// shadow test of Cucchiara et al. 2003, rho = ShadowRatio). The position
// is the w-weighted centroid (sub-pixel); the ellipse has full axes
// 4 sqrt(lambda) of the weighted second-moment matrix and its major axis's
// angle counter-clockwise on screen from +x, in [0, 180). Blobs longer
// than MaxLengthBL body lengths, more elongated than MaxElongation, or
// with too few body pixels (a shadow alone) are dropped. Two bees that
// touch give one detection; the linker coasts the other until they part.
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
