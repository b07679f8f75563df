package visits

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestBatemanIndex checks Bateman's (1951) constancy index,
//
//	BI = (sqrt(AA*BB) - sqrt(AB*BA)) / (sqrt(AA*BB) + sqrt(AB*BA)),
//
// on worked examples computed by hand from that definition (formula as
// given by Waser 1986, from memory).
func TestBatemanIndex(t *testing.T) {
	cases := []struct {
		name           string
		aa, ab, ba, bb int
		want           float64
	}{
		// sqrt(9*4) = 6, sqrt(1*1) = 1: (6 - 1)/(6 + 1) = 5/7.
		{"mostly constant", 9, 1, 1, 4, 5.0 / 7},
		// sqrt(1*1) = 1, sqrt(4*9) = 6: (1 - 6)/(1 + 6) = -5/7.
		{"mostly switching", 1, 4, 9, 1, -5.0 / 7},
		// AA*BB = AB*BA = 12: switching as often as the proportions of
		// moves predict, 0.
		{"independent", 4, 2, 6, 3, 0},
		{"complete constancy", 5, 0, 0, 3, 1},
		{"strict alternation", 0, 4, 3, 0, -1},
		// sqrt(2*8) = 4, sqrt(1*1) = 1: 3/5.
		{"hand example", 2, 1, 1, 8, 0.6},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := BatemanIndex(c.aa, c.ab, c.ba, c.bb); math.Abs(got-c.want) > 1e-12 {
				t.Errorf("BatemanIndex(%d, %d, %d, %d) = %v, want %v", c.aa, c.ab, c.ba, c.bb, got, c.want)
			}
		})
	}
	if !math.IsNaN(BatemanIndex(0, 3, 0, 0)) {
		t.Error("BatemanIndex with both products zero is not NaN")
	}
	// Property: Bateman's index is Yule's coefficient of colligation of
	// the 2x2 table, Y = (sqrt(OR) - 1)/(sqrt(OR) + 1) with the odds
	// ratio OR = AA*BB/(AB*BA) (Yule 1912; from memory), and lies in
	// [-1, 1]; swapping the kinds (AA <-> BB, AB <-> BA) leaves it.
	rng := rand.New(rand.NewPCG(5, 5))
	for i := 0; i < 200; i++ {
		aa, ab, ba, bb := 1+rng.IntN(30), 1+rng.IntN(30), 1+rng.IntN(30), 1+rng.IntN(30)
		or := float64(aa*bb) / float64(ab*ba)
		y := (math.Sqrt(or) - 1) / (math.Sqrt(or) + 1)
		bi := BatemanIndex(aa, ab, ba, bb)
		if math.Abs(bi-y) > 1e-12 || bi < -1 || bi > 1 || math.Abs(bi-BatemanIndex(bb, ba, ab, aa)) > 1e-12 {
			t.Fatalf("table %d %d %d %d: index %v, Yule's Y %v", aa, ab, ba, bb, bi, y)
		}
	}
}

func TestConstancyFromFlights(t *testing.T) {
	// A bee's kinds in landing order: a a a b b a b b b.
	seq := []string{"a", "a", "a", "b", "b", "a", "b", "b", "b"}
	var fs []Flight
	for i := 1; i < len(seq); i++ {
		fs = append(fs, Flight{FromKind: seq[i-1], ToKind: seq[i]})
	}
	// Moves: aa = 2, ab = 2, ba = 1, bb = 3 (counted by hand).
	kt := kindTransitions(fs)
	if kt.Counts[0][0] != 2 || kt.Counts[0][1] != 2 || kt.Counts[1][0] != 1 || kt.Counts[1][1] != 3 {
		t.Fatalf("counts %v", kt.Counts)
	}
	cs := constancy(kt)
	// (sqrt(6) - sqrt(2)) / (sqrt(6) + sqrt(2)) = 2 - sqrt(3).
	if len(cs) != 1 || math.Abs(cs[0].BatemanIndex-(2-math.Sqrt(3))) > 1e-12 {
		t.Errorf("constancy %+v, want 2 - sqrt(3) = %v", cs, 2-math.Sqrt(3))
	}
	// Flights involving a flower without a kind are left out.
	fs = append(fs, Flight{FromKind: "b", ToKind: ""})
	if kt2 := kindTransitions(fs); kt2.Counts[1][1] != 3 || len(kt2.Kinds) != 2 {
		t.Errorf("kindless flight counted: %+v", kt2)
	}
}

