package agree

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Options tune Compare.
type Options struct {
	// ToleranceS is the largest gap between two landings on one flower
	// that may still match, s (see Gap). Range >= 0; zero means
	// DefaultToleranceS (0.5 s); a negative value means none: the
	// landings must overlap or touch.
	ToleranceS float64
	// GridS is the step of the frame-wise time grid, s; 1/fps samples
	// every frame. Range > 0; zero means DefaultGridS (0.1 s).
	GridS float64
	// FromS and ToS restrict the comparison to landings that overlap
	// [FromS, ToS) and the frame-wise grid to that span, s. When ToS <=
	// FromS (both zero, say) the span is automatic: from the earliest
	// start to the latest end in either table.
	FromS, ToS float64
}

// Report is the result of comparing two landing tables. A is the
// reference; differences are B - A.
type Report struct {
	A, B        *Table
	ToleranceS  float64 // as used, s (0 when the landings must overlap or touch)
	FromS, ToS  float64 // span compared, s
	WindowGiven bool    // FromS and ToS came from Options

	// Landings compared (those overlapping the span), as indices into
	// A.Landings and B.Landings.
	InA, InB []int
	Matches  []Match
	OnlyA    []int // indices into A.Landings of unmatched reference landings (misses)
	OnlyB    []int // indices into B.Landings of unmatched landings (extras)

	Precision, Recall, F1 float64
	Onset, Offset         DiffSummary // boundary differences B - A, s

	// Handling-time agreement over matched landings, s.
	Durations   BlandAltmanResult
	ICC         ICC   // ICC(2,1), the form reported
	ICCAll      []ICC // ICC(1,1), ICC(2,1), ICC(3,1); nil with fewer than 2 matches
	Concordance CCC

	Frames FrameAgreement

	Warnings []string
}

// Match is a matched pair of landings.
type Match struct {
	A, B        int    // indices into the tables' Landings
	FlowerID    string // as written in A
	OnsetDiffS  float64
	OffsetDiffS float64 // B - A
	DurationAS  float64
	DurationBS  float64
}

// DiffSummary summarises signed differences B - A, s.
type DiffSummary struct {
	N       int
	MedianS float64 // median of the signed differences
	MeanS   float64
	P95AbsS float64 // 95th percentile of |difference|
	MaxAbsS float64
}

func summarise(d []float64) DiffSummary {
	s := DiffSummary{N: len(d), MedianS: math.NaN(), MeanS: math.NaN(), P95AbsS: math.NaN(), MaxAbsS: math.NaN()}
	if len(d) == 0 {
		return s
	}
	abs := make([]float64, len(d))
	var sum float64
	for i, v := range d {
		abs[i] = math.Abs(v)
		sum += v
	}
	s.MedianS = Quantile(0.5, d)
	s.MeanS = sum / float64(len(d))
	s.P95AbsS = Quantile(0.95, abs)
	s.MaxAbsS = Quantile(1, abs)
	return s
}

// ClipError reports two landing tables of different clips.
type ClipError struct {
	A, B *Table
}

func (e *ClipError) Error() string {
	return fmt.Sprintf("%s: row %d, field clip: clip %q differs from clip %q of %s row %d: compare tables of the same clip",
		e.B.Name, e.B.ClipRow, e.B.Clip, e.A.Clip, e.A.Name, e.A.ClipRow)
}

