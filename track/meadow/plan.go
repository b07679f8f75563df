package meadow

import (
	"math"
	"math/rand/v2"
)

// segKind is what a bee does during one segment of its plan.
type segKind uint8

const (
	segFly     segKind = iota // flying along a flight
	segHover                  // hovering about a point near a flower
	segDescend                // settling from the hover point onto the flower
	segLanded                 // on a flower, still or walking
)

// keyframe is one pose of a landed bee: offset from the flower centre (px)
// and heading (rad, image angle atan2(dy, dx)). Poses between keyframes are
// smoothstep-interpolated.
type keyframe struct{ t, ox, oy, head float64 }

// segment is one piece of a bee's plan over [t0, t1) seconds.
type segment struct {
	kind   segKind
	t0, t1 float64
	flower int // -1 for flights
	event  int // index into beePlan.events, -1 if none
	fl     *flight
	// hover and descend: hover centre (px) and heading (rad)
	hx, hy, head float64
	hoverA       float64 // wander amplitude, px
	hf, hph      [2]float64
	// descend: target offset from the flower centre, px
	ox, oy float64
	// landed
	keys []keyframe
}

// eventKind tells landings from inspections.
type eventKind uint8

const (
	evLanding eventKind = iota
	evInspection
)

// event is a planned landing (its landed segment) or inspection (its hover
// segment).
type event struct {
	kind   eventKind
	flower int
	t0, t1 float64
}

// beePlan is the whole plan of one bee: segments in time order; gaps
// between segments are times the bee is out of the scene.
type beePlan struct {
	id     int
	lenPX  float64
	segs   []segment
	events []event
	landed []int // flowers landed on, in order
}

// actKind is a planned action at a flower.
type actKind uint8

const (
	actLand actKind = iota
	actInspect
)

// action is one step of a bee's script.
type action struct {
	kind      actKind
	handlingS float64 // landing: handling time, s (0: draw)
	revisit   bool    // land on a flower landed on before
	nearest   bool    // go to the nearest flower
	exitAfter bool    // leave the frame after the landing
}

// planner plans bees one after another over a fixed flower layout.
type planner struct {
	cfg    *Config
	fs     []flower
	rng    *rand.Rand
	pxmm   float64
	tEnd   float64
	others []*beePlan
}

// cursor is where the planning of one bee stands.
type cursor struct {
	t, x, y float64
	v       float64 // speed at (x, y), px/s
	flower  int     // flower the bee is at, -1 if none
}

func (p *planner) uniform(a, b float64) float64 { return a + (b-a)*p.rng.Float64() }

// cruise draws a cruise speed, px/s.
func (p *planner) cruise() float64 {
	return p.uniform(p.cfg.CruiseSpeedMinMMPerS, p.cfg.CruiseSpeedMaxMMPerS) * p.pxmm
}

// handling draws a log-normal handling time, s.
func (p *planner) handling() float64 {
	h := p.cfg.HandlingMedianS * math.Exp(p.cfg.HandlingSigma*p.rng.NormFloat64())
	return math.Max(1, math.Min(h, p.cfg.HandlingMaxS))
}

// edgePoint returns a point outside the frame, beyond one edge by 1.5 body
// lengths. If nearX, nearY >= 0 the edge nearest that point is preferred.
func (p *planner) edgePoint(lenPX, nearX, nearY float64) (x, y float64) {
	w, h := float64(p.cfg.WidthPX), float64(p.cfg.HeightPX)
	m := 1.5 * lenPX
	side := p.rng.IntN(4)
	if nearX >= 0 && p.rng.Float64() < 0.6 {
		d := []float64{nearX, w - nearX, nearY, h - nearY}
		side = 0
		for k := 1; k < 4; k++ {
			if d[k] < d[side] {
				side = k
			}
		}
	}
	u := p.uniform(0.1, 0.9)
	switch side {
	case 0:
		return -m, u * h
	case 1:
		return w + m, u * h
	case 2:
		return u * w, -m
	}
	return u * w, h + m
}

// occupied reports whether another bee is landed on flower f at any time
// in [t0-0.5, t1+0.5].
func (p *planner) occupied(f int, t0, t1 float64) bool {
	for _, o := range p.others {
		for _, e := range o.events {
			if e.kind == evLanding && e.flower == f && e.t0 < t1+0.5 && e.t1 > t0-0.5 {
				return true
			}
		}
	}
	return false
}

