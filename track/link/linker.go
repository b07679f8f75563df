package link

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Assignment tells which detection of a frame went to which confirmed
// track.
type Assignment struct {
	DetIndex int // index into the detections passed to Step
	TrackID  int // provisional track ID (see Linker)
	// Pending is true if the track was lost (coasted more than
	// ReconfirmAfterMisses frames) and this detection does not yet
	// re-confirm it; it may be dropped later.
	Pending bool
	// Merged is true if the detection is a blob of two or more bees whose
	// tracks came within MergeRadiusPX; each of them has an Assignment
	// to it, and none was updated with it.
	Merged bool
}

// Prediction is where a confirmed track expects its target in the next
// frame.
type Prediction struct {
	TrackID  int // provisional track ID
	Frame    int // the frame this prediction is for
	XPX, YPX float64
	// SXX, SXY, SYY are the entries of the innovation covariance
	// S = H P H' + R, px^2: the spread of the target's next detection.
	SXX, SXY, SYY float64
	// GateRadiusPX is the radius within which a detection can be
	// assigned to this track: the chi-square gate ellipse's longest
	// semi-axis, clamped to [MinGateRadiusPX, MaxGateRadiusPX].
	GateRadiusPX float64
	// CoastFrames is the number of frames since the track's latest
	// detection (0 if it was detected in the latest frame).
	CoastFrames int
	// Still is true if the track's recent speed is at most
	// StillSpeedPXPerS: a landed or walking bee.
	Still bool
}

// Linker links per-frame detections into tracks online. Call Step once per
// frame in increasing frame order, then Finish once.
//
// Each Step predicts every live track with its Kalman filter, assigns
// detections to confirmed tracks and then to tentative tracks with the
// Hungarian method under a chi-square gate, updates matched tracks, lets
// unmatched tracks coast, starts a tentative track at every detection left
// over (except pieces split off a detected bee's blob: see besideFound),
// confirms tentative tracks after MinHitsToConfirm detections and ends
// tracks that coasted too long (see doc.go for the costs and rules).
//
// Track IDs given out by Step and Predicted are provisional: they are
// unique, given in order of confirmation, and stay with a track while it
// lives. Finish joins fragments and renumbers; FinalID maps a provisional ID
// to the ID in Finish's result.
type Linker struct {
	s          Settings
	kcfg       KalmanConfig
	gateD2     float64
	dtS        float64
	frame      int      // last frame stepped
	box        frameBox // bounding box of all detections so far
	firstFrame int      // first frame stepped
	started    bool
	finished   bool
	live       []*ltrack
	ended      []*ltrack // confirmed tracks that have ended
	nextID     int
	finalID    map[int]int
}

// ltrack is a live or ended track.
type ltrack struct {
	id int // provisional ID, 0 while tentative
	kf *Kalman
	// imm is the two-model filter (see imm) that predicts and updates
	// while the track is detected frame after frame (immLive); kf then
	// holds its combined estimate. While the track coasts or is merged,
	// kf alone runs and imm restarts from kf at the next detection.
	imm     *imm
	immLive bool
	points  []Point // one per frame from the first detection
	// coasted[i] is true if points[i] was appended by miss (no
	// detection; not a merged frame).
	coasted []bool
	hits    int // detections
	// misses counts frames since the latest reliable detection: every
	// detection of a tentative or found track, or the detection that
	// re-confirms a lost track (see Settings.ReconfirmAfterMisses).
	misses       int
	sinceHit     int     // frames since the latest detection of any kind
	pendingHits  int     // detections in a row while lost
	pendingGap   int     // frames since the latest pending detection
	lastReliable int     // index in points of the latest reliable detection
	speedPXPS    float64 // recent speed at the latest reliable detection, px/s
	kfSpeedPXPS  float64 // filter speed after that detection, px/s
	// anchor is the filtered position and its covariance at the latest
	// reliable detection; a still track coasts there.
	anchorX, anchorY float64
	anchorCov        *mat.SymDense
	// mergedWith is the index of the detection of a merged blob this
	// track is in for the current frame, -1 otherwise; inMerge is true
	// while the track has been merged since its latest detection or miss.
	mergedWith  int
	inMerge     bool
	mergeFrames int  // consecutive merged frames
	duplicate   bool // to be ended: follows the same bee as another track
	exited      bool // ended because its prediction left BoundsPX
}

