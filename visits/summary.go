package visits

import (
	"math"
	"sort"

	"flitlog/kinematics"
)

// Summary is the visit part of summary.json.
type Summary struct {
	PerBee []BeeSummary `json:"per_bee"`
	Clip   ClipSummary  `json:"clip"`
}

// BeeSummary summarises the foraging of one track (one bee).
type BeeSummary struct {
	TrackID    int     `json:"track_id"`
	FirstFrame int     `json:"first_frame"`
	LastFrame  int     `json:"last_frame"`
	TrackedS   float64 `json:"tracked_s"` // from the track's first frame to the frame after its last, s
	Foraging
}

// ClipSummary summarises the foraging of all bees of the clip.
type ClipSummary struct {
	Frames       int     `json:"frames"`
	FPS          float64 `json:"fps"`
	DurationS    float64 `json:"duration_s"`
	PXPerMM      float64 `json:"px_per_mm"`
	Bees         int     `json:"bees"` // tracks with at least one sample
	FlowersInMap int     `json:"flowers_in_map"`
	// PositionNoiseMM is the tracker's position noise (standard deviation
	// per axis, mm) used by the stillness test: Settings.PositionNoisePX
	// converted, or estimated from the clip.
	PositionNoiseMM float64 `json:"position_noise_mm"`
	// StillThresholdMM and RestTolMM are the stillness threshold and the
	// resting-place tolerance that follow from it (see Settings), mm.
	StillThresholdMM float64 `json:"still_threshold_mm"`
	RestTolMM        float64 `json:"rest_tol_mm"`
	Foraging
}

// Foraging holds the foraging statistics shared by BeeSummary and
// ClipSummary. Rates that would divide by zero are NaN (null in JSON).
type Foraging struct {
	Landings         int `json:"landings"`
	CensoredLandings int `json:"censored_landings"` // of Landings, those cut by the clip's or track's start or end
	Inspections      int `json:"inspections"`
	Flights          int `json:"flights"`
	// LandingsPerMin is Landings per minute of TrackedS (per bee) or of
	// the clip's duration (per clip).
	LandingsPerMin float64 `json:"landings_per_min"`
	FlowersVisited int     `json:"flowers_visited"` // distinct flowers landed on
	// HandlingS: handling times of the landings that are not censored, s.
	HandlingS Stats `json:"handling_s"`
	// InterVisitS: durations of the flights between landings, s.
	InterVisitS Stats `json:"inter_visit_s"`
	// RevisitFrac is the fraction of landings that are revisits (the same
	// bee landed on that flower before in the clip).
	RevisitFrac float64 `json:"revisit_frac"`
	// InspectionsPerLanding is Inspections / Landings.
	InspectionsPerLanding float64 `json:"inspections_per_landing"`
	// KindTransitions counts the moves between consecutive landings by
	// flower kind; landings on flowers without a kind are left out.
	KindTransitions KindTransitions `json:"kind_transitions"`
	// Constancy gives Bateman's index for every pair of kinds that has
	// transitions (only where kinds are given).
	Constancy []Constancy `json:"constancy"`
	// NectarUL is the nectar taken over all landings, uL (see
	// Landing.RewardUL); NaN when the map gives no rewards.
	NectarUL float64 `json:"nectar_ul"`
	// HandlingTotalS is the summed duration of all landings (censored
	// ones included), s.
	HandlingTotalS float64 `json:"handling_total_s"`
	// ForagingS is the time from the start of a bee's first landing to
	// the end of its last (handling plus inter-visit flights), s; per clip
	// the sum over bees.
	ForagingS float64 `json:"foraging_s"`
	// IntakeULPerHandlingS = NectarUL / HandlingTotalS, uL/s.
	IntakeULPerHandlingS float64 `json:"intake_ul_per_handling_s"`
	// IntakeULPerForagingS = NectarUL / ForagingS, uL/s: the rate of
	// foraging theory (intake over handling plus travel time).
	IntakeULPerForagingS float64 `json:"intake_ul_per_foraging_s"`
}

// KindTransitions is a matrix of counts: Counts[i][j] is the number of
// moves from a landing on kind Kinds[i] to the next landing of the same bee
// on kind Kinds[j]. Kinds are sorted.
type KindTransitions struct {
	Kinds  []string `json:"kinds"`
	Counts [][]int  `json:"counts"`
}

// Constancy is Bateman's index for one pair of kinds, from the moves
// between those two kinds only.
type Constancy struct {
	KindA        string  `json:"kind_a"`
	KindB        string  `json:"kind_b"`
	AA           int     `json:"aa"`
	AB           int     `json:"ab"`
	BA           int     `json:"ba"`
	BB           int     `json:"bb"`
	BatemanIndex float64 `json:"bateman_index"` // see BatemanIndex; NaN when undefined
}

