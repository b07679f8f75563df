package visits

import (
	"fmt"
	"math"
	"sort"

	"flitlog/kinematics"
)

// Clip describes the clip the tracks come from.
type Clip struct {
	// Frames is the number of frames read. 0: taken as one past the last
	// frame of any track.
	Frames int
	// FPS is the frame rate, frames/s. 0: estimated as the median of
	// 1/(time step) between consecutive frames of the tracks.
	FPS float64
	// DurationS is the clip's length, s. 0: TimeS(Frames) when TimeS is
	// given, else Frames/FPS.
	DurationS float64
	// PXPerMM is the image scale on the flower plane, px/mm; it converts
	// the margins and radii of Settings to px for the flower map. 0:
	// estimated from the tracks as (sum of steps in px) / (sum of steps in
	// mm); Analyze fails when that is not possible either.
	PXPerMM float64
	// TimeS, optional, gives the time of a frame in seconds from the
	// clip's first frame, for frames no track covers (the frame after a
	// landing that ends a track). nil: the time of the last frame plus
	// 1/FPS.
	TimeS func(frame int) float64
}

// Result is the output of Analyze. Landings, inspections and flights are
// sorted by start frame, then track id.
type Result struct {
	Landings    []Landing
	Inspections []Inspection
	Flights     []Flight
	Summary     Summary
}

// Analyze finds the landings on the flowers of fm, the inspections of
// flowers without landing, and the flights between landings in the tracks,
// and summarises them per bee and for the clip. Each track is taken to be
// one bee. See the package documentation for the definitions.
//
// Tracks must have their samples in increasing frame order; positions
// (XPX, YPX) must be in the pixel frame of the flower map, and XMM, YMM
// and SpeedMMPerS on the flower plane as computed by kinematics.Analyze.
// A NaN speed counts as fast except that it does not end a landing.
func Analyze(tracks []kinematics.Result, fm FlowerMap, clip Clip, s Settings) (Result, error) {
	s, err := s.withDefaults()
	if err != nil {
		return Result{}, err
	}
	if err := fm.Validate(0, 0); err != nil {
		return Result{}, err
	}
	for _, tr := range tracks {
		for i := 1; i < len(tr.Samples); i++ {
			if tr.Samples[i].Frame <= tr.Samples[i-1].Frame {
				return Result{}, fmt.Errorf("visits: track %d: frame %d follows frame %d: samples must be in increasing frame order",
					tr.ID, tr.Samples[i].Frame, tr.Samples[i-1].Frame)
			}
		}
	}
	clip, err = clip.complete(tracks)
	if err != nil {
		return Result{}, err
	}
	a := analyzer{s: s, fm: fm, clip: clip}
	a.marginPX = s.MarginMM * clip.PXPerMM
	a.exitMarginPX = s.ExitMarginMM * clip.PXPerMM
	a.inspectPX = s.InspectRadiusMM * clip.PXPerMM
	a.mergeGapFrames = -1
	if s.MergeGapS >= 0 {
		a.mergeGapFrames = int(math.Round(s.MergeGapS * clip.FPS))
	}

	a.sigmaMM = s.PositionNoisePX / clip.PXPerMM
	if s.PositionNoisePX == 0 {
		a.sigmaMM = noiseSigmaMM(tracks, s.HoverSpeedMMPerS)
		if math.IsNaN(a.sigmaMM) {
			a.sigmaMM = 0
		}
	}
	a.stillMM = math.Hypot(s.StillNoiseFactor*a.sigmaMM, s.StillFloorMM)
	a.restTolMM = math.Hypot(s.RestTolSigma*a.sigmaMM, s.StillFloorMM)

	var res Result
	for _, tr := range tracks {
		if len(tr.Samples) == 0 {
			continue
		}
		t := a.newTrack(tr)
		ls := a.landings(t)
		is := a.inspections(t, ls)
		res.Flights = append(res.Flights, a.flights(t, ls, is)...)
		res.Landings = append(res.Landings, ls...)
		res.Inspections = append(res.Inspections, is...)
	}
	a.annotate(res.Landings, res.Flights)
	sort.SliceStable(res.Landings, func(i, j int) bool {
		return lessFrameTrack(res.Landings[i].StartFrame, res.Landings[i].TrackID, res.Landings[j].StartFrame, res.Landings[j].TrackID)
	})
	sort.SliceStable(res.Inspections, func(i, j int) bool {
		return lessFrameTrack(res.Inspections[i].StartFrame, res.Inspections[i].TrackID, res.Inspections[j].StartFrame, res.Inspections[j].TrackID)
	})
	sort.SliceStable(res.Flights, func(i, j int) bool {
		return lessFrameTrack(res.Flights[i].StartFrame, res.Flights[i].TrackID, res.Flights[j].StartFrame, res.Flights[j].TrackID)
	})
	res.Summary = summarize(tracks, fm, clip, res)
	res.Summary.Clip.PositionNoiseMM = a.sigmaMM
	res.Summary.Clip.StillThresholdMM = a.stillMM
	res.Summary.Clip.RestTolMM = a.restTolMM
	return res, nil
}