// NewLinker returns a Linker with settings s; zero fields of s take their
// defaults (see Settings). It panics if s is invalid.
func NewLinker(s Settings) *Linker {
	s = s.withDefaults()
	return &Linker{
		s:       s,
		kcfg:    s.kalmanConfig(),
		gateD2:  GateD2(s.GateProbability),
		dtS:     1 / s.FPS,
		finalID: map[int]int{},
	}
}

// Settings returns the settings in use, with defaults filled in.
func (l *Linker) Settings() Settings { return l.s }

// Step links the detections of frame (>= 0, larger than the previous
// frame; a skipped frame counts as a frame without detections) and returns
// which detection went to which confirmed track, in detection order. A
// track confirmed in this frame is included; a merged blob appears once
// for each of its tracks. The frame argument is authoritative; the Frame
// field of the detections is not read. Step panics if a detection's
// position is not finite.
func (l *Linker) Step(frame int, dets []Detection) []Assignment {
	if l.finished {
		panic("link: Step after Finish")
	}
	if frame < 0 || (l.started && frame <= l.frame) {
		panic(fmt.Sprintf("link: frame %d not after frame %d", frame, l.frame))
	}
	for i, d := range dets {
		if math.IsNaN(d.XPX) || math.IsNaN(d.YPX) || math.IsInf(d.XPX, 0) || math.IsInf(d.YPX, 0) {
			panic(fmt.Sprintf("link: frame %d detection %d has position (%v, %v)", frame, i, d.XPX, d.YPX))
		}
	}
	if l.started {
		for f := l.frame + 1; f < frame; f++ {
			l.predictAll()
			for _, t := range l.live {
				l.miss(t, f)
			}
			l.prune()
		}
		l.predictAll()
	}
	if !l.started {
		l.firstFrame = frame
		l.box = frameBox{math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)}
	}
	for _, d := range dets {
		l.box.minX, l.box.maxX = math.Min(l.box.minX, d.XPX), math.Max(l.box.maxX, d.XPX)
		l.box.minY, l.box.maxY = math.Min(l.box.minY, d.YPX), math.Max(l.box.maxY, d.YPX)
	}
	l.started = true
	l.frame = frame

	detTrack := make([]*ltrack, len(dets))
	var conf, found, lost, tent []*ltrack
	for _, t := range l.live {
		switch {
		case t.id == 0:
			tent = append(tent, t)
		case l.lost(t):
			conf = append(conf, t)
			lost = append(lost, t)
		default:
			conf = append(conf, t)
			found = append(found, t)
		}
	}
	// Confirmed tracks detected lately choose first, then lost confirmed
	// tracks, then tentative tracks get what is left (a matching cascade:
	// Wojke et al. 2017). A lost track's prediction is stale, and a still
	// one is held for up to MaxCoastStillS: in a joint assignment it
	// could take the detection of a bee whose own track is still
	// followed (a fragment on swaying grass catching a bee that arrives
	// to hover beside it).
	matched := map[*ltrack]bool{}
	beside := make([]bool, len(dets))
	for gi, group := range [][]*ltrack{found, lost, tent} {
		if gi == 1 {
			beside = l.besideFound(found, dets, detTrack)
		}
		if gi == 2 {
			// All confirmed tracks have chosen.
			l.findMerges(conf, dets, detTrack, matched)
		}
		free := make([]int, 0, len(dets))
		for j := range dets {
			if detTrack[j] == nil && !beside[j] {
				free = append(free, j)
			}
		}
		if len(group) == 0 || len(free) == 0 {
			continue
		}
		cost := mat.NewDense(len(group), len(free), nil)
		for i, t := range group {
			for jj, j := range free {
				cost.Set(i, jj, l.assocCost(t, dets[j]))
			}
		}
		rowToCol, _ := Assign(cost)
		for i, jj := range rowToCol {
			if jj >= 0 {
				detTrack[free[jj]] = group[i]
				matched[group[i]] = true
			}
		}
	}
	var mergedOut []Assignment
	groups := map[int][]*ltrack{}
	for _, t := range l.live {
		switch {
		case t.mergedWith >= 0:
			l.merged(t, frame)
			groups[t.mergedWith] = append(groups[t.mergedWith], t)
			mergedOut = append(mergedOut, Assignment{DetIndex: t.mergedWith, TrackID: t.id, Merged: true})
		case !matched[t]:
			l.miss(t, frame)
		}
	}
	l.dropDuplicates(groups)
	for j, t := range detTrack {
		if t != nil && t.mergedWith < 0 {
			l.hit(t, frame, dets[j])
		}
	}
	for j, d := range dets {
		if detTrack[j] == nil && !beside[j] {
			t := &ltrack{kf: NewKalman(l.kcfg, d.XPX, d.YPX), mergedWith: -1}
			l.record(t, frame, d)
			l.reliable(t)
			l.live = append(l.live, t)
			detTrack[j] = t
		}
	}
	// Confirm, in detection order so that IDs are deterministic.
	var out []Assignment
	for j, t := range detTrack {
		if t == nil || t.mergedWith >= 0 {
			continue
		}
		if t.id == 0 && t.hits >= l.s.MinHitsToConfirm {
			l.nextID++
			t.id = l.nextID
			if l.useIMM() {
				t.imm, t.immLive = newIMM(t.kf, [numModels]float64{0.5, 0.5}), true
			}
		}
		if t.id > 0 {
			out = append(out, Assignment{DetIndex: j, TrackID: t.id, Pending: t.misses > 0})
		}
	}
	out = append(out, mergedOut...)
	sort.SliceStable(out, func(i, j int) bool { return out[i].DetIndex < out[j].DetIndex })
	for _, t := range l.live {
		t.mergedWith = -1
	}
	l.prune()
	return out
}

