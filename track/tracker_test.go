package track

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gocv.io/x/gocv"
)

// synth draws small synthetic frames: a textured grey-green ground and
// dark bees (soft-edged ellipses, coverage by 4x4 supersampling) with
// optional soft shadows. Positions are exact ground truth, px, pixel
// centres at integer coordinates.
type synth struct {
	w, h   int
	ground []uint8 // BGR
	rng    *rand.Rand
	noise  float64 // grey levels

	img      []float32 // scratch
	noiseTab []float32
}

type synthBee struct {
	x, y, lenPX, widPX, angDeg float64 // angle counter-clockwise on screen from +x
	grey                       float64 // body grey level; < 0: no body, shadow only
	shadow                     float64 // 0 = none, else darkening fraction of the ground
}

func newSynth(w, h int, seed uint64, noise float64) *synth {
	s := &synth{w: w, h: h, ground: make([]uint8, w*h*3), rng: rand.New(rand.NewPCG(seed, 1)), noise: noise}
	// Smooth texture: a sum of a few random sinusoids around mid grey-green.
	type wave struct{ fx, fy, ph, amp float64 }
	var ws []wave
	for i := 0; i < 6; i++ {
		ws = append(ws, wave{s.rng.Float64() * 0.08, s.rng.Float64() * 0.08, s.rng.Float64() * 6.3, 4 + 6*s.rng.Float64()})
	}
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			v := 0.0
			for _, q := range ws {
				v += q.amp * math.Sin(q.fx*float64(x)+q.fy*float64(y)+q.ph)
			}
			o := (y*w + x) * 3
			s.ground[o] = uint8(clamp255(90 + v))
			s.ground[o+1] = uint8(clamp255(140 + v))
			s.ground[o+2] = uint8(clamp255(120 + v))
		}
	}
	return s
}

func clamp255(v float64) float64 { return math.Max(0, math.Min(255, v)) }

// coverage returns the fraction of pixel (px, py) inside the ellipse.
func coverage(px, py int, cx, cy, a, b, th float64) float64 {
	c, s := math.Cos(th), math.Sin(th)
	n := 0
	for i := 0; i < 4; i++ {
		for j := 0; j < 4; j++ {
			dx := float64(px) - 0.375 + 0.25*float64(i) - cx
			dy := float64(py) - 0.375 + 0.25*float64(j) - cy
			u := dx*c + dy*s
			v := -dx*s + dy*c
			if (u/a)*(u/a)+(v/b)*(v/b) <= 1 {
				n++
			}
		}
	}
	return float64(n) / 16
}

// frame renders the bees into dst (8-bit BGR, w x h), with sensor noise
// taken at a random offset from a table of Gaussian noise.
func (s *synth) frame(dst *gocv.Mat, bees []synthBee) {
	if dst.Empty() || dst.Rows() != s.h || dst.Cols() != s.w {
		*dst = gocv.NewMatWithSize(s.h, s.w, gocv.MatTypeCV8UC3)
	}
	d, _ := dst.DataPtrUint8()
	img := s.img[:0]
	for _, v := range s.ground {
		img = append(img, float32(v))
	}
	s.img = img
	for _, b := range bees {
		// Image angle (y down) is minus the on-screen angle.
		th := -b.angDeg * math.Pi / 180
		a, bb := b.lenPX/2, b.widPX/2
		r := int(a) + 3
		if b.shadow > 0 {
			// Offset down-right, a little larger than the body, soft.
			sx, sy := b.x+0.06*b.lenPX, b.y+0.1*b.lenPX
			for y := max(0, int(sy)-r-3); y <= min(s.h-1, int(sy)+r+3); y++ {
				for x := max(0, int(sx)-r-3); x <= min(s.w-1, int(sx)+r+3); x++ {
					c := coverage(x, y, sx, sy, a*1.1+1, bb*1.3+1, th)
					for k := 0; k < 3; k++ {
						img[(y*s.w+x)*3+k] *= float32(1 - b.shadow*c)
					}
				}
			}
		}
		if b.grey < 0 {
			continue // shadow only
		}
		for y := max(0, int(b.y)-r); y <= min(s.h-1, int(b.y)+r); y++ {
			for x := max(0, int(b.x)-r); x <= min(s.w-1, int(b.x)+r); x++ {
				c := float32(coverage(x, y, b.x, b.y, a, bb, th))
				for k := 0; k < 3; k++ {
					o := (y*s.w+x)*3 + k
					img[o] = img[o]*(1-c) + float32(b.grey)*c
				}
			}
		}
	}
	if s.noiseTab == nil {
		s.noiseTab = make([]float32, len(img)+4096)
		for i := range s.noiseTab {
			s.noiseTab[i] = float32(s.noise * s.rng.NormFloat64())
		}
	}
	nz := s.noiseTab[s.rng.IntN(4096):]
	for i, v := range img {
		d[i] = uint8(max(0, min(255, v+nz[i]+0.5)))
	}
}