func lessFrameTrack(f1, t1, f2, t2 int) bool {
	if f1 != f2 {
		return f1 < f2
	}
	return t1 < t2
}

// complete fills the Clip fields left zero.
func (c Clip) complete(tracks []kinematics.Result) (Clip, error) {
	if c.FPS < 0 || math.IsNaN(c.FPS) || math.IsInf(c.FPS, 0) {
		return c, fmt.Errorf("visits: clip frame rate %g: want > 0 frames/s (or 0 to estimate it)", c.FPS)
	}
	if c.PXPerMM < 0 || math.IsNaN(c.PXPerMM) || math.IsInf(c.PXPerMM, 0) {
		return c, fmt.Errorf("visits: clip scale %g px/mm: want > 0 (or 0 to estimate it)", c.PXPerMM)
	}
	lastFrame := -1
	var dts []float64
	var sumPX, sumMM float64
	for _, tr := range tracks {
		for i, p := range tr.Samples {
			lastFrame = max(lastFrame, p.Frame)
			if i == 0 || p.Frame != tr.Samples[i-1].Frame+1 {
				continue
			}
			q := tr.Samples[i-1]
			if dt := p.TimeS - q.TimeS; dt > 0 {
				dts = append(dts, dt)
			}
			dpx := math.Hypot(p.XPX-q.XPX, p.YPX-q.YPX)
			dmm := math.Hypot(p.XMM-q.XMM, p.YMM-q.YMM)
			if finite(dpx) && finite(dmm) {
				sumPX += dpx
				sumMM += dmm
			}
		}
	}
	if c.Frames <= 0 {
		c.Frames = lastFrame + 1
	}
	if c.FPS == 0 {
		if len(dts) == 0 {
			return c, fmt.Errorf("visits: clip frame rate unknown and no track has two consecutive frames to estimate it from: give Clip.FPS")
		}
		c.FPS = 1 / median(dts)
	}
	if c.PXPerMM == 0 {
		if !(sumPX > 0 && sumMM > 0) {
			return c, fmt.Errorf("visits: image scale unknown and the tracks do not move in both px and mm: give Clip.PXPerMM (px/mm)")
		}
		c.PXPerMM = sumPX / sumMM
	}
	if c.DurationS <= 0 {
		if c.TimeS != nil {
			c.DurationS = c.TimeS(c.Frames)
		} else {
			c.DurationS = float64(c.Frames) / c.FPS
		}
	}
	return c, nil
}

// analyzer holds the settings of one Analyze call, converted to px and
// frames.
type analyzer struct {
	s                      Settings
	fm                     FlowerMap
	clip                   Clip
	marginPX, exitMarginPX float64
	inspectPX              float64
	mergeGapFrames         int     // -1: no merging
	sigmaMM                float64 // position noise per axis, mm
	stillMM, restTolMM     float64 // stillness threshold and resting tolerance, mm
}

// track is one track prepared for detection.
type track struct {
	id  int
	smp []kinematics.Sample
}

func (a *analyzer) newTrack(tr kinematics.Result) *track {
	return &track{id: tr.ID, smp: tr.Samples}
}

// index returns the sample index of frame f, or -1.
func (t *track) index(f int) int {
	i := sort.Search(len(t.smp), func(i int) bool { return t.smp[i].Frame >= f })
	if i < len(t.smp) && t.smp[i].Frame == f {
		return i
	}
	return -1
}

