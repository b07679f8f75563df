package link_test

import (
	"fmt"
	"image"
	"math"
	"math/rand/v2"
	"testing"

	"flitlog/track/link"
	"flitlog/track/mot"
)

// Synthetic scenes for the linker: invented ground truth, seeded noise.
const (
	fps  = 30.0
	blPX = 20.0 // bee body length, px
)

var frame640 = image.Rect(0, 0, 640, 480)

// scene is ground truth plus how it is detected.
type scene struct {
	truth   []mot.Obs
	frames  int
	sigmaPX float64 // centroid noise
	pDetect float64 // probability a present bee is detected (1 if 0)
	drop    func(id, frame int) bool
	mergePX float64 // bees closer than this give one detection at their mean
	clutter float64 // mean number of false detections per frame
	// leaves are spots of swaying foliage: each gives a false detection
	// with probability leafP per frame, within leafPX of the spot.
	leaves        [][2]float64
	leafP, leafPX float64
	seed          uint64
	settings      link.Settings
}

// run feeds the scene's detections to a Linker frame by frame and returns
// the tracks and the detections it made.
func (sc scene) run(t *testing.T) ([]link.Track, *link.Linker) {
	t.Helper()
	rng := rand.New(rand.NewPCG(sc.seed, 99))
	byFrame := make([][]mot.Obs, sc.frames)
	for _, o := range sc.truth {
		byFrame[o.Frame] = append(byFrame[o.Frame], o)
	}
	s := sc.settings
	if s.FPS == 0 {
		s = link.DefaultSettings(fps, blPX)
	}
	l := link.NewLinker(s)
	pd := sc.pDetect
	if pd == 0 {
		pd = 1
	}
	for f := 0; f < sc.frames; f++ {
		var dets []link.Detection
		used := make([]bool, len(byFrame[f]))
		for i, o := range byFrame[f] {
			if used[i] {
				continue
			}
			x, y := o.XPX, o.YPX
			for j := i + 1; j < len(byFrame[f]); j++ {
				p := byFrame[f][j]
				if sc.mergePX > 0 && math.Hypot(p.XPX-o.XPX, p.YPX-o.YPX) < sc.mergePX {
					x, y = (x+p.XPX)/2, (y+p.YPX)/2
					used[j] = true
				}
			}
			if rng.Float64() >= pd || (sc.drop != nil && sc.drop(o.ID, f)) {
				continue
			}
			dets = append(dets, link.Detection{Frame: f, XPX: x + sc.sigmaPX*rng.NormFloat64(), YPX: y + sc.sigmaPX*rng.NormFloat64(), AreaPX: 150})
		}
		n := poisson(rng, sc.clutter)
		for k := 0; k < n; k++ {
			dets = append(dets, link.Detection{Frame: f, XPX: rng.Float64() * 640, YPX: rng.Float64() * 480, AreaPX: 40})
		}
		for _, lf := range sc.leaves {
			if rng.Float64() < sc.leafP {
				dets = append(dets, link.Detection{Frame: f, XPX: lf[0] + sc.leafPX*(2*rng.Float64()-1), YPX: lf[1] + sc.leafPX*(2*rng.Float64()-1), AreaPX: 60})
			}
		}
		rng.Shuffle(len(dets), func(i, j int) { dets[i], dets[j] = dets[j], dets[i] })
		asg := l.Step(f, dets)
		seen := map[int]bool{}
		for _, a := range asg {
			if a.DetIndex < 0 || a.DetIndex >= len(dets) || seen[a.TrackID] {
				t.Fatalf("frame %d: bad assignment %+v", f, a)
			}
			seen[a.TrackID] = true
		}
	}
	tracks := l.Finish()
	checkTracks(t, tracks)
	return tracks, l
}

func poisson(rng *rand.Rand, mean float64) int {
	if mean <= 0 {
		return 0
	}
	l, k, p := math.Exp(-mean), 0, 1.0
	for {
		p *= rng.Float64()
		if p <= l {
			return k
		}
		k++
	}
}

