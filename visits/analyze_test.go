package visits

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"flitlog/kinematics"
)

// step is one piece of a scripted bee path in px: fly to (x, y), or stay
// (rest) for durS, or hover with a wander of amplitude ampPX.
type step struct {
	kind        int // pieceFly, pieceLanded, pieceHover
	x, y        float64
	durS, ampPX float64
}

func fly(x, y float64) step           { return step{kind: pieceFly, x: x, y: y} }
func rest(durS float64) step          { return step{kind: pieceLanded, durS: durS} }
func hover(durS, amp float64) step    { return step{kind: pieceHover, durS: durS, ampPX: amp} }
func startAt(x, y float64) [2]float64 { return [2]float64{x, y} }

// scripted is a bee path made of steps, sampled at 30 frames/s with
// px/mm 2, starting at frame first.
type scripted struct {
	pieces []piece
	endS   float64
}

// script builds the path. Flights cruise at 400 mm/s with 3 m/s^2 ramps.
func script(t0 float64, at [2]float64, steps ...step) scripted {
	const pxPerMM = 2
	x, y := at[0]/pxPerMM, at[1]/pxPerMM
	tt := t0
	var ps []piece
	for _, s := range steps {
		switch s.kind {
		case pieceFly:
			pos, d := flight(x, y, s.x/pxPerMM, s.y/pxPerMM, tt, 400, 3000)
			ps = append(ps, piece{tt, tt + d, pos, pieceFly, -1})
			x, y = s.x/pxPerMM, s.y/pxPerMM
			tt += d
		case pieceLanded:
			cx, cy := x, y
			ps = append(ps, piece{tt, tt + s.durS, func(float64) (float64, float64) { return cx, cy }, pieceLanded, -1})
			tt += s.durS
		case pieceHover:
			cx, cy, a, h0, d := x, y, s.ampPX/pxPerMM, tt, s.durS
			ps = append(ps, piece{tt, tt + s.durS, func(u float64) (float64, float64) {
				env := math.Max(0, math.Min(1, math.Min(u-h0, h0+d-u)/0.1))
				return cx + env*a*math.Sin(2*math.Pi*2.7*(u-h0)), cy + env*a*math.Sin(2*math.Pi*3.4*(u-h0)+1)
			}, pieceHover, -1})
			tt += s.durS
		}
	}
	return scripted{ps, tt}
}

// track samples the path at frames [f0, f1] with noise sigmaPX per axis
// and computes kinematics.
func (s scripted) track(t testing.TB, id, f0, f1 int, sigmaPX float64, seed uint64) kinematics.Result {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 3))
	tr := kinematics.Track{ID: id}
	k := 0
	for f := f0; f <= f1; f++ {
		tt := float64(f) / 30
		for k+1 < len(s.pieces) && s.pieces[k].t1 <= tt {
			k++
		}
		x, y := s.pieces[k].pos(tt)
		xp, yp := 2*x+sigmaPX*rng.NormFloat64(), 2*y+sigmaPX*rng.NormFloat64()
		tr.Points = append(tr.Points, kinematics.Point{Frame: f, TimeS: tt, XPX: xp, YPX: yp, XMM: xp / 2, YMM: yp / 2, Observed: true})
	}
	r, err := kinematics.Analyze(tr, kinematics.DefaultSettings())
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// frameOf is the first frame at or after time tS (30 frames/s).
func frameOf(tS float64) int { return int(math.Ceil(tS*30 - 1e-9)) }

var clip30 = Clip{FPS: 30, PXPerMM: 2}

