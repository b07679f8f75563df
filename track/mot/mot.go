package mot

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"flitlog/track/link"
)

// Obs is one position of one object in one frame: a ground-truth object
// or a tracker's hypothesis.
type Obs struct {
	Frame    int
	ID       int
	XPX, YPX float64
}

// Scores are the CLEAR MOT and identity scores of a hypothesis set against
// ground truth. Counts are summed over all frames.
type Scores struct {
	// MOTA = 1 - (Misses + FalsePositives + IDSwitches) / GTObs
	// (Bernardin & Stiefelhagen 2008, Eq. 3); NaN if GTObs = 0. At most 1,
	// may be negative.
	MOTA float64
	// MOTP is the mean distance between matched truth and hypothesis
	// positions, px (Bernardin & Stiefelhagen 2008, Eq. 1, with distance
	// as the error); NaN without matches. Lower is better.
	MOTP float64
	// RMSEPX is the root mean square of the same distances, px.
	RMSEPX float64

	// IDF1 = 2 IDTP / (GTObs + HypObs), IDP = IDTP / HypObs,
	// IDR = IDTP / GTObs (Ristani et al. 2016, Sec. 4); NaN where the
	// denominator is 0.
	IDF1, IDP, IDR float64
	// IDTP, IDFP, IDFN are the identity true positives, false positives
	// and false negatives under the best one-to-one matching of truth
	// trajectories to hypothesis trajectories.
	IDTP, IDFP, IDFN int

	Matches        int // truth observations matched to a hypothesis
	Misses         int // truth observations not matched (false negatives)
	FalsePositives int // hypothesis observations not matched
	IDSwitches     int // mismatches: a truth object matched to another hypothesis than the last time
	// Fragmentations counts interruptions of a truth trajectory: a frame
	// where it is matched followed by one where it is present but missed,
	// between its first and last matched frame (Li, Huang & Nevatia 2009).
	Fragmentations int

	// MostlyTracked, PartlyTracked and MostlyLost count truth objects
	// matched in >= 80 %, in between, and <= 20 % of the frames they are
	// present (Li, Huang & Nevatia 2009).
	MostlyTracked, PartlyTracked, MostlyLost int

	GTObjects  int // distinct truth IDs
	GTObs      int // truth observations (sum over frames of objects present)
	HypTracks  int // distinct hypothesis IDs
	HypObs     int // hypothesis observations
	Frames     int // distinct frames with any observation
	FirstFrame int // smallest frame number seen (0 if none)
	LastFrame  int // largest frame number seen (0 if none)

	// FalseTracks lists, in increasing order, the hypothesis IDs of which
	// fewer than half the observations were matched to truth (see
	// FalseTracks).
	FalseTracks []int
}

// DataError reports bad input to Evaluate: which set, frame and ID.
type DataError struct {
	Set   string // "truth" or "hypothesis"
	Frame int
	ID    int
	Err   string
}

func (e *DataError) Error() string {
	return fmt.Sprintf("mot: %s frame %d id %d: %s", e.Set, e.Frame, e.ID, e.Err)
}

// Pair is one correspondence of the per-frame CLEAR MOT matching.
type Pair struct {
	Frame          int
	TruthID, HypID int
	DistPX         float64
	// Switch is true if the truth object's latest earlier match was to
	// another hypothesis ID (an ID switch, or mismatch).
	Switch bool
}

// MatchPairs returns the correspondences of Evaluate's per-frame matching
// in increasing frame order (by truth ID within a frame). Errors are as for
// Evaluate.
func MatchPairs(truth, hyp []Obs, maxDistPX float64) ([]Pair, error) {
	if !(maxDistPX > 0) || math.IsInf(maxDistPX, 0) {
		panic(fmt.Sprintf("mot: maxDistPX %v must be > 0", maxDistPX))
	}
	if err := check("truth", truth); err != nil {
		return nil, err
	}
	if err := check("hypothesis", hyp); err != nil {
		return nil, err
	}
	frames, order := byFrame(truth, hyp)
	return matchFrames(frames, order, maxDistPX), nil
}

