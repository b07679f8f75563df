package track

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"sort"
	"unsafe"

	"gocv.io/x/gocv"
)

// segParams are the per-clip parameters of the segmentation, derived from
// Settings and the clip (see Settings for meaning and defaults).
type segParams struct {
	factor         int     // integer reduction from the frame to the working image
	workW, workH   int     // working image size, px
	fps            float64 // nominal frame rate, frames/s
	beeLenPX       float64 // expected bee length in the frame, px
	bgTauS, fgTauS float64 // time constants of the selective running average, s
	warmS          float64 // start-up period with a cumulative average, s
	thresh2        float64 // ThresholdSigma^2
	varFloor       float64 // floor of the per-pixel variance, grey levels^2
	varInit        float64 // variance of a fresh background, grey levels^2
	varClamp       float64 // largest squared deviation one frame adds to the variance, grey levels^2
	minContrast    float64 // grey levels
	minAreaWork    float64 // area gates at the working scale, px^2
	maxAreaWork    float64
	maxLenPX       float64 // longest ellipse major axis accepted, px of the frame
	minWidthPX     float64 // shortest ellipse minor axis accepted, px of the frame
	minAreaPX      float64 // least foreground area of a detection, px of the frame
	splitAreaPX    float64 // least foreground area of a blob split among track predictions, px
	maxElong       float64 // largest major/minor ratio accepted
	actTauS        float64 // time constant of the foreground frequency, s
	maxActivity    float64 // foreground frequency above which a pixel is unstable
	shadowRatio    float64 // pixels darker than this fraction of the background are bee body
	minBodyPX      float64 // least number of body pixels of a detection, px of the frame
	disturbedFrac  float64 // fraction of the analysed area above which a frame is disturbed
	resetS         float64 // consecutive disturbed time after which the background restarts, s
	stabilize      bool
	maxShiftWorkPX float64 // largest accepted shake at the working scale, px
	colourEvery    int     // the colour background for plots is updated every this many frames
	minChroma      float64 // least chromaticity distortion counted as foreground, grey levels
	cVarFloor      float64 // floor of the per-pixel variance of the chromaticity distortion, grey levels^2
	cVarInit       float64 // its value where the colour model starts, grey levels^2
}

// protectZone is a disc of the frame, px, in which the background is not
// learned in the current frame: where a confirmed track is or is expected.
type protectZone struct {
	XPX, YPX, RadiusPX float64
}

// segmenter holds the background model of one clip and finds dark blobs
// in each frame, and near tracked bees on ground as dark as a bee also
// blobs of another colour (chroma; Horprasert, T., Harwood, D. & Davis,
// L. S. (1999). A statistical approach for real-time robust background
// subtraction and shadow detection. Proc. IEEE ICCV'99 FRAME-RATE
// Workshop). All images but the frame itself are at the working scale
// and are allocated once.
type segmenter struct {
	p              segParams
	frameW, frameH int
	crop           image.Rectangle // part of the frame reduced to the working image (a multiple of factor)

	n         int     // frames seen since the model (re)started
	frames    int     // frames seen in total
	lastT     float64 // time of the previous frame, s
	gain      float64 // global gain of the current frame
	shiftX    float64 // shake of the current frame, working px (image = background moved by +shift)
	shiftY    float64
	skipLearn bool    // the current frame is not learned (disturbed)
	distRunS  float64 // length of the current run of disturbed frames, s
	dt        float64 // time step of the current frame, s
	haveSmall bool    // small holds the current frame in colour

	// Colour model of the blind ground (see chroma), working scale.
	// bodyGrey is the running body level of clearly seen tracked bees,
	// grey levels, < 0 until the first; a cell is blind where darkness
	// cannot show such a body: ShadowRatio mu - bodyGrey < MinContrastGrey.
	bodyGrey float64
	bgr      []uint8   // the current frame, full size, BGR
	blind    []int32   // the blind cells of the current frame
	cMu      []float32 // background colour of a cell, BGR
	cVar     []float32 // variance of its chromaticity distortion
	cD2      []float32 // squared chromaticity distortion in the current frame
	cSeen    []int32   // frame (s.frames) at which the cell was last blind, 0 = never
	cTaken   []int32   // frame at which the cell was put in blind (de-duplication)
	cGap     []int32   // frames since the cell's previous update
	cX       []float32 // colour of the blind cells in the current frame, BGR, in the order of blind

	// counters for the report
	disturbed, resets int

	greyFull       gocv.Mat // grey frame, full size (8U)
	greyHalf       gocv.Mat // greyFull halved (scratch of areaDownscale)
	grey           gocv.Mat // grey working image (8U)
	x, xa          gocv.Mat // working image as float, and the shake-aligned copy (32F)
	mu, vr         gocv.Mat // background mean and variance (32F)
	d, d2, thr2    gocv.Mat // mu - x, its square, ThresholdSigma^2 var (32F)
	zero           gocv.Mat // zeros (32F)
	anyFg, darkFg  gocv.Mat // |d| > t, and d > t (8U)
	chromaFg       gocv.Mat // blind cells of another colour (8U)
	fg             gocv.Mat // darkFg or chromaFg (8U)
	frameCopy      gocv.Mat // the frame, when its data is not continuous (8UC3)
	det            gocv.Mat // fg of stable pixels, after closing (8U)
	tmp            gocv.Mat // scratch (8U)
	lmask, protect gocv.Mat // masks (8U)
	notDark        gocv.Mat // where the gain is measured (8U)
	near           gocv.Mat // near this frame's detections, start-up only (8U)
	act            gocv.Mat // running frequency of dark foreground, 0..255 (32F)
	unstable       gocv.Mat // act above MaxActivity and not protected (8U)
	actTmp         gocv.Mat // scratch (32F)
	roi            gocv.Mat // analysed area (8U), empty = all
	roiCount       int
	labels, stats  gocv.Mat
	cents          gocv.Mat
	kernel         gocv.Mat
	hann           gocv.Mat // window for phase correlation (32F)
	ref            gocv.Mat // key frame times the window, the reference for shake (32F)
	pcTmp          gocv.Mat // windowed working image (32F)
	noWindow       gocv.Mat // empty
	keyAgeS        float64  // age of the key frame, s
	warpM          gocv.Mat // 2x3 translation (64F)
	small          gocv.Mat // colour working image (8UC3)
	muBGR          gocv.Mat // colour background (32FC3)

	seeds []protectZone // predicted positions of confirmed tracks, this frame
	pix   []pixel       // scratch of refine
	grid  []bool        // scratch of refine
	dark  []float32     // scratch of weigh
	part  []pixel       // scratch of split
	lab   []int         // scratch of split
}

