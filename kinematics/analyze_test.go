package kinematics

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// makeTrack samples pos at frames 0..n-1 of a camera running at fps.
// All points are observed; positions are synthetic ground truth.
func makeTrack(fps float64, n int, pos func(tS float64) (xMM, yMM float64)) Track {
	tr := Track{ID: 1, Points: make([]Point, n)}
	for i := range tr.Points {
		tS := float64(i) / fps
		x, y := pos(tS)
		tr.Points[i] = Point{Frame: i, TimeS: tS, XMM: x, YMM: y, Observed: true}
	}
	return tr
}

func near(got, want, tol float64) bool { return math.Abs(got-want) <= tol }

// TestStraightLine: constant velocity on a straight line is a polynomial
// of degree 1, which Savitzky-Golay filtering reproduces exactly at every
// point including the ends (analytic ground truth: speed v, acceleration
// 0, heading constant, turning rate 0, curvature 0, straightness 1,
// sinuosity 0).
func TestStraightLine(t *testing.T) {
	for _, c := range []struct {
		name           string
		fps, speed, hd float64
	}{
		{"30 fps 300 mm/s heading 30", 30, 300, 30},
		{"60 fps 800 mm/s heading -120", 60, 800, -120},
		{"25 fps 120 mm/s heading 180", 25, 120, 180},
	} {
		t.Run(c.name, func(t *testing.T) {
			ux, uy := math.Cos(c.hd*math.Pi/180), math.Sin(c.hd*math.Pi/180)
			tr := makeTrack(c.fps, 90, func(ts float64) (float64, float64) {
				return 100 + c.speed*ts*ux, 50 + c.speed*ts*uy
			})
			res, err := Analyze(tr, DefaultSettings())
			if err != nil {
				t.Fatal(err)
			}
			for i, s := range res.Samples {
				if !near(s.SpeedMMPerS, c.speed, 1e-6*c.speed) || !near(s.VXMMPerS, c.speed*ux, 1e-6*c.speed) ||
					!near(s.AccelMMPerS2, 0, 1e-6*c.speed*c.fps) || !near(s.TurnRateDegPerS, 0, 1e-6) ||
					!near(s.CurvaturePerMM, 0, 1e-9) || !near(s.HeadingDeg, c.hd, 1e-9) || s.State != Flying {
					t.Fatalf("sample %d: %+v", i, s)
				}
			}
			if len(res.Bouts) != 1 {
				t.Fatalf("%d bouts, want 1", len(res.Bouts))
			}
			b := res.Bouts[0]
			wantPath := c.speed * 89 / c.fps
			if !near(b.PathLengthMM, wantPath, 1e-6) || !near(b.NetDisplacementMM, wantPath, 1e-6) ||
				!near(b.StraightnessIndex, 1, 1e-12) || !near(b.Sinuosity, 0, 1e-6) ||
				!near(b.SpeedMedianMMPerS, c.speed, 1e-6) || !near(b.FlyingS, 90/c.fps, 1e-9) || b.HoveringS != 0 {
				t.Errorf("bout %+v", b)
			}
		})
	}
}