// checkTracks verifies the Track contract: IDs 1..n in order of first
// frame, one point per frame except across an exit from the picture (a
// jump in frame numbers between two detections), first and last point
// observed.
func checkTracks(t *testing.T, tracks []link.Track) {
	t.Helper()
	for i, tr := range tracks {
		if tr.ID != i+1 {
			t.Fatalf("track %d has ID %d", i, tr.ID)
		}
		if i > 0 && tr.Points[0].Frame < tracks[i-1].Points[0].Frame {
			t.Fatalf("track %d starts before track %d", tr.ID, tracks[i-1].ID)
		}
		for k := 1; k < len(tr.Points); k++ {
			p, q := tr.Points[k], tr.Points[k-1]
			if p.Frame <= q.Frame || (p.Frame != q.Frame+1 && (!p.Observed || !q.Observed)) {
				t.Fatalf("track %d: frame %d (observed %v) follows %d (observed %v)", tr.ID, p.Frame, p.Observed, q.Frame, q.Observed)
			}
		}
		if !tr.Points[0].Observed || !tr.Points[len(tr.Points)-1].Observed {
			t.Fatalf("track %d does not start and end with a detection", tr.ID)
		}
	}
}

// straight returns truth for a bee moving from (x0, y0) at (vx, vy) px/s
// during frames [f0, f1), only while inside the 640x480 frame.
func straight(id, f0, f1 int, x0, y0, vx, vy float64) []mot.Obs {
	var out []mot.Obs
	for f := f0; f < f1; f++ {
		ts := float64(f-f0) / fps
		x, y := x0+vx*ts, y0+vy*ts
		if x < 0 || y < 0 || x >= 640 || y >= 480 {
			continue
		}
		out = append(out, mot.Obs{Frame: f, ID: id, XPX: x, YPX: y})
	}
	return out
}

func score(t *testing.T, truth []mot.Obs, tracks []link.Track) mot.Scores {
	t.Helper()
	sc, err := mot.Evaluate(truth, mot.FromTracks(tracks, false), blPX)
	if err != nil {
		t.Fatal(err)
	}
	return sc
}

// TestCrossing: two bees fly straight through the same point at the same
// time, at several crossing angles; each keeps its ID.
func TestCrossing(t *testing.T) {
	cases := []struct {
		name     string
		angleDeg float64
		mergePX  float64
	}{
		{"90 deg", 90, 0},
		{"25 deg", 25, 0},
		{"15 deg merged blobs", 15, 0.5 * blPX},
		{"20 deg merged blobs", 20, 0.5 * blPX},
		{"25 deg merged blobs", 25, 0.5 * blPX},
		{"30 deg merged blobs", 30, 0.5 * blPX},
		{"45 deg merged blobs", 45, 0.5 * blPX},
		{"90 deg merged blobs", 90, 0.5 * blPX},
		{"10 deg merged blobs", 10, 0.5 * blPX},
		{"5 deg merged blobs", 5, 0.5 * blPX},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			const speed = 200.0 // px/s, 10 BL/s
			a := straight(1, 0, 90, 100, 240, speed, 0)
			th := tc.angleDeg * math.Pi / 180
			// B passes (400, 240) at frame 45, like A.
			bx0, by0 := 400-speed*math.Cos(th)*1.5, 240-speed*math.Sin(th)*1.5
			b := straight(2, 0, 90, bx0, by0, speed*math.Cos(th), speed*math.Sin(th))
			truth := append(a, b...)
			for seed := uint64(1); seed <= 20; seed++ {
				tracks, _ := scene{truth: truth, frames: 90, sigmaPX: 1, mergePX: tc.mergePX, seed: seed}.run(t)
				sc := score(t, truth, tracks)
				if len(tracks) != 2 || sc.IDSwitches != 0 || sc.IDF1 < 0.98 {
					t.Errorf("seed %d: got %d tracks, %d ID switches, IDF1 %.3f; want 2, 0, >= 0.98", seed, len(tracks), sc.IDSwitches, sc.IDF1)
				}
			}
		})
	}
}