func newSegmenter(p segParams, frameW, frameH int, roi gocv.Mat) *segmenter {
	k := p.factor
	s := &segmenter{
		p: p, frameW: frameW, frameH: frameH,
		crop: image.Rect(0, 0, p.workW*k, p.workH*k),
		gain: 1,
	}
	for _, m := range []*gocv.Mat{&s.greyFull, &s.greyHalf, &s.grey, &s.x, &s.xa, &s.d, &s.d2, &s.thr2, &s.anyFg, &s.darkFg, &s.fg, &s.frameCopy, &s.det, &s.tmp, &s.lmask, &s.labels, &s.stats, &s.cents, &s.small, &s.muBGR, &s.ref, &s.pcTmp, &s.noWindow, &s.unstable, &s.actTmp} {
		*m = gocv.NewMat()
	}
	s.chromaFg = gocv.NewMatWithSizeFromScalar(gocv.NewScalar(0, 0, 0, 0), p.workH, p.workW, gocv.MatTypeCV8U)
	nc := p.workW * p.workH
	s.bodyGrey = -1
	s.cMu = make([]float32, 3*nc)
	s.cVar = make([]float32, nc)
	s.cD2 = make([]float32, nc)
	s.cSeen = make([]int32, nc)
	s.cTaken = make([]int32, nc)
	s.cGap = make([]int32, nc)
	s.mu = gocv.NewMatWithSize(p.workH, p.workW, gocv.MatTypeCV32F)
	s.vr = gocv.NewMatWithSize(p.workH, p.workW, gocv.MatTypeCV32F)
	s.zero = gocv.NewMatWithSizeFromScalar(gocv.NewScalar(0, 0, 0, 0), p.workH, p.workW, gocv.MatTypeCV32F)
	s.act = gocv.NewMatWithSizeFromScalar(gocv.NewScalar(0, 0, 0, 0), p.workH, p.workW, gocv.MatTypeCV32F)
	s.protect = gocv.NewMatWithSize(p.workH, p.workW, gocv.MatTypeCV8U)
	s.near = gocv.NewMatWithSize(p.workH, p.workW, gocv.MatTypeCV8U)
	s.notDark = gocv.NewMatWithSizeFromScalar(gocv.NewScalar(255, 0, 0, 0), p.workH, p.workW, gocv.MatTypeCV8U)
	s.kernel = gocv.GetStructuringElement(gocv.MorphRect, image.Pt(3, 3))
	s.warpM = gocv.NewMatWithSize(2, 3, gocv.MatTypeCV64F)
	if roi.Empty() {
		s.roi = gocv.NewMat()
		s.roiCount = p.workW * p.workH
	} else {
		s.roi = roi.Clone()
		s.roiCount = gocv.CountNonZero(s.roi)
		gocv.BitwiseAnd(s.notDark, s.roi, &s.notDark)
	}
	if p.stabilize {
		s.hann = hanningWindow(p.workW, p.workH)
	} else {
		s.hann = gocv.NewMat()
	}
	return s
}

func (s *segmenter) close() {
	for _, m := range []*gocv.Mat{&s.greyFull, &s.greyHalf, &s.grey, &s.x, &s.xa, &s.mu, &s.vr, &s.d, &s.d2, &s.thr2, &s.zero, &s.anyFg, &s.darkFg, &s.chromaFg, &s.fg, &s.frameCopy, &s.det, &s.tmp, &s.lmask, &s.protect, &s.notDark, &s.near, &s.roi, &s.labels, &s.stats, &s.cents, &s.kernel, &s.hann, &s.warpM, &s.small, &s.muBGR, &s.ref, &s.pcTmp, &s.noWindow, &s.act, &s.unstable, &s.actTmp} {
		m.Close()
	}
}

// hanningWindow returns the w x h raised-cosine window used to taper the
// images before phase correlation.
func hanningWindow(w, h int) gocv.Mat {
	hw := func(n int) []float64 {
		v := make([]float64, n)
		for i := range v {
			if n > 1 {
				v[i] = 0.5 * (1 - math.Cos(2*math.Pi*float64(i)/float64(n-1)))
			}
		}
		return v
	}
	wx, wy := hw(w), hw(h)
	m := gocv.NewMatWithSize(h, w, gocv.MatTypeCV32F)
	data, _ := m.DataPtrFloat32()
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			data[y*w+x] = float32(wy[y] * wx[x])
		}
	}
	return m
}

// alpha is the weight of the new frame in an exponential running average
// with time constant tauS after a step of dtS: 1 - exp(-dt/tau). Using the
// true time step keeps the model's memory in seconds for variable frame
// rates.
func alpha(dtS, tauS float64) float64 { return 1 - math.Exp(-dtS/tauS) }

// detect segments one frame (8-bit BGR, full size) at time tS and returns
// the bee candidates. zones are where confirmed bees are expected (the
// linker's predictions). The model is not updated; call learn next.
func (s *segmenter) detect(frame gocv.Mat, index int, tS float64, zones, seeds []protectZone) []Detection {
	s.seeds = seeds
	if frame.Cols() != s.frameW || frame.Rows() != s.frameH || frame.Type() != gocv.MatTypeCV8UC3 {
		panic(fmt.Sprintf("track: frame %d is %dx%d %v, want %dx%d CV8UC3", index, frame.Cols(), frame.Rows(), frame.Type(), s.frameW, s.frameH))
	}
	p := s.p
	if !frame.IsContinuous() {
		frame.CopyTo(&s.frameCopy)
		frame = s.frameCopy
	}
	s.bgr, _ = frame.DataPtrUint8()
	defer func() { s.bgr = nil }() // a view of the caller's frame: valid during detect only
	gocv.CvtColor(frame, &s.greyFull, gocv.ColorBGRToGray)
	if s.crop.Dx() == s.frameW && s.crop.Dy() == s.frameH {
		areaDownscale(s.greyFull, &s.grey, &s.greyHalf, image.Pt(p.workW, p.workH))
	} else {
		r := s.greyFull.Region(s.crop)
		areaDownscale(r, &s.grey, &s.greyHalf, image.Pt(p.workW, p.workH))
		r.Close()
	}
	s.grey.ConvertTo(&s.x, gocv.MatTypeCV32F)
	dt := 1 / p.fps
	if s.frames > 0 && tS > s.lastT {
		dt = tS - s.lastT
	}
	s.lastT = tS
	s.frames++
	s.skipLearn = false

	if s.n == 0 {
		s.restart(frame)
		return nil
	}
	if p.stabilize {
		s.align(dt)
	}
	s.protect.SetTo(gocv.NewScalar(0, 0, 0, 0))
	s.drawZones(zones)
	// Global gain: the frame is scaled so that its mean over the pixels
	// that were not dark foreground in the previous frame matches the
	// background's (illumination drift, flicker, automatic exposure).
	mb := s.mu.MeanWithMask(s.notDark).Val1
	mx := s.x.MeanWithMask(s.notDark).Val1
	s.gain = 1
	if mx > 1 && mb > 1 {
		s.gain = math.Min(2, math.Max(0.5, mb/mx))
		s.x.MultiplyFloat(float32(s.gain))
	}
	// Signed difference: the bee is darker than what it covers, so only
	// d = mu - x > 0 is foreground. Bright changes (the ground a bee
	// leaves behind when it was part of the first frame, glints, petals
	// lit by the sun) are ignored for detection.
	gocv.Subtract(s.mu, s.x, &s.d)
	gocv.Multiply(s.d, s.d, &s.d2)
	s.vr.ConvertToWithParams(&s.thr2, gocv.MatTypeCV32F, float32(p.thresh2), 0)
	gocv.Compare(s.d2, s.thr2, &s.anyFg, gocv.CompareGT)
	gocv.Compare(s.d, s.zero, &s.darkFg, gocv.CompareGT)
	gocv.BitwiseAnd(s.darkFg, s.anyFg, &s.darkFg)
	s.chroma()
	gocv.BitwiseOr(s.darkFg, s.chromaFg, &s.fg)
	if !s.roi.Empty() {
		gocv.BitwiseAnd(s.anyFg, s.roi, &s.anyFg)
		gocv.BitwiseAnd(s.darkFg, s.roi, &s.darkFg)
		gocv.BitwiseAnd(s.fg, s.roi, &s.fg)
	}
	// A frame that changed over a large part of the picture (camera
	// bumped, exposure jump, a corrupt frame) says nothing about bees and
	// must not be learned. If it lasts, the scene itself changed: restart.
	frac := float64(gocv.CountNonZero(s.anyFg)) / float64(max(1, s.roiCount))
	if s.n > 1 && frac > p.disturbedFrac {
		s.disturbed++
		s.skipLearn = true
		s.distRunS += dt
		if s.distRunS >= p.resetS {
			s.resets++
			s.restart(frame)
		}
		return nil
	}
	s.distRunS = 0
	s.dt = dt
	// Temporal persistence: pixels that were foreground too often of
	// late (swaying leaf and flower edges, a dark flower centre rocking on
	// its stalk) are left out, except where a confirmed bee is expected.
	gocv.Threshold(s.act, &s.actTmp, float32(255*p.maxActivity), 255, gocv.ThresholdBinary)
	s.actTmp.ConvertTo(&s.unstable, gocv.MatTypeCV8U)
	gocv.BitwiseNot(s.protect, &s.tmp)
	gocv.BitwiseAnd(s.unstable, s.tmp, &s.unstable)
	gocv.BitwiseNot(s.unstable, &s.tmp)
	gocv.BitwiseAnd(s.fg, s.tmp, &s.det)
	s.haveSmall = false
	if s.frames%s.p.colourEvery == 0 {
		s.colour(frame)
	}
	return s.blobs(index)
}