// TestCircle: uniform motion on a circle of radius r at speed v has
// curvature 1/r and turning rate v/r (analytic ground truth). The filter
// attenuates the sinusoids a little; the test checks (a) closeness to the
// analytic values within the stated tolerance and (b) exact agreement with
// the prediction from the filter's gains at the angular step
// theta = (v/r) dt: speed v G1, curvature G2/(G1^2 r), turning rate
// (v/r) G2/G1, where G1 = sum_j w1_j sin(j theta)/theta and
// G2 = -sum_j w2_j cos(j theta)/theta^2 (w1, w2 the centred first and
// second derivative weights). Only interior points are checked.
func TestCircle(t *testing.T) {
	for _, c := range []struct {
		name              string
		fps, rMM, vMMPerS float64
		tolSpeed, tolCurv float64 // relative, to the analytic value
	}{
		{"r 100 mm, 200 mm/s, 30 fps", 30, 100, 200, 0.01, 0.02},
		{"r 40 mm, 150 mm/s, 60 fps", 60, 40, 150, 0.02, 0.04},
		{"r 250 mm, 500 mm/s, 25 fps", 25, 250, 500, 0.01, 0.03},
	} {
		t.Run(c.name, func(t *testing.T) {
			w := c.vMMPerS / c.rMM
			tr := makeTrack(c.fps, 200, func(ts float64) (float64, float64) {
				return c.rMM * math.Cos(w*ts), c.rMM * math.Sin(w*ts)
			})
			s := DefaultSettings()
			res, err := Analyze(tr, s)
			if err != nil {
				t.Fatal(err)
			}
			win := s.windowFrames(1 / c.fps)
			m := win / 2
			w1 := SavitzkyGolayWeights(win, 2, 1, m)
			w2 := SavitzkyGolayWeights(win, 2, 2, m)
			th := w / c.fps
			g1, g2 := 0.0, 0.0
			for j := range w1 {
				k := float64(j - m)
				g1 += w1[j] * math.Sin(k*th) / th
				g2 -= w2[j] * math.Cos(k*th) / (th * th)
			}
			turnDeg := w * 180 / math.Pi
			for i := m; i < len(res.Samples)-m; i++ {
				p := res.Samples[i]
				if !near(p.SpeedMMPerS, c.vMMPerS, c.tolSpeed*c.vMMPerS) ||
					!near(p.CurvaturePerMM, 1/c.rMM, c.tolCurv/c.rMM) ||
					!near(p.TurnRateDegPerS, turnDeg, c.tolCurv*turnDeg) {
					t.Fatalf("sample %d: speed %g (want %g), curvature %g (want %g), turning %g deg/s (want %g)",
						i, p.SpeedMMPerS, c.vMMPerS, p.CurvaturePerMM, 1/c.rMM, p.TurnRateDegPerS, turnDeg)
				}
				if !near(p.SpeedMMPerS, c.vMMPerS*g1, 1e-9*c.vMMPerS) ||
					!near(p.CurvaturePerMM, g2/(g1*g1*c.rMM), 1e-9/c.rMM) ||
					!near(p.TurnRateDegPerS, turnDeg*g2/g1, 1e-9*turnDeg) {
					t.Fatalf("sample %d: differs from the filter-gain prediction", i)
				}
			}
			mid := res.Samples[len(res.Samples)/2]
			t.Logf("window %d frames: speed %.3f mm/s (true %g), curvature %.6f /mm (true %.6f), turning %.2f deg/s (true %.2f)",
				win, mid.SpeedMMPerS, c.vMMPerS, mid.CurvaturePerMM, 1/c.rMM, mid.TurnRateDegPerS, turnDeg)
		})
	}
}

// TestSpeedNoise: straight flight at 400 mm/s filmed at 30 fps with a
// scale of 2 px/mm (a 0.64 m wide patch in 1280 px), with 1 px Gaussian
// noise on each image coordinate (0.5 mm). The speed error of the
// smoothed derivative is predicted by error propagation: sigma_v =
// sigma_x sqrt(sum_j w1_j^2) / dt = 0.5 mm * sqrt(1/28) * 30/s = 2.83 mm/s
// for the 7-frame window; the measured RMS error in the interior must be
// within 15% of that (60 s of flight, 1800 points; the errors are
// correlated over 7 frames, so about 250 independent values and a 5%
// standard error), the bias within 0.5 mm/s, and the RMS under 1% of the
// speed. For comparison the raw two-frame difference has
// 0.5 * sqrt(2) * 30 = 21 mm/s.
func TestSpeedNoise(t *testing.T) {
	const (
		fps, pxPerMM, speed = 30.0, 2.0, 400.0
		noisePX             = 1.0
		n                   = 1800
	)
	r := rand.New(rand.NewPCG(2026, 4))
	sigma := noisePX / pxPerMM
	tr := makeTrack(fps, n, func(ts float64) (float64, float64) {
		return speed*ts*0.8 + sigma*r.NormFloat64(), speed*ts*0.6 + sigma*r.NormFloat64()
	})
	s := DefaultSettings()
	res, err := Analyze(tr, s)
	if err != nil {
		t.Fatal(err)
	}
	win := s.windowFrames(1 / fps)
	m := win / 2
	w1 := SavitzkyGolayWeights(win, 2, 1, m)
	sw := 0.0
	for _, w := range w1 {
		sw += w * w
	}
	pred := sigma * math.Sqrt(sw) * fps
	var sum, sum2, endSum2 float64
	var k, ke int
	for i, p := range res.Samples {
		e := p.SpeedMMPerS - speed
		if i < m || i >= n-m {
			endSum2 += e * e
			ke++
			continue
		}
		sum += e
		sum2 += e * e
		k++
	}
	rms, bias := math.Sqrt(sum2/float64(k)), sum/float64(k)
	t.Logf("speed error at 2 px/mm, 30 fps, 400 mm/s, 1 px noise: interior RMS %.3f mm/s (predicted %.3f), bias %.3f mm/s; track ends RMS %.2f mm/s",
		rms, pred, bias, math.Sqrt(endSum2/float64(ke)))
	if math.Abs(rms/pred-1) > 0.15 {
		t.Errorf("RMS speed error %.3f mm/s, predicted %.3f", rms, pred)
	}
	if math.Abs(bias) > 0.5 {
		t.Errorf("speed bias %.3f mm/s", bias)
	}
	if rms > 0.01*speed {
		t.Errorf("RMS speed error %.3f mm/s over 1%% of %g mm/s", rms, speed)
	}
}