// summarize computes the per-bee and per-clip summaries.
func summarize(tracks []kinematics.Result, fm FlowerMap, clip Clip, res Result) Summary {
	var sum Summary
	byTrackL := map[int][]Landing{}
	byTrackI := map[int]int{}
	byTrackF := map[int][]Flight{}
	for _, l := range res.Landings {
		byTrackL[l.TrackID] = append(byTrackL[l.TrackID], l)
	}
	for _, in := range res.Inspections {
		byTrackI[in.TrackID]++
	}
	for _, f := range res.Flights {
		byTrackF[f.TrackID] = append(byTrackF[f.TrackID], f)
	}
	var forTotal float64
	bees := 0
	for _, tr := range tracks {
		if len(tr.Samples) == 0 {
			continue
		}
		bees++
		first, last := tr.Samples[0], tr.Samples[len(tr.Samples)-1]
		endS := last.TimeS + 1/clip.FPS
		if clip.TimeS != nil {
			endS = clip.TimeS(last.Frame + 1)
		}
		b := BeeSummary{TrackID: tr.ID, FirstFrame: first.Frame, LastFrame: last.Frame, TrackedS: endS - first.TimeS}
		b.Foraging = foraging(byTrackL[tr.ID], byTrackF[tr.ID], byTrackI[tr.ID], b.TrackedS)
		ls := byTrackL[tr.ID]
		if len(ls) > 0 {
			sort.Slice(ls, func(i, j int) bool { return ls[i].StartFrame < ls[j].StartFrame })
			b.ForagingS = ls[len(ls)-1].EndS - ls[0].StartS
			forTotal += b.ForagingS
		}
		b.IntakeULPerForagingS = ratio(b.NectarUL, b.ForagingS)
		sum.PerBee = append(sum.PerBee, b)
	}
	sort.SliceStable(sum.PerBee, func(i, j int) bool { return sum.PerBee[i].TrackID < sum.PerBee[j].TrackID })
	c := ClipSummary{Frames: clip.Frames, FPS: clip.FPS, DurationS: clip.DurationS, PXPerMM: clip.PXPerMM,
		Bees: bees, FlowersInMap: len(fm.Flowers)}
	c.Foraging = foraging(res.Landings, res.Flights, len(res.Inspections), clip.DurationS)
	c.ForagingS = forTotal
	c.IntakeULPerForagingS = ratio(c.NectarUL, c.ForagingS)
	sum.Clip = c
	return sum
}

// ratio is a/b, NaN when b is not > 0.
func ratio(a, b float64) float64 {
	if !(b > 0) {
		return math.NaN()
	}
	return a / b
}

// foraging computes Foraging except ForagingS and IntakeULPerForagingS.
func foraging(ls []Landing, fs []Flight, inspections int, spanS float64) Foraging {
	var f Foraging
	f.Landings = len(ls)
	f.Inspections = inspections
	f.Flights = len(fs)
	f.LandingsPerMin = ratio(float64(len(ls)), spanS/60)
	var handling, inter []float64
	visited := map[string]bool{}
	revisits := 0
	f.NectarUL = math.NaN()
	for _, l := range ls {
		if l.CensoredStart || l.CensoredEnd {
			f.CensoredLandings++
		} else {
			handling = append(handling, l.DurationS)
		}
		f.HandlingTotalS += l.DurationS
		visited[l.FlowerID] = true
		if l.Revisit {
			revisits++
		}
		if finite(l.RewardUL) {
			if math.IsNaN(f.NectarUL) {
				f.NectarUL = 0
			}
			f.NectarUL += l.RewardUL
		}
	}
	for _, x := range fs {
		inter = append(inter, x.DurationS)
	}
	f.FlowersVisited = len(visited)
	f.HandlingS = describe(handling)
	f.InterVisitS = describe(inter)
	f.RevisitFrac = ratio(float64(revisits), float64(len(ls)))
	f.InspectionsPerLanding = ratio(float64(inspections), float64(len(ls)))
	f.KindTransitions = kindTransitions(fs)
	f.Constancy = constancy(f.KindTransitions)
	f.IntakeULPerHandlingS = ratio(f.NectarUL, f.HandlingTotalS)
	f.ForagingS = math.NaN()
	f.IntakeULPerForagingS = math.NaN()
	return f
}

// kindTransitions counts the flights by the kinds of their two flowers.
func kindTransitions(fs []Flight) KindTransitions {
	set := map[string]bool{}
	for _, f := range fs {
		if f.FromKind != "" && f.ToKind != "" {
			set[f.FromKind], set[f.ToKind] = true, true
		}
	}
	kt := KindTransitions{Kinds: []string{}, Counts: [][]int{}}
	for k := range set {
		kt.Kinds = append(kt.Kinds, k)
	}
	sort.Strings(kt.Kinds)
	pos := map[string]int{}
	for i, k := range kt.Kinds {
		pos[k] = i
		kt.Counts = append(kt.Counts, make([]int, len(kt.Kinds)))
	}
	for _, f := range fs {
		if f.FromKind != "" && f.ToKind != "" {
			kt.Counts[pos[f.FromKind]][pos[f.ToKind]]++
		}
	}
	return kt
}

// constancy returns Bateman's index for each pair of kinds with moves
// between or within them.
func constancy(kt KindTransitions) []Constancy {
	out := []Constancy{}
	for i := range kt.Kinds {
		for j := i + 1; j < len(kt.Kinds); j++ {
			c := Constancy{KindA: kt.Kinds[i], KindB: kt.Kinds[j],
				AA: kt.Counts[i][i], AB: kt.Counts[i][j], BA: kt.Counts[j][i], BB: kt.Counts[j][j]}
			if c.AA+c.AB+c.BA+c.BB == 0 {
				continue
			}
			c.BatemanIndex = BatemanIndex(c.AA, c.AB, c.BA, c.BB)
			out = append(out, c)
		}
	}
	return out
}