// synthSettings: a 14 mm bee at 2 px/mm is 28 px long.
func synthSettings() Settings { return Settings{PXPerMM: 2, BodyLengthMM: 14} }

func synthInfo(w, h int) VideoInfo {
	return VideoInfo{Path: "synthetic", WidthPX: w, HeightPX: h, FPS: 30, Backend: "none"}
}

// detectOne learns an empty background for 15 frames, then shows the bees
// and returns the detections of that frame.
func detectOne(t *testing.T, s Settings, sy *synth, bees []synthBee) []Detection {
	t.Helper()
	var dets []Detection
	show := func(i int) []synthBee {
		if i < 15 {
			return nil
		}
		return bees
	}
	runSynth(t, s, sy, 16, show, func(i int, tr *Tracker) {
		if i == 15 {
			dets = append([]Detection(nil), tr.Detections()...)
		}
	})
	return dets
}

// TestDetectionGeometry: centroid, axes and orientation of single bees
// against the synthetic ground truth they were drawn from.
func TestDetectionGeometry(t *testing.T) {
	for _, tc := range []struct {
		name         string
		b            synthBee
		tolPX        float64 // centroid
		tolAxis      float64 // relative, axes
		tolDeg       float64
		checkAngle   bool
		checkMinorOK bool
	}{
		{"horizontal", synthBee{x: 160.3, y: 120.7, lenPX: 28, widPX: 12.6, angDeg: 0, grey: 30}, 0.15, 0.1, 2, true, true},
		{"30 deg", synthBee{x: 101.6, y: 80.2, lenPX: 28, widPX: 12.6, angDeg: 30, grey: 30}, 0.15, 0.1, 2, true, true},
		{"vertical", synthBee{x: 220.5, y: 150.5, lenPX: 28, widPX: 12.6, angDeg: 90, grey: 30}, 0.15, 0.1, 2, true, true},
		{"135 deg", synthBee{x: 60.9, y: 170.1, lenPX: 28, widPX: 12.6, angDeg: 135, grey: 30}, 0.15, 0.1, 2, true, true},
		{"small honeybee", synthBee{x: 200.25, y: 60.75, lenPX: 24, widPX: 9, angDeg: 60, grey: 40}, 0.2, 0.12, 3, true, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			sy := newSynth(320, 240, 7, 2)
			dets := detectOne(t, synthSettings(), sy, []synthBee{tc.b})
			if len(dets) != 1 {
				t.Fatalf("%d detections, want 1: %+v", len(dets), dets)
			}
			d := dets[0]
			if e := math.Hypot(d.XPX-tc.b.x, d.YPX-tc.b.y); e > tc.tolPX {
				t.Errorf("centroid (%.3f, %.3f), truth (%.3f, %.3f): error %.3f px > %.2f", d.XPX, d.YPX, tc.b.x, tc.b.y, e, tc.tolPX)
			}
			if math.Abs(d.MajorPX/tc.b.lenPX-1) > tc.tolAxis || math.Abs(d.MinorPX/tc.b.widPX-1) > 2*tc.tolAxis {
				t.Errorf("axes %.2f x %.2f px, truth %.1f x %.1f", d.MajorPX, d.MinorPX, tc.b.lenPX, tc.b.widPX)
			}
			dAng := math.Mod(math.Abs(d.AngleDeg-tc.b.angDeg), 180)
			dAng = math.Min(dAng, 180-dAng)
			if dAng > tc.tolDeg || d.AngleDeg < 0 || d.AngleDeg >= 180 {
				t.Errorf("angle %.2f deg, truth %.1f", d.AngleDeg, tc.b.angDeg)
			}
			if !image.Pt(int(tc.b.x), int(tc.b.y)).In(d.Box) || d.AreaPX < 0.6*math.Pi/4*tc.b.lenPX*tc.b.widPX {
				t.Errorf("box %v area %.0f px^2 for a bee at (%.1f, %.1f) of %.0f px^2", d.Box, d.AreaPX, tc.b.x, tc.b.y, math.Pi/4*tc.b.lenPX*tc.b.widPX)
			}
		})
	}
}