// flyTo appends a flight from the cursor to (x, y) arriving at speed v1.
func (p *planner) flyTo(b *beePlan, c *cursor, x, y, v1 float64) {
	vc := math.Max(p.cruise(), math.Max(c.v, v1))
	zig := math.Max(0, p.cfg.ZigzagMM) * p.pxmm
	fl := newFlight(p.rng, c.x, c.y, x, y, c.v, vc, v1, p.cfg.AccelMMPerS2*p.pxmm, zig, 0.12)
	b.segs = append(b.segs, segment{kind: segFly, t0: c.t, t1: c.t + fl.duration(), flower: -1, event: -1, fl: fl})
	c.t += fl.duration()
	c.x, c.y, c.v, c.flower = x, y, v1, -1
}

// pickFlower chooses the next flower for bee b at cursor c.
func (p *planner) pickFlower(b *beePlan, c *cursor, revisit bool) int {
	if revisit {
		var cand []int
		for _, f := range b.landed {
			if f != c.flower {
				cand = append(cand, f)
			}
		}
		if len(cand) > 0 {
			return cand[p.rng.IntN(len(cand))]
		}
	}
	landedBefore := make(map[int]bool)
	for _, f := range b.landed {
		landedBefore[f] = true
	}
	w := make([]float64, len(p.fs))
	sum := 0.0
	for i, f := range p.fs {
		if i == c.flower {
			continue
		}
		w[i] = 1 / (math.Hypot(f.x-c.x, f.y-c.y) + 3*b.lenPX)
		if landedBefore[i] {
			w[i] *= 0.5
		}
		sum += w[i]
	}
	if sum == 0 {
		return 0
	}
	u := p.rng.Float64() * sum
	for i := range w {
		u -= w[i]
		if u < 0 && w[i] > 0 {
			return i
		}
	}
	for i := len(w) - 1; i >= 0; i-- {
		if w[i] > 0 {
			return i
		}
	}
	return 0
}

// nearestFlower returns the flower nearest the cursor.
func (p *planner) nearestFlower(c *cursor) int {
	best, bestD := 0, math.Inf(1)
	for i, f := range p.fs {
		if d := math.Hypot(f.x-c.x, f.y-c.y) - f.r; d < bestD && i != c.flower {
			best, bestD = i, d
		}
	}
	return best
}

// visit appends the approach to flower fi and either an inspection (hover,
// leave) or a landing (hover, descend, handle). It returns whether the bee
// landed: a landing on a flower occupied by another bee becomes an
// inspection.
func (p *planner) visit(b *beePlan, c *cursor, fi int, a action) bool {
	f := p.fs[fi]
	L := b.lenPX
	// Hover point: on the side the bee comes from, within ±40°.
	ang := math.Atan2(c.y-f.y, c.x-f.x) + p.uniform(-0.7, 0.7)
	inspect := a.kind == actInspect
	var d float64
	if inspect {
		d = p.uniform(0.5*f.r, f.r+0.8*L)
	} else {
		d = p.uniform(0.3*f.r, 0.8*f.r)
	}
	hx, hy := f.x+d*math.Cos(ang), f.y+d*math.Sin(ang)
	p.flyTo(b, c, hx, hy, 0)
	arrive := b.segs[len(b.segs)-1].fl
	ax, ay := arrive.pos(arrive.duration() - 0.02)
	head := math.Atan2(hy-ay, hx-ax) // keep the arrival direction ...
	if d > 0.3*f.r {
		head = math.Atan2(f.y-hy, f.x-hx) // ... unless off-centre: face the flower
	}
	hover := func(dur float64, ev int) {
		b.segs = append(b.segs, segment{
			kind: segHover, t0: c.t, t1: c.t + dur, flower: fi, event: ev,
			hx: hx, hy: hy, head: head,
			hoverA: p.uniform(0.8, 2) * p.pxmm,
			hf:     [2]float64{p.uniform(1.5, 3.5), p.uniform(1.5, 3.5)},
			hph:    [2]float64{p.uniform(0, 2*math.Pi), p.uniform(0, 2*math.Pi)},
		})
		c.t += dur
	}
	if !inspect {
		hoverS := p.uniform(0.25, 0.7)
		descendS := p.uniform(0.3, 0.45)
		h := a.handlingS
		if h == 0 {
			h = p.handling()
		}
		t0 := c.t + hoverS + descendS
		if p.occupied(fi, t0, t0+h) {
			inspect = true
		} else {
			hover(hoverS, -1)
			// Landing point within 0.4 r of the centre.
			lr := 0.4 * f.r * math.Sqrt(p.rng.Float64())
			la := p.uniform(0, 2*math.Pi)
			ox, oy := lr*math.Cos(la), lr*math.Sin(la)
			b.segs = append(b.segs, segment{kind: segDescend, t0: c.t, t1: c.t + descendS, flower: fi, event: -1,
				hx: hx, hy: hy, head: head, ox: ox, oy: oy})
			c.t += descendS
			keys := p.walk(f, ox, oy, head, c.t, c.t+h)
			b.events = append(b.events, event{kind: evLanding, flower: fi, t0: c.t, t1: c.t + h})
			b.segs = append(b.segs, segment{kind: segLanded, t0: c.t, t1: c.t + h, flower: fi,
				event: len(b.events) - 1, keys: keys})
			c.t += h
			last := keys[len(keys)-1]
			sx, sy := f.sway(p.cfg, c.t)
			c.x, c.y, c.v, c.flower = f.x+sx+last.ox, f.y+sy+last.oy, 0, fi
			b.landed = append(b.landed, fi)
			return true
		}
	}
	dur := p.uniform(0.6, 2.0)
	b.events = append(b.events, event{kind: evInspection, flower: fi, t0: c.t, t1: c.t + dur})
	hover(dur, len(b.events)-1)
	c.x, c.y, c.v, c.flower = hx, hy, 0, fi
	return false
}

