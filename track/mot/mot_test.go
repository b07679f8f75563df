package mot

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"flitlog/track/link"
)

// track returns observations of one object at (x(f), y) for the frames.
func track(id int, frames []int, x func(f int) float64, y float64) []Obs {
	var out []Obs
	for _, f := range frames {
		out = append(out, Obs{Frame: f, ID: id, XPX: x(f), YPX: y})
	}
	return out
}

func seq(a, b int) []int {
	var out []int
	for f := a; f <= b; f++ {
		out = append(out, f)
	}
	return out
}

func at(v float64) func(int) float64 { return func(int) float64 { return v } }

func cat(sets ...[]Obs) []Obs {
	var out []Obs
	for _, s := range sets {
		out = append(out, s...)
	}
	return out
}

// TestEvaluateHandWorked: every expected value below was worked out by
// hand from the definitions of CLEAR MOT (Bernardin & Stiefelhagen 2008,
// Sec. 2.1.1-2.1.2, Eqs. 1 and 3), IDF1 (Ristani et al. 2016, Sec. 4) and
// fragmentations / mostly tracked (Li, Huang & Nevatia 2009).
func TestEvaluateHandWorked(t *testing.T) {
	const T = 10.0 // px
	type want struct {
		matches, misses, fp, idsw, frag int
		mota, motp, rmse                float64
		idtp                            int
		idf1, idp, idr                  float64
		mt, pt, ml                      int
		falseTracks                     []int
	}
	cases := []struct {
		name       string
		truth, hyp []Obs
		want       want
	}{
		{
			// Two objects, 5 frames, hypotheses on top of them with other
			// IDs: nothing wrong.
			name:  "perfect",
			truth: cat(track(1, seq(0, 4), at(0), 0), track(2, seq(0, 4), at(100), 0)),
			hyp:   cat(track(10, seq(0, 4), at(0), 0), track(20, seq(0, 4), at(100), 0)),
			want: want{matches: 10, mota: 1, motp: 0, rmse: 0, idtp: 10, idf1: 1, idp: 1, idr: 1,
				mt: 2},
		},
		{
			// One object, 4 frames; hypothesis 10 covers frames 0-1, 30
			// frames 2-3: 1 ID switch. MOTA = 1 - 1/4. IDTP = 2 (either
			// pairing), IDF1 = 2*2/(4+4).
			name:  "handover",
			truth: track(1, seq(0, 3), func(f int) float64 { return float64(f) }, 0),
			hyp: cat(track(10, seq(0, 1), func(f int) float64 { return float64(f) }, 0),
				track(30, seq(2, 3), func(f int) float64 { return float64(f) }, 0)),
			want: want{matches: 4, idsw: 1, mota: 0.75, motp: 0, rmse: 0, idtp: 2, idf1: 0.5, idp: 0.5, idr: 0.5, mt: 1},
		},
		{
			// Two far-apart objects; the hypotheses swap objects at frame
			// 2: both objects change hypothesis, 2 ID switches.
			// MOTA = 1 - 2/8; IDTP = 4, IDF1 = 8/16.
			name:  "swap",
			truth: cat(track(1, seq(0, 3), at(0), 0), track(2, seq(0, 3), at(100), 0)),
			hyp: cat(track(10, seq(0, 1), at(0), 0), track(10, seq(2, 3), at(100), 0),
				track(20, seq(0, 1), at(100), 0), track(20, seq(2, 3), at(0), 0)),
			want: want{matches: 8, idsw: 2, mota: 0.75, motp: 0, rmse: 0, idtp: 4, idf1: 0.5, idp: 0.5, idr: 0.5, mt: 2},
		},
		{
			// Object 1 present in frames 0-3 and 5 at (0, 0). Hypothesis 10
			// at (3, 4) (distance 5) in frames 0-1, at (30, 0) (too far) in
			// frame 2, at (0, 0) in frames 4 (no object) and 5.
			// Matches frames 0, 1, 5 (d = 5, 5, 0); misses frames 2, 3;
			// false positives frames 2, 4. MOTA = 1 - (2 + 2)/5 = 0.2,
			// MOTP = 10/3, RMSE = sqrt(50/3). Tracked, missed, tracked:
			// 1 fragmentation. IDTP = 3, IDF1 = 6/10. Matched in 3/5 of
			// its frames: partly tracked.
			name:  "misses, false positives, fragmentation",
			truth: track(1, []int{0, 1, 2, 3, 5}, at(0), 0),
			hyp: cat(track(10, seq(0, 1), at(3), 4), track(10, []int{2}, at(30), 0),
				track(10, []int{4, 5}, at(0), 0)),
			want: want{matches: 3, misses: 2, fp: 2, frag: 1, mota: 0.2, motp: 10.0 / 3, rmse: math.Sqrt(50.0 / 3),
				idtp: 3, idf1: 0.6, idp: 0.6, idr: 0.6, pt: 1},
		},
		{
			// CLEAR MOT step 1: the correspondence 1-10 of frame 0 is kept
			// in frame 1 (distance 4 <= T) although 20 is closer (1 px);
			// 20 is a false positive. MOTA = 1 - 1/2, MOTP = 4. IDTP = 2
			// (1-10 both frames), IDF1 = 4/5. Track 20 is never matched:
			// a false track.
			name:  "keep previous correspondence",
			truth: track(1, seq(0, 1), at(0), 0),
			hyp:   cat(track(10, seq(0, 1), at(4), 0), track(20, []int{1}, at(1), 0)),
			want: want{matches: 2, fp: 1, mota: 0.5, motp: 4, rmse: 4, idtp: 2, idf1: 0.8, idp: 2.0 / 3, idr: 1,
				mt: 1, falseTracks: []int{20}},
		},
		{
			// Object 1 tracked by 10 in frames 0-1, missed in frame 2,
			// tracked by 20 in frame 3: the switch counts against the
			// latest match even across the gap (1 ID switch), and the gap is
			// a fragmentation. MOTA = 1 - (1 + 1)/4.
			name:  "switch across a gap",
			truth: track(1, seq(0, 3), at(0), 0),
			hyp:   cat(track(10, seq(0, 1), at(0), 0), track(20, []int{3}, at(0), 0)),
			want: want{matches: 3, misses: 1, idsw: 1, frag: 1, mota: 0.5, motp: 0, rmse: 0,
				idtp: 2, idf1: 4.0 / 7, idp: 2.0 / 3, idr: 0.5, pt: 1},
		},
		{
			// Nothing hypothesised: all misses, MOTA = 0, IDF1 = 0.
			name:  "no hypotheses",
			truth: track(1, seq(0, 4), at(0), 0),
			want: want{misses: 5, mota: 0, motp: math.NaN(), rmse: math.NaN(), idf1: 0, idp: math.NaN(), idr: 0,
				ml: 1},
		},
	}
	const tol = 1e-12
	close := func(a, b float64) bool {
		if math.IsNaN(b) {
			return math.IsNaN(a)
		}
		return math.Abs(a-b) <= tol
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := Evaluate(tc.truth, tc.hyp, T)
			if err != nil {
				t.Fatal(err)
			}
			w := tc.want
			counts := [][2]int{
				{got.Matches, w.matches}, {got.Misses, w.misses}, {got.FalsePositives, w.fp},
				{got.IDSwitches, w.idsw}, {got.Fragmentations, w.frag}, {got.IDTP, w.idtp},
				{got.MostlyTracked, w.mt}, {got.PartlyTracked, w.pt}, {got.MostlyLost, w.ml},
			}
			for i, c := range counts {
				if c[0] != c[1] {
					t.Errorf("count %d (matches, misses, fp, idsw, frag, idtp, mt, pt, ml): got %d, want %d", i, c[0], c[1])
				}
			}
			reals := [][2]float64{
				{got.MOTA, w.mota}, {got.MOTP, w.motp}, {got.RMSEPX, w.rmse},
				{got.IDF1, w.idf1}, {got.IDP, w.idp}, {got.IDR, w.idr},
			}
			for i, r := range reals {
				if !close(r[0], r[1]) {
					t.Errorf("score %d (MOTA, MOTP, RMSE, IDF1, IDP, IDR): got %v, want %v", i, r[0], r[1])
				}
			}
			if got.IDFN != got.GTObs-got.IDTP || got.IDFP != got.HypObs-got.IDTP {
				t.Errorf("IDFN %d IDFP %d inconsistent with IDTP %d", got.IDFN, got.IDFP, got.IDTP)
			}
			if len(got.FalseTracks) != len(w.falseTracks) {
				t.Fatalf("false tracks %v, want %v", got.FalseTracks, w.falseTracks)
			}
			for i := range w.falseTracks {
				if got.FalseTracks[i] != w.falseTracks[i] {
					t.Errorf("false tracks %v, want %v", got.FalseTracks, w.falseTracks)
				}
			}
		})
	}
}