// TestDetectionShadow: a soft shadow beside the bee (the ground dimmed to
// 62 %) must not pull the centroid aside. The shadow-aware weights
// (ShadowRatio 0.55) are compared with weighting every darkened pixel
// (ShadowRatio 1), which the shadow does pull.
func TestDetectionShadow(t *testing.T) {
	b := synthBee{x: 150.4, y: 110.6, lenPX: 28, widPX: 12.6, angDeg: 20, grey: 30, shadow: 0.38}
	errFor := func(ratio float64) float64 {
		s := synthSettings()
		s.ShadowRatio = ratio
		dets := detectOne(t, s, newSynth(320, 240, 11, 2), []synthBee{b})
		if len(dets) != 1 {
			t.Fatalf("ShadowRatio %g: %d detections, want 1", ratio, len(dets))
		}
		return math.Hypot(dets[0].XPX-b.x, dets[0].YPX-b.y)
	}
	aware, naive := errFor(0.55), errFor(1)
	t.Logf("centroid error with shadow: %.3f px shadow-aware, %.3f px all darkening", aware, naive)
	if aware > 0.3 {
		t.Errorf("shadow-aware centroid error %.3f px > 0.3", aware)
	}
	if naive < 2*aware {
		t.Errorf("all-darkening error %.3f px not clearly worse than shadow-aware %.3f px", naive, aware)
	}
	// A shadow alone (a bee out of the picture above) is no detection.
	if dets := detectOne(t, synthSettings(), newSynth(320, 240, 12, 2), []synthBee{{x: 100, y: 100, lenPX: 28, widPX: 12.6, grey: -1, shadow: 0.38}}); len(dets) != 0 {
		t.Errorf("shadow alone gave detections %+v", dets)
	}
}

// runSynth steps a Tracker through frames made by frameBees(i).
func runSynth(t *testing.T, s Settings, sy *synth, n int, frameBees func(i int) []synthBee, each func(i int, tr *Tracker)) []Track {
	t.Helper()
	tr, err := NewTracker(s, synthInfo(sy.w, sy.h))
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	m := gocv.NewMat()
	defer m.Close()
	for i := 0; i < n; i++ {
		sy.frame(&m, frameBees(i))
		if err := tr.Step(FrameInfo{Index: i, TimeS: float64(i) / 30}, m); err != nil {
			t.Fatal(err)
		}
		if each != nil {
			each(i, tr)
		}
	}
	return tr.Finish()
}