// besideFound marks the detections that no track took in the first round
// of the matching cascade and that lie inside the gate of a track of that
// round (found: confirmed and detected lately) which did take a detection.
// Such a detection is a piece of that track's bee split off its blob (a
// sitting bee cut in two by a flower's dark centre or a grass blade in
// front) or clutter touching it; a second bee that close would have
// merged with it into one blob. Step keeps these detections from lost
// and tentative tracks and starts no track at them: given to a lost
// track they would keep it alive on the bee beside the bee's own track
// (a fragment on swaying grass that coasted, held still, until the bee
// landed within its gate), and at take-off either track could then leave
// with the bee.
func (l *Linker) besideFound(found []*ltrack, dets []Detection, detTrack []*ltrack) []bool {
	out := make([]bool, len(dets))
	took := map[*ltrack]bool{}
	for _, u := range detTrack {
		if u != nil {
			took[u] = true
		}
	}
	for j, d := range dets {
		if detTrack[j] != nil {
			continue
		}
		for _, t := range found {
			if took[t] && !math.IsInf(l.assocCost(t, d), 1) {
				out[j] = true
				break
			}
		}
	}
	return out
}

// findMerges looks for two confirmed moving tracks whose bees have merged
// into one blob: a track u left without a detection, another track m within
// MergeRadiusPX of u's prediction that got detection j, and j inside u's
// gate. Both are then marked merged with j (the closest m wins): neither
// filter is updated with the blob's centroid, which lies between the bees
// and would bend both velocities, and both predict on undamped. Still
// tracks take no part: a still track holds its place anyway (a bee flying
// over a sitting one costs the flier a few coasted frames), and a still
// track is also what flickering foliage makes.
func (l *Linker) findMerges(conf []*ltrack, dets []Detection, detTrack []*ltrack, matched map[*ltrack]bool) {
	for _, u := range conf {
		if matched[u] || u.mergedWith >= 0 || l.still(u) {
			continue
		}
		ux, uy, _, _ := u.kf.State()
		best, bestD := -1, math.Inf(1)
		for j, m := range detTrack {
			if m == nil || m.id == 0 || m == u || l.still(m) {
				continue
			}
			mx, my, _, _ := m.kf.State()
			d := math.Hypot(mx-ux, my-uy)
			if d <= l.s.MergeRadiusPX && d < bestD && !math.IsInf(l.assocCost(u, dets[j]), 1) {
				best, bestD = j, d
			}
		}
		if best >= 0 {
			u.mergedWith = best
			detTrack[best].mergedWith = best
		}
	}
}