// TestIDTPBruteForce: the IDTP of Evaluate (Hungarian matching of IDs)
// equals the best over all one-to-one pairings of truth and hypothesis
// IDs, enumerated, on seeded random scenes.
func TestIDTPBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 200; trial++ {
		nT, nH := 1+rng.IntN(4), 1+rng.IntN(5)
		var truth, hyp []Obs
		for f := 0; f < 12; f++ {
			for id := 1; id <= nT; id++ {
				if rng.Float64() < 0.8 {
					truth = append(truth, Obs{Frame: f, ID: id, XPX: 30 * float64(id), YPX: 0})
				}
			}
			for id := 1; id <= nH; id++ {
				if rng.Float64() < 0.7 {
					// Near a random truth position, sometimes too far.
					g := 1 + rng.IntN(nT)
					hyp = append(hyp, Obs{Frame: f, ID: 100 + id, XPX: 30*float64(g) + 15*rng.Float64(), YPX: 0})
				}
			}
		}
		sc, err := Evaluate(truth, hyp, 10)
		if err != nil {
			t.Fatal(err)
		}
		// Overlap counts by brute force.
		ov := map[[2]int]int{}
		for _, g := range truth {
			for _, h := range hyp {
				if g.Frame == h.Frame && dist(g, h) <= 10 {
					ov[[2]int{g.ID, h.ID}]++
				}
			}
		}
		best := 0
		used := make([]bool, nH)
		var rec func(i, sum int)
		rec = func(i, sum int) {
			if i > nT {
				best = max(best, sum)
				return
			}
			rec(i+1, sum)
			for j := 0; j < nH; j++ {
				if !used[j] {
					used[j] = true
					rec(i+1, sum+ov[[2]int{i, 101 + j}])
					used[j] = false
				}
			}
		}
		rec(1, 0)
		if sc.IDTP != best {
			t.Fatalf("trial %d: IDTP %d, brute force %d", trial, sc.IDTP, best)
		}
	}
}