// Evaluate scores hypothesis observations hyp against ground truth truth.
// A truth and a hypothesis position correspond only if their Euclidean
// distance is at most maxDistPX (> 0, px).
//
// Per frame, in increasing frame order, the CLEAR MOT matching of
// Bernardin & Stiefelhagen (2008, Sec. 2.1.1) is used: a correspondence of
// the previous frame is kept if both objects are present and still within
// maxDistPX; the remaining objects are matched by a minimum-total-distance
// assignment (Hungarian method, link.Assign) among pairs within maxDistPX,
// with as many pairs as possible. A new correspondence whose truth object
// was last matched (in any earlier frame) to a different hypothesis counts
// as an ID switch.
//
// The identity scores use one global matching of truth IDs to hypothesis
// IDs that maximises IDTP, the number of frames in which a matched pair is
// within maxDistPX (Ristani et al. 2016, Sec. 4), also solved with
// link.Assign.
//
// Evaluate returns a *DataError if an ID appears twice in one frame of a
// set or a position is not finite. It panics if maxDistPX is not > 0.
func Evaluate(truth, hyp []Obs, maxDistPX float64) (Scores, error) {
	if !(maxDistPX > 0) || math.IsInf(maxDistPX, 0) {
		panic(fmt.Sprintf("mot: maxDistPX %v must be > 0", maxDistPX))
	}
	if err := check("truth", truth); err != nil {
		return Scores{}, err
	}
	if err := check("hypothesis", hyp); err != nil {
		return Scores{}, err
	}
	frames, order := byFrame(truth, hyp)
	pairs := matchFrames(frames, order, maxDistPX)

	var sc Scores
	sc.GTObs, sc.HypObs, sc.Frames = len(truth), len(hyp), len(order)
	if len(order) > 0 {
		sc.FirstFrame, sc.LastFrame = order[0], order[len(order)-1]
	}
	gtPresent, hyPresent := map[int]int{}, map[int]int{}
	for _, o := range truth {
		gtPresent[o.ID]++
	}
	for _, o := range hyp {
		hyPresent[o.ID]++
	}
	sc.GTObjects, sc.HypTracks = len(gtPresent), len(hyPresent)

	gtMatched, hyMatched := map[int]int{}, map[int]int{}
	matchedAt := make(map[[2]int]bool, len(pairs)) // (frame, truth ID)
	var sumD, sumD2 float64
	for _, p := range pairs {
		sc.Matches++
		sumD += p.DistPX
		sumD2 += p.DistPX * p.DistPX
		gtMatched[p.TruthID]++
		hyMatched[p.HypID]++
		matchedAt[[2]int{p.Frame, p.TruthID}] = true
		if p.Switch {
			sc.IDSwitches++
		}
	}
	sc.Misses = sc.GTObs - sc.Matches
	sc.FalsePositives = sc.HypObs - sc.Matches

	// Fragmentations: per truth ID, its frames in order; count tracked ->
	// missed transitions that are followed by a later match.
	gtFrames := map[int][]int{}
	for _, f := range order {
		for _, g := range frames[f].gt {
			gtFrames[g.ID] = append(gtFrames[g.ID], f)
		}
	}
	for id, fs := range gtFrames {
		tracked, ever, pending := false, false, 0
		for _, f := range fs {
			if matchedAt[[2]int{f, id}] {
				if ever && !tracked {
					sc.Fragmentations += pending
				}
				pending = 0
				tracked, ever = true, true
				continue
			}
			if tracked {
				pending++
			}
			tracked = false
		}
	}

	nan := math.NaN()
	sc.MOTA, sc.MOTP, sc.RMSEPX = nan, nan, nan
	if sc.GTObs > 0 {
		sc.MOTA = 1 - float64(sc.Misses+sc.FalsePositives+sc.IDSwitches)/float64(sc.GTObs)
	}
	if sc.Matches > 0 {
		sc.MOTP = sumD / float64(sc.Matches)
		sc.RMSEPX = math.Sqrt(sumD2 / float64(sc.Matches))
	}
	for id, n := range gtPresent {
		r := float64(gtMatched[id]) / float64(n)
		switch {
		case r >= 0.8:
			sc.MostlyTracked++
		case r <= 0.2:
			sc.MostlyLost++
		default:
			sc.PartlyTracked++
		}
	}
	sc.FalseTracks = falseTracks(hyPresent, hyMatched, 0.5)

	// Identity scores: overlap[(truth, hyp)] = frames within maxDistPX.
	overlap := map[[2]int]int{}
	for _, f := range order {
		fo := frames[f]
		for _, g := range fo.gt {
			for _, h := range fo.hy {
				if dist(g, h) <= maxDistPX {
					overlap[[2]int{g.ID, h.ID}]++
				}
			}
		}
	}
	gtIDs, hyIDs := sortedKeys(gtPresent), sortedKeys(hyPresent)
	if len(gtIDs) > 0 && len(hyIDs) > 0 {
		// Maximise IDTP = minimise -IDTP. All entries are finite, so every
		// truth ID (or every hypothesis ID) is paired; pairs without
		// overlap add 0, as an unmatched ID would.
		cost := mat.NewDense(len(gtIDs), len(hyIDs), nil)
		for a, g := range gtIDs {
			for b, h := range hyIDs {
				cost.Set(a, b, -float64(overlap[[2]int{g, h}]))
			}
		}
		_, total := link.Assign(cost)
		sc.IDTP = int(math.Round(-total))
	}
	sc.IDFN = sc.GTObs - sc.IDTP
	sc.IDFP = sc.HypObs - sc.IDTP
	sc.IDF1, sc.IDP, sc.IDR = nan, nan, nan
	if n := sc.GTObs + sc.HypObs; n > 0 {
		sc.IDF1 = 2 * float64(sc.IDTP) / float64(n)
	}
	if sc.HypObs > 0 {
		sc.IDP = float64(sc.IDTP) / float64(sc.HypObs)
	}
	if sc.GTObs > 0 {
		sc.IDR = float64(sc.IDTP) / float64(sc.GTObs)
	}
	return sc, nil
}