// TestVariableFrameRate: with frame times that are not equally spaced
// (t = dt j + e j^2, a slowly drifting rate) and a position linear in
// time, position is quadratic in the frame index, so the chain rule
// v = x1/t1 recovers the true speed exactly (synthetic ground truth).
func TestVariableFrameRate(t *testing.T) {
	tr := Track{ID: 3}
	for j := 0; j < 60; j++ {
		tS := float64(j)/30 + 1e-5*float64(j*j)
		tr.Points = append(tr.Points, Point{Frame: j, TimeS: tS, XMM: 250 * tS, YMM: 10, Observed: true})
	}
	res, err := Analyze(tr, DefaultSettings())
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range res.Samples {
		if !near(p.SpeedMMPerS, 250, 1e-6) || !near(p.AccelMMPerS2, 0, 1e-4) {
			t.Fatalf("sample %d: speed %g, accel %g; want 250, 0", i, p.SpeedMMPerS, p.AccelMMPerS2)
		}
	}
}

// TestGaps: no derivative is taken across a frame jump or a long
// unobserved run. Each side is a straight line at its own speed, so any
// window reaching across would show a wrong speed (synthetic ground
// truth).
func TestGaps(t *testing.T) {
	const fps = 30.0
	line := func(f0, n int, x0, vx float64, observed bool) []Point {
		var p []Point
		for j := 0; j < n; j++ {
			f := f0 + j
			p = append(p, Point{Frame: f, TimeS: float64(f) / fps, XMM: x0 + vx*float64(j)/fps, YMM: 0, Observed: observed})
		}
		return p
	}
	t.Run("frame jump", func(t *testing.T) {
		tr := Track{ID: 1, Points: append(line(0, 30, 0, 100, true), line(40, 30, 500, 300, true)...)}
		res, err := Analyze(tr, DefaultSettings())
		if err != nil {
			t.Fatal(err)
		}
		for i, p := range res.Samples {
			want := 100.0
			if i >= 30 {
				want = 300
			}
			if !near(p.SpeedMMPerS, want, 1e-6) {
				t.Fatalf("point %d (frame %d): speed %g, want %g", i, p.Frame, p.SpeedMMPerS, want)
			}
		}
		if len(res.Bouts) != 2 || res.Bouts[0].EndFrame != 29 || res.Bouts[1].StartFrame != 40 {
			t.Errorf("bouts %+v, want two split at the jump", res.Bouts)
		}
	})
	t.Run("long unobserved run", func(t *testing.T) {
		// 20 unobserved frames (0.67 s > 0.25 s) filled on a straight
		// line at another speed, as a tracker's interpolation would be.
		pts := line(0, 30, 0, 100, true)
		pts = append(pts, line(30, 20, 100, 600, false)...)
		pts = append(pts, line(50, 30, 500, 300, true)...)
		res, err := Analyze(Track{ID: 2, Points: pts}, DefaultSettings())
		if err != nil {
			t.Fatal(err)
		}
		for i, p := range res.Samples {
			switch {
			case i < 30 && !near(p.SpeedMMPerS, 100, 1e-6), i >= 50 && !near(p.SpeedMMPerS, 300, 1e-6):
				t.Fatalf("point %d: speed %g", i, p.SpeedMMPerS)
			case i >= 30 && i < 50 && (!p.Gap || !math.IsNaN(p.SpeedMMPerS)):
				t.Fatalf("point %d in the gap: Gap %v speed %g, want true NaN", i, p.Gap, p.SpeedMMPerS)
			case (i < 30 || i >= 50) && p.Gap:
				t.Fatalf("point %d marked Gap", i)
			}
		}
		if len(res.Bouts) != 2 || res.Bouts[0].EndFrame != 29 || res.Bouts[1].StartFrame != 50 {
			t.Errorf("bouts %+v, want two split at the gap", res.Bouts)
		}
	})
	t.Run("short unobserved run is smoothed through", func(t *testing.T) {
		pts := line(0, 30, 0, 200, true)
		pts = append(pts, line(30, 5, 200, 200, false)...) // 0.17 s
		pts = append(pts, line(35, 30, 200+200*5/fps, 200, true)...)
		res, err := Analyze(Track{ID: 3, Points: pts}, DefaultSettings())
		if err != nil {
			t.Fatal(err)
		}
		for i, p := range res.Samples {
			if p.Gap || !near(p.SpeedMMPerS, 200, 1e-6) {
				t.Fatalf("point %d: Gap %v speed %g, want false 200", i, p.Gap, p.SpeedMMPerS)
			}
		}
		if len(res.Bouts) != 1 {
			t.Errorf("%d bouts, want 1", len(res.Bouts))
		}
	})
	t.Run("hidden inside a blossom", func(t *testing.T) {
		// Still for 1 s, hidden (filled at the same place) 1 s, still 1 s.
		pts := line(0, 30, 80, 0, true)
		pts = append(pts, line(30, 30, 80, 0, false)...)
		pts = append(pts, line(60, 30, 80, 0, true)...)
		res, err := Analyze(Track{ID: 4, Points: pts}, DefaultSettings())
		if err != nil {
			t.Fatal(err)
		}
		for i, p := range res.Samples {
			if p.State != Landed {
				t.Fatalf("point %d: %v, want landed", i, p.State)
			}
		}
		if len(res.Bouts) != 0 || !near(res.LandedS, 3, 1e-9) {
			t.Errorf("bouts %v landed %g s, want none and 3 s", res.Bouts, res.LandedS)
		}
	})
	t.Run("short runs", func(t *testing.T) {
		// Runs of 1, 2 and 4 frames between jumps: 1 has no velocity,
		// 2 no acceleration, 4 both (exact for a line).
		pts := append(line(0, 1, 0, 100, true), line(10, 2, 0, 100, true)...)
		pts = append(pts, line(20, 4, 0, 100, true)...)
		res, err := Analyze(Track{ID: 5, Points: pts}, DefaultSettings())
		if err != nil {
			t.Fatal(err)
		}
		sm := res.Samples
		if !math.IsNaN(sm[0].SpeedMMPerS) || !near(sm[1].SpeedMMPerS, 100, 1e-9) || !math.IsNaN(sm[1].AccelMMPerS2) ||
			!near(sm[3].SpeedMMPerS, 100, 1e-9) || !near(sm[3].AccelMMPerS2, 0, 1e-6) {
			t.Errorf("got %+v", sm)
		}
	})
}