// timeAfter is the time of the frame after sample i: the take-off time
// of a landing whose last sample is i.
// cut reports whether samples i0..i1 are cut at their start or end: they
// begin at the track's first sample or end at its last, or border a gap
// that merging did not bridge.
func (t *track) cut(i0, i1 int) (start, end bool) {
	n := len(t.smp)
	start = i0 == 0 || t.smp[i0-1].Frame != t.smp[i0].Frame-1
	end = i1 == n-1 || t.smp[i1+1].Frame != t.smp[i1].Frame+1
	return start, end
}

func (a *analyzer) timeAfter(t *track, i int) float64 {
	f := t.smp[i].Frame + 1
	if i+1 < len(t.smp) && t.smp[i+1].Frame == f {
		return t.smp[i+1].TimeS
	}
	if a.clip.TimeS != nil {
		return a.clip.TimeS(f)
	}
	return t.smp[i].TimeS + 1/a.clip.FPS
}

// run is a stretch of samples [i0, i1] (inclusive) assigned to flower k.
type run struct {
	k, i0, i1 int
}

// runs splits per-sample labels (flower index or -1) into runs of one
// label, breaking also at frame gaps.
func runsOf(t *track, label []int) []run {
	var out []run
	for i := 0; i < len(label); i++ {
		if label[i] < 0 {
			continue
		}
		j := i
		for j+1 < len(label) && label[j+1] == label[i] && t.smp[j+1].Frame == t.smp[j].Frame+1 {
			j++
		}
		out = append(out, run{label[i], i, j})
		i = j
	}
	return out
}

// merge joins runs on the same flower separated by at most gapFrames
// frames in which there are only runs on other flowers shorter than
// minFrames (those are dropped). With gapFrames < 0 it returns rs.
func (a *analyzer) merge(t *track, rs []run, gapFrames, minFrames int) []run {
	if gapFrames < 0 {
		return rs
	}
	var out []run
	for _, r := range rs {
		joined := false
		for q := len(out) - 1; q >= 0; q-- {
			p := out[q]
			if t.smp[r.i0].Frame-t.smp[p.i1].Frame-1 > gapFrames {
				break
			}
			if p.k == r.k {
				out[q].i1 = r.i1
				out = out[:q+1]
				joined = true
				break
			}
			if t.smp[p.i1].Frame-t.smp[p.i0].Frame+1 >= minFrames {
				break // a real run on another flower lies between
			}
		}
		if !joined {
			out = append(out, r)
		}
	}
	return out
}