// TestLandedBeeNotAbsorbed: a bee flies across the picture, sits still
// for 40 s and flies off. With the selective update it is detected in
// every frame of the landing; with protection switched off
// (ProtectAfterBL so large that no track qualifies; the bee starts
// inside the picture, so it does not qualify by flying in at the border
// either) the same bee is learned into the background within seconds,
// which shows what the check guards against.
func TestLandedBeeNotAbsorbed(t *testing.T) {
	const fps, inF, sitF, outF = 30, 40, 40 * 30, 40
	n := inF + sitF + outF
	path := func(i int) []synthBee {
		x, y := 160.0, 120.0
		switch {
		case i < inF:
			x = 60 + 100*float64(i)/inF
		case i >= inF+sitF:
			x = 160 + 200*float64(i-inF-sitF)/outF
		}
		if x > 340 {
			return nil
		}
		return []synthBee{{x: x, y: y, lenPX: 28, widPX: 12.6, angDeg: 0, grey: 30}}
	}
	seen := func(s Settings) (float64, int) {
		hits := 0
		tracks := runSynth(t, s, newSynth(320, 240, 3, 2), n, path, func(i int, tr *Tracker) {
			if i >= inF && i < inF+sitF {
				for _, d := range tr.Detections() {
					if math.Hypot(d.XPX-160, d.YPX-120) < 3 {
						hits++
					}
				}
			}
		})
		return float64(hits) / sitF, len(tracks)
	}
	frac, ntr := seen(synthSettings())
	t.Logf("protected: detected in %.1f %% of the %d landed frames, %d track(s)", 100*frac, sitF, ntr)
	if frac < 0.99 || ntr != 1 {
		t.Errorf("landed bee detected in %.1f %% of frames, %d tracks; want >= 99 %% and 1 track", 100*frac, ntr)
	}
	off := synthSettings()
	off.ProtectAfterBL = 100
	frac, _ = seen(off)
	t.Logf("unprotected: detected in %.1f %% of the landed frames", 100*frac)
	if frac > 0.5 {
		t.Errorf("without protection the bee stayed visible in %.1f %% of frames: the check cannot fail", 100*frac)
	}
}

// TestTouchingBeesSplit: two bees fly in from the sides and stop side by
// side, touching (centres 0.5 body lengths apart across their length).
// Their blob is split between the two tracks' predictions: two
// detections, each on its bee.
func TestTouchingBeesSplit(t *testing.T) {
	const n = 75
	pos := func(i int) (float64, float64) {
		// From x = -20 and 340 (outside) to both at 160 over 30 frames
		// (6 px per frame), braking over the last third; then still.
		f := math.Min(1, float64(i)/30)
		if f > 2.0/3 {
			g := (f - 2.0/3) * 3
			f = 2.0/3 + (1.0/3)*(2*g-g*g)
		}
		return -20 + 180*f, 340 - 180*f
	}
	bees := func(i int) []synthBee {
		x1, x2 := pos(i)
		return []synthBee{
			{x: x1, y: 113, lenPX: 28, widPX: 12.6, angDeg: 0, grey: 30},
			{x: x2, y: 127, lenPX: 28, widPX: 12.6, angDeg: 0, grey: 30},
		}
	}
	worst, twoDets, touching := 0.0, 0, 0
	tracks := runSynth(t, synthSettings(), newSynth(320, 240, 5, 2), n, bees, func(i int, tr *Tracker) {
		x1, x2 := pos(i)
		if x2-x1 > 28 {
			return // not yet touching
		}
		touching++
		dets := tr.Detections()
		if len(dets) != 2 {
			return
		}
		twoDets++
		for _, d := range dets {
			e := math.Min(math.Hypot(d.XPX-x1, d.YPX-113), math.Hypot(d.XPX-x2, d.YPX-127))
			worst = math.Max(worst, e)
		}
	})
	t.Logf("touching frames with two detections: %d of %d, worst error %.2f px, tracks %d", twoDets, touching, worst, len(tracks))
	if twoDets < touching*9/10 || worst > 3 || len(tracks) != 2 {
		t.Errorf("two detections in %d of %d touching frames (worst error %.2f px), %d tracks; want >= 90 %%, <= 3 px, 2 tracks", twoDets, touching, worst, len(tracks))
	}
}