// landingTruth: a bee approaches the flower at (320, 240) decelerating
// over 1.5 s, sits for sitS seconds jittering by 0.3 px, then takes off and
// accelerates away over 1.5 s.
func landingTruth(sitS float64) (truth []mot.Obs, landF, leaveF, frames int) {
	approach := int(1.5 * fps)
	landF = approach
	leaveF = landF + int(sitS*fps)
	frames = leaveF + approach
	fx, fy := 320.0, 240.0
	for f := 0; f < frames; f++ {
		var x, y float64
		switch {
		case f < landF: // ease out from (80, 100)
			u := float64(f) / float64(landF)
			e := 1 - (1-u)*(1-u)
			x, y = 80+(fx-80)*e, 100+(fy-100)*e
		case f < leaveF:
			x, y = fx, fy
		default: // ease in to (600, 60)
			u := float64(f-leaveF) / float64(approach)
			e := u * u
			x, y = fx+(600-fx)*e, fy+(60-fy)*e
		}
		truth = append(truth, mot.Obs{Frame: f, ID: 1, XPX: x, YPX: y})
	}
	return truth, landF, leaveF, frames
}

// TestLanding: a bee sits still for 30 s while its detections drop out in
// 30 % of frames, or vanish entirely for several seconds; it keeps one
// track for the whole visit.
func TestLanding(t *testing.T) {
	truth, landF, leaveF, frames := landingTruth(30)
	rng := rand.New(rand.NewPCG(5, 5))
	drop30 := map[int]bool{}
	for f := landF; f < leaveF; f++ {
		if rng.Float64() < 0.3 {
			drop30[f] = true
		}
	}
	cases := []struct {
		name string
		drop func(id, f int) bool
	}{
		{"30% dropped while landed", func(_, f int) bool { return drop30[f] }},
		{"6 s dropout while landed", func(_, f int) bool { return f >= landF+60 && f < landF+60+180 }},
		{"8 s dropout then take-off unseen for 0.2 s", func(_, f int) bool { return f >= leaveF-240 && f < leaveF+6 }},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			tracks, _ := scene{truth: truth, frames: frames, sigmaPX: 0.5, drop: tc.drop, seed: 2}.run(t)
			sc := score(t, truth, tracks)
			t.Logf("%d tracks, MOTA %.4f IDF1 %.4f frag %d RMSE %.2f px", len(tracks), sc.MOTA, sc.IDF1, sc.Fragmentations, sc.RMSEPX)
			if len(tracks) != 1 {
				t.Fatalf("got %d tracks, want 1", len(tracks))
			}
			if n := len(tracks[0].Points); n < frames-2 {
				t.Errorf("track has %d points, want about %d", n, frames)
			}
			if sc.IDF1 < 0.99 {
				t.Errorf("IDF1 %.4f, want >= 0.99", sc.IDF1)
			}
		})
	}
}

// TestPredictedWhileLanded: during a long dropout of a landed bee the
// prediction stays on the flower, is marked still, and keeps a gate no
// wider than MaxGateRadiusPX.
func TestPredictedWhileLanded(t *testing.T) {
	truth, landF, _, _ := landingTruth(30)
	s := link.DefaultSettings(fps, blPX)
	l := link.NewLinker(s)
	rng := rand.New(rand.NewPCG(8, 8))
	off := landF + 60 // detections stop here
	for f := 0; f < off+200; f++ {
		var dets []link.Detection
		if f < off {
			o := truth[f]
			dets = append(dets, link.Detection{XPX: o.XPX + 0.5*rng.NormFloat64(), YPX: o.YPX + 0.5*rng.NormFloat64()})
		}
		l.Step(f, dets)
	}
	preds := l.Predicted()
	if len(preds) != 1 {
		t.Fatalf("%d predictions after 200 frames without detection, want 1", len(preds))
	}
	p := preds[0]
	t.Logf("prediction %+v", p)
	if d := math.Hypot(p.XPX-320, p.YPX-240); d > 2 || !p.Still || p.CoastFrames != 200 || p.Frame != off+200 {
		t.Errorf("prediction %+v: %.2f px from the flower", p, d)
	}
	if p.GateRadiusPX > s.MaxGateRadiusPX || p.GateRadiusPX < s.MinGateRadiusPX {
		t.Errorf("gate radius %v outside [%v, %v]", p.GateRadiusPX, s.MinGateRadiusPX, s.MaxGateRadiusPX)
	}
}