// landings finds the landings of one track.
//
// A landing starts where the bee has been still (see Settings.StillWindowS)
// and slower than LandSpeedMMPerS on one flower (with MarginMM) for
// MinLandingS without a break, and goes on while the bee stays within
// ExitMarginMM of that flower and no faster than TakeOffSpeedMMPerS. Runs
// on one flower separated by at most MergeGapS are merged, then the first
// and last frame are refined (see refine).
func (a *analyzer) landings(t *track) []Landing {
	s := a.s
	n := len(t.smp)
	h := max(minStillFrames/2, int(math.Round(s.StillWindowS*a.clip.FPS/2)))
	resid := centredResiduals(t.smp, h)
	enterFrames := max(1, int(math.Round(s.MinLandingS*a.clip.FPS)))
	label := make([]int, n)
	cur := -1
	streak, streakK := 0, -1 // consecutive still frames on flower streakK
	for i, p := range t.smp {
		if i > 0 && p.Frame-t.smp[i-1].Frame-1 > max(a.mergeGapFrames, 0) {
			cur = -1 // a long gap: the bee may have gone anywhere
		}
		v := p.SpeedMMPerS
		cand := a.fm.nearestFlower(p.XPX, p.YPX, a.marginPX)
		// NaN residual or speed: not still.
		if cand >= 0 && v <= s.LandSpeedMMPerS && resid[i] <= a.stillMM &&
			(i == 0 || p.Frame == t.smp[i-1].Frame+1) && cand == streakK {
			streak++
		} else if cand >= 0 && v <= s.LandSpeedMMPerS && resid[i] <= a.stillMM {
			streak, streakK = 1, cand
		} else {
			streak, streakK = 0, -1
		}
		if cur >= 0 && !(a.fm.Flowers[cur].EdgeDistPX(p.XPX, p.YPX) <= a.exitMarginPX && !(v > s.TakeOffSpeedMMPerS)) {
			cur = -1
		}
		if streak >= enterFrames && streakK != cur {
			// Settled on a flower (or walked onto an overlapping one
			// whose centre is nearer): the landing began with the streak.
			cur = streakK
			for j := i - streak + 1; j < i; j++ {
				label[j] = cur
			}
		}
		label[i] = cur
	}
	minFrames := int(math.Ceil(s.MinLandingS*a.clip.FPS - 1e-9))
	rs := a.merge(t, runsOf(t, label), a.mergeGapFrames, minFrames)
	lo, _ := segmentBounds(t.smp)
	for k := range rs {
		a.refine(t, &rs[k], lo, 2*h+enterFrames)
	}

	var out []Landing
	for k, r := range rs {
		if r.i1 < r.i0 || (k > 0 && r.i0 <= rs[k-1].i1) {
			continue // refined away, or overlapping the previous one
		}
		f := a.fm.Flowers[r.k]
		l := Landing{
			TrackID:    t.id,
			FlowerID:   f.ID,
			FlowerKind: f.Kind,
			StartFrame: t.smp[r.i0].Frame,
			EndFrame:   t.smp[r.i1].Frame,
			StartS:     t.smp[r.i0].TimeS,
			EndS:       a.timeAfter(t, r.i1),
			RewardUL:   math.NaN(),
		}
		l.CensoredStart, l.CensoredEnd = t.cut(r.i0, r.i1)
		l.DurationS = l.EndS - l.StartS
		min := s.MinLandingS
		if l.CensoredStart || l.CensoredEnd {
			min = s.MinCensoredLandingS
		}
		if l.DurationS < min-1e-9 {
			continue
		}
		w := max(1, int(math.Round(s.ApproachWindowS*a.clip.FPS)))
		l.ApproachSpeedMMPerS = t.meanSpeed(l.StartFrame-w, l.StartFrame-1)
		w = max(1, int(math.Round(s.DepartureWindowS*a.clip.FPS)))
		l.DepartureSpeedMMPerS = t.meanSpeed(l.EndFrame+1, l.EndFrame+w)
		out = append(out, l)
	}
	return out
}

// restWindowS is the time over which a landing's resting place (at its
// start and at its end) is taken as the median position.
const restWindowS = 0.3

// refine moves the first frame of a landed run to where the bee arrives
// at its resting place, as a change point. d_i is the distance of sample
// i from the median position of the restWindowS of samples after it (the
// resting place as it is just then, which follows a slowly swaying
// flower). The first frame is the c, from maxShift samples before the
// run's start to restWindowS after it and within the run of consecutive
// frames, that maximises
//
//	S(c) = sum_{i=c}^{start+window} max(tau^2 - d_i^2, -tau^2),
//
// with tau^2 = (RestTolSigma sigma)^2 (1 + 1/m) + StillFloorMM^2 for m
// samples in the median: samples nearer than tau count for "at rest",
// farther ones against (by at most one sample's worth, so a single noisy
// sample neither stops nor extends the landing).
//
// The last frame needs no such step: the run ends when the speed passes
// TakeOffSpeedMMPerS, and a take-off accelerates so hard that this is
// within a frame or so of leaving, while a landed bee walking just before
// it leaves would defeat a resting-place test.
func (a *analyzer) refine(t *track, r *run, lo []int, maxShift int) {
	m := max(3, int(math.Round(restWindowS*a.clip.FPS)))
	ks := a.s.RestTolSigma * a.sigmaMM
	w1 := min(r.i1-1, r.i0+m-1)
	if w1 < r.i0 {
		return
	}
	best, bestS, sum := w1+1, 0.0, 0.0
	for c := w1; c >= max(lo[r.i0], r.i0-maxShift); c-- {
		j1 := min(r.i1, c+m)
		x, y := medianXY(t.smp[c+1 : j1+1])
		tau2 := ks*ks*(1+1/float64(j1-c)) + a.s.StillFloorMM*a.s.StillFloorMM
		dx, dy := t.smp[c].XMM-x, t.smp[c].YMM-y
		sum += math.Max(tau2-dx*dx-dy*dy, -tau2)
		if sum > bestS {
			best, bestS = c, sum
		}
	}
	r.i0 = best
}

// medianXY is the per-axis median of the positions (mm) of smp.
func medianXY(smp []kinematics.Sample) (x, y float64) {
	xs := make([]float64, len(smp))
	ys := make([]float64, len(smp))
	for i, p := range smp {
		xs[i], ys[i] = p.XMM, p.YMM
	}
	return median(xs), median(ys)
}