// merged records a frame in which t's bee is inside a merged blob: the
// prediction is appended as an unobserved point; the filter is not
// updated, and the frame counts neither as a detection nor as a miss.
//
// On the first merged frame the state is replaced by a straight-line
// least-squares fit to the track's detections of the last SpeedWindowS
// (at least 3 of them), evaluated at this frame: the filter's own velocity
// follows the latest detections closely and is too noisy to extrapolate
// through a merge of many frames.
func (l *Linker) merged(t *ltrack, frame int) {
	if !t.inMerge {
		if x, y, vx, vy, ok := l.lineFit(t, frame); ok {
			t.kf.setState(x, y, vx, vy)
		}
		t.mergeFrames = 0
	}
	t.inMerge = true
	t.immLive = false
	t.mergeFrames++
	x, y, _, _ := t.kf.State()
	t.points = append(t.points, Point{Frame: frame, XPX: x, YPX: y})
	t.coasted = append(t.coasted, false)
}

// dropDuplicates ends all but the strongest track of every merged group
// that has stayed merged for more than MaxMergeS: two tracks that share one
// blob that long are taken to follow the same bee. The strongest is the one
// with the most detections; the others end at their latest reliable
// detection (Finish may still join them to something by gap closing).
func (l *Linker) dropDuplicates(groups map[int][]*ltrack) {
	limit := l.s.frames(l.s.MaxMergeS)
	for _, g := range groups {
		if len(g) < 2 {
			continue
		}
		best := g[0]
		long := true
		for _, t := range g {
			if t.mergeFrames <= limit {
				long = false
			}
			if t.hits > best.hits || (t.hits == best.hits && t.id < best.id) {
				best = t
			}
		}
		if !long {
			continue
		}
		for _, t := range g {
			if t != best {
				t.duplicate = true
			}
		}
	}
}

// lineFit fits x(f) and y(f) by least squares to the observed points of t
// within SpeedWindowS before its latest point and returns the fitted
// position at frame and the velocity in px/s; ok is false with fewer than
// 3 points.
func (l *Linker) lineFit(t *ltrack, frame int) (x, y, vx, vy float64, ok bool) {
	if len(t.points) == 0 {
		return 0, 0, 0, 0, false
	}
	lastF := t.points[len(t.points)-1].Frame
	win := l.s.frames(l.s.SpeedWindowS)
	var n, sf, sff, sx, sy, sfx, sfy float64
	for i := len(t.points) - 1; i >= 0 && lastF-t.points[i].Frame <= win; i-- {
		p := t.points[i]
		if !p.Observed {
			continue
		}
		f := float64(p.Frame - frame)
		n++
		sf += f
		sff += f * f
		sx += p.XPX
		sy += p.YPX
		sfx += f * p.XPX
		sfy += f * p.YPX
	}
	den := n*sff - sf*sf
	if n < 3 || den == 0 {
		return 0, 0, 0, 0, false
	}
	bx := (n*sfx - sf*sx) / den // px/frame
	by := (n*sfy - sf*sy) / den
	// Intercepts at f = 0, i.e. at frame.
	return (sx - bx*sf) / n, (sy - by*sf) / n, bx * l.s.FPS, by * l.s.FPS, true
}