// TestFastTrackEndsSooner: a flying bee that vanishes mid-frame ends after
// MaxCoastMovingS, a still one after MaxCoastStillS.
func TestFastTrackEndsSooner(t *testing.T) {
	s := link.DefaultSettings(fps, blPX)
	for _, tc := range []struct {
		name      string
		vx        float64
		wantAlive int // frames without detection the track survives
	}{
		{"flying 300 px/s", 300, int(s.MaxCoastMovingS * fps)},
		{"still", 0, int(s.MaxCoastStillS * fps)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			l := link.NewLinker(s)
			for f := 0; f < 30; f++ {
				l.Step(f, []link.Detection{{XPX: 100 + tc.vx*float64(f)/fps, YPX: 200}})
			}
			alive := 0
			for f := 30; f < 30+int(s.MaxCoastStillS*fps)+10; f++ {
				l.Step(f, nil)
				if len(l.Predicted()) == 0 {
					break
				}
				alive++
			}
			if alive != tc.wantAlive {
				t.Errorf("track survived %d frames without detection, want %d", alive, tc.wantAlive)
			}
		})
	}
}

// TestExitReenter: a bee flies out of the right edge and comes back 2 s
// later 60 px lower; gap closing joins the two fragments into one track
// but invents no positions for the time the bee was out of the picture:
// those frames have no points, and every point is a detection.
func TestExitReenter(t *testing.T) {
	out := straight(1, 0, 30, 400, 200, 300, 0) // leaves at x = 640 after 0.8 s
	exitF := out[len(out)-1].Frame
	backF := exitF + 1 + int(2*fps)
	back := straight(1, backF, backF+45, 639, 260, -300, 0)
	truth := append(out, back...)
	for _, bounds := range []image.Rectangle{frame640, {}} {
		name := "bounds known"
		if bounds.Empty() {
			name = "bounds unknown"
		}
		t.Run(name, func(t *testing.T) {
			s := link.DefaultSettings(fps, blPX)
			s.BoundsPX = bounds
			tracks, l := scene{truth: truth, frames: backF + 45, sigmaPX: 1, seed: 3, settings: s}.run(t)
			if len(tracks) != 1 {
				t.Fatalf("got %d tracks, want 1", len(tracks))
			}
			tr := tracks[0]
			unobserved, inGap := 0, 0
			for _, p := range tr.Points {
				if !p.Observed {
					unobserved++
				}
				if p.Frame > exitF && p.Frame < backF {
					inGap++
				}
			}
			if tr.Points[0].Frame != 0 || tr.Points[len(tr.Points)-1].Frame != backF+44 || unobserved != 0 || inGap != 0 {
				t.Errorf("track frames %d..%d with %d unobserved points and %d points while out of the picture (frames %d-%d), want 0..%d with 0 and 0",
					tr.Points[0].Frame, tr.Points[len(tr.Points)-1].Frame, unobserved, inGap, exitF+1, backF-1, backF+44)
			}
			if len(tr.Points) != len(truth) {
				t.Errorf("%d points, want the %d detections", len(tr.Points), len(truth))
			}
			if id1, ok1 := l.FinalID(1); !ok1 || id1 != 1 {
				t.Errorf("FinalID(1) = %d, %v", id1, ok1)
			}
			if id2, ok2 := l.FinalID(2); !ok2 || id2 != 1 {
				t.Errorf("FinalID(2) = %d, %v; the re-entry fragment should join track 1", id2, ok2)
			}
		})
	}
}

// TestGapTooLong: re-entry after more than MaxGapS is not joined.
func TestGapTooLong(t *testing.T) {
	s := link.DefaultSettings(fps, blPX)
	out := straight(1, 0, 30, 400, 200, 300, 0)
	backF := out[len(out)-1].Frame + 1 + int((s.MaxGapS+0.5)*fps)
	truth := append(out, straight(2, backF, backF+45, 639, 260, -300, 0)...)
	tracks, _ := scene{truth: truth, frames: backF + 45, sigmaPX: 1, seed: 4}.run(t)
	if len(tracks) != 2 {
		t.Errorf("got %d tracks, want 2", len(tracks))
	}
}

