package link

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// fragment is a confirmed track piece: its points start and end with a
// detection. ids lists the provisional IDs joined into it, in time order.
type fragment struct {
	ids    []int
	points []Point
	// endSpeedPXPS is the filter's speed at the last point, px/s.
	endSpeedPXPS float64
	// exited is true if the fragment ended because its prediction left
	// the frame (Settings.BoundsPX).
	exited bool
}

func (f fragment) first() Point { return f.points[0] }
func (f fragment) last() Point  { return f.points[len(f.points)-1] }

// Costs of leaving a fragment's end unlinked (it terminates) or its start
// unlinked (it begins), in the units of gapLinkCost. Every allowed link
// without overlap costs at most 2 = gapDeathCost + gapBirthCost, so gap
// closing makes all such joins it can and uses the costs to choose between
// conflicting ones.
const (
	gapDeathCost = 1.0
	gapBirthCost = 1.0
)

// frameBox is the picture area as known to gap closing, px.
type frameBox struct {
	minX, minY, maxX, maxY float64
}

// nearEdge reports whether p is within marginPX of the box's border.
func (b frameBox) nearEdge(p Point, marginPX float64) bool {
	return p.XPX-b.minX <= marginPX || b.maxX-p.XPX <= marginPX ||
		p.YPX-b.minY <= marginPX || b.maxY-p.YPX <= marginPX
}

// gapLinkCost returns the cost of joining the end of a to the start of b,
// +Inf if not allowed, and the index in a.points of the point that a is
// cut after (normally its last point). With gap g = (frames between a's
// end point and b's first point) / FPS in s and d the straight distance
// between those points in px, these links are allowed:
//
//	flight:  g <= MaxGapS and d <= reach = MinGateRadiusPX + vmax g, where
//	         vmax = min(MaxSpeedPXPerS, 2 max(va, vb) + StillSpeedPXPerS)
//	         with va, vb the straight-line speeds over SpeedWindowS before
//	         a's end and after b's start, va raised to the filter's speed
//	         at a's end if that is larger: the bee flies through the gap at
//	         most about twice as fast as on either side of it, so two
//	         still fragments far apart are not joined;
//	         and, if g > MaxCoastMovingS, either both points lie within
//	         EdgeMarginPX of the frame's border (the bee left the
//	         picture and came back) or d <= MaxGateRadiusPX and a
//	         ends faster than StillSpeedPXPerS (it flew behind
//	         something and came out nearby; from a still end, the bee
//	         would have had to take off and fly unseen, and still
//	         pieces that far from the next are what flickering foliage
//	         makes);
//	         cost g/MaxGapS + d/(MaxGateRadiusPX + vmax g) (the distance
//	         scale does not vanish for short gaps, so that a short gap
//	         with a jump is still preferred to a long one);
//	sitting: g <= MaxCoastStillS, va <= 2 StillSpeedPXPerS (a was
//	         about still when it vanished) and d <= sitReach =
//	         MinGateRadiusPX, or, if b's first motion points away from
//	         a's end (departs), MinGateRadiusPX + min(MaxSpeedPXPerS,
//	         2 vb + StillSpeedPXPerS) min(g, MaxCoastMovingS) (it sat
//	         unseen and took off unseen shortly before b starts),
//	         cost g/MaxCoastStillS + d/sitReach;
//
// the cheaper one is used. Each cost lies in [0, 2]: a shorter gap and a
// slower implied speed are preferred. The rule for long gaps reflects that
// a bee flying inside the picture is seen: it does not cross the frame
// unseen for seconds.
//
// Normally b must start after a ends. A lost track may however follow
// clutter for a few frames while a new track has already picked up its
// bee; so b may also start up to o <= round(MaxCoastMovingS FPS) frames
// before a's last point (and after a's first point). Then a is cut after
// its last detection before b's first frame, the cut-off tail is dropped,
// g and d are measured from that detection, and o/(that number of frames)
// is added to the cost.
func gapLinkCost(a, b fragment, s Settings, box frameBox) (cost float64, cut int) {
	cut = len(a.points) - 1
	penalty := 0.0
	sb := b.first()
	if sb.Frame <= a.last().Frame {
		maxOverlap := s.frames(s.MaxCoastMovingS)
		o := a.last().Frame - sb.Frame + 1
		if o > maxOverlap || sb.Frame <= a.first().Frame {
			return math.Inf(1), cut
		}
		cut = sb.Frame - a.first().Frame - 1 // points are one per frame
		for cut >= 0 && !a.points[cut].Observed {
			cut--
		}
		if cut < 0 {
			return math.Inf(1), cut
		}
		penalty = float64(o) / float64(maxOverlap)
	}
	ea := a.points[cut]
	g := float64(sb.Frame-ea.Frame) / s.FPS
	d := math.Hypot(sb.XPX-ea.XPX, sb.YPX-ea.YPX)
	c := math.Inf(1)
	win := s.frames(s.SpeedWindowS)
	va := speedBefore(a.points, cut, win, s.FPS)
	if cut == len(a.points)-1 {
		// A turn within the window hides speed from the displacement.
		va = math.Max(va, a.endSpeedPXPS)
	}
	vb := speedAfter(b.points, win, s.FPS)
	vmax := math.Min(s.MaxSpeedPXPerS, 2*math.Max(va, vb)+s.StillSpeedPXPerS)
	reach := s.MinGateRadiusPX + vmax*g
	atEdge := box.nearEdge(ea, s.EdgeMarginPX) && box.nearEdge(sb, s.EdgeMarginPX)
	longOK := g <= s.MaxCoastMovingS || atEdge || (d <= s.MaxGateRadiusPX && va > s.StillSpeedPXPerS)
	if g <= s.MaxGapS && d <= reach && longOK {
		c = g/s.MaxGapS + d/(s.MaxGateRadiusPX+vmax*g)
	}
	// Sitting: it may have taken off unseen within the last
	// MaxCoastMovingS of the gap (longer, and it would have been seen),
	// and then b flies on away from the seat.
	sitReach := s.MinGateRadiusPX
	if d > s.MinGateRadiusPX && departs(ea, b, win) {
		sitReach += math.Min(s.MaxSpeedPXPerS, 2*vb+s.StillSpeedPXPerS) * math.Min(g, s.MaxCoastMovingS)
	}
	if g <= s.MaxCoastStillS && d <= sitReach && s.MinGateRadiusPX > 0 && va <= 2*s.StillSpeedPXPerS {
		c = math.Min(c, g/s.MaxCoastStillS+d/sitReach)
	}
	return c + penalty, cut
}