// TestEndRule: at the ends of a track the end polynomial is used, so a
// uniformly accelerated path (degree 2) gives exact velocity and
// acceleration at every point, including the first and last (synthetic
// ground truth: x = x0 + v0 t + a t^2 / 2).
func TestEndRule(t *testing.T) {
	const a, v0 = 900.0, -150.0
	tr := makeTrack(50, 40, func(ts float64) (float64, float64) { return 3 + v0*ts + a*ts*ts/2, -7 })
	res, err := Analyze(tr, DefaultSettings())
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range res.Samples {
		if !near(p.VXMMPerS, v0+a*p.TimeS, 1e-6) || !near(p.AccelMMPerS2, a, 1e-5) {
			t.Fatalf("point %d: v %g a %g, want %g %g", i, p.VXMMPerS, p.AccelMMPerS2, v0+a*p.TimeS, a)
		}
	}
}

// TestFlightPhases runs a synthetic visit sequence through Analyze: still
// on a blossom 1 s, flight at 300 mm/s 1 s, hovering in front of a blossom
// 1 s (drifting at 20 mm/s), flight 1 s, still 1 s, with 0.5 px noise at
// 2 px/mm and 30 fps. Points in the middle of each phase must have the
// phase's state, and the single flight bout must last about 3 s, of which
// about 1 s hovering (within 0.25 s: the smoothing window and hysteresis
// move the boundaries by a few frames).
func TestFlightPhases(t *testing.T) {
	const fps = 30.0
	r := rand.New(rand.NewPCG(11, 12))
	x := 0.0
	var pts []Point
	phases := []struct {
		speed float64
		want  State
	}{{0, Landed}, {300, Flying}, {20, Hovering}, {300, Flying}, {0, Landed}}
	for k, ph := range phases {
		for j := 0; j < 30; j++ {
			f := len(pts)
			x += ph.speed / fps
			pts = append(pts, Point{Frame: f, TimeS: float64(f) / fps, XMM: x + 0.25*r.NormFloat64(), YMM: 0.25 * r.NormFloat64(), Observed: true})
		}
		_ = k
	}
	res, err := Analyze(Track{ID: 9, Points: pts}, DefaultSettings())
	if err != nil {
		t.Fatal(err)
	}
	for k, ph := range phases {
		for j := 10; j < 20; j++ {
			if got := res.Samples[30*k+j].State; got != ph.want {
				t.Errorf("phase %d frame %d: %v, want %v", k, 30*k+j, got, ph.want)
			}
		}
	}
	if len(res.Bouts) != 1 {
		t.Fatalf("%d bouts, want 1: %+v", len(res.Bouts), res.Bouts)
	}
	b := res.Bouts[0]
	t.Logf("bout frames %d-%d, flying %.3f s, hovering %.3f s, path %.1f mm, straightness %.3f",
		b.StartFrame, b.EndFrame, b.FlyingS, b.HoveringS, b.PathLengthMM, b.StraightnessIndex)
	if !near(b.FlyingS+b.HoveringS, 3, 0.25) || !near(b.HoveringS, 1, 0.25) {
		t.Errorf("bout %+v", b)
	}
	if !near(res.LandedS, 2, 0.25) {
		t.Errorf("landed %g s, want about 2", res.LandedS)
	}
}