// TestDisturbedFrames: a frame half covered by a bright box (as in
// Megamind_bugy.avi) gives no detections and is not learned; when the
// change stays for ResetAfterS the background restarts.
func TestDisturbedFrames(t *testing.T) {
	sy := newSynth(320, 240, 9, 2)
	tr, err := NewTracker(synthSettings(), synthInfo(320, 240))
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	m := gocv.NewMat()
	defer m.Close()
	bee := []synthBee{{x: 100, y: 100, lenPX: 28, widPX: 12.6, grey: 30}}
	for i := 0; i < 100; i++ {
		bee[0].x = 40 + 2*float64(i)
		sy.frame(&m, bee)
		if i == 50 || i >= 70 {
			gocv.Rectangle(&m, image.Rect(0, 0, 320, 130), color.RGBA{250, 250, 250, 0}, -1)
		}
		if err := tr.Step(FrameInfo{Index: i, TimeS: float64(i) / 30}, m); err != nil {
			t.Fatal(err)
		}
		if i == 50 && len(tr.Detections()) != 0 {
			t.Errorf("disturbed frame 50 gave %d detections", len(tr.Detections()))
		}
	}
	st := tr.Stats()
	t.Logf("%+v", st)
	// Frame 50, then frames 70.. until the restart after 1 s (30 frames).
	if st.DisturbedFrames < 31 || st.DisturbedFrames > 33 || st.BackgroundResets != 1 {
		t.Errorf("disturbed %d, resets %d; want 31..33 and 1", st.DisturbedFrames, st.BackgroundResets)
	}
}

// TestROIMask: a bee in the black half of the mask is not detected, one
// in the white half is; bad mask files give errors naming them.
func TestROIMask(t *testing.T) {
	dir := t.TempDir()
	mask := gocv.NewMatWithSize(120, 160, gocv.MatTypeCV8U) // half size, same shape
	defer mask.Close()
	gocv.Rectangle(&mask, image.Rect(80, 0, 160, 120), color.RGBA{255, 255, 255, 0}, -1)
	path := filepath.Join(dir, "roi.png")
	if !gocv.IMWrite(path, mask) {
		t.Fatal("writing mask")
	}
	s := synthSettings()
	s.ROIMaskPath = path
	sy := newSynth(320, 240, 13, 2)
	left := detectOne(t, s, sy, []synthBee{{x: 70, y: 120, lenPX: 28, widPX: 12.6, grey: 30}})
	right := detectOne(t, s, sy, []synthBee{{x: 250, y: 120, lenPX: 28, widPX: 12.6, grey: 30}})
	if len(left) != 0 || len(right) != 1 {
		t.Errorf("detections: %d in the ignored half (want 0), %d in the analysed half (want 1)", len(left), len(right))
	}

	wide := gocv.NewMatWithSize(100, 400, gocv.MatTypeCV8U)
	defer wide.Close()
	wide.SetTo(gocv.NewScalar(255, 0, 0, 0))
	black := gocv.NewMatWithSize(120, 160, gocv.MatTypeCV8U)
	defer black.Close()
	widePath, blackPath := filepath.Join(dir, "wide.png"), filepath.Join(dir, "black.png")
	gocv.IMWrite(widePath, wide)
	gocv.IMWrite(blackPath, black)
	textPath := filepath.Join(dir, "notes.png")
	os.WriteFile(textPath, []byte("not an image"), 0o644)
	for _, tc := range []struct{ path, want string }{
		{filepath.Join(dir, "missing.png"), "cannot read"},
		{textPath, "cannot read"},
		{widePath, "shape"},
		{blackPath, "no white"},
	} {
		s.ROIMaskPath = tc.path
		_, err := NewTracker(s, synthInfo(320, 240))
		if err == nil || !strings.Contains(err.Error(), tc.path) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("mask %s: error %v, want one naming the file and saying %q", tc.path, err, tc.want)
		}
	}
}

// TestSettingsValidate: out-of-range settings are errors naming the
// setting; zero fields are defaults.
func TestSettingsValidate(t *testing.T) {
	if err := (Settings{}).Validate(); err != nil {
		t.Errorf("zero settings: %v", err)
	}
	if err := DefaultSettings().Validate(); err != nil {
		t.Errorf("default settings: %v", err)
	}
	for _, tc := range []struct {
		name string
		mod  func(*Settings)
	}{
		{"px_per_mm", func(s *Settings) { s.PXPerMM = -1 }},
		{"body_length_mm", func(s *Settings) { s.BodyLengthMM = 100 }},
		{"threshold_sigma", func(s *Settings) { s.ThresholdSigma = math.NaN() }},
		{"area_frac", func(s *Settings) { s.MinAreaFrac, s.MaxAreaFrac = 2, 1 }},
		{"shadow_ratio", func(s *Settings) { s.ShadowRatio = 1.5 }},
		{"foreground_tau_s", func(s *Settings) { s.BackgroundTauS, s.ForegroundTauS = 10, 5 }},
		{"disturbed_frac", func(s *Settings) { s.DisturbedFrac = 2 }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := Settings{}
			tc.mod(&s)
			err := s.Validate()
			if err == nil || !strings.Contains(err.Error(), tc.name) {
				t.Errorf("error %v, want one naming %s", err, tc.name)
			}
			if _, err2 := NewTracker(s, synthInfo(320, 240)); err2 == nil {
				t.Error("NewTracker accepted it")
			}
		})
	}
	if _, err := NewTracker(Settings{}, VideoInfo{Path: "x", WidthPX: 8, HeightPX: 8, FPS: 30}); err == nil {
		t.Error("8x8 frame accepted")
	}
	if _, err := NewTracker(Settings{}, VideoInfo{Path: "x", WidthPX: 320, HeightPX: 240}); err == nil {
		t.Error("frame rate 0 accepted")
	}
}

