package visits

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Score compares found landings and inspections with ground truth (see
// ScoreAgainstTruth). Ratios with a zero denominator are NaN.
type Score struct {
	// TruthLandings and FoundLandings leave out the ignored ones.
	TruthLandings, FoundLandings, MatchedLandings int
	// IgnoredTruthLandings: true landings cut by the clip's start or end
	// to less than MinScoredCensoredS, which no detector can tell from a
	// touch in passing; they count neither as found nor as missed, and
	// found landings overlapping them on the same flower are left out too
	// (IgnoredFoundLandings).
	IgnoredTruthLandings, IgnoredFoundLandings int
	LandingPrecision, LandingRecall, LandingF1 float64
	// Onset (offset) error: |found StartFrame - true StartFrame| (EndFrame)
	// over matched landings whose start (end) is censored in neither,
	// frames. Percentiles as in Stats (Hyndman & Fan 1996, definition 7).
	OnsetErrMedianFrames, OnsetErrP95Frames   float64
	OffsetErrMedianFrames, OffsetErrP95Frames float64
	OnsetErrMaxFrames, OffsetErrMaxFrames     float64
	// Mean signed handling-time error of matched uncensored landings
	// (found - true), s.
	HandlingBiasS float64

	TruthInspections, FoundInspections, MatchedInspections int
	InspectionPrecision, InspectionRecall                  float64
	// InspectionsAsLandingsFrac is the fraction of true inspections of
	// which at least half the frames lie in found landings on the same
	// flower that match no true landing (another bee's true landing on
	// the flower being inspected does not count).
	InspectionsAsLandingsFrac float64
}

// MinScoredCensoredS: a true landing cut by the clip's start or end that
// is visible for less than this (s) is not scored (see
// Score.IgnoredTruthLandings). It equals the default MinLandingS.
const MinScoredCensoredS = 0.3

// Targets are the accuracy targets of the visit detector on synthetic
// scenes (issue 5).
var Targets = struct {
	LandingF1Min, OnsetMedianMax, OnsetP95Max, InspectionRecallMin, InspectionsAsLandingsMax float64
}{0.98, 1, 3, 0.9, 0.05}

// MeetsTargets returns nil when s meets Targets, else an error listing
// every target missed.
func (s Score) MeetsTargets() error {
	var miss []string
	chk := func(name string, v float64, ok bool, want string) {
		if !ok || math.IsNaN(v) {
			miss = append(miss, fmt.Sprintf("%s %.3g (want %s)", name, v, want))
		}
	}
	t := Targets
	chk("landing F1", s.LandingF1, s.LandingF1 >= t.LandingF1Min, fmt.Sprintf(">= %g", t.LandingF1Min))
	chk("onset error median", s.OnsetErrMedianFrames, s.OnsetErrMedianFrames <= t.OnsetMedianMax, fmt.Sprintf("<= %g frames", t.OnsetMedianMax))
	chk("onset error p95", s.OnsetErrP95Frames, s.OnsetErrP95Frames <= t.OnsetP95Max, fmt.Sprintf("<= %g frames", t.OnsetP95Max))
	chk("offset error median", s.OffsetErrMedianFrames, s.OffsetErrMedianFrames <= t.OnsetMedianMax, fmt.Sprintf("<= %g frames", t.OnsetMedianMax))
	chk("offset error p95", s.OffsetErrP95Frames, s.OffsetErrP95Frames <= t.OnsetP95Max, fmt.Sprintf("<= %g frames", t.OnsetP95Max))
	if s.TruthInspections > 0 {
		chk("inspection recall", s.InspectionRecall, s.InspectionRecall >= t.InspectionRecallMin, fmt.Sprintf(">= %g", t.InspectionRecallMin))
		chk("inspections reported as landings", s.InspectionsAsLandingsFrac, s.InspectionsAsLandingsFrac <= t.InspectionsAsLandingsMax, fmt.Sprintf("<= %g", t.InspectionsAsLandingsMax))
	}
	if len(miss) == 0 {
		return nil
	}
	return fmt.Errorf("visits: targets missed: %s", strings.Join(miss, "; "))
}

func (s Score) String() string {
	return fmt.Sprintf("landings truth %d found %d matched %d (ignored: %d truth, %d found): P %.3f R %.3f F1 %.3f; onset err median %.1f p95 %.1f max %.0f frames; "+
		"offset err median %.1f p95 %.1f max %.0f frames; handling bias %+.3f s; inspections truth %d found %d matched %d: "+
		"recall %.3f precision %.3f, as landings %.3f",
		s.TruthLandings, s.FoundLandings, s.MatchedLandings, s.IgnoredTruthLandings, s.IgnoredFoundLandings, s.LandingPrecision, s.LandingRecall, s.LandingF1,
		s.OnsetErrMedianFrames, s.OnsetErrP95Frames, s.OnsetErrMaxFrames,
		s.OffsetErrMedianFrames, s.OffsetErrP95Frames, s.OffsetErrMaxFrames, s.HandlingBiasS,
		s.TruthInspections, s.FoundInspections, s.MatchedInspections, s.InspectionRecall, s.InspectionPrecision, s.InspectionsAsLandingsFrac)
}

// span is an inclusive frame interval on one flower.
type span struct {
	flower string
	f0, f1 int
}

func overlap(a, b span) int {
	if a.flower != b.flower {
		return 0
	}
	return max(0, min(a.f1, b.f1)-max(a.f0, b.f0)+1)
}

// matchSpans pairs truth and found spans one to one: pairs on the same
// flower that share at least one frame, taken greedily in decreasing
// order of intersection over union. Track ids are ignored, since the
// tracker's ids are not the truth's. It returns, per truth span, the index
// of its found span or -1.
func matchSpans(truth, found []span) []int {
	type pair struct {
		t, f int
		iou  float64
	}
	var ps []pair
	for i, t := range truth {
		for j, f := range found {
			if o := overlap(t, f); o > 0 {
				union := (t.f1 - t.f0 + 1) + (f.f1 - f.f0 + 1) - o
				ps = append(ps, pair{i, j, float64(o) / float64(union)})
			}
		}
	}
	sort.SliceStable(ps, func(a, b int) bool {
		if ps[a].iou != ps[b].iou {
			return ps[a].iou > ps[b].iou
		}
		if ps[a].t != ps[b].t {
			return ps[a].t < ps[b].t
		}
		return ps[a].f < ps[b].f
	})
	m := make([]int, len(truth))
	for i := range m {
		m[i] = -1
	}
	used := make([]bool, len(found))
	for _, p := range ps {
		if m[p.t] < 0 && !used[p.f] {
			m[p.t], used[p.f] = p.f, true
		}
	}
	return m
}

// ScoreAgainstTruth scores found landings and inspections against the
// truth of a synthetic scene. Landings (inspections) match one to one when
// they are on the same flower and share at least one frame; the best
// overlapping pairs (intersection over union of their frame intervals) are
// taken first. Track ids are not compared, since the tracker numbers bees
// its own way. Onset and offset errors are taken over matched landings,
// leaving out starts (ends) censored in either. True landings cut by the
// clip to less than MinScoredCensoredS are not scored (see
// Score.IgnoredTruthLandings).
func ScoreAgainstTruth(truthL []Landing, truthI []Inspection, gotL []Landing, gotI []Inspection) Score {
	nan := math.NaN()
	s := Score{TruthInspections: len(truthI), FoundInspections: len(gotI)}
	truthL, gotL, s.IgnoredTruthLandings, s.IgnoredFoundLandings = dropUnscorable(truthL, gotL)
	s.TruthLandings, s.FoundLandings = len(truthL), len(gotL)
	ls := func(xs []Landing) []span {
		out := make([]span, len(xs))
		for i, x := range xs {
			out[i] = span{x.FlowerID, x.StartFrame, x.EndFrame}
		}
		return out
	}
	is := func(xs []Inspection) []span {
		out := make([]span, len(xs))
		for i, x := range xs {
			out[i] = span{x.FlowerID, x.StartFrame, x.EndFrame}
		}
		return out
	}
	m := matchSpans(ls(truthL), ls(gotL))
	var on, off, bias []float64
	for i, j := range m {
		if j < 0 {
			continue
		}
		s.MatchedLandings++
		t, g := truthL[i], gotL[j]
		if !t.CensoredStart && !g.CensoredStart {
			on = append(on, math.Abs(float64(g.StartFrame-t.StartFrame)))
		}
		if !t.CensoredEnd && !g.CensoredEnd {
			off = append(off, math.Abs(float64(g.EndFrame-t.EndFrame)))
		}
		if !t.CensoredStart && !g.CensoredStart && !t.CensoredEnd && !g.CensoredEnd {
			bias = append(bias, g.DurationS-t.DurationS)
		}
	}
	s.LandingPrecision = ratio(float64(s.MatchedLandings), float64(len(gotL)))
	s.LandingRecall = ratio(float64(s.MatchedLandings), float64(len(truthL)))
	s.LandingF1 = f1(s.LandingPrecision, s.LandingRecall)
	if len(truthL) == 0 && len(gotL) == 0 {
		s.LandingPrecision, s.LandingRecall, s.LandingF1 = 1, 1, 1
	}
	sort.Float64s(on)
	sort.Float64s(off)
	s.OnsetErrMedianFrames, s.OnsetErrP95Frames, s.OnsetErrMaxFrames = quantile(on, 0.5), quantile(on, 0.95), quantile(on, 1)
	s.OffsetErrMedianFrames, s.OffsetErrP95Frames, s.OffsetErrMaxFrames = quantile(off, 0.5), quantile(off, 0.95), quantile(off, 1)
	s.HandlingBiasS = describe(bias).Mean

	mi := matchSpans(is(truthI), is(gotI))
	for _, j := range mi {
		if j >= 0 {
			s.MatchedInspections++
		}
	}
	s.InspectionRecall = ratio(float64(s.MatchedInspections), float64(len(truthI)))
	s.InspectionPrecision = ratio(float64(s.MatchedInspections), float64(len(gotI)))
	matchedGot := make([]bool, len(gotL))
	for _, j := range m {
		if j >= 0 {
			matchedGot[j] = true
		}
	}
	asL := 0
	for _, t := range truthI {
		ts := span{t.FlowerID, t.StartFrame, t.EndFrame}
		covered := 0
		for f := ts.f0; f <= ts.f1; f++ {
			for j, g := range gotL {
				if !matchedGot[j] && g.FlowerID == t.FlowerID && g.StartFrame <= f && f <= g.EndFrame {
					covered++
					break
				}
			}
		}
		if 2*covered >= ts.f1-ts.f0+1 {
			asL++
		}
	}
	s.InspectionsAsLandingsFrac = ratio(float64(asL), float64(len(truthI)))
	if len(truthI) == 0 {
		s.InspectionsAsLandingsFrac = nan
	}
	return s
}

// dropUnscorable removes the true landings cut by the clip to less than
// MinScoredCensoredS and the found landings that overlap them on the same
// flower.
func dropUnscorable(truthL, gotL []Landing) (t, g []Landing, nt, ng int) {
	var ignored []span
	for _, l := range truthL {
		if (l.CensoredStart || l.CensoredEnd) && l.DurationS < MinScoredCensoredS {
			ignored = append(ignored, span{l.FlowerID, l.StartFrame, l.EndFrame})
			continue
		}
		t = append(t, l)
	}
	for _, l := range gotL {
		drop := false
		for _, sp := range ignored {
			if overlap(sp, span{l.FlowerID, l.StartFrame, l.EndFrame}) > 0 {
				drop = true
				break
			}
		}
		if !drop {
			g = append(g, l)
		}
	}
	return t, g, len(truthL) - len(t), len(gotL) - len(g)
}

func f1(p, r float64) float64 {
	if math.IsNaN(p) || math.IsNaN(r) {
		return 0
	}
	if p+r == 0 {
		return 0
	}
	return 2 * p * r / (p + r)
}