// Compare compares landing table b with the reference table a: event
// matching (MatchLandings), precision, recall, F1, onset and offset
// differences, handling-time agreement over matched landings
// (BlandAltman with LoAZ, ICC2 with ICC1 and ICC3 alongside, LinCCC), and
// frame-wise agreement (CompareFrames). It returns a *ClipError when both
// tables name a clip and the clips differ. Statistics that need more
// matched landings than there are are NaN, with a warning.
func Compare(a, b *Table, opt Options) (*Report, error) {
	if a.Clip != "" && b.Clip != "" && a.Clip != b.Clip {
		return nil, &ClipError{A: a, B: b}
	}
	tol := opt.ToleranceS
	switch {
	case tol == 0:
		tol = DefaultToleranceS
	case tol < 0:
		tol = 0
	}
	grid := opt.GridS
	if grid == 0 {
		grid = DefaultGridS
	}
	if !(grid > 0) || math.IsInf(grid, 0) {
		panic("agree: grid step must be positive and finite")
	}
	r := &Report{A: a, B: b, ToleranceS: tol}
	if opt.ToS > opt.FromS {
		r.FromS, r.ToS, r.WindowGiven = opt.FromS, opt.ToS, true
	} else {
		r.FromS, r.ToS = math.Inf(1), math.Inf(-1)
		for _, t := range []*Table{a, b} {
			for _, l := range t.Landings {
				r.FromS = math.Min(r.FromS, l.StartS)
				r.ToS = math.Max(r.ToS, l.EndS)
			}
		}
	}
	pick := func(t *Table) ([]int, []Landing) {
		var idx []int
		var ls []Landing
		for i, l := range t.Landings {
			if r.WindowGiven && (l.EndS < r.FromS || l.StartS >= r.ToS || (l.EndS == r.FromS && l.StartS < l.EndS)) {
				continue
			}
			idx = append(idx, i)
			ls = append(ls, l)
		}
		return idx, ls
	}
	var la, lb []Landing
	r.InA, la = pick(a)
	r.InB, lb = pick(b)
	if r.WindowGiven {
		if len(la) == 0 {
			r.warnf("%s has no landings in %s to %s", a.Name, fmtS(r.FromS), fmtS(r.ToS))
		}
		if len(lb) == 0 {
			r.warnf("%s has no landings in %s to %s", b.Name, fmtS(r.FromS), fmtS(r.ToS))
		}
	}
	r.flowerWarnings(la, lb)

	pairs := MatchLandings(la, lb, tol)
	matchedA := make([]bool, len(la))
	matchedB := make([]bool, len(lb))
	var on, off, da, db []float64
	for _, p := range pairs {
		x, y := la[p.A], lb[p.B]
		matchedA[p.A], matchedB[p.B] = true, true
		m := Match{A: r.InA[p.A], B: r.InB[p.B], FlowerID: x.FlowerID,
			OnsetDiffS: y.StartS - x.StartS, OffsetDiffS: y.EndS - x.EndS,
			DurationAS: x.DurationS(), DurationBS: y.DurationS()}
		r.Matches = append(r.Matches, m)
		on = append(on, m.OnsetDiffS)
		off = append(off, m.OffsetDiffS)
		da = append(da, m.DurationAS)
		db = append(db, m.DurationBS)
	}
	for i, ok := range matchedA {
		if !ok {
			r.OnlyA = append(r.OnlyA, r.InA[i])
		}
	}
	for j, ok := range matchedB {
		if !ok {
			r.OnlyB = append(r.OnlyB, r.InB[j])
		}
	}
	r.Precision, r.Recall, r.F1 = EventScores(len(pairs), len(la), len(lb))
	r.Onset, r.Offset = summarise(on), summarise(off)

	r.Durations = BlandAltman(da, db, LoAZ)
	r.Concordance = LinCCC(da, db)
	nan := math.NaN()
	r.ICC = ICC{Form: "ICC(2,1)", Model: "two-way random effects, absolute agreement, single rating", Value: nan, Lower: nan, Upper: nan}
	if len(pairs) >= 2 {
		x := mat.NewDense(len(pairs), 2, nil)
		for i := range da {
			x.Set(i, 0, da[i])
			x.Set(i, 1, db[i])
		}
		r.ICCAll = []ICC{ICC1(x), ICC2(x), ICC3(x)}
		r.ICC = r.ICCAll[1]
	}
	switch {
	case len(pairs) < 2:
		r.warnf("%d matched landing(s): handling-time agreement needs at least 2 (3 for the concordance interval)", len(pairs))
	case len(pairs) < 10:
		r.warnf("only %d matched landings: handling-time statistics are rough; score more landings", len(pairs))
	}

	r.Frames = CompareFrames(la, lb, r.FromS, r.ToS, grid)
	if r.Frames.Times == 0 {
		r.warnf("the span %s to %s holds no grid time: no frame-wise agreement", fmtS(r.FromS), fmtS(r.ToS))
	} else if math.IsNaN(r.Frames.Kappa.Value) {
		r.warnf("frame-wise kappa is undefined: both tables are in one state throughout")
	}
	return r, nil
}

func (r *Report) warnf(format string, args ...any) {
	r.Warnings = append(r.Warnings, fmt.Sprintf(format, args...))
}

// flowerWarnings warns about flowers scored in one table only, which is
// often a naming mismatch between the tables.
func (r *Report) flowerWarnings(la, lb []Landing) {
	ka, kb := map[string]string{}, map[string]string{}
	for _, l := range la {
		ka[flowerKey(l.FlowerID)] = l.FlowerID
	}
	for _, l := range lb {
		kb[flowerKey(l.FlowerID)] = l.FlowerID
	}
	one := func(x, y map[string]string, name string) {
		var ids []string
		for k, id := range x {
			if _, ok := y[k]; !ok {
				ids = append(ids, id)
			}
		}
		sort.Strings(ids)
		if len(ids) > 0 {
			r.warnf("flower(s) %v have landings in %s only: check the flower ids of the two tables", ids, name)
		}
	}
	one(ka, kb, r.A.Name)
	one(kb, ka, r.B.Name)
}