// TestStepErrors: frames of the wrong size and out-of-order indices are
// errors, not crashes.
func TestStepErrors(t *testing.T) {
	tr, err := NewTracker(synthSettings(), synthInfo(320, 240))
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	m := gocv.NewMatWithSize(240, 320, gocv.MatTypeCV8UC3)
	defer m.Close()
	small := gocv.NewMatWithSize(100, 100, gocv.MatTypeCV8UC3)
	defer small.Close()
	if err := tr.Step(FrameInfo{Index: 0}, small); err == nil {
		t.Error("wrong frame size accepted")
	}
	if err := tr.Step(FrameInfo{Index: 5}, m); err != nil {
		t.Fatal(err)
	}
	if err := tr.Step(FrameInfo{Index: 5}, m); err == nil {
		t.Error("repeated frame index accepted")
	}
	bg := gocv.NewMat()
	defer bg.Close()
	tr.Background(&bg)
	if bg.Cols() != 320 || bg.Rows() != 240 || bg.Type() != gocv.MatTypeCV8UC3 {
		t.Errorf("background %dx%d %v", bg.Cols(), bg.Rows(), bg.Type())
	}
}

// TestStabilize: a still picture moved by known sub-pixel amounts each
// frame (a 3 px sway plus 1 px jitter); the estimated shake, taken
// relative to the first frame, follows the true one.
func TestStabilize(t *testing.T) {
	img := gocv.IMRead(samplePath(t, "baboon.jpg"), gocv.IMReadColor)
	defer img.Close()
	base := gocv.NewMat()
	defer base.Close()
	gocv.Resize(img, &base, image.Pt(640, 360), 0, 0, gocv.InterpolationArea)
	s := synthSettings()
	s.Stabilize = true
	tr, err := NewTracker(s, synthInfo(640, 360))
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	m := gocv.NewMat()
	defer m.Close()
	M := gocv.NewMatWithSize(2, 3, gocv.MatTypeCV64F)
	defer M.Close()
	rng := rand.New(rand.NewPCG(1, 2))
	var dx0, dy0, se float64
	const n = 200
	for i := 0; i < n; i++ {
		dx := 3*math.Sin(0.7*float64(i)) + rng.NormFloat64()
		dy := 3*math.Cos(0.5*float64(i)) + rng.NormFloat64()
		for r := 0; r < 2; r++ {
			for c := 0; c < 3; c++ {
				M.SetDoubleAt(r, c, 0)
			}
		}
		M.SetDoubleAt(0, 0, 1)
		M.SetDoubleAt(1, 1, 1)
		M.SetDoubleAt(0, 2, dx)
		M.SetDoubleAt(1, 2, dy)
		gocv.WarpAffineWithParams(base, &m, M, image.Pt(640, 360), gocv.InterpolationLinear, gocv.BorderReflect101, color.RGBA{})
		if err := tr.Step(FrameInfo{Index: i, TimeS: float64(i) / 30}, m); err != nil {
			t.Fatal(err)
		}
		if i == 0 {
			dx0, dy0 = dx, dy
		}
		k := float64(tr.p.factor)
		ex, ey := tr.seg.shiftX*k+dx0, tr.seg.shiftY*k+dy0
		se += (ex-dx)*(ex-dx) + (ey-dy)*(ey-dy)
	}
	rmse := math.Sqrt(se / n)
	t.Logf("shake estimate RMSE %.3f px (working scale 1/%d), detections %d", rmse, tr.p.factor, tr.Stats().Detections)
	if rmse > 0.5 {
		t.Errorf("shake estimate RMSE %.3f px > 0.5", rmse)
	}
	if tr.Stats().Detections > 0 {
		t.Errorf("%d detections in a still picture that only shakes", tr.Stats().Detections)
	}
}