// meanSpeed is the mean of the finite speeds of frames f0..f1, NaN when
// the track does not cover f0..f1 or has no finite speed there.
func (t *track) meanSpeed(f0, f1 int) float64 {
	i0, i1 := t.index(f0), t.index(f1)
	if i0 < 0 || i1 < 0 {
		return math.NaN()
	}
	var sum float64
	var k int
	for i := i0; i <= i1; i++ {
		if v := t.smp[i].SpeedMMPerS; finite(v) {
			sum += v
			k++
		}
	}
	if k == 0 {
		return math.NaN()
	}
	return sum / float64(k)
}

// inspections finds the inspections of one track, given its landings.
func (a *analyzer) inspections(t *track, ls []Landing) []Inspection {
	s := a.s
	n := len(t.smp)
	landed := make([]bool, n)
	for _, l := range ls {
		for i := t.index(l.StartFrame); i >= 0 && i < n && t.smp[i].Frame <= l.EndFrame; i++ {
			landed[i] = true
		}
	}
	label := make([]int, n)
	for i, p := range t.smp {
		label[i] = -1
		if landed[i] || !(p.SpeedMMPerS <= s.HoverSpeedMMPerS) {
			continue
		}
		best, bestD := -1, math.Inf(1)
		for k, f := range a.fm.Flowers {
			if f.EdgeDistPX(p.XPX, p.YPX) > a.inspectPX {
				continue
			}
			if d := f.CentreDistPX(p.XPX, p.YPX); d < bestD {
				best, bestD = k, d
			}
		}
		label[i] = best
	}
	minFrames := int(math.Ceil(s.MinInspectionS*a.clip.FPS - 1e-9))
	rs := runsOf(t, label)
	// Do not merge across a landing.
	var parts [][]run
	start := 0
	for i := range rs {
		if i > 0 && anyTrue(landed, rs[i-1].i1, rs[i].i0) {
			parts = append(parts, rs[start:i])
			start = i
		}
	}
	parts = append(parts, rs[start:])

	var out []Inspection
	for _, part := range parts {
		for _, r := range a.merge(t, part, a.mergeGapFrames, minFrames) {
			f := a.fm.Flowers[r.k]
			in := Inspection{
				TrackID:    t.id,
				FlowerID:   f.ID,
				FlowerKind: f.Kind,
				StartFrame: t.smp[r.i0].Frame,
				EndFrame:   t.smp[r.i1].Frame,
				StartS:     t.smp[r.i0].TimeS,
				EndS:       a.timeAfter(t, r.i1),
			}
			in.CensoredStart, in.CensoredEnd = t.cut(r.i0, r.i1)
			in.DurationS = in.EndS - in.StartS
			if in.DurationS < s.MinInspectionS-1e-9 {
				continue
			}
			// The slow approach to (departure from) a landing on the same
			// flower belongs to that landing.
			attached := false
			for _, l := range ls {
				if l.FlowerID != f.ID {
					continue
				}
				gapBefore := l.StartFrame - in.EndFrame - 1
				gapAfter := in.StartFrame - l.EndFrame - 1
				if (gapBefore >= 0 && gapBefore <= max(a.mergeGapFrames, 0)) || (gapAfter >= 0 && gapAfter <= max(a.mergeGapFrames, 0)) {
					attached = true
					break
				}
			}
			if attached {
				continue
			}
			in.MinDistMM = math.Inf(1)
			for i := r.i0; i <= r.i1; i++ {
				in.MinDistMM = math.Min(in.MinDistMM, f.EdgeDistPX(t.smp[i].XPX, t.smp[i].YPX)/a.clip.PXPerMM)
			}
			out = append(out, in)
		}
	}
	return out
}

// anyTrue reports whether b[i] is true for some i in (i0, i1).
func anyTrue(b []bool, i0, i1 int) bool {
	for i := i0 + 1; i < i1; i++ {
		if b[i] {
			return true
		}
	}
	return false
}