// assocCost is the cost of giving detection d to track t, +Inf outside the
// gate:
//
//	cost = d^2 + ln det S
//
// the negative log-likelihood of d under the prediction up to a constant
// (Blackman & Popoli 1999, Sec. 6.3), so that a confident track wins a
// detection over a long-coasting one at equal d^2.
//
// While the track's two-model filter runs (see imm), the cost is the
// mixture's -2 ln sum_j c_j Lambda_j instead, and d^2 in the gate is the
// smallest over the models: the detection must fit at least one of them.
func (l *Linker) assocCost(t *ltrack, d Detection) float64 {
	px, py, _, _ := t.kf.State()
	dist := math.Hypot(d.XPX-px, d.YPX-py)
	if dist > l.s.MaxGateRadiusPX {
		return math.Inf(1)
	}
	if t.immLive {
		c, d2 := t.imm.cost(d.XPX, d.YPX)
		if d2 > l.gateD2 && dist > l.s.MinGateRadiusPX {
			return math.Inf(1)
		}
		return c
	}
	d2 := t.kf.Mahalanobis2(d.XPX, d.YPX)
	if d2 > l.gateD2 && dist > l.s.MinGateRadiusPX {
		return math.Inf(1)
	}
	return d2 + t.kf.LogDetS()
}

// useIMM reports whether tracks run the two-model filter.
func (l *Linker) useIMM() bool { return l.s.HoverSigmaPX > 0 }

// predictAll advances every live track by one frame. A track detected in
// the latest frame is predicted with its IMM filter (imm) or, without
// one, with the constant-velocity model; a
// coasting still track is held at its anchor (Kalman.Hold); any other
// coasting track is predicted with its velocity decaying with half-life
// CoastVelHalfLifeS.
func (l *Linker) predictAll() {
	damp := math.Pow(0.5, l.dtS/l.s.CoastVelHalfLifeS)
	for _, t := range l.live {
		l.predict(t.kf, t.imm, t, damp)
	}
}

// predict advances k (t's filter or a copy) and m (t's two-model filter
// or a copy) by one frame.
func (l *Linker) predict(k *Kalman, m *imm, t *ltrack, damp float64) {
	switch {
	case t.sinceHit == 0 && t.immLive:
		m.predict(l.dtS, math.Min(0.5, l.dtS/l.s.ModeSwitchS), l.s.HoverSigmaPX, l.s.StillSpeedPXPerS, l.s.TakeoffSpeedPXPerS)
		m.combined(k, m.c)
	case t.sinceHit == 0:
		k.Predict(l.dtS)
	case l.still(t):
		c := mat.NewSymDense(2, nil)
		c.CopySym(t.anchorCov)
		s2 := l.s.StillSigmaPX * l.s.StillSigmaPX
		c.SetSym(0, 0, c.At(0, 0)+s2)
		c.SetSym(1, 1, c.At(1, 1)+s2)
		k.Hold(t.anchorX, t.anchorY, c, l.s.StillSpeedPXPerS)
	default:
		k.PredictDamped(l.dtS, damp)
	}
}

// lost reports whether t has coasted long enough to need re-confirmation.
func (l *Linker) lost(t *ltrack) bool {
	return l.s.ReconfirmAfterMisses >= 0 && t.misses > l.s.ReconfirmAfterMisses
}

// hit updates t with detection d of frame.
func (l *Linker) hit(t *ltrack, frame int, d Detection) {
	wasLost := t.id > 0 && l.lost(t)
	switch {
	case t.immLive:
		t.imm.update(d.XPX, d.YPX)
		t.imm.combined(t.kf, t.imm.mu)
	case t.imm != nil:
		t.kf.Update(d.XPX, d.YPX)
		t.imm, t.immLive = newIMM(t.kf, t.imm.mu), true
	default:
		t.kf.Update(d.XPX, d.YPX)
	}
	l.record(t, frame, d)
	if !wasLost {
		l.reliable(t)
		return
	}
	t.misses++
	if t.pendingGap > max(0, l.s.MaxTentativeMisses) {
		t.pendingHits = 0
	}
	t.pendingHits++
	t.pendingGap = 0
	if t.pendingHits >= l.s.MinHitsToConfirm {
		l.reliable(t)
	}
}

// record appends detection d as an observed point.
func (l *Linker) record(t *ltrack, frame int, d Detection) {
	t.points = append(t.points, Point{Frame: frame, XPX: d.XPX, YPX: d.YPX, Observed: true, AreaPX: d.AreaPX})
	t.coasted = append(t.coasted, false)
	t.hits++
	t.sinceHit = 0
	t.inMerge = false
}