// meander returns truth for a bee wandering smoothly inside the frame for
// frames [0, n): velocity follows an Ornstein-Uhlenbeck process with
// speed scale speed px/s and correlation time 0.5 s, and soft walls keep
// it inside the frame.
func meander(id, n int, x, y, speed float64, rng *rand.Rand) []mot.Obs {
	vx, vy := speed*rng.NormFloat64(), speed*rng.NormFloat64()
	var out []mot.Obs
	dt := 1 / fps
	for f := 0; f < n; f++ {
		out = append(out, mot.Obs{Frame: f, ID: id, XPX: x, YPX: y})
		vx += -vx*dt/0.5 + speed*math.Sqrt(2*dt/0.5)*rng.NormFloat64()
		vy += -vy*dt/0.5 + speed*math.Sqrt(2*dt/0.5)*rng.NormFloat64()
		// Soft walls: a restoring acceleration within 80 px of the edge.
		vx += wall(x, 640) * dt
		vy += wall(y, 480) * dt
		x += vx * dt
		y += vy * dt
	}
	return out
}

// wall returns an acceleration (px/s^2) pushing a coordinate at p back
// from the edges of [0, size], growing linearly within 80 px of an edge.
func wall(p, size float64) float64 {
	const k, margin = 60.0, 80.0 // 1/s^2, px
	switch {
	case p < margin:
		return k * (margin - p)
	case p > size-margin:
		return -k * (p - (size - margin))
	}
	return 0
}

// TestClutter: two bees wander for 60 s, detected in 95 % of frames,
// among false detections: spread uniformly over the frame (on average 3
// or 10 per frame), or flickering at six spots of "swaying foliage"
// (each detected in 30 % of frames, uniformly within 15 px of its spot).
// Foliage flickering this often is hard to tell from a bee by motion
// alone; that case and the 10 per frame case have looser limits.
func TestClutter(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	const n = 1800
	truth := append(meander(1, n, 200, 200, 150, rng), meander(2, n, 450, 300, 150, rng)...)
	leaves := [][2]float64{{100, 80}, {320, 60}, {560, 100}, {80, 400}, {330, 420}, {580, 380}}
	for _, tc := range []struct {
		name                 string
		clutter              float64 // uniform false detections per frame
		leafP                float64 // per foliage spot and frame
		minMOTA, minIDF1     float64
		maxFalseTracksPerMin float64
	}{
		{"none", 0, 0, 0.99, 0.99, 0},
		{"3 per frame", 3, 0, 0.99, 0.99, 1},
		{"10 per frame", 10, 0, 0.97, 0.85, 1},
		// Known weak spot: a foliage track can take over a bee that
		// passes close by, and foliage fragments get chained (measured
		// MOTA 0.93, IDF1 0.74 with MaxGapS 5 s; 0.99 and 0.77 with 3 s).
		{"foliage 30%", 0, 0.3, 0.90, 0.70, 2},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := link.DefaultSettings(fps, blPX)
			s.BoundsPX = frame640
			tracks, _ := scene{truth: truth, frames: n, sigmaPX: 1, pDetect: 0.95, clutter: tc.clutter,
				leaves: leaves, leafP: tc.leafP, leafPX: 15, seed: 6, settings: s}.run(t)
			sc := score(t, truth, tracks)
			ft := mot.PerMinute(len(sc.FalseTracks), n, fps)
			t.Logf("%s: %d tracks, MOTA %.4f MOTP %.2f px IDF1 %.4f IDsw %d frag %d FP %d FN %d, false tracks %.1f/min",
				tc.name, len(tracks), sc.MOTA, sc.MOTP, sc.IDF1, sc.IDSwitches, sc.Fragmentations, sc.FalsePositives, sc.Misses, ft)
			if sc.MOTA < tc.minMOTA || sc.IDF1 < tc.minIDF1 || ft > tc.maxFalseTracksPerMin {
				t.Errorf("MOTA %.4f IDF1 %.4f false tracks %.1f/min; want >= %v, >= %v, <= %v",
					sc.MOTA, sc.IDF1, ft, tc.minMOTA, tc.minIDF1, tc.maxFalseTracksPerMin)
			}
		})
	}
}