func TestLandingEdgeCases(t *testing.T) {
	fm := FlowerMap{Flowers: []Flower{
		{ID: "A", XPX: 400, YPX: 300, RPX: 40},
		{ID: "B", XPX: 450, YPX: 300, RPX: 40}, // overlaps A for 410 < x < 440
		{ID: "E", XPX: -10, YPX: 500, RPX: 50}, // partly outside the frame
		{ID: "C", XPX: 900, YPX: 400, RPX: 30},
	}}
	if err := fm.Validate(1280, 720); err != nil {
		t.Fatalf("map with a flower partly outside the frame: %v", err)
	}
	type want struct {
		flower     string
		start, end int // frames; -1: do not check
		cs, ce     bool
	}
	cases := []struct {
		name   string
		s      scripted
		f0, f1 int
		want   []want
	}{
		{
			// The clip starts with the bee on C: censored start at frame 0.
			name: "censored at clip start",
			s:    script(0, startAt(905, 400), rest(2), fly(1200, 100), rest(1)),
			f0:   0, f1: 119,
			want: []want{{"C", 0, 59, true, false}},
		},
		{
			// The bee lands on C at 1 s and is still there at the last frame.
			name: "censored at clip end",
			s:    script(0, startAt(1200, 100), fly(905, 400), rest(10)),
			f0:   0, f1: 149,
			want: []want{{"C", -1, 149, false, true}},
		},
		{
			// The track starts late (the tracker found the bee already
			// sitting): cut by the track's start, flagged censored.
			name: "censored at track start",
			s:    script(0, startAt(905, 400), rest(3), fly(1200, 100), rest(1)),
			f0:   30, f1: 150,
			want: []want{{"C", 30, 89, true, false}},
		},
		{
			name: "overlap, nearer B's centre",
			s:    script(0, startAt(800, 100), fly(432, 300), rest(2), fly(800, 100), rest(1)),
			f0:   0, f1: 200,
			want: []want{{"B", -1, -1, false, false}},
		},
		{
			name: "overlap, nearer A's centre",
			s:    script(0, startAt(800, 100), fly(418, 300), rest(2), fly(800, 100), rest(1)),
			f0:   0, f1: 200,
			want: []want{{"A", -1, -1, false, false}},
		},
		{
			name: "flower partly outside the frame",
			s:    script(0, startAt(300, 300), fly(15, 505), rest(2), fly(300, 300), rest(1)),
			f0:   0, f1: 200,
			want: []want{{"E", -1, -1, false, false}},
		},
		{
			// Hovering 6 px (3 mm) wide near C, then leaving: an inspection.
			name: "hover is not a landing",
			s:    script(0, startAt(1200, 100), fly(880, 380), hover(1.2, 6), fly(1200, 600), rest(1)),
			f0:   0, f1: 200,
			want: nil,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tr := c.s.track(t, 1, c.f0, c.f1, 0.5, 1)
			res, err := Analyze([]kinematics.Result{tr}, fm, Clip{Frames: c.f1 + 1, FPS: 30, PXPerMM: 2}, DefaultSettings())
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Landings) != len(c.want) {
				t.Fatalf("got %d landings %+v, want %d", len(res.Landings), res.Landings, len(c.want))
			}
			for i, w := range c.want {
				l := res.Landings[i]
				if l.FlowerID != w.flower || l.CensoredStart != w.cs || l.CensoredEnd != w.ce {
					t.Errorf("landing %d: flower %s censored %v/%v, want %s %v/%v", i, l.FlowerID, l.CensoredStart, l.CensoredEnd, w.flower, w.cs, w.ce)
				}
				// Frame resolution: within 1 frame at the censored (exact) ends.
				if w.start >= 0 && absInt(l.StartFrame-w.start) > 1 {
					t.Errorf("landing %d starts at frame %d, want %d", i, l.StartFrame, w.start)
				}
				if w.end >= 0 && absInt(l.EndFrame-w.end) > 1 {
					t.Errorf("landing %d ends at frame %d, want %d", i, l.EndFrame, w.end)
				}
				if math.Abs(l.DurationS-(l.EndS-l.StartS)) > 1e-12 {
					t.Errorf("DurationS %v != EndS - StartS %v", l.DurationS, l.EndS-l.StartS)
				}
			}
			if c.name == "hover is not a landing" {
				if len(res.Inspections) != 1 || res.Inspections[0].FlowerID != "C" {
					t.Errorf("inspections %+v, want one of C", res.Inspections)
				}
			}
			if c.name == "censored at clip end" && len(res.Landings) == 1 {
				// EndS is one frame period after the last frame.
				if got, want := res.Landings[0].EndS, 150.0/30; math.Abs(got-want) > 1e-9 {
					t.Errorf("EndS = %v, want %v", got, want)
				}
			}
		})
	}
}