// reliable marks t's latest point as a reliable detection.
func (l *Linker) reliable(t *ltrack) {
	t.misses, t.pendingHits, t.pendingGap = 0, 0, 0
	t.lastReliable = len(t.points) - 1
	t.speedPXPS = l.recentSpeed(t)
	var vx, vy float64
	t.anchorX, t.anchorY, vx, vy = t.kf.State()
	t.kfSpeedPXPS = math.Hypot(vx, vy)
	t.anchorCov = t.kf.PosCov()
}

// recentSpeed is the straight-line distance between the latest detection
// and the earliest detection within SpeedWindowS before it, divided by the
// time between them; the filter's speed if there is no such detection.
func (l *Linker) recentSpeed(t *ltrack) float64 {
	lastIdx := len(t.points) - 1
	last := t.points[lastIdx]
	win := l.s.frames(l.s.SpeedWindowS)
	first := -1
	for i := lastIdx - 1; i >= 0 && last.Frame-t.points[i].Frame <= win; i-- {
		if t.points[i].Observed {
			first = i
		}
	}
	if first < 0 {
		_, _, vx, vy := t.kf.State()
		return math.Hypot(vx, vy)
	}
	p := t.points[first]
	return math.Hypot(last.XPX-p.XPX, last.YPX-p.YPX) / (float64(last.Frame-p.Frame) * l.dtS)
}

// miss records a frame without detection for t: the predicted position is
// appended as a coasted point.
func (l *Linker) miss(t *ltrack, frame int) {
	x, y, _, _ := t.kf.State()
	t.points = append(t.points, Point{Frame: frame, XPX: x, YPX: y})
	t.coasted = append(t.coasted, true)
	t.misses++
	t.sinceHit++
	t.inMerge = false
	t.immLive = false
	t.pendingGap++
}

// still reports whether t's recent speed is at most StillSpeedPXPerS, by
// both the straight-line speed over SpeedWindowS (which a quick turn can
// hide) and the filter's speed at the latest reliable detection.
func (l *Linker) still(t *ltrack) bool {
	return math.Max(t.speedPXPS, t.kfSpeedPXPS) <= l.s.StillSpeedPXPerS
}

// prune drops tentative tracks that missed too often and ends confirmed
// tracks that coasted too long or left the frame.
func (l *Linker) prune() {
	maxTent := max(0, l.s.MaxTentativeMisses)
	keep := l.live[:0]
	for _, t := range l.live {
		switch {
		case t.id == 0 && t.misses > maxTent:
			// Dropped: never confirmed.
		case t.id > 0 && (t.duplicate || l.expired(t)):
			l.end(t)
		default:
			keep = append(keep, t)
		}
	}
	for i := len(keep); i < len(l.live); i++ {
		l.live[i] = nil
	}
	l.live = keep
}

// expired reports whether the confirmed track t should end now.
func (l *Linker) expired(t *ltrack) bool {
	if t.misses == 0 {
		return false
	}
	maxCoast := l.s.MaxCoastMovingS
	if l.still(t) {
		maxCoast = l.s.MaxCoastStillS
	}
	if t.misses > l.s.frames(maxCoast) {
		return true
	}
	if t.sinceHit > 0 && !l.s.BoundsPX.Empty() {
		x, y, _, _ := t.kf.State()
		b := l.s.BoundsPX
		if x < float64(b.Min.X) || y < float64(b.Min.Y) || x >= float64(b.Max.X) || y >= float64(b.Max.Y) {
			t.exited = true
			return true
		}
	}
	return false
}

// end moves a confirmed track to the ended list without the points after
// its latest reliable detection.
func (l *Linker) end(t *ltrack) {
	t.points = t.points[:t.lastReliable+1]
	t.coasted = t.coasted[:t.lastReliable+1]
	t.misses = 0
	t.kf = nil
	l.ended = append(l.ended, t)
}