// chroma finds, at the working scale, the blind cells of the current frame
// (where the grey background is so dark that darkness cannot show a bee's
// body: ShadowRatio mu - bodyGrey < MinContrastGrey, e.g. a dark flower
// centre) and marks in chromaFg those whose colour differs from the
// cell's colour background: there the bee is sought by colour instead
// (its coloured bands, a body of another hue). The difference is the
// chromaticity distortion of Horprasert et al. (1999, eq. 4-5, the same
// weight on the three channels): with E the cell's background colour and
// I its colour in this frame (the area mean of the cell, times the gain),
//
//	a = I.E / E.E,   CD^2 = |I - a E|^2 = I.I - (I.E)^2 / E.E,
//
// so CD is 0 for a shadow or a change of light (I = a E, whatever a) and
// large for a change of hue. A cell is foreground when CD^2 >
// ThresholdSigma^2 var_CD, var_CD its running variance floored at
// (MinChromaGrey / ThresholdSigma)^2.
//
// Colour is sought only within one bee length of where a confirmed track
// is expected (nearSeed), as the background is kept from learning there:
// unguided, a colour test on dark ground sees every change of hue of
// shade, soil and swaying leaves, and a bee that arrives is seen by
// darkness first, over brighter ground. The colour model is updated every
// frame for the blind cells within chromaZoneBL of those places, and every
// chromaEvery frames for the other blind cells, so the test costs in
// proportion to the blind ground: nothing before a bee has been seen
// clearly (bodyGrey unknown) or where the ground is bright. A cell that
// was not blind in the last chromaRestartS seconds starts its model from
// the current frame.
func (s *segmenter) chroma() {
	out, _ := s.chromaFg.DataPtrUint8()
	for _, i := range s.blind {
		out[i] = 0
	}
	s.blind = s.blind[:0]
	s.cX = s.cX[:0]
	if s.bodyGrey < 0 {
		return
	}
	p := s.p
	lim := float32((s.bodyGrey + p.minContrast) / p.shadowRatio)
	k, W := p.factor, p.workW
	kf := float64(k)
	now := int32(s.frames)
	mu := float32s(s.mu)
	// Blind cells within chromaZoneBL of a confirmed track's prediction,
	// each once.
	rw := chromaZoneBL * p.beeLenPX / kf
	for _, sd := range s.seeds {
		cx := (sd.XPX-(kf-1)/2)/kf - s.shiftX
		cy := (sd.YPX-(kf-1)/2)/kf - s.shiftY
		if !finite(cx) || !finite(cy) {
			continue
		}
		for y := max(0, int(math.Floor(cy-rw))); y <= min(p.workH-1, int(math.Ceil(cy+rw))); y++ {
			for x := max(0, int(math.Floor(cx-rw))); x <= min(W-1, int(math.Ceil(cx+rw))); x++ {
				i := y*W + x
				if mu[i] >= lim || s.cTaken[i] == now || (float64(x)-cx)*(float64(x)-cx)+(float64(y)-cy)*(float64(y)-cy) > rw*rw {
					continue
				}
				s.blind = append(s.blind, int32(i))
				s.cTaken[i] = now
			}
		}
	}
	if s.frames%chromaEvery == 0 {
		// Every chromaEvery frames all blind cells, so that a cell a bee
		// comes to has a model that has seen the ground move.
		for i, m := range mu {
			if m < lim && s.cTaken[i] != now {
				s.blind = append(s.blind, int32(i))
				s.cTaken[i] = now
			}
		}
	}
	ox := int(math.Round(s.shiftX * kf))
	oy := int(math.Round(s.shiftY * kf))
	inv := float32(s.gain) / float32(k*k)
	t2 := float32(p.thresh2)
	stale := int32(math.Max(2*chromaEvery, chromaRestartS*p.fps))
	for _, i := range s.blind {
		cx, cy := int(i)%W, int(i)/W
		x0 := min(max(cx*k+ox, 0), s.frameW-k)
		y0 := min(max(cy*k+oy, 0), s.frameH-k)
		var b0, b1, b2 float32
		for y := y0; y < y0+k; y++ {
			row := s.bgr[(y*s.frameW+x0)*3 : (y*s.frameW+x0+k)*3]
			for j := 0; j+2 < len(row); j += 3 {
				b0 += float32(row[j])
				b1 += float32(row[j+1])
				b2 += float32(row[j+2])
			}
		}
		x0f, x1f, x2f := b0*inv, b1*inv, b2*inv
		s.cX = append(s.cX, x0f, x1f, x2f)
		j := 3 * int(i)
		if s.cSeen[i] == 0 || now-s.cSeen[i] > stale {
			s.cMu[j], s.cMu[j+1], s.cMu[j+2] = x0f, x1f, x2f
			s.cVar[i] = float32(p.cVarInit)
			s.cD2[i] = -1 // new: not learned from this frame
			s.cSeen[i] = now
			continue
		}
		s.cGap[i] = now - s.cSeen[i]
		s.cSeen[i] = now
		e0, e1, e2 := s.cMu[j], s.cMu[j+1], s.cMu[j+2]
		ii := x0f*x0f + x1f*x1f + x2f*x2f
		c := ii
		if ee := e0*e0 + e1*e1 + e2*e2; ee > 1 {
			ie := x0f*e0 + x1f*e1 + x2f*e2
			c = max(0, ii-ie*ie/ee)
		}
		s.cD2[i] = c
		if c > t2*s.cVar[i] && s.nearSeed((float64(cx)+s.shiftX)*float64(k)+float64(k-1)/2, (float64(cy)+s.shiftY)*float64(k)+float64(k-1)/2) {
			out[i] = 255
		}
	}
}