func absInt(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// TestIntakeRate checks the nectar intake arithmetic with facts of the
// trade as check values (common practice): a full flower yielding about
// 6 uL in about 3 s of handling gives about 2 uL/s; a poor one about 1 uL
// in 1 s gives about 1 uL/s. The bee of the test rests about 3 s on the
// full flower, so the check covers the detected handling time as well as
// the reward bookkeeping; the clip summary's own rates are checked against
// its totals below.
func TestIntakeRate(t *testing.T) {
	full, poor := 6.0, 1.0
	fm := FlowerMap{Flowers: []Flower{
		{ID: "full", XPX: 300, YPX: 300, RPX: 30, RewardUL: &full},
		{ID: "poor", XPX: 900, YPX: 300, RPX: 30, RewardUL: &poor},
	}}
	// Bee 1 handles the full flower for 3 s, bee 2 the poor one for 1 s;
	// bee 1 then comes back to the full flower (emptied: no reward).
	s1 := script(0, startAt(600, 650), fly(300, 300), rest(3), fly(600, 650), fly(300, 305), rest(2), fly(600, 650), rest(0.5))
	s2 := script(0, startAt(600, 50), fly(900, 300), rest(1), fly(600, 50), rest(0.5))
	tr := []kinematics.Result{s1.track(t, 1, 0, frameOf(s1.endS)-1, 0.5, 1), s2.track(t, 2, 0, frameOf(s2.endS)-1, 0.5, 2)}
	res, err := Analyze(tr, fm, Clip{FPS: 30, PXPerMM: 2}, DefaultSettings())
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Landings) != 3 {
		t.Fatalf("landings %+v, want 3", res.Landings)
	}
	cases := []struct {
		name     string
		bee      int
		wantRate float64 // uL per s of handling
		tol      float64
	}{
		{"full flower 6 uL in 3 s (+ 2 s on the emptied flower)", 1, 6.0 / 5, 0.05},
		{"poor flower 1 uL in 1 s", 2, 1, 0.07},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var b *BeeSummary
			for i := range res.Summary.PerBee {
				if res.Summary.PerBee[i].TrackID == c.bee {
					b = &res.Summary.PerBee[i]
				}
			}
			if b == nil {
				t.Fatalf("no summary for bee %d", c.bee)
			}
			if math.Abs(b.IntakeULPerHandlingS-c.wantRate) > c.tol*c.wantRate {
				t.Errorf("intake %.3f uL/s, want %.3f (handling %.3f s, nectar %.3f uL)", b.IntakeULPerHandlingS, c.wantRate, b.HandlingTotalS, b.NectarUL)
			}
		})
	}
	// The first landing alone: 6 uL over about 3 s is about 2 uL/s.
	var first Landing
	for _, l := range res.Landings {
		if l.FlowerID == "full" && !l.Revisit {
			first = l
		}
	}
	if first.RewardUL != 6 {
		t.Fatalf("first landing %+v", first)
	}
	if r := first.RewardUL / first.DurationS; math.Abs(r-2) > 0.1 {
		t.Errorf("first landing: %.3f uL/s, want about 2 (common practice)", r)
	}
	// The revisit of the emptied flower takes nothing.
	for _, l := range res.Landings {
		if l.FlowerID == "full" && l.Revisit && l.RewardUL != 0 {
			t.Errorf("revisit took %v uL, want 0", l.RewardUL)
		}
	}
	// Per clip: 7 uL over the summed handling time, and over foraging time.
	c := res.Summary.Clip
	if c.NectarUL != 7 || math.Abs(c.IntakeULPerHandlingS-7/c.HandlingTotalS) > 1e-12 || !(c.IntakeULPerForagingS < c.IntakeULPerHandlingS) {
		t.Errorf("clip nectar %v, intake %v per handling s, %v per foraging s", c.NectarUL, c.IntakeULPerHandlingS, c.IntakeULPerForagingS)
	}
	// With refilled flowers every landing takes the reward.
	set := DefaultSettings()
	set.RewardEveryLanding = true
	res2, err := Analyze(tr, fm, Clip{FPS: 30, PXPerMM: 2}, set)
	if err != nil {
		t.Fatal(err)
	}
	if res2.Summary.Clip.NectarUL != 13 {
		t.Errorf("refilled: nectar %v uL, want 13", res2.Summary.Clip.NectarUL)
	}
}