// FalseTracks returns, in increasing order, the IDs of hypothesis tracks
// of which a fraction less than minMatchedFrac (in (0, 1]) of the
// observations were matched to truth by Evaluate's per-frame matching:
// tracks that follow no bee for most of their length. Evaluate reports
// them for minMatchedFrac = 0.5 in Scores.FalseTracks. Errors are as for
// Evaluate.
func FalseTracks(truth, hyp []Obs, maxDistPX, minMatchedFrac float64) ([]int, error) {
	if !(minMatchedFrac > 0 && minMatchedFrac <= 1) {
		panic(fmt.Sprintf("mot: minMatchedFrac %v not in (0, 1]", minMatchedFrac))
	}
	pairs, err := MatchPairs(truth, hyp, maxDistPX)
	if err != nil {
		return nil, err
	}
	present, matched := map[int]int{}, map[int]int{}
	for _, h := range hyp {
		present[h.ID]++
	}
	for _, p := range pairs {
		matched[p.HypID]++
	}
	return falseTracks(present, matched, minMatchedFrac), nil
}

// PerMinute converts a count over a clip of clipFrames frames at fps
// frames/s into a rate per minute: n / (clipFrames / fps / 60). It panics
// unless clipFrames > 0 and fps > 0.
func PerMinute(n, clipFrames int, fps float64) float64 {
	if clipFrames <= 0 || !(fps > 0) {
		panic("mot: PerMinute needs clipFrames > 0 and fps > 0")
	}
	return float64(n) / (float64(clipFrames) / fps / 60)
}

// frameObs holds the observations of one frame, each sorted by ID.
type frameObs struct {
	gt, hy []Obs
}

// byFrame groups both sets by frame and returns the frames in increasing
// order.
func byFrame(truth, hyp []Obs) (map[int]*frameObs, []int) {
	frames := map[int]*frameObs{}
	get := func(f int) *frameObs {
		fo := frames[f]
		if fo == nil {
			fo = &frameObs{}
			frames[f] = fo
		}
		return fo
	}
	for _, o := range truth {
		fo := get(o.Frame)
		fo.gt = append(fo.gt, o)
	}
	for _, o := range hyp {
		fo := get(o.Frame)
		fo.hy = append(fo.hy, o)
	}
	order := make([]int, 0, len(frames))
	for f, fo := range frames {
		order = append(order, f)
		sortObs(fo.gt)
		sortObs(fo.hy)
	}
	sort.Ints(order)
	return frames, order
}