// nearSeed reports whether frame point (x, y), px, lies within one bee
// length of the predicted position of a confirmed track: where colour is
// sought (see chroma).
func (s *segmenter) nearSeed(x, y float64) bool {
	r2 := s.p.beeLenPX * s.p.beeLenPX
	for _, sd := range s.seeds {
		if dx, dy := x-sd.XPX, y-sd.YPX; dx*dx+dy*dy <= r2 {
			return true
		}
	}
	return false
}

// chromaZoneBL: the colour model is kept for the blind cells within this
// many body lengths of where a confirmed track is expected, body lengths.
// A bee comes from farther in a few frames at most, so a cell it lands on
// has had a model for several frames.
const chromaZoneBL = 3.0

// chromaEvery: the colour model of the blind cells far from tracked bees
// is updated every this many frames.
const chromaEvery = 8

// chromaRestartS: the colour model of a cell that was not blind for this
// long starts again from the current frame, s.
const chromaRestartS = 1.0

// learnChroma updates the colour model of the blind cells not under a
// confirmed bee, like the grey model: the variance of the chromaticity
// distortion at rate aVar (clamped like the grey deviation), the colour
// at aFG where the cell is foreground and aBG elsewhere. A cell last
// updated n frames ago learns at the rate of n frames, 1 - (1 - a)^n.
func (s *segmenter) learnChroma(aBG, aFG, aVar float64) {
	if len(s.blind) == 0 {
		return
	}
	p := s.p
	prot, _ := s.protect.DataPtrUint8()
	fg, _ := s.fg.DataPtrUint8()
	floor, clamp := float32(p.cVarFloor), float32(p.varClamp)
	for n, i := range s.blind {
		if prot[i] != 0 || s.cD2[i] < 0 {
			continue
		}
		gap := float64(max(1, s.cGap[i]))
		av := float32(1 - math.Pow(1-aVar, gap))
		s.cVar[i] = max(floor, s.cVar[i]+av*(min(s.cD2[i], clamp)-s.cVar[i]))
		a := float32(1 - math.Pow(1-aBG, gap))
		if fg[i] != 0 {
			a = float32(1 - math.Pow(1-aFG, gap))
		}
		j := 3 * int(i)
		for ch := 0; ch < 3; ch++ {
			s.cMu[j+ch] += a * (s.cX[3*n+ch] - s.cMu[j+ch])
		}
	}
}

// chromaAt returns the chromaticity distortion of frame pixel (x, y)
// against the colour background of its working cell (u, v) (see chroma)
// and the threshold t_c = max(ThresholdSigma sqrt(var_CD),
// MinChromaGrey), grey levels; ok is false where the cell has no colour
// model this frame.
func (s *segmenter) chromaAt(x, y int, u, v float64) (cd, tc float64, ok bool) {
	p := s.p
	cx := min(max(int(math.Round(u)), 0), p.workW-1)
	cy := min(max(int(math.Round(v)), 0), p.workH-1)
	i := cy*p.workW + cx
	if s.cSeen[i] != int32(s.frames) || s.cD2[i] < 0 {
		return 0, 0, false
	}
	g := s.gain
	k := (y*s.frameW + x) * 3
	I := [3]float64{g * float64(s.bgr[k]), g * float64(s.bgr[k+1]), g * float64(s.bgr[k+2])}
	E := [3]float64{float64(s.cMu[3*i]), float64(s.cMu[3*i+1]), float64(s.cMu[3*i+2])}
	return math.Sqrt(chromaDist2(I, E)), math.Max(math.Sqrt(p.thresh2*float64(s.cVar[i])), p.minChroma), true
}

// chromaDist2 returns the squared chromaticity distortion of colour I
// against background colour E (Horprasert et al. 1999, eq. 4-5, equal
// channel weights): |I - a E|^2 with a = I.E / E.E, written
// I.I - (I.E)^2 / E.E; against a black background (E.E <= 1) it is I.I.
func chromaDist2(I, E [3]float64) float64 {
	ii := I[0]*I[0] + I[1]*I[1] + I[2]*I[2]
	ee := E[0]*E[0] + E[1]*E[1] + E[2]*E[2]
	if ee <= 1 {
		return ii
	}
	ie := I[0]*E[0] + I[1]*E[1] + I[2]*E[2]
	return math.Max(0, ii-ie*ie/ee)
}

// learnBody updates the running body level bodyGrey (an exponential
// average over clearly seen tracked bees) with a blob's body level.
func (s *segmenter) learnBody(body float64) {
	const a = 0.05
	if s.bodyGrey < 0 {
		s.bodyGrey = body
	}
	s.bodyGrey += a * (body - s.bodyGrey)
}

// align estimates the camera shake of the working image by phase
// correlation (Kuglin & Hines 1975) and translates the working image back.
// The reference is a key frame: the first working image after the model
// (re)starts, renewed every shakeKeyS seconds by the current image
// translated back onto it, so it stays sharp (phase correlation against a
// blurred mean underestimates shifts) and in the same place (estimates
// against the background, which is learned from aligned images, could
// drift). A second round on the once-aligned image refines the estimate.
func (s *segmenter) align(dt float64) {
	var dx, dy float64
	ok := true
	for round := 0; round < 2 && ok; round++ {
		src := s.x
		if round > 0 {
			s.warp(s.x, &s.xa, dx, dy)
			src = s.xa
		}
		// cv::phaseCorrelate (OpenCV 4.6) multiplies its inputs by the
		// window in place when their size is already a good DFT size, so
		// it gets windowed copies and no window.
		gocv.Multiply(src, s.hann, &s.pcTmp)
		sh, resp := gocv.PhaseCorrelate(s.ref, s.pcTmp, s.noWindow)
		ddx, ddy := float64(sh.X), float64(sh.Y)
		if !finite(ddx) || !finite(ddy) || resp < 0.02 {
			ok = round > 0 // first round unusable: keep the last estimate
			break
		}
		dx, dy = dx+ddx, dy+ddy
	}
	if !ok || math.Hypot(dx, dy) > s.p.maxShiftWorkPX {
		dx, dy = s.shiftX, s.shiftY
	}
	s.shiftX, s.shiftY = dx, dy
	s.warp(s.x, &s.xa, dx, dy)
	s.x, s.xa = s.xa, s.x
	s.keyAgeS += dt
	if s.keyAgeS >= shakeKeyS {
		gocv.Multiply(s.x, s.hann, &s.ref)
		s.keyAgeS = 0
	}
}