// Predicted returns, for every live confirmed track, its prediction for
// the frame after the latest Step (for frame 0 before the first Step: none).
// It does not change the Linker. Segmentation can use it to keep a landed
// bee out of the background model and to search near the prediction.
func (l *Linker) Predicted() []Prediction {
	if l.finished || !l.started {
		return nil
	}
	damp := math.Pow(0.5, l.dtS/l.s.CoastVelHalfLifeS)
	var out []Prediction
	for _, t := range l.live {
		if t.id == 0 {
			continue
		}
		k := t.kf.clone()
		var m *imm
		if t.imm != nil {
			m = t.imm.clone()
		}
		l.predict(k, m, t, damp)
		x, y, _, _ := k.State()
		s := k.S()
		r := math.Min(math.Max(gateRadiusPX(s, l.gateD2), l.s.MinGateRadiusPX), l.s.MaxGateRadiusPX)
		out = append(out, Prediction{
			TrackID: t.id, Frame: l.frame + 1, XPX: x, YPX: y,
			SXX: s.At(0, 0), SXY: s.At(0, 1), SYY: s.At(1, 1),
			GateRadiusPX: r, CoastFrames: t.sinceHit, Still: l.still(t),
		})
	}
	return out
}

// Finish ends all live tracks, drops tracks with fewer than
// MinObservedPoints detections, closes gaps between the others, drops
// stationary tracks in mid-clip (see StationaryRadiusPX) and tracks
// detected in less than MinDetectedFrac of their points, and returns the
// resulting tracks with
// IDs 1..n in order of their first frame. A track is first cut wherever
// it coasted longer than MaxCoastMovingS (the pieces go to gap closing,
// which may join them again); shorter runs of coasted points are replaced
// by linear interpolation between the detections around them. Finish may
// be called once; Step panics afterwards.
func (l *Linker) Finish() []Track {
	if l.finished {
		panic("link: Finish called twice")
	}
	l.finished = true
	for _, t := range l.live {
		if t.id > 0 {
			l.end(t)
		}
	}
	l.live = nil
	var frags []fragment
	for _, t := range l.ended {
		n := 0
		for _, p := range t.points {
			if p.Observed {
				n++
			}
		}
		if n < l.s.MinObservedPoints {
			continue
		}
		pieces := splitLongCoasts(t.points, t.coasted, l.s.frames(l.s.MaxCoastMovingS))
		for k, pts := range pieces {
			f := fragment{ids: []int{t.id}, points: interpolateCoasted(pts)}
			if k == len(pieces)-1 {
				f.endSpeedPXPS, f.exited = t.kfSpeedPXPS, t.exited
			}
			frags = append(frags, f)
		}
	}
	l.ended = nil
	box := l.box
	if b := l.s.BoundsPX; !b.Empty() {
		box = frameBox{float64(b.Min.X), float64(b.Min.Y), float64(b.Max.X), float64(b.Max.Y)}
	}
	joined := closeGaps(frags, l.s, box)
	edge := l.s.frames(1)
	keep := joined[:0]
	for _, f := range joined {
		if observed(f.points) < l.s.MinObservedPoints {
			continue // a short piece of a cut track that nothing joined
		}
		midClip := f.first().Frame > l.firstFrame+edge && f.last().Frame < l.frame-edge
		if midClip && stationary(f.points, l.s.StationaryRadiusPX) {
			continue
		}
		if detectedFrac(f.points, l.s.frames(l.s.MaxCoastMovingS), l.s.StationaryRadiusPX) < l.s.MinDetectedFrac {
			continue
		}
		keep = append(keep, f)
	}
	sort.Slice(keep, func(i, j int) bool {
		a, b := keep[i], keep[j]
		if a.points[0].Frame != b.points[0].Frame {
			return a.points[0].Frame < b.points[0].Frame
		}
		return a.ids[0] < b.ids[0]
	})
	out := make([]Track, len(keep))
	for i, f := range keep {
		out[i] = Track{ID: i + 1, Points: f.points}
		for _, id := range f.ids {
			l.finalID[id] = i + 1
		}
	}
	return out
}