// matchFrames runs the CLEAR MOT matching over the frames in order.
func matchFrames(frames map[int]*frameObs, order []int, maxDistPX float64) []Pair {
	var pairs []Pair
	cur := map[int]int{}  // truth ID -> hypothesis ID matched in the previous frame
	last := map[int]int{} // truth ID -> hypothesis ID of its latest match
	for _, f := range order {
		fo := frames[f]
		hyIdx := make(map[int]int, len(fo.hy))
		for j, h := range fo.hy {
			hyIdx[h.ID] = j
		}
		gtTo := make([]int, len(fo.gt)) // index into fo.hy, or -1
		hyUsed := make([]bool, len(fo.hy))
		// Step 1: keep the previous frame's correspondences still valid.
		for i, g := range fo.gt {
			gtTo[i] = -1
			if hid, ok := cur[g.ID]; ok {
				if j, ok := hyIdx[hid]; ok && !hyUsed[j] && dist(g, fo.hy[j]) <= maxDistPX {
					gtTo[i] = j
					hyUsed[j] = true
				}
			}
		}
		// Step 2: minimum-distance assignment of the rest.
		var ri, cj []int
		for i := range fo.gt {
			if gtTo[i] < 0 {
				ri = append(ri, i)
			}
		}
		for j := range fo.hy {
			if !hyUsed[j] {
				cj = append(cj, j)
			}
		}
		if len(ri) > 0 && len(cj) > 0 {
			cost := mat.NewDense(len(ri), len(cj), nil)
			for a, i := range ri {
				for b, j := range cj {
					d := dist(fo.gt[i], fo.hy[j])
					if d > maxDistPX {
						d = math.Inf(1)
					}
					cost.Set(a, b, d)
				}
			}
			rowToCol, _ := link.Assign(cost)
			for a, b := range rowToCol {
				if b >= 0 {
					gtTo[ri[a]] = cj[b]
					hyUsed[cj[b]] = true
				}
			}
		}
		next := map[int]int{}
		for i, g := range fo.gt {
			j := gtTo[i]
			if j < 0 {
				continue
			}
			h := fo.hy[j]
			prev, seen := last[g.ID]
			pairs = append(pairs, Pair{
				Frame: f, TruthID: g.ID, HypID: h.ID, DistPX: dist(g, h),
				Switch: seen && prev != h.ID,
			})
			next[g.ID] = h.ID
			last[g.ID] = h.ID
		}
		cur = next
	}
	return pairs
}

func falseTracks(present, matched map[int]int, frac float64) []int {
	var out []int
	for id, n := range present {
		if float64(matched[id]) < frac*float64(n) {
			out = append(out, id)
		}
	}
	sort.Ints(out)
	return out
}

func check(set string, obs []Obs) error {
	seen := make(map[[2]int]bool, len(obs))
	for _, o := range obs {
		if math.IsNaN(o.XPX) || math.IsNaN(o.YPX) || math.IsInf(o.XPX, 0) || math.IsInf(o.YPX, 0) {
			return &DataError{Set: set, Frame: o.Frame, ID: o.ID, Err: fmt.Sprintf("position (%v, %v) not finite", o.XPX, o.YPX)}
		}
		k := [2]int{o.Frame, o.ID}
		if seen[k] {
			return &DataError{Set: set, Frame: o.Frame, ID: o.ID, Err: "ID appears twice in the frame"}
		}
		seen[k] = true
	}
	return nil
}

func dist(a, b Obs) float64 { return math.Hypot(a.XPX-b.XPX, a.YPX-b.YPX) }

func sortObs(o []Obs) { sort.Slice(o, func(i, j int) bool { return o[i].ID < o[j].ID }) }

func sortedKeys(m map[int]int) []int {
	out := make([]int, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Ints(out)
	return out
}

// FromTracks turns linked tracks into hypothesis observations, one per
// track point; with observedOnly, coasted and gap-filled points are left
// out.
func FromTracks(tracks []link.Track, observedOnly bool) []Obs {
	var out []Obs
	for _, t := range tracks {
		for _, p := range t.Points {
			if observedOnly && !p.Observed {
				continue
			}
			out = append(out, Obs{Frame: p.Frame, ID: t.ID, XPX: p.XPX, YPX: p.YPX})
		}
	}
	return out
}