// exitGap reports whether the bee left the picture between a's point
// a.points[cut] and b's first point: a ended because its prediction left
// the frame and was not cut back, or a was flying (faster than
// StillSpeedPXPerS) when it ended, both points lie within EdgeMarginPX of
// the frame's border and the gap is longer than MaxCoastMovingS (a flying
// bee is not missed that long inside the picture; a bee sitting near the
// border that vanishes has not left).
func exitGap(a fragment, cut int, b fragment, s Settings, box frameBox) bool {
	ea, sb := a.points[cut], b.first()
	if a.exited && cut == len(a.points)-1 {
		return true
	}
	g := float64(sb.Frame-ea.Frame) / s.FPS
	va := speedBefore(a.points, cut, s.frames(s.SpeedWindowS), s.FPS)
	if cut == len(a.points)-1 {
		va = math.Max(va, a.endSpeedPXPS)
	}
	return g > s.MaxCoastMovingS && va > s.StillSpeedPXPerS &&
		box.nearEdge(ea, s.EdgeMarginPX) && box.nearEdge(sb, s.EdgeMarginPX)
}

// departs reports whether b's first motion, from its first point to its
// latest detection within win frames, points away from p: within about
// 25 degrees of the direction from p to b's first point.
func departs(p Point, b fragment, win int) bool {
	first := b.first()
	last := -1
	for i := 1; i < len(b.points) && b.points[i].Frame-first.Frame <= win; i++ {
		if b.points[i].Observed {
			last = i
		}
	}
	if last < 0 {
		return false
	}
	vx, vy := b.points[last].XPX-first.XPX, b.points[last].YPX-first.YPX
	dx, dy := first.XPX-p.XPX, first.YPX-p.YPX
	n := math.Hypot(vx, vy) * math.Hypot(dx, dy)
	return n > 0 && (vx*dx+vy*dy)/n >= 0.9
}

// speedBefore is the straight-line speed, px/s, between the earliest
// observed point within win frames before pts[idx] and pts[idx]; 0 if
// there is none.
func speedBefore(pts []Point, idx, win int, fps float64) float64 {
	last := pts[idx]
	first := -1
	for i := idx - 1; i >= 0 && last.Frame-pts[i].Frame <= win; i-- {
		if pts[i].Observed {
			first = i
		}
	}
	if first < 0 {
		return 0
	}
	p := pts[first]
	return math.Hypot(last.XPX-p.XPX, last.YPX-p.YPX) * fps / float64(last.Frame-p.Frame)
}

// speedAfter is the straight-line speed, px/s, between pts[0] and the
// latest observed point within win frames after it; 0 if there is none.
func speedAfter(pts []Point, win int, fps float64) float64 {
	first := pts[0]
	last := -1
	for i := 1; i < len(pts) && pts[i].Frame-first.Frame <= win; i++ {
		if pts[i].Observed {
			last = i
		}
	}
	if last < 0 {
		return 0
	}
	p := pts[last]
	return math.Hypot(p.XPX-first.XPX, p.YPX-first.YPX) * fps / float64(p.Frame-first.Frame)
}