// walk plans the small movements of a bee handling flower f from t0 to t1:
// still spells of 0.8-4 s with slow turning, and walks of 2-6 mm at the
// walking speed after a quick turn, staying within half the flower radius.
func (p *planner) walk(f flower, ox, oy, head, t0, t1 float64) []keyframe {
	keys := []keyframe{{t0, ox, oy, head}}
	t := t0
	speed := p.cfg.WalkSpeedMMPerS * p.pxmm
	for {
		t += p.uniform(0.8, 4)
		if t >= t1 {
			break
		}
		head += 0.3 * p.rng.NormFloat64()
		keys = append(keys, keyframe{t, ox, oy, head})
		dist := p.uniform(2, 6) * p.pxmm
		dir := p.uniform(0, 2*math.Pi)
		nx, ny := ox+dist*math.Cos(dir), oy+dist*math.Sin(dir)
		if math.Hypot(nx, ny) > 0.5*f.r {
			// Walk back towards the centre instead.
			dir = math.Atan2(-oy, -ox) + p.uniform(-0.5, 0.5)
			nx, ny = ox+dist*math.Cos(dir), oy+dist*math.Sin(dir)
		}
		// Turn towards the walking direction the short way round.
		nh := head + math.Remainder(dir-head, 2*math.Pi)
		turnS := 0.3
		walkS := dist / speed
		if t+turnS+walkS >= t1 {
			break
		}
		t += turnS
		keys = append(keys, keyframe{t, ox, oy, nh})
		t += walkS
		ox, oy, head = nx, ny, nh
		keys = append(keys, keyframe{t, ox, oy, head})
	}
	keys = append(keys, keyframe{t1, ox, oy, head})
	return keys
}

// leave appends a flight out of the frame and a stay outside; the cursor
// ends at a re-entry point outside the frame.
func (p *planner) leave(b *beePlan, c *cursor) {
	x, y := p.edgePoint(b.lenPX, c.x, c.y)
	p.flyTo(b, c, x, y, p.cruise())
	c.t += p.uniform(p.cfg.OutsideMinS, p.cfg.OutsideMaxS)
	c.x, c.y = p.edgePoint(b.lenPX, -1, -1)
	c.v = p.cruise()
}