func TestDescribe(t *testing.T) {
	cases := []struct {
		name                      string
		xs                        []float64
		mean, median, q1, q3, iqr float64
	}{
		// R: quantile(c(1, 2, 3, 4)) gives 1.75, 2.5, 3.25 (type 7, R's
		// default; from memory, and by hand: h = 3p + 1).
		{"1..4", []float64{4, 1, 3, 2}, 2.5, 2.5, 1.75, 3.25, 1.5},
		// R: quantile(c(1, 2, 3, 4, 100)) gives 2, 3, 4.
		{"outlier", []float64{1, 2, 3, 4, 100}, 22, 3, 2, 4, 2},
		{"one value", []float64{7}, 7, 7, 7, 7, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			st := describe(c.xs)
			for _, p := range [][2]float64{{st.Mean, c.mean}, {st.Median, c.median}, {st.Q1, c.q1}, {st.Q3, c.q3}, {st.IQR, c.iqr}} {
				if math.Abs(p[0]-p[1]) > 1e-12 {
					t.Errorf("got %+v, want mean %v median %v q1 %v q3 %v iqr %v", st, c.mean, c.median, c.q1, c.q3, c.iqr)
					break
				}
			}
		})
	}
	if st := describe(nil); st.N != 0 || !math.IsNaN(st.Mean) || !math.IsNaN(st.IQR) {
		t.Errorf("empty: %+v", st)
	}
}

func TestScoreAgainstTruth(t *testing.T) {
	truthL := []Landing{
		{TrackID: 0, FlowerID: "A", StartFrame: 10, EndFrame: 40},
		{TrackID: 0, FlowerID: "B", StartFrame: 100, EndFrame: 150},
		{TrackID: 1, FlowerID: "A", StartFrame: 300, EndFrame: 360, DurationS: 2.0, CensoredEnd: true},
		// Cut by the clip's end to 2 frames: not scored.
		{TrackID: 1, FlowerID: "D", StartFrame: 998, EndFrame: 999, DurationS: 2.0 / 30, CensoredEnd: true},
	}
	gotL := []Landing{
		{TrackID: 7, FlowerID: "A", StartFrame: 12, EndFrame: 41},   // onset 2, offset 1
		{TrackID: 7, FlowerID: "B", StartFrame: 99, EndFrame: 150},  // onset 1, offset 0
		{TrackID: 9, FlowerID: "A", StartFrame: 303, EndFrame: 350}, // onset 3, end censored in truth
		{TrackID: 9, FlowerID: "C", StartFrame: 500, EndFrame: 530}, // false
		{TrackID: 9, FlowerID: "A", StartFrame: 200, EndFrame: 240}, // false, over an inspection
		{TrackID: 9, FlowerID: "D", StartFrame: 996, EndFrame: 999}, // on the unscored landing: left out
	}
	truthI := []Inspection{
		{FlowerID: "C", StartFrame: 60, EndFrame: 80},
		{FlowerID: "A", StartFrame: 205, EndFrame: 230}, // reported as a landing
		{FlowerID: "B", StartFrame: 120, EndFrame: 140}, // during another bee's true landing on B: not counted
	}
	gotI := []Inspection{{FlowerID: "C", StartFrame: 58, EndFrame: 75}, {FlowerID: "B", StartFrame: 118, EndFrame: 141}}
	s := ScoreAgainstTruth(truthL, truthI, gotL, gotI)
	// By hand: 3 matched of 5 found and 3 true: P 0.6, R 1, F1 0.75;
	// onset errors {1, 2, 3}: median 2, p95 2.9 (type 7: 2 + 0.9); offset
	// errors {0, 1}: median 0.5, p95 0.95.
	checks := []struct {
		name      string
		got, want float64
	}{
		{"precision", s.LandingPrecision, 0.6},
		{"recall", s.LandingRecall, 1},
		{"F1", s.LandingF1, 0.75},
		{"onset median", s.OnsetErrMedianFrames, 2},
		{"onset p95", s.OnsetErrP95Frames, 2.9},
		{"offset median", s.OffsetErrMedianFrames, 0.5},
		{"offset p95", s.OffsetErrP95Frames, 0.95},
		{"inspection recall", s.InspectionRecall, 2.0 / 3},
		{"inspections as landings", s.InspectionsAsLandingsFrac, 1.0 / 3},
	}
	if s.IgnoredTruthLandings != 1 || s.IgnoredFoundLandings != 1 || s.TruthLandings != 3 || s.FoundLandings != 5 {
		t.Errorf("counts %+v", s)
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("%s = %v, want %v", c.name, c.got, c.want)
		}
	}
	if err := s.MeetsTargets(); err == nil {
		t.Error("MeetsTargets accepted F1 0.75")
	}
	perfect := ScoreAgainstTruth(truthL, truthI, truthL, truthI)
	if err := perfect.MeetsTargets(); err != nil || perfect.LandingF1 != 1 || perfect.OnsetErrMaxFrames != 0 {
		t.Errorf("truth against itself: %v, %v", perfect, err)
	}
}