// TestSequenceAndFlights checks per-landing bookkeeping (index, revisit,
// time since the flower's previous visit) and the flights between them.
func TestSequenceAndFlights(t *testing.T) {
	fm := FlowerMap{Flowers: []Flower{
		{ID: "A", XPX: 300, YPX: 300, RPX: 30, Kind: "a"},
		{ID: "B", XPX: 700, YPX: 300, RPX: 30, Kind: "b"},
	}}
	s := script(0, startAt(500, 600), fly(300, 300), rest(2), fly(700, 300), rest(2), fly(300, 300), rest(2), fly(500, 600), rest(0.5))
	tr := s.track(t, 5, 0, frameOf(s.endS)-1, 0.5, 4)
	res, err := Analyze([]kinematics.Result{tr}, fm, clip30, DefaultSettings())
	if err != nil {
		t.Fatal(err)
	}
	ls := res.Landings
	if len(ls) != 3 || ls[0].FlowerID != "A" || ls[1].FlowerID != "B" || ls[2].FlowerID != "A" {
		t.Fatalf("landings %+v", ls)
	}
	for i, l := range ls {
		if l.Index != i+1 || l.TrackID != 5 {
			t.Errorf("landing %d: index %d track %d", i, l.Index, l.TrackID)
		}
		if l.Revisit != (i == 2) {
			t.Errorf("landing %d: revisit %v", i, l.Revisit)
		}
		if l.DurationS < 1.9 || l.DurationS > 2.1 {
			t.Errorf("landing %d: handling %.3f s, want 2 +- 0.1", i, l.DurationS)
		}
		if !(l.ApproachSpeedMMPerS > 50) || !(l.DepartureSpeedMMPerS > 50) {
			t.Errorf("landing %d: approach %.1f departure %.1f mm/s, want fast flight around it", i, l.ApproachSpeedMMPerS, l.DepartureSpeedMMPerS)
		}
	}
	if !math.IsNaN(ls[0].SincePrevVisitS) || !math.IsNaN(ls[1].SincePrevVisitS) {
		t.Errorf("first visits: SincePrevVisitS %v %v, want NaN", ls[0].SincePrevVisitS, ls[1].SincePrevVisitS)
	}
	if got := ls[2].SincePrevVisitS; math.Abs(got-(ls[2].StartS-ls[0].EndS)) > 1e-12 {
		t.Errorf("SincePrevVisitS %v, want %v", got, ls[2].StartS-ls[0].EndS)
	}
	fs := res.Flights
	if len(fs) != 2 {
		t.Fatalf("flights %+v", fs)
	}
	for i, f := range fs {
		p, q := ls[i], ls[i+1]
		if f.FromFlowerID != p.FlowerID || f.ToFlowerID != q.FlowerID || f.FromIndex != p.Index ||
			f.StartFrame != p.EndFrame+1 || f.EndFrame != q.StartFrame || f.StartS != p.EndS || f.EndS != q.StartS {
			t.Errorf("flight %d %+v does not join landings %+v and %+v", i, f, p, q)
		}
		// Flower centres 400 px = 200 mm apart; the bee lands and
		// leaves at the centres (within noise).
		if math.Abs(f.FlowerDistanceMM-200) > 1e-9 || math.Abs(f.DistanceMM-200) > 2 {
			t.Errorf("flight %d: distance %.2f mm, between flowers %.2f mm, want 200", i, f.DistanceMM, f.FlowerDistanceMM)
		}
		if f.PathLengthMM < f.DistanceMM || f.PathLengthMM > 1.2*f.DistanceMM {
			t.Errorf("flight %d: path %.1f mm for a %.1f mm straight flight", i, f.PathLengthMM, f.DistanceMM)
		}
		if math.Abs(f.MeanSpeedMMPerS-f.PathLengthMM/f.DurationS) > 1e-9 {
			t.Errorf("flight %d: mean speed %v", i, f.MeanSpeedMMPerS)
		}
		if f.UnseenS != 0 {
			t.Errorf("flight %d: unseen %v s, want 0 (every frame has a point)", i, f.UnseenS)
		}
	}
	// The same bee out of the picture for 12 frames in mid-flight (the
	// track has no points there): the second flight says so.
	mid := (fs[1].StartFrame + fs[1].EndFrame) / 2
	cut := tr
	cut.Samples = nil
	for _, smp := range tr.Samples {
		if smp.Frame < mid || smp.Frame >= mid+12 {
			cut.Samples = append(cut.Samples, smp)
		}
	}
	resCut, err := Analyze([]kinematics.Result{cut}, fm, clip30, DefaultSettings())
	if err != nil {
		t.Fatal(err)
	}
	if fc := resCut.Flights; len(fc) != 2 || fc[0].UnseenS != 0 || math.Abs(fc[1].UnseenS-12.0/30) > 1e-12 {
		t.Errorf("flights with 12 frames unseen in the second: %+v, want UnseenS 0 and 0.4 s", fc)
	}
	b := res.Summary.PerBee[0]
	if b.Landings != 3 || b.FlowersVisited != 2 || math.Abs(b.RevisitFrac-1.0/3) > 1e-12 || b.InterVisitS.N != 2 {
		t.Errorf("bee summary %+v", b)
	}
	// Kinds a -> b -> a: one move a->b, one b->a.
	kt := b.KindTransitions
	if len(kt.Kinds) != 2 || kt.Counts[0][1] != 1 || kt.Counts[1][0] != 1 || kt.Counts[0][0] != 0 || kt.Counts[1][1] != 0 {
		t.Errorf("transitions %+v", kt)
	}
	// Strict alternation: Bateman's index -1.
	if len(b.Constancy) != 1 || b.Constancy[0].BatemanIndex != -1 {
		t.Errorf("constancy %+v, want index -1", b.Constancy)
	}
}