func TestAnalyzeErrors(t *testing.T) {
	good := func() Track {
		return makeTrack(30, 10, func(ts float64) (float64, float64) { return ts, ts })
	}
	cases := []struct {
		name   string
		edit   func(*Track, *Settings)
		wantIn string // part of the error message
	}{
		{"unsorted frames", func(tr *Track, _ *Settings) { tr.Points[4].Frame = 2 }, "frame 2): follows frame 3"},
		{"repeated frame", func(tr *Track, _ *Settings) { tr.Points[5].Frame = 4 }, "sorted by frame"},
		{"NaN position", func(tr *Track, _ *Settings) { tr.Points[3].XMM = math.NaN() }, "point 3 (frame 3): position"},
		{"infinite position", func(tr *Track, _ *Settings) { tr.Points[3].YMM = math.Inf(1) }, "not a finite number"},
		{"time not increasing", func(tr *Track, _ *Settings) { tr.Points[6].TimeS = tr.Points[5].TimeS }, "frame times must increase"},
		{"NaN time", func(tr *Track, _ *Settings) { tr.Points[6].TimeS = math.NaN() }, "time NaN s"},
		{"poly order 1", func(_ *Track, s *Settings) { s.PolyOrder = 1 }, "PolyOrder = 1"},
		{"even window", func(_ *Track, s *Settings) { s.SmoothWindowFrames = 6 }, "SmoothWindowFrames = 6"},
		{"window too short", func(_ *Track, s *Settings) { s.SmoothWindowFrames = 3 }, "SmoothWindowFrames = 3"},
		{"NaN min landed", func(_ *Track, s *Settings) { s.MinLandedS = math.NaN() }, "MinLandedS = NaN"},
		{"negative window", func(_ *Track, s *Settings) { s.SmoothWindowS = -1 }, "SmoothWindowS = -1"},
		{"exit below enter", func(_ *Track, s *Settings) { s.LandedExitMMPerS = 5 }, "LandedExitMMPerS = 5"},
		{"hover below landed", func(_ *Track, s *Settings) { s.HoverEnterMMPerS = 6 }, "HoverEnterMMPerS = 6"},
		{"window too long", func(_ *Track, s *Settings) { s.SmoothWindowS = 100 }, "at most 1001 frames"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tr, s := good(), DefaultSettings()
			c.edit(&tr, &s)
			_, err := Analyze(tr, s)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.wantIn) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %q, want one line containing %q", err, c.wantIn)
			}
			var pe *PointError
			var se *SettingsError
			if !errors.As(err, &pe) && !errors.As(err, &se) {
				t.Errorf("error %T is neither *PointError nor *SettingsError", err)
			}
		})
	}
	t.Run("empty track", func(t *testing.T) {
		res, err := Analyze(Track{ID: 7}, DefaultSettings())
		if err != nil || len(res.Samples) != 0 || res.ID != 7 {
			t.Errorf("got %+v, %v", res, err)
		}
	})
	t.Run("zero settings mean defaults", func(t *testing.T) {
		tr := good()
		a, err1 := Analyze(tr, Settings{MaxUnobservedS: 0.25, HeadingMinSpeedMMPerS: 10, MinLandedS: 0.3, MinAirborneS: 0.1, MinHoverS: 0.1, SinuosityStepMM: 5})
		b, err2 := Analyze(tr, DefaultSettings())
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		for i := range a.Samples {
			if a.Samples[i].SpeedMMPerS != b.Samples[i].SpeedMMPerS || a.Samples[i].State != b.Samples[i].State {
				t.Fatalf("sample %d differs", i)
			}
		}
	})
}