// shakeKeyS is the age at which the key frame for shake is renewed, s.
const shakeKeyS = 20.0

// warp writes src translated by (-dx, -dy) to dst: dst(p) = src(p + d).
func (s *segmenter) warp(src gocv.Mat, dst *gocv.Mat, dx, dy float64) {
	s.warpM.SetDoubleAt(0, 0, 1)
	s.warpM.SetDoubleAt(0, 1, 0)
	s.warpM.SetDoubleAt(0, 2, -dx)
	s.warpM.SetDoubleAt(1, 0, 0)
	s.warpM.SetDoubleAt(1, 1, 1)
	s.warpM.SetDoubleAt(1, 2, -dy)
	gocv.WarpAffineWithParams(src, dst, s.warpM, image.Pt(s.p.workW, s.p.workH), gocv.InterpolationLinear, gocv.BorderReplicate, color.RGBA{})
}

// restart makes the current working image the background and starts the
// cumulative start-up average again.
func (s *segmenter) restart(frame gocv.Mat) {
	s.x.CopyTo(&s.mu)
	s.vr.SetTo(gocv.NewScalar(s.p.varInit, 0, 0, 0))
	s.n = 1
	s.distRunS = 0
	s.shiftX, s.shiftY = 0, 0
	if s.p.stabilize {
		gocv.Multiply(s.x, s.hann, &s.ref)
		s.keyAgeS = 0
	}
	s.skipLearn = true
	s.notDark.SetTo(gocv.NewScalar(255, 0, 0, 0))
	if !s.roi.Empty() {
		gocv.BitwiseAnd(s.notDark, s.roi, &s.notDark)
	}
	for i := range s.cSeen {
		s.cSeen[i] = 0
	}
	s.colour(frame)
	s.small.ConvertTo(&s.muBGR, gocv.MatTypeCV32FC3)
	s.haveSmall = false
}

// colour reduces the frame to the working scale in colour, for the
// colour background shown in plots.
func (s *segmenter) colour(frame gocv.Mat) {
	r := frame.Region(s.crop)
	gocv.Resize(r, &s.small, image.Pt(s.p.workW, s.p.workH), 0, 0, gocv.InterpolationArea)
	r.Close()
	s.haveSmall = true
}

// drawZones marks discs of the frame (px) in the protect mask.
func (s *segmenter) drawZones(zones []protectZone) {
	p := s.p
	k := float64(p.factor)
	for _, z := range zones {
		cx := (z.XPX-(k-1)/2)/k - s.shiftX
		cy := (z.YPX-(k-1)/2)/k - s.shiftY
		r := int(math.Ceil(z.RadiusPX / k))
		if !finite(cx) || !finite(cy) || cx < -float64(r) || cy < -float64(r) || cx > float64(p.workW+r) || cy > float64(p.workH+r) {
			continue
		}
		gocv.Circle(&s.protect, image.Pt(int(math.Round(cx)), int(math.Round(cy))), r, color.RGBA{255, 255, 255, 0}, -1)
	}
}

// learn updates the background with the current frame: the selective
// running Gaussian. zones are discs (frame px) where confirmed bees were
// detected in this frame; together with the zones given to detect they
// are not learned at all.
func (s *segmenter) learn(zones []protectZone, dets []Detection) {
	if s.skipLearn {
		return
	}
	p := s.p
	s.drawZones(zones)
	aBG := alpha(s.dt, p.bgTauS)
	aFG := alpha(s.dt, p.fgTauS)
	aVar := aBG
	c := 1 / float64(s.n+1)
	if float64(s.n) < p.warmS*p.fps {
		// Start-up: cumulative average of the frames so far, so that the
		// first frame (possibly with a bee in it) is soon outweighed. Only
		// for background pixels: what is darker than the frames so far is
		// a bee arriving, not the ghost of one that sat in the first frame
		// (that ghost is brighter than the model).
		aBG = math.Max(aBG, c)
	}
	s.learnChroma(aBG, aFG, math.Max(c, aVar))
	// Variance first, from the deviation against the mean before the
	// update: var <- (1-a) var + a min(d^2, clamp), everywhere but under
	// bees. Foreground pixels count too, so that pixels that keep
	// changing (swaying grass) grow a large variance and stop being
	// foreground; the clamp bounds what one passing bee adds. Background
	// pixels start as a cumulative average until the variance's own rate
	// takes over, so a fresh model learns where the scene sways within
	// the first few sway periods; pixels near a detection are learned at
	// the normal rate, so that a bee hovering in the first seconds does
	// not teach its own pixels a huge variance.
	gocv.BitwiseNot(s.protect, &s.lmask)
	gocv.AccumulatedWeightedWithMask(s.fg, &s.act, alpha(s.dt, p.actTauS), s.lmask)
	gocv.Threshold(s.d2, &s.d2, float32(p.varClamp), 0, gocv.ThresholdTrunc)
	if c <= aVar || len(dets) == 0 {
		gocv.AccumulatedWeightedWithMask(s.d2, &s.vr, math.Max(c, aVar), s.lmask)
	} else {
		// Start-up: near this frame's detections (bee-like blobs, tracked
		// or not) at the normal rate, elsewhere cumulative.
		s.near.SetTo(gocv.NewScalar(0, 0, 0, 0))
		k := float64(p.factor)
		r := int(math.Ceil(0.6 * p.beeLenPX / k))
		for _, d := range dets {
			cx := (d.XPX-(k-1)/2)/k - s.shiftX
			cy := (d.YPX-(k-1)/2)/k - s.shiftY
			gocv.Circle(&s.near, image.Pt(int(math.Round(cx)), int(math.Round(cy))), r, color.RGBA{255, 255, 255, 0}, -1)
		}
		gocv.BitwiseAnd(s.near, s.lmask, &s.tmp)
		gocv.AccumulatedWeightedWithMask(s.d2, &s.vr, aVar, s.tmp)
		gocv.BitwiseOr(s.near, s.protect, &s.tmp)
		gocv.BitwiseNot(s.tmp, &s.tmp)
		gocv.AccumulatedWeightedWithMask(s.d2, &s.vr, c, s.tmp)
	}
	s.vr.SubtractFloat(float32(p.varFloor))
	gocv.Threshold(s.vr, &s.vr, 0, 0, gocv.ThresholdToZero)
	s.vr.AddFloat(float32(p.varFloor))
	// Mean: dark foreground that is not under a confirmed bee at the slow
	// rate aFG (an object that stops and stays is absorbed in about
	// fgTauS); background pixels at aBG; pixels under confirmed bees never.
	gocv.BitwiseAnd(s.darkFg, s.lmask, &s.tmp)
	gocv.AccumulatedWeightedWithMask(s.x, &s.mu, aFG, s.tmp)
	gocv.BitwiseOr(s.darkFg, s.protect, &s.tmp)
	gocv.BitwiseNot(s.tmp, &s.lmask)
	gocv.AccumulatedWeightedWithMask(s.x, &s.mu, aBG, s.lmask)
	// The next frame's gain is measured where this one was background.
	if s.roi.Empty() {
		s.lmask.CopyTo(&s.notDark)
	} else {
		gocv.BitwiseAnd(s.lmask, s.roi, &s.notDark)
	}
	if s.haveSmall {
		a := math.Min(1, alpha(s.dt*float64(p.colourEvery), p.bgTauS))
		if float64(s.n) < p.warmS*p.fps {
			a = math.Max(a, 1/float64(s.n+1))
		}
		gocv.AccumulatedWeightedWithMask(s.small, &s.muBGR, a, s.lmask)
		s.haveSmall = false
	}
	s.n++
}