// flights returns the flights between consecutive landings of one track.
func (a *analyzer) flights(t *track, ls []Landing, is []Inspection) []Flight {
	var out []Flight
	for j := 1; j < len(ls); j++ {
		p, q := ls[j-1], ls[j]
		fp, fq := a.fm.Flowers[a.flowerIndex(p.FlowerID)], a.fm.Flowers[a.flowerIndex(q.FlowerID)]
		f := Flight{
			TrackID:      t.id,
			FromFlowerID: p.FlowerID, ToFlowerID: q.FlowerID,
			FromKind: p.FlowerKind, ToKind: q.FlowerKind,
			FromIndex:  j, // set again by annotate
			StartFrame: p.EndFrame + 1, EndFrame: q.StartFrame,
			StartS: p.EndS, EndS: q.StartS,
			FlowerDistanceMM: math.Hypot(fp.XPX-fq.XPX, fp.YPX-fq.YPX) / a.clip.PXPerMM,
		}
		f.DurationS = f.EndS - f.StartS
		i0, i1 := t.index(p.EndFrame), t.index(q.StartFrame)
		s0, s1 := t.smp[i0], t.smp[i1]
		f.DistanceMM = math.Hypot(s1.XMM-s0.XMM, s1.YMM-s0.YMM)
		for i := i0 + 1; i <= i1; i++ {
			f.PathLengthMM += math.Hypot(t.smp[i].XMM-t.smp[i-1].XMM, t.smp[i].YMM-t.smp[i-1].YMM)
			f.UnseenS += float64(t.smp[i].Frame-t.smp[i-1].Frame-1) / a.clip.FPS
		}
		f.MeanSpeedMMPerS = math.NaN()
		if f.DurationS > 0 {
			f.MeanSpeedMMPerS = f.PathLengthMM / f.DurationS
		}
		for _, in := range is {
			if in.StartFrame > p.EndFrame && in.EndFrame < q.StartFrame {
				f.Inspections++
			}
		}
		out = append(out, f)
	}
	return out
}

func (a *analyzer) flowerIndex(id string) int {
	for i, f := range a.fm.Flowers {
		if f.ID == id {
			return i
		}
	}
	panic("visits: landing on a flower not in the map: " + id)
}

// annotate sets Index, Revisit, SincePrevVisitS and RewardUL of the
// landings and FromIndex of the flights.
func (a *analyzer) annotate(ls []Landing, fs []Flight) {
	order := make([]int, len(ls))
	for i := range order {
		order[i] = i
	}
	// Per bee, in start order.
	sort.SliceStable(order, func(x, y int) bool {
		lx, ly := ls[order[x]], ls[order[y]]
		if lx.TrackID != ly.TrackID {
			return lx.TrackID < ly.TrackID
		}
		return lx.StartFrame < ly.StartFrame
	})
	seen := map[string]bool{}
	prevTrack, idx := 0, 0
	for k, i := range order {
		l := &ls[i]
		if k == 0 || l.TrackID != prevTrack {
			prevTrack, idx = l.TrackID, 0
			clear(seen)
		}
		idx++
		l.Index = idx
		l.Revisit = seen[l.FlowerID]
		seen[l.FlowerID] = true
	}
	// Per flower, in start order over all bees.
	sort.SliceStable(order, func(x, y int) bool {
		lx, ly := ls[order[x]], ls[order[y]]
		return lessFrameTrack(lx.StartFrame, lx.TrackID, ly.StartFrame, ly.TrackID)
	})
	last := map[string]int{}
	for _, i := range order {
		l := &ls[i]
		l.SincePrevVisitS = math.NaN()
		if j, ok := last[l.FlowerID]; ok {
			l.SincePrevVisitS = l.StartS - ls[j].EndS
		}
		f := a.fm.Flowers[a.flowerIndex(l.FlowerID)]
		if f.RewardUL != nil {
			l.RewardUL = 0
			if !ok(last, l.FlowerID) || a.s.RewardEveryLanding {
				l.RewardUL = *f.RewardUL
			}
		}
		last[l.FlowerID] = i
	}
	// Flights: FromIndex is the Index of the landing the flight leaves.
	byStart := map[[2]int]int{}
	for _, l := range ls {
		byStart[[2]int{l.TrackID, l.EndFrame + 1}] = l.Index
	}
	for i := range fs {
		if x, ok := byStart[[2]int{fs[i].TrackID, fs[i].StartFrame}]; ok {
			fs[i].FromIndex = x
		}
	}
}

func ok(m map[string]int, k string) bool { _, found := m[k]; return found }