// FinalID returns the ID in Finish's result of the track that had
// provisional ID id, and false if that track was dropped or Finish has not
// run. A track that Finish cut at a long coast (see doc.go) maps to the
// result track that starts last among those holding its pieces.
func (l *Linker) FinalID(id int) (int, bool) {
	f, ok := l.finalID[id]
	return f, ok
}

// stationary reports whether every observed point lies within radiusPX
// of the observed points' median position (per coordinate); false if
// radiusPX < 0.
func stationary(pts []Point, radiusPX float64) bool {
	if radiusPX < 0 {
		return false
	}
	var xs, ys []float64
	for _, p := range pts {
		if p.Observed {
			xs = append(xs, p.XPX)
			ys = append(ys, p.YPX)
		}
	}
	if len(xs) == 0 {
		return false
	}
	mx, my := median(xs), median(ys)
	for i := range xs {
		if math.Hypot(xs[i]-mx, ys[i]-my) > radiusPX {
			return false
		}
	}
	return true
}

// splitLongCoasts splits a track's points at every gap between two
// detections that holds more than maxRun coasted points (coasted[i]:
// points[i] was a miss, not a merged frame), leaving the gaps out: what
// the track picked up after coasting that long may be another object, so
// the pieces are left to gap closing, which weighs all ends and starts
// at once (Jaqaman et al. 2008: cautious frame-to-frame linking, global
// gap closing).
func splitLongCoasts(pts []Point, coasted []bool, maxRun int) [][]Point {
	var out [][]Point
	start, lastObs, run := 0, -1, 0
	for i, p := range pts {
		if !p.Observed {
			if coasted[i] {
				run++
			}
			continue
		}
		r := run
		run = 0
		if lastObs >= 0 && r > maxRun {
			out = append(out, pts[start:lastObs+1])
			start = i
		}
		lastObs = i
	}
	return append(out, pts[start:lastObs+1])
}

// observed is the number of detections among pts.
func observed(pts []Point) int {
	n := 0
	for _, p := range pts {
		if p.Observed {
			n++
		}
	}
	return n
}

// detectedFrac is the fraction of pts that are detections.
//
// A run of unobserved points longer than maxRun frames whose two
// neighbouring detections lie within sitPX of each other is left out of
// the count: a bee that sat unseen (on ground as dark as itself) and was
// joined across the gap where it sat. Counted, a long unseen sit would
// drop the whole track, detected flight included.
func detectedFrac(pts []Point, maxRun int, sitPX float64) float64 {
	n, skip := observed(pts), 0
	for i := 0; i < len(pts); {
		if pts[i].Observed {
			i++
			continue
		}
		j := i
		for j < len(pts) && !pts[j].Observed {
			j++
		}
		if run := j - i; run > maxRun && i > 0 && j < len(pts) {
			a, b := pts[i-1], pts[j]
			if math.Hypot(a.XPX-b.XPX, a.YPX-b.YPX) <= sitPX {
				skip += run
			}
		}
		i = j
	}
	return float64(n) / float64(len(pts)-skip)
}

// median returns the median of v, reordering v.
func median(v []float64) float64 {
	sort.Float64s(v)
	n := len(v)
	if n%2 == 1 {
		return v[n/2]
	}
	return (v[n/2-1] + v[n/2]) / 2
}

// interpolateCoasted replaces every run of unobserved points between two
// observed points by linear interpolation between them, in place.
func interpolateCoasted(pts []Point) []Point {
	last := -1
	for i, p := range pts {
		if !p.Observed {
			continue
		}
		if last >= 0 && i-last > 1 {
			fillLinear(pts[last+1:i], pts[last], p)
		}
		last = i
	}
	return pts
}

// fillLinear sets the positions of gap (unobserved points between a and b)
// by linear interpolation in frame number.
func fillLinear(gap []Point, a, b Point) {
	df := float64(b.Frame - a.Frame)
	for i := range gap {
		w := float64(gap[i].Frame-a.Frame) / df
		gap[i] = Point{
			Frame: gap[i].Frame,
			XPX:   a.XPX + w*(b.XPX-a.XPX),
			YPX:   a.YPX + w*(b.YPX-a.YPX),
		}
	}
}