func TestStepPanics(t *testing.T) {
	for name, f := range map[string]func(){
		"frame not increasing": func() {
			l := link.NewLinker(link.DefaultSettings(fps, blPX))
			l.Step(5, nil)
			l.Step(5, nil)
		},
		"step after finish": func() {
			l := link.NewLinker(link.DefaultSettings(fps, blPX))
			l.Finish()
			l.Step(0, nil)
		},
		"NaN detection": func() {
			link.NewLinker(link.DefaultSettings(fps, blPX)).Step(0, []link.Detection{{XPX: math.NaN()}})
		},
		"no fps":         func() { link.NewLinker(link.Settings{BodyLengthPX: 20}) },
		"no body length": func() { link.NewLinker(link.Settings{FPS: 30}) },
	} {
		t.Run(name, func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Error("no panic")
				}
			}()
			f()
		})
	}
}

// TestSkippedFrames: frames missing from the Step sequence are coasted
// frames of the tracks; the output still has one point per frame.
func TestSkippedFrames(t *testing.T) {
	l := link.NewLinker(link.DefaultSettings(fps, blPX))
	for f := 0; f < 40; f++ {
		if f%5 == 4 {
			continue
		}
		l.Step(f, []link.Detection{{XPX: 100 + 3*float64(f), YPX: 100}})
	}
	tracks := l.Finish()
	checkTracks(t, tracks)
	if len(tracks) != 1 || len(tracks[0].Points) != 39 {
		t.Fatalf("got %d tracks, want 1 with 39 points", len(tracks))
	}
	for _, p := range tracks[0].Points {
		if want := 100 + 3*float64(p.Frame); math.Abs(p.XPX-want) > 1e-9 || p.Observed == (p.Frame%5 == 4) {
			t.Errorf("frame %d: x %v observed %v, want x %v observed %v", p.Frame, p.XPX, p.Observed, want, p.Frame%5 != 4)
		}
	}
}

// TestMergedAssignments: while two bees form one blob, Step reports the
// blob once for each track with Merged set, and Finish marks those frames
// as not observed.
func TestMergedAssignments(t *testing.T) {
	l := link.NewLinker(link.DefaultSettings(fps, blPX))
	mergedFrames := map[int]bool{}
	for f := 0; f < 90; f++ {
		ts := float64(f) / fps
		ax, ay := 100+200*ts, 240.0
		bx, by := 100+200*ts, 150+60*ts // converges on A's line at frame 45
		if f > 45 {
			by = 240 + 60*(ts-1.5)
		}
		var dets []link.Detection
		if math.Hypot(ax-bx, ay-by) < 0.5*blPX {
			dets = []link.Detection{{XPX: (ax + bx) / 2, YPX: (ay + by) / 2}}
		} else {
			dets = []link.Detection{{XPX: ax, YPX: ay}, {XPX: bx, YPX: by}}
		}
		asg := l.Step(f, dets)
		ids := map[int]bool{}
		for _, a := range asg {
			if a.Merged {
				ids[a.TrackID] = true
			}
		}
		if len(ids) == 2 {
			mergedFrames[f] = true
		} else if len(ids) != 0 {
			t.Errorf("frame %d: merged assignments %+v", f, asg)
		}
	}
	if len(mergedFrames) == 0 {
		t.Fatal("no frame reported a merged blob")
	}
	tracks := l.Finish()
	if len(tracks) != 2 {
		t.Fatalf("%d tracks, want 2", len(tracks))
	}
	for _, tr := range tracks {
		for _, p := range tr.Points {
			if mergedFrames[p.Frame] && p.Observed {
				t.Errorf("track %d frame %d: merged frame marked observed", tr.ID, p.Frame)
			}
		}
	}
	t.Logf("%d merged frames", len(mergedFrames))
}