// blobs labels the dark foreground of the current frame, applies the area
// gate at the working scale and measures the survivors at full size.
func (s *segmenter) blobs(index int) []Detection {
	p := s.p
	gocv.MorphologyEx(s.det, &s.det, gocv.MorphClose, s.kernel)
	n := gocv.ConnectedComponentsWithStats(s.det, &s.labels, &s.stats, &s.cents)
	if n <= 1 {
		return nil
	}
	st := int32s(s.stats)
	c := &refineCtx{
		labels: int32s(s.labels),
		mu:     float32s(s.mu),
		vr:     float32s(s.vr),
	}
	c.grey, _ = s.greyFull.DataPtrUint8()
	var frags []blob
	for i := 1; i < n; i++ {
		r := st[i*5 : i*5+5]
		area := float64(r[4])
		if area < p.minAreaWork || area > p.maxAreaWork {
			continue
		}
		box := image.Rect(int(r[0]), int(r[1]), int(r[0]+r[2]), int(r[1]+r[3]))
		frags = append(frags, s.refine(c, int32(i), box)...)
	}
	frags = mergeFragments(frags, p.beeLenPX)
	var out []Detection
	for _, b := range frags {
		if d, ok := b.detection(index, p); ok {
			out = append(out, d)
		}
	}
	return out
}

// blob holds the weighted moment sums of one blob in frame coordinates,
// px: m0 = sum w, mx = sum w x, mxx = sum w x^2, ...
type blob struct {
	m0, mx, my, mxx, mxy, myy float64
	area, body                int // foreground and body pixels
	box                       image.Rectangle
	seed                      int // index of the track prediction it belongs to, -1 if none
}

// shape returns the centroid, the full axes of the moment ellipse and the
// orientation of its major axis (degrees counter-clockwise on screen from
// +x, in [0, 180)).
func (b blob) shape() (xc, yc, major, minor, angDeg float64) {
	xc, yc = b.mx/b.m0, b.my/b.m0
	cxx := b.mxx/b.m0 - xc*xc
	cxy := b.mxy/b.m0 - xc*yc
	cyy := b.myy/b.m0 - yc*yc
	tr, det := cxx+cyy, cxx*cyy-cxy*cxy
	disc := math.Sqrt(math.Max(0, tr*tr/4-det))
	l1, l2 := tr/2+disc, math.Max(0, tr/2-disc)
	major, minor = 4*math.Sqrt(l1), 4*math.Sqrt(l2)
	// In image coordinates (y down) the orientation 0.5 atan2(2cxy,
	// cxx-cyy) is clockwise on screen; Detection wants counter-clockwise.
	angDeg = math.Mod(-0.5*math.Atan2(2*cxy, cxx-cyy)*180/math.Pi+360, 180)
	return
}

func (b blob) merged(o blob) blob {
	return blob{
		m0: b.m0 + o.m0, mx: b.mx + o.mx, my: b.my + o.my,
		mxx: b.mxx + o.mxx, mxy: b.mxy + o.mxy, myy: b.myy + o.myy,
		area: b.area + o.area, body: b.body + o.body, box: b.box.Union(o.box),
		seed: max(b.seed, o.seed),
	}
}

// mergeFragments joins blobs that are parts of one bee: a bee crossing a
// dark flower centre or a dark stem is cut in two where it has no
// contrast. Two blobs merge when their centroids are closer than 0.8 body
// lengths and the merged moment ellipse is at most 1.3 body lengths long,
// closest pair first. Two bees that overlap that much are one blob anyway.
func mergeFragments(fr []blob, bl float64) []blob {
	for {
		bi, bj, best := -1, -1, 0.8*bl
		for i := range fr {
			xi, yi, _, _, _ := fr[i].shape()
			for j := i + 1; j < len(fr); j++ {
				if fr[i].seed >= 0 && fr[j].seed >= 0 && fr[i].seed != fr[j].seed {
					continue // parts of two different tracked bees
				}
				xj, yj, _, _, _ := fr[j].shape()
				if d := math.Hypot(xi-xj, yi-yj); d < best {
					if _, _, maj, _, _ := fr[i].merged(fr[j]).shape(); maj <= 1.3*bl {
						bi, bj, best = i, j, d
					}
				}
			}
		}
		if bi < 0 {
			return fr
		}
		fr[bi] = fr[bi].merged(fr[bj])
		fr = append(fr[:bj], fr[bj+1:]...)
	}
}

// detection applies the shape gates and returns the detection of b.
func (b blob) detection(index int, p segParams) (Detection, bool) {
	if b.m0 <= 0 || b.area == 0 || float64(b.body) < p.minBodyPX {
		return Detection{}, false
	}
	xc, yc, major, minor, ang := b.shape()
	if major > p.maxLenPX || minor < p.minWidthPX || major/minor > p.maxElong || float64(b.area) < p.minAreaPX {
		return Detection{}, false
	}
	return Detection{
		Frame: index, XPX: xc, YPX: yc,
		AreaPX: float64(b.area), MajorPX: major, MinorPX: minor, AngleDeg: ang,
		Box: b.box,
	}, true
}

// refineCtx holds raw views of the images the refinement reads.
type refineCtx struct {
	labels []int32   // working scale
	mu, vr []float32 // working scale
	grey   []uint8   // full size
}