func TestAnalyzeBadInput(t *testing.T) {
	fm := FlowerMap{Flowers: []Flower{{ID: "A", XPX: 10, YPX: 10, RPX: 5}}}
	good := kinematics.Result{ID: 3, Samples: []kinematics.Sample{{Point: kinematics.Point{Frame: 0}}, {Point: kinematics.Point{Frame: 1, TimeS: 1.0 / 30}}}}
	bad := kinematics.Result{ID: 4, Samples: []kinematics.Sample{{Point: kinematics.Point{Frame: 5}}, {Point: kinematics.Point{Frame: 5}}}}
	if _, err := Analyze([]kinematics.Result{good, bad}, fm, clip30, DefaultSettings()); err == nil {
		t.Error("repeated frame: no error")
	}
	dup := FlowerMap{Flowers: []Flower{fm.Flowers[0], fm.Flowers[0]}}
	var me *MapError
	if _, err := Analyze(nil, dup, clip30, DefaultSettings()); !errors.As(err, &me) {
		t.Errorf("duplicate flowers: err = %v, want *MapError", err)
	}
	s := DefaultSettings()
	s.MinLandingS = -1
	var se *SettingsError
	if _, err := Analyze(nil, fm, clip30, s); !errors.As(err, &se) || se.Field != "MinLandingS" {
		t.Errorf("negative MinLandingS: err = %v", err)
	}
	if _, err := Analyze([]kinematics.Result{good}, fm, Clip{FPS: 30}, DefaultSettings()); err == nil {
		t.Error("no scale and a track that does not move: no error")
	}
	// Zero settings take the defaults.
	if r, err := Analyze(nil, fm, clip30, Settings{}); err != nil || r.Summary.Clip.FlowersInMap != 1 {
		t.Errorf("zero settings: %v", err)
	}
}

// TestNoiseEstimate checks the position-noise estimate on a track with
// known noise: still spells, walks and hovering mixed.
func TestNoiseEstimate(t *testing.T) {
	for _, sigmaPX := range []float64{0.3, 0.7, 1.5} {
		s := script(0, startAt(300, 300), rest(3), fly(600, 300), rest(2), hover(1, 4), fly(900, 400), rest(4))
		tr := s.track(t, 1, 0, frameOf(s.endS)-1, sigmaPX, 9)
		got := noiseSigmaMM([]kinematics.Result{tr}, 150)
		want := sigmaPX / 2
		if math.Abs(got-want) > 0.1*want {
			t.Errorf("sigma %.2f px: estimate %.4f mm, want %.4f mm +- 10%%", sigmaPX, got, want)
		}
	}
}

// TestChiSquareMedian checks the constant used by the noise estimate: the
// chi-squared distribution with 4 degrees of freedom has the closed-form
// CDF 1 - (1 + x/2) exp(-x/2) (from memory; the even-degree form of the
// regularised gamma function), which is 1/2 at its median.
func TestChiSquareMedian(t *testing.T) {
	x := chi2_4MedianOver4 * 4
	if cdf := 1 - (1+x/2)*math.Exp(-x/2); math.Abs(cdf-0.5) > 1e-6 {
		t.Errorf("CDF(%v) = %v, want 0.5", x, cdf)
	}
}