// takeoffTruth: bee 1 hovers about (300, 240), wandering by 2 px at
// 2.5 Hz; bee 2 sits at (dx, dy) px from it until frame 45, then takes off
// straight past bee 1's hover point, accelerating at 200 BL/s^2 up to
// 40 BL/s, and flies on out of the frame. Invented, after the two
// take-offs of the meadow preset "three" that made tracks swap.
func takeoffTruth(dx, dy float64, frames int) []mot.Obs {
	const hx, hy, leaveF = 300.0, 240.0, 45
	var out []mot.Obs
	ux, uy := -dx/math.Hypot(dx, dy), -dy/math.Hypot(dx, dy)
	for f := 0; f < frames; f++ {
		ts := float64(f) / fps
		out = append(out, mot.Obs{Frame: f, ID: 1,
			XPX: hx + 2*math.Sin(2*math.Pi*2.5*ts), YPX: hy + 2*math.Cos(2*math.Pi*2.1*ts)})
		x, y := hx+dx, hy+dy
		if f > leaveF {
			// Distance flown: accelerate at a to vmax, then cruise.
			a, vmax := 200*blPX, 40*blPX
			t := float64(f-leaveF) / fps
			tAcc := vmax / a
			s := 0.5 * a * t * t
			if t > tAcc {
				s = 0.5*a*tAcc*tAcc + vmax*(t-tAcc)
			}
			x, y = x+ux*s, y+uy*s
		}
		if x >= 0 && y >= 0 && x < 640 && y < 480 {
			out = append(out, mot.Obs{Frame: f, ID: 2, XPX: x, YPX: y})
		}
	}
	return out
}

// TestTakeoffBesideHover: a bee takes off from a flower beside a hovering
// bee and flies right past it, the two blobs merging for a frame or two;
// each track keeps its bee. The hover model of the IMM filter is what
// makes this work: with the constant-velocity filter alone (HoverSigmaPX
// < 0) the tracks swap in some of the cases, which the test logs.
func TestTakeoffBesideHover(t *testing.T) {
	const frames = 90
	swapsOffAll := 0
	for _, tc := range []struct {
		name   string
		dx, dy float64 // bee 2's seat from bee 1's hover point, px
	}{
		{"seat 1 BL away", 18, 9},
		{"seat 0.75 BL away", 13, 7},
		{"seat 1.5 BL away, below", 5, 29},
	} {
		t.Run(tc.name, func(t *testing.T) {
			truth := takeoffTruth(tc.dx, tc.dy, frames)
			swapsOff := 0
			for seed := uint64(1); seed <= 10; seed++ {
				for _, hover := range []bool{true, false} {
					s := link.DefaultSettings(fps, blPX)
					s.AccelSigmaPXPerS2 = 200 * blPX // as package track sets it
					s.BoundsPX = frame640
					if !hover {
						s.HoverSigmaPX = -1
					}
					tracks, _ := scene{truth: truth, frames: frames, sigmaPX: 0.5, mergePX: 0.5 * blPX, seed: seed, settings: s}.run(t)
					sc := score(t, truth, tracks)
					if !hover {
						if sc.IDSwitches > 0 || len(tracks) != 2 {
							swapsOff++
						}
						continue
					}
					if len(tracks) != 2 || sc.IDSwitches != 0 || sc.IDF1 < 0.97 {
						t.Errorf("seed %d: %d tracks, %d identity switches, IDF1 %.3f; want 2, 0, >= 0.97", seed, len(tracks), sc.IDSwitches, sc.IDF1)
					}
				}
			}
			t.Logf("constant-velocity filter alone: %d of 10 seeds with a swap or a broken track", swapsOff)
			swapsOffAll += swapsOff
		})
	}
	// The scene must be hard for the single filter, or it tests nothing
	// (measured: 8 of 30 runs fail without the hover model).
	if swapsOffAll == 0 {
		t.Errorf("the constant-velocity filter alone kept every identity: the scene no longer tests the hover model")
	}
}