// script returns the actions that meet bee 0's requirements, compactly:
// the long landing first, then inspections, landings followed by exits,
// and revisits.
func (p *planner) script() []action {
	cfg := p.cfg
	var s []action
	short := func() float64 { return p.uniform(1.5, 3) }
	landings := 0
	if cfg.MinLongLandingS > 0 {
		// Two frame periods of margin for the rounding of the landing to
		// whole frames.
		h := math.Max(p.handling(), cfg.MinLongLandingS+2/cfg.FPS)
		s = append(s, action{kind: actLand, handlingS: h, nearest: true})
		landings++
	}
	for i := 0; i < cfg.MinInspections; i++ {
		s = append(s, action{kind: actInspect})
	}
	for i := 0; i < cfg.MinExits; i++ {
		s = append(s, action{kind: actLand, handlingS: short(), exitAfter: true})
		landings++
	}
	if cfg.MinRevisits > 0 && landings == 0 {
		s = append(s, action{kind: actLand, handlingS: short()})
	}
	for i := 0; i < cfg.MinRevisits; i++ {
		s = append(s, action{kind: actLand, handlingS: short(), revisit: true})
	}
	return s
}

// planBee plans one bee from its entry until the end of the clip.
func (p *planner) planBee(id int, lenPX float64, script []action) *beePlan {
	b := &beePlan{id: id, lenPX: lenPX}
	entry := p.cfg.EntryMaxS
	if len(script) > 0 && script[0].nearest {
		entry = math.Min(entry, 0.5) // a long landing first: enter early
	}
	c := cursor{t: p.rng.Float64() * entry, flower: -1}
	c.x, c.y = p.edgePoint(lenPX, -1, -1)
	c.v = p.cruise()
	for c.t < p.tEnd {
		var a action
		if len(script) > 0 {
			a, script = script[0], script[1:]
		} else {
			a = action{kind: actLand, revisit: p.rng.Float64() < clampNeg(p.cfg.RevisitProb),
				exitAfter: p.rng.Float64() < clampNeg(p.cfg.ExitProb)}
			if p.rng.Float64() < clampNeg(p.cfg.InspectionProb) {
				a.kind = actInspect
			}
		}
		var fi int
		if a.nearest {
			fi = p.nearestFlower(&c)
		} else {
			fi = p.pickFlower(b, &c, a.revisit)
		}
		landed := p.visit(b, &c, fi, a)
		if landed && a.exitAfter && c.t < p.tEnd {
			p.leave(b, &c)
		}
	}
	return b
}

// pose returns the position (px), the heading hint (rad; ok false if the
// heading should follow the motion), the segment kind and flower of bee
// segment s at time t.
func (s *segment) pose(cfg *Config, fs []flower, t float64) (x, y, head float64, hintOK bool) {
	switch s.kind {
	case segFly:
		tau := t - s.t0
		x, y = s.fl.pos(tau)
		const dt = 1e-3
		x1, y1 := s.fl.pos(tau - dt)
		x2, y2 := s.fl.pos(tau + dt)
		vx, vy := (x2-x1)/(2*dt), (y2-y1)/(2*dt)
		if math.Hypot(vx, vy) > 30 {
			return x, y, math.Atan2(vy, vx), true
		}
		return x, y, 0, false
	case segHover:
		u := t - s.t0
		ramp := math.Min(0.25, (s.t1-s.t0)/3)
		env := smoothstep(u/ramp) * smoothstep((s.t1-t)/ramp)
		x = s.hx + env*s.hoverA*math.Sin(2*math.Pi*s.hf[0]*u+s.hph[0])
		y = s.hy + env*s.hoverA*math.Sin(2*math.Pi*s.hf[1]*u+s.hph[1])
		return x, y, s.head + 0.15*env*math.Sin(2*math.Pi*0.7*u+s.hph[0]), true
	case segDescend:
		f := &fs[s.flower]
		sx, sy := f.sway(cfg, t)
		k := smoothstep((t - s.t0) / (s.t1 - s.t0))
		tx, ty := f.x+sx+s.ox, f.y+sy+s.oy
		return s.hx + k*(tx-s.hx), s.hy + k*(ty-s.hy), s.head, true
	}
	// segLanded
	f := &fs[s.flower]
	sx, sy := f.sway(cfg, t)
	ks := s.keys
	j := 0
	for j+1 < len(ks) && ks[j+1].t <= t {
		j++
	}
	if j+1 >= len(ks) {
		k := ks[len(ks)-1]
		return f.x + sx + k.ox, f.y + sy + k.oy, k.head, true
	}
	a, b := ks[j], ks[j+1]
	u := smoothstep((t - a.t) / (b.t - a.t))
	return f.x + sx + a.ox + u*(b.ox-a.ox), f.y + sy + a.oy + u*(b.oy-a.oy), a.head + u*(b.head-a.head), true
}