func TestEvaluateErrors(t *testing.T) {
	good := []Obs{{Frame: 0, ID: 1}}
	cases := []struct {
		name       string
		truth, hyp []Obs
		set        string
		frame, id  int
	}{
		{"duplicate truth", []Obs{{Frame: 3, ID: 7}, {Frame: 3, ID: 7, XPX: 1}}, good, "truth", 3, 7},
		{"NaN hypothesis", good, []Obs{{Frame: 2, ID: 9, XPX: math.NaN()}}, "hypothesis", 2, 9},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Evaluate(tc.truth, tc.hyp, 5)
			var de *DataError
			if !errors.As(err, &de) || de.Set != tc.set || de.Frame != tc.frame || de.ID != tc.id {
				t.Errorf("error %v, want DataError for %s frame %d id %d", err, tc.set, tc.frame, tc.id)
			}
		})
	}
}

func TestFalseTracksAndRate(t *testing.T) {
	truth := track(1, seq(0, 99), at(0), 0)
	hyp := cat(track(10, seq(0, 99), at(1), 0),
		track(20, seq(0, 9), at(300), 0),                              // never near truth
		track(30, seq(50, 59), func(f int) float64 { return 0.5 }, 0)) // duplicate, unmatched
	for _, tc := range []struct {
		frac float64
		want []int
	}{{0.5, []int{20, 30}}, {1, []int{20, 30}}} {
		got, err := FalseTracks(truth, hyp, 5, tc.frac)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != len(tc.want) || got[0] != tc.want[0] || got[1] != tc.want[1] {
			t.Errorf("frac %v: %v, want %v", tc.frac, got, tc.want)
		}
	}
	// 2 false tracks in 1800 frames at 30 fps (1 minute): 2 per minute.
	if got := PerMinute(2, 1800, 30); math.Abs(got-2) > 1e-12 {
		t.Errorf("PerMinute = %v, want 2", got)
	}
}

func TestFromTracks(t *testing.T) {
	tr := []link.Track{{ID: 4, Points: []link.Point{
		{Frame: 0, XPX: 1, YPX: 2, Observed: true}, {Frame: 1, XPX: 3, YPX: 4}, {Frame: 2, XPX: 5, YPX: 6, Observed: true},
	}}}
	if all, obs := FromTracks(tr, false), FromTracks(tr, true); len(all) != 3 || len(obs) != 2 || obs[1] != (Obs{Frame: 2, ID: 4, XPX: 5, YPX: 6}) {
		t.Errorf("FromTracks: %v / %v", all, obs)
	}
}