// refine measures blob id (bounding box box, working px) on the full-size
// grey frame, in a window around it. A pixel of the window belongs to the
// blob if its working-scale cell or one of the 8 around it has label id.
// Its background b is bilinearly interpolated from the working scale, and
// its brightness I is scaled by the frame's gain.
//
// Foreground pixels, b - I > t with t = max(ThresholdSigma sqrt(var),
// MinContrastGrey), make the area and the bounding box.
//
// The position and shape come from the bee's body only. A shadow dims the
// ground by a fraction, I >= rho b, where a bee's body is dark whatever it
// covers (the lower bound of the brightness-ratio test for shadow pixels of
// Cucchiara et al. 2003, rho = ShadowRatio). Every pixel enters the
// moments with the body-coverage weight w of weigh (0 for shadow, 1
// inside the body):
//
//	xc = sum w x / sum w,  yc = sum w y / sum w,
//	C  = sum w (p - pc)(p - pc)' / sum w,
//
// an intensity-weighted centroid that neither a shadow nor the texture of
// the ground pulls aside. The fitted ellipse has full axes 4 sqrt(lambda_1,2) of C
// (exact for a uniform ellipse) and orientation 0.5 atan2(2 C_xy, C_xx -
// C_yy). A blob with fewer than minBodyPX pixels with w > 0 is a shadow or
// a dimmed patch, not a bee, and is dropped (by blob.detection).
//
// A blob at least splitAreaPX large that holds the predicted positions of
// two or more confirmed tracks is two bees touching: it is split among
// them (split).
func (s *segmenter) refine(c *refineCtx, id int32, box image.Rectangle) []blob {
	p := s.p
	k := p.factor
	kf := float64(k)
	half := (kf - 1) / 2
	sx, sy := s.shiftX*kf, s.shiftY*kf
	x0 := max(0, int(math.Floor(float64(box.Min.X*k)+sx))-k)
	y0 := max(0, int(math.Floor(float64(box.Min.Y*k)+sy))-k)
	x1 := min(s.frameW, int(math.Ceil(float64(box.Max.X*k)+sx))+k)
	y1 := min(s.frameH, int(math.Ceil(float64(box.Max.Y*k)+sy))+k)
	W, H := p.workW, p.workH
	// Membership per working cell of the window, dilated by one cell:
	// computed once per cell rather than once per full-size pixel.
	gx0 := max(0, int(math.Floor((float64(x0)-sx)/kf))-1)
	gy0 := max(0, int(math.Floor((float64(y0)-sy)/kf))-1)
	gx1 := min(W-1, int(math.Floor((float64(x1-1)-sx)/kf))+1)
	gy1 := min(H-1, int(math.Floor((float64(y1-1)-sy)/kf))+1)
	gw, gh := gx1-gx0+1, gy1-gy0+1
	if gw <= 0 || gh <= 0 {
		return nil
	}
	grid := s.grid[:0]
	for i := 0; i < gw*gh; i++ {
		grid = append(grid, false)
	}
	s.grid = grid
	for yy := max(0, gy0-1); yy <= min(H-1, gy1+1); yy++ {
		for xx := max(0, gx0-1); xx <= min(W-1, gx1+1); xx++ {
			if c.labels[yy*W+xx] != id {
				continue
			}
			for dy := -1; dy <= 1; dy++ {
				for dx := -1; dx <= 1; dx++ {
					if gx, gy := xx+dx-gx0, yy+dy-gy0; gx >= 0 && gy >= 0 && gx < gw && gy < gh {
						grid[gy*gw+gx] = true
					}
				}
			}
		}
	}
	member := func(cx, cy int) bool {
		gx, gy := cx-gx0, cy-gy0
		return gx >= 0 && gy >= 0 && gx < gw && gy < gh && grid[gy*gw+gx]
	}
	bilin := func(img []float32, u, v float64) float64 {
		u = math.Min(math.Max(u, 0), float64(W-1))
		v = math.Min(math.Max(v, 0), float64(H-1))
		iu, iv := int(u), int(v)
		fu, fv := u-float64(iu), v-float64(iv)
		iu1, iv1 := min(iu+1, W-1), min(iv+1, H-1)
		a := float64(img[iv*W+iu])*(1-fu) + float64(img[iv*W+iu1])*fu
		b := float64(img[iv1*W+iu])*(1-fu) + float64(img[iv1*W+iu1])*fu
		return a*(1-fv) + b*fv
	}
	// lowest returns the darkest of the four working cells bilinear
	// interpolation at (u, v) draws on.
	lowest := func(img []float32, u, v float64) float64 {
		u = math.Min(math.Max(u, 0), float64(W-1))
		v = math.Min(math.Max(v, 0), float64(H-1))
		iu, iv := int(u), int(v)
		iu1, iv1 := min(iu+1, W-1), min(iv+1, H-1)
		return float64(min(img[iv*W+iu], img[iv*W+iu1], img[iv1*W+iu], img[iv1*W+iu1]))
	}
	g := s.gain
	rho := p.shadowRatio
	s.pix = s.pix[:0]
	for y := y0; y < y1; y++ {
		cy := int(math.Floor((float64(y) - sy) / kf))
		v := (float64(y) - sy - half) / kf
		for x := x0; x < x1; x++ {
			cx := int(math.Floor((float64(x) - sx) / kf))
			if !member(cx, cy) {
				continue
			}
			u := (float64(x) - sx - half) / kf
			b := bilin(c.mu, u, v)
			I := g * float64(c.grey[y*s.frameW+x])
			fg := b-I > math.Max(math.Sqrt(p.thresh2*bilin(c.vr, u, v)), p.minContrast)
			blind := s.bodyGrey >= 0 && rho*b-s.bodyGrey < p.minContrast && s.nearSeed(float64(x), float64(y))
			if fg || rho*b > I || blind {
				q := pixel{x: int32(x), y: int32(y), b: float32(b), i: float32(I), fg: fg, blind: blind}
				if blind {
					// The ground under a pixel may be as dark as the
					// darkest cell b is interpolated from (see weigh).
					q.b = float32(math.Min(b, lowest(c.mu, u, v)))
					if cd, tc, ok := s.chromaAt(x, y, u, v); ok && cd > tc {
						q.cw = float32(math.Min(1, (cd-tc)/tc))
						q.fg = true
					}
				}
				s.pix = append(s.pix, q)
			}
		}
	}
	body := s.weigh(rho)
	whole := blobOf(s.pix)
	if whole.m0 <= 0 || whole.area == 0 {
		return nil
	}
	// Seeds (predicted positions of confirmed tracks) inside the blob.
	bb := whole.box.Inset(-int(0.25 * p.beeLenPX))
	var in []int
	for i, sd := range s.seeds {
		if image.Pt(int(sd.XPX), int(sd.YPX)).In(bb) {
			in = append(in, i)
		}
	}
	if len(in) < 2 || float64(whole.area) < p.splitAreaPX {
		whole.seed = nearestSeed(whole, s.seeds, 0.6*p.beeLenPX)
		if whole.seed >= 0 && float64(len(s.dark)) >= p.minBodyPX && !s.anyBlind() {
			s.learnBody(body) // a tracked bee, clearly seen
		}
		return []blob{whole}
	}
	return s.split(in)
}

// pixel is one pixel of a blob at full size: background b (on blind
// ground the darkest it may be, see weigh) and brightness I (grey
// levels), weight w (see weigh), whether it is foreground, whether
// it lies on blind ground (see chroma) and, there, its colour weight cw
// (see weigh).
type pixel struct {
	x, y  int32
	b, i  float32
	w, cw float32
	fg    bool
	blind bool
}

// anyBlind reports whether a pixel of the current blob lies on blind ground.
func (s *segmenter) anyBlind() bool {
	for _, q := range s.pix {
		if q.blind {
			return true
		}
	}
	return false
}