// closeGaps joins fragments end to start (see gapLinkCost; box is the
// picture area) by one optimal assignment in the
// block form of Jaqaman et al. (2008): for n fragments a 2n x 2n cost
// matrix
//
//	[ L   D ]    L[i][j] = gapLinkCost(i -> j)      (ends x starts)
//	[ B   X ]    D = diag(gapDeathCost), B = diag(gapBirthCost)
//	             X[j][i] = 0 where L[i][j] is allowed (transpose pattern)
//
// with +Inf elsewhere, solved with Assign. Chosen links chain fragments.
// The frames between two joined fragments are filled by linear
// interpolation, marked not observed, unless the bee left the picture in
// between (exitGap): then those frames get no points at all, since
// nobody saw where the bee was, and a straight line would cut through
// the picture. The matrix is split into the
// connected components of the allowed links first, so the cost grows with
// the size of the largest component rather than with all fragments.
func closeGaps(frags []fragment, s Settings, box frameBox) []fragment {
	n := len(frags)
	if n == 0 {
		return nil
	}
	sort.SliceStable(frags, func(i, j int) bool { return frags[i].first().Frame < frags[j].first().Frame })
	type link struct {
		i, j, cut int
		c         float64
	}
	exit := make([]bool, n) // the gap after frags[i] is an exit from the picture
	var links []link
	parent := make([]int, n)
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	maxGapFrames := int(math.Ceil(math.Max(s.MaxGapS, s.MaxCoastStillS)*s.FPS)) + 1
	maxOverlap := s.frames(s.MaxCoastMovingS)
	for i := range frags {
		start, end := frags[i].first().Frame, frags[i].last().Frame
		for j := range frags {
			if f := frags[j].first().Frame; j == i || f <= start || f <= end-maxOverlap || f-end > maxGapFrames {
				continue
			}
			if c, cut := gapLinkCost(frags[i], frags[j], s, box); !math.IsInf(c, 1) {
				links = append(links, link{i, j, cut, c})
				parent[find(i)] = find(j)
			}
		}
	}
	next := make([]int, n)
	cutAt := make([]int, n) // index in frags[i].points that i is cut after when joined
	hasPrev := make([]bool, n)
	for i := range next {
		next[i] = -1
	}
	comps := map[int][]int{}
	for i := range frags {
		r := find(i)
		comps[r] = append(comps[r], i)
	}
	compLinks := map[int][]link{}
	for _, lk := range links {
		r := find(lk.i)
		compLinks[r] = append(compLinks[r], lk)
	}
	for r, members := range comps {
		lks := compLinks[r]
		if len(lks) == 0 {
			continue
		}
		m := len(members)
		local := make(map[int]int, m)
		for k, g := range members {
			local[g] = k
		}
		inf := math.Inf(1)
		cost := mat.NewDense(2*m, 2*m, nil)
		for i := 0; i < 2*m; i++ {
			for j := 0; j < 2*m; j++ {
				cost.Set(i, j, inf)
			}
		}
		for k := 0; k < m; k++ {
			cost.Set(k, m+k, gapDeathCost)
			cost.Set(m+k, k, gapBirthCost)
		}
		cuts := map[[2]int]int{}
		for _, lk := range lks {
			i, j := local[lk.i], local[lk.j]
			cost.Set(i, j, lk.c)
			cost.Set(m+j, m+i, 0)
			cuts[[2]int{i, j}] = lk.cut
		}
		rowToCol, _ := Assign(cost)
		for i := 0; i < m; i++ {
			if j := rowToCol[i]; j >= 0 && j < m {
				next[members[i]] = members[j]
				cutAt[members[i]] = cuts[[2]int{i, j}]
				exit[members[i]] = exitGap(frags[members[i]], cutAt[members[i]], frags[members[j]], s, box)
				hasPrev[members[j]] = true
			}
		}
	}
	var out []fragment
	for i := range frags {
		if hasPrev[i] {
			continue
		}
		f := fragment{ids: append([]int(nil), frags[i].ids...), points: append([]Point(nil), frags[i].points...), endSpeedPXPS: frags[i].endSpeedPXPS, exited: frags[i].exited}
		for prev, j := i, next[i]; j >= 0; prev, j = j, next[j] {
			// Drop prev's tail after the cut (nothing without overlap).
			f.points = f.points[:len(f.points)-(len(frags[prev].points)-1-cutAt[prev])]
			if !exit[prev] {
				a, b := f.last(), frags[j].first()
				gap := make([]Point, b.Frame-a.Frame-1)
				for k := range gap {
					gap[k].Frame = a.Frame + 1 + k
				}
				fillLinear(gap, a, b)
				f.points = append(f.points, gap...)
			}
			f.points = append(f.points, frags[j].points...)
			f.ids = append(f.ids, frags[j].ids...)
			f.endSpeedPXPS, f.exited = frags[j].endSpeedPXPS, frags[j].exited
		}
		out = append(out, f)
	}
	return out
}