// TestLongUnseenSit: a bee flies in, sits on a flower, is unseen for a
// while in the middle of its sit (on ground as dark as itself), is seen
// again and flies off. Its track is kept whole for unseen stretches up to
// well beyond the detected time around them (the whole-track M-of-N rule
// must not count the gap filled where it sat).
func TestLongUnseenSit(t *testing.T) {
	for _, hidden := range []int{0, 90, 180, 270} {
		t.Run(fmt.Sprintf("hidden_%d_frames", hidden), func(t *testing.T) {
			const sitX, sitY, seen = 320.0, 240.0, 30
			truth := straight(1, 0, 30, sitX-29*8, sitY, 8*fps, 0)
			sitF0, sitF1 := 30, 30+2*seen+hidden-1
			for f := sitF0; f <= sitF1; f++ {
				truth = append(truth, mot.Obs{Frame: f, ID: 1, XPX: sitX, YPX: sitY})
			}
			truth = append(truth, straight(1, sitF1+1, sitF1+31, sitX+8, sitY, 8*fps, 0)...)
			frames := sitF1 + 31
			hide := func(_, f int) bool { return f >= sitF0+seen && f < sitF0+seen+hidden }
			tracks, _ := scene{truth: truth, frames: frames, sigmaPX: 0.5, drop: hide, seed: 7}.run(t)
			if len(tracks) != 1 {
				t.Fatalf("%d tracks, want 1", len(tracks))
			}
			tr := tracks[0]
			if first, last := tr.Points[0].Frame, tr.Points[len(tr.Points)-1].Frame; first > 3 || last < frames-3 {
				t.Errorf("track covers frames %d-%d of 0-%d", first, last, frames-1)
			}
		})
	}
}

// TestSplitSitterBesideGrass: a sitting bee is seen as two blobs for a
// while (a dark flower centre cuts it in two) and one of them lies
// towards a spot of swaying grass whose short track coasts, held still,
// nearby. The grass track must not live on that piece beside the bee's
// own track: it would then leave with the bee at take-off (the bee's
// track on grass, a switch; seen on the meadow preset "windy", where the
// bee is 30 px long, the grass track's anchor 19 px from the seat and
// the piece 6 px from the bee, here scaled to blPX = 20). Invented scene,
// seeded noise.
func TestSplitSitterBesideGrass(t *testing.T) {
	const (
		seatX, seatY = 320.0, 240.0
		grassX       = seatX - 13 // grass spot, px
		sitF0, sitF1 = 40, 129    // frames the bee sits
		splitF0      = 50         // from here to sitF1 the bee is two blobs
		frames       = 170
	)
	// In from the right at 8 px/frame, away to the left past the grass.
	truth := straight(1, 0, sitF0, seatX+8*sitF0, seatY, -8*fps, 0)
	for f := sitF0; f <= sitF1; f++ {
		truth = append(truth, mot.Obs{Frame: f, ID: 1, XPX: seatX, YPX: seatY})
	}
	truth = append(truth, straight(1, sitF1+1, frames, seatX-8, seatY+2, -8*fps, -2*fps)...)
	byFrame := map[int]mot.Obs{}
	for _, o := range truth {
		byFrame[o.Frame] = o
	}
	for seed := uint64(1); seed <= 5; seed++ {
		rng := rand.New(rand.NewPCG(seed, 7))
		s := link.DefaultSettings(fps, blPX)
		s.BoundsPX = frame640
		l := link.NewLinker(s)
		noise := func() float64 { return 0.5 * rng.NormFloat64() }
		for f := 0; f < frames; f++ {
			var dets []link.Detection
			if f >= 20 && f < 24 { // the grass moves into the foreground
				dets = append(dets, link.Detection{XPX: grassX + noise(), YPX: seatY + noise(), AreaPX: 60})
			}
			if o, ok := byFrame[f]; ok {
				if f >= splitF0 && f <= sitF1 {
					dets = append(dets,
						link.Detection{XPX: o.XPX + 4 + noise(), YPX: o.YPX + noise(), AreaPX: 90},
						link.Detection{XPX: o.XPX - 4 + noise(), YPX: o.YPX + noise(), AreaPX: 60})
				} else {
					dets = append(dets, link.Detection{XPX: o.XPX + noise(), YPX: o.YPX + noise(), AreaPX: 150})
				}
			}
			rng.Shuffle(len(dets), func(i, j int) { dets[i], dets[j] = dets[j], dets[i] })
			l.Step(f, dets)
		}
		tracks := l.Finish()
		checkTracks(t, tracks)
		sc := score(t, truth, tracks)
		if len(tracks) != 1 || sc.IDSwitches != 0 || sc.FalsePositives != 0 || sc.IDF1 < 0.97 {
			t.Errorf("seed %d: %d tracks, %d identity switches, %d false positives, IDF1 %.3f; want 1, 0, 0, >= 0.97",
				seed, len(tracks), sc.IDSwitches, sc.FalsePositives, sc.IDF1)
		}
	}
}