// weigh sets the weights of the blob's pixels and returns the body level
// I_body used (-1 if none): how much of each pixel is covered by dark bee
// body, from its brightness between the darkest body level and the
// darkest a shadow could make the ground,
//
//	w = clamp((rho b - I) / (rho b - I_body), 0, 1),
//
// where I_body is the 10th percentile of I over the pixels darker than
// rho b (the running bodyGrey when there are none). Inside the body w = 1
// whatever the ground; a shadow (I >= rho b) gets 0; the soft edge gets a
// share that grows with the pixel's coverage, the same on every side. So
// the weighted centroid is that of the body's outline, not pulled toward
// the side with the brighter ground, as plain darkness weights (b - I)
// would be.
//
// On blind ground (see chroma), where darkness cannot show the body, a
// pixel of another colour than the background (CD > t_c, see chromaAt) is
// body too: w = max(w, cw), cw = clamp((CD - t_c) / t_c, 0, 1). Elsewhere
// colour does not enter the weights, so that wings and pale bands over
// bright ground do not move the centroid.
//
// The background b of a full-size pixel is interpolated from the working
// scale, so on the dark side of a sharp edge (the rim of a dark flower
// centre against bright petals) it is brighter than the ground really
// is, and there a shadow passes I < rho b and counts as body. A settling
// bee's shadow, sliding under it across the rim as it comes down, pulled
// the centroid toward the shadow by about 2 px over half a second, long
// enough to delay the start of a landing. So on blind ground, where such
// rims are, b is the darkest of the working cells it is interpolated from
// (refine): a pixel is body by darkness only if it is darker than a
// shadow on any ground it may show. Elsewhere b stays interpolated, so a
// body over bright ground beside a dark rim keeps its weight.
func (s *segmenter) weigh(rho float64) float64 {
	dark := s.dark[:0]
	for _, q := range s.pix {
		if rho*float64(q.b) > float64(q.i) {
			dark = append(dark, q.i)
		}
	}
	s.dark = dark
	body := s.bodyGrey
	if len(dark) > 0 {
		sort.Slice(dark, func(i, j int) bool { return dark[i] < dark[j] })
		body = float64(dark[len(dark)/10])
	}
	for i, q := range s.pix {
		den := rho*float64(q.b) - body
		w := 0.0
		if den > 0 && body >= 0 {
			w = math.Min(1, math.Max(0, (rho*float64(q.b)-float64(q.i))/den))
		}
		if q.blind {
			w = math.Max(w, float64(q.cw))
		}
		s.pix[i].w = float32(w)
	}
	return body
}

// blobOf sums the moments, area, body count and box of pixels.
func blobOf(px []pixel) blob {
	var b blob
	bx0, by0, bx1, by1 := math.MaxInt32, math.MaxInt32, math.MinInt32, math.MinInt32
	b.seed = -1
	for _, q := range px {
		x, y, w := float64(q.x), float64(q.y), float64(q.w)
		if q.fg {
			b.area++
			bx0, by0 = min(bx0, int(q.x)), min(by0, int(q.y))
			bx1, by1 = max(bx1, int(q.x)+1), max(by1, int(q.y)+1)
		}
		if w > 0 {
			b.body++
			b.m0 += w
			b.mx += w * x
			b.my += w * y
			b.mxx += w * x * x
			b.mxy += w * x * y
			b.myy += w * y * y
		}
	}
	if b.area > 0 {
		b.box = image.Rect(bx0, by0, bx1, by1)
	}
	return b
}

// split divides the pixels of a blob that holds the predicted positions
// of several confirmed tracks (bees touching or overlapping) among them:
// weighted k-means (Lloyd 1982) started at the predictions, 4 rounds,
// each pixel to the nearest centre. It returns one blob per non-empty
// part, each tagged with its seed so that mergeFragments keeps them apart.
func (s *segmenter) split(in []int) []blob {
	if len(in) > 4 {
		in = in[:4]
	}
	cx := make([]float64, len(in))
	cy := make([]float64, len(in))
	for i, j := range in {
		cx[i], cy[i] = s.seeds[j].XPX, s.seeds[j].YPX
	}
	lab := s.lab[:0]
	for range s.pix {
		lab = append(lab, 0)
	}
	s.lab = lab
	for round := 0; round < 4; round++ {
		for i, q := range s.pix {
			best, bd := 0, math.Inf(1)
			for c := range cx {
				if d := (float64(q.x)-cx[c])*(float64(q.x)-cx[c]) + (float64(q.y)-cy[c])*(float64(q.y)-cy[c]); d < bd {
					best, bd = c, d
				}
			}
			lab[i] = best
		}
		if round == 3 {
			break
		}
		for c := range cx {
			var m0, mx, my float64
			for i, q := range s.pix {
				if lab[i] == c && q.w > 0 {
					m0 += float64(q.w)
					mx += float64(q.w) * float64(q.x)
					my += float64(q.w) * float64(q.y)
				}
			}
			if m0 > 0 {
				cx[c], cy[c] = mx/m0, my/m0
			}
		}
	}
	var out []blob
	part := s.part[:0]
	for c := range cx {
		part = part[:0]
		for i, q := range s.pix {
			if lab[i] == c {
				part = append(part, q)
			}
		}
		b := blobOf(part)
		if b.m0 > 0 && b.area > 0 {
			b.seed = in[c]
			out = append(out, b)
		}
	}
	s.part = part
	return out
}

// nearestSeed returns the index of the seed nearest to b's centroid
// within r px, or -1.
func nearestSeed(b blob, seeds []protectZone, r float64) int {
	if b.m0 <= 0 {
		return -1
	}
	x, y := b.mx/b.m0, b.my/b.m0
	best, bd := -1, r*r
	for i, sd := range seeds {
		if d := (sd.XPX-x)*(sd.XPX-x) + (sd.YPX-y)*(sd.YPX-y); d <= bd {
			best, bd = i, d
		}
	}
	return best
}

// background writes the colour background model, enlarged to the frame
// size, to dst (8-bit BGR).
func (s *segmenter) background(dst *gocv.Mat) {
	if s.muBGR.Empty() {
		z := gocv.NewMatWithSizeFromScalar(gocv.NewScalar(0, 0, 0, 0), s.frameH, s.frameW, gocv.MatTypeCV8UC3)
		z.CopyTo(dst)
		z.Close()
		return
	}
	tmp := gocv.NewMat()
	defer tmp.Close()
	s.muBGR.ConvertTo(&tmp, gocv.MatTypeCV8UC3)
	gocv.Resize(tmp, dst, image.Pt(s.frameW, s.frameH), 0, 0, gocv.InterpolationLinear)
}

// int32s and float32s view the data of a continuous Mat without copying;
// the views are valid until the Mat is reallocated or closed.
func int32s(m gocv.Mat) []int32 {
	b, err := m.DataPtrUint8()
	if err != nil || len(b) < 4 {
		return nil
	}
	return unsafe.Slice((*int32)(unsafe.Pointer(&b[0])), len(b)/4)
}

func float32s(m gocv.Mat) []float32 {
	f, err := m.DataPtrFloat32()
	if err != nil {
		panic("track: " + err.Error())
	}
	return f
}