// TestRealFootage runs the tracker over every opencv-doc sample clip:
// no crash, every frame read, and on tree.avi (a tree swaying in the
// wind, no animal) no tracks.
func TestRealFootage(t *testing.T) {
	for _, tc := range []struct {
		name      string
		frames    int // decodable frames, from the AVI index (TestSourceSampleClips)
		maxTracks int // -1: not checked
	}{
		{"tree.avi", 68, 0},
		{"vtest.avi", 795, -1},
		{"Megamind.avi", 270, -1},
		{"Megamind_bugy.avi", 270, -1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tracks, st, info, err := trackFile(t, samplePath(t, tc.name), Settings{})
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("%s %dx%d: %d tracks; %+v", tc.name, info.WidthPX, info.HeightPX, len(tracks), st)
			if st.Frames != tc.frames {
				t.Errorf("stepped %d frames, want %d", st.Frames, tc.frames)
			}
			if tc.maxTracks >= 0 && len(tracks) > tc.maxTracks {
				t.Errorf("%d tracks on a clip without animals, want <= %d", len(tracks), tc.maxTracks)
			}
			for _, tr := range tracks {
				for i, p := range tr.Points {
					// Frames rise one by one, except across an exit from
					// the picture: then the identity is kept without
					// invented points, so the jump lies between two
					// detected points.
					if i > 0 {
						prev := tr.Points[i-1]
						if p.Frame <= prev.Frame || (p.Frame != prev.Frame+1 && !(p.Observed && prev.Observed)) {
							t.Fatalf("track %d: frame %d after %d", tr.ID, p.Frame, prev.Frame)
						}
					}
					if math.IsNaN(p.XPX) || math.IsNaN(p.YPX) {
						t.Fatalf("track %d frame %d: NaN position", tr.ID, p.Frame)
					}
				}
			}
		})
	}
}

// ExampleOpen reads the sample clip of a swaying tree, whose AVI header
// declares 444 frames of which 376 repeat the previous picture.
func ExampleOpen() {
	src, err := Open("/usr/share/doc/opencv-doc/examples/data/tree.avi", SourceOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer src.Close()
	frame := gocv.NewMat()
	defer frame.Close()
	var last FrameInfo
	n := 0
	for {
		fi, err := src.Next(&frame)
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			fmt.Println(err)
			return
		}
		last, n = fi, n+1
	}
	info := src.Info()
	fmt.Printf("%dx%d, %d frames declared, %d decoded, last at %.2f s\n", info.WidthPX, info.HeightPX, info.HeaderFrames, n, last.TimeS)
	// Output:
	// 320x240, 444 frames declared, 68 decoded, last at 29.53 s
}

// ExampleTracker tracks the swaying tree: wind, no animal, no tracks.
func ExampleTracker() {
	src, err := Open("/usr/share/doc/opencv-doc/examples/data/tree.avi", SourceOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer src.Close()
	tr, err := NewTracker(DefaultSettings(), src.Info())
	if err != nil {
		fmt.Println(err)
		return
	}
	defer tr.Close()
	frame := gocv.NewMat()
	defer frame.Close()
	for {
		fi, err := src.Next(&frame)
		if err != nil {
			break // io.EOF, or *TruncatedError: keep what was read
		}
		if err := tr.Step(fi, frame); err != nil {
			fmt.Println(err)
			return
		}
	}
	tracks := tr.Finish()
	fmt.Printf("frames %d, tracks %d\n", tr.Stats().Frames, len(tracks))
	// Output:
	// frames 68, tracks 0
}
