package meadow

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"flitlog/kinematics"
	"flitlog/visits"
)

// Random streams: every use of randomness draws from its own stream of
// rand.NewPCG(seed, stream), so changing one part of the scene does not
// change the others.
const (
	streamFlowers   = 1
	streamVeg       = 2
	streamTexture   = 3
	streamNoise     = 4
	streamLeaf      = 5
	streamBees      = 100     // + 1000*attempt
	streamFrameBase = 1 << 40 // + frame index
)

func newRNG(seed int64, stream uint64) *rand.Rand {
	return rand.New(rand.NewPCG(uint64(seed), stream))
}

// maxAttempts bounds the re-planning of the bees when a requirement
// (crossings, say) is not met by chance.
const maxAttempts = 80

// beeTrack is the sampled plan of one bee: its pose in every frame.
type beeTrack struct {
	id           int
	lenPX, wPX   float64
	present      []bool    // in the scene (possibly outside the frame)
	x, y         []float64 // body centre, scene px (before shake)
	vx, vy       []float64 // velocity, scene px/s (central differences)
	head         []float64 // body axis, image angle rad
	height       []float64 // height above the flowers, body lengths (for the shadow)
	state        []kinematics.State
	event        []int // plan event index, -1 if none
	visible      []bool
	wingPh       float64
	plan         *beePlan
	airborneSeen bool
}

// Scene is a planned synthetic clip. Its methods are not safe for
// concurrent use.
type Scene struct {
	cfg     Config
	n       int
	flowers []flower
	bees    []*beeTrack
	leaf    *leaf
	truth   *Truth
	shakeX  []float64
	shakeY  []float64
	gain    []float64
	r       *renderer
	// hideBees and hideFlowers are for tests: render the scene without
	// bees (and their shadows and wings) or without flowers.
	hideBees, hideFlowers bool
}

// New plans a scene: flowers, every bee's path, the occluder and the
// ground truth. It renders nothing; rendering state is made on the first
// Render call. It returns an error if cfg is invalid or a requirement
// (MinLongLandingS, MinInspections, MinRevisits, MinExits, MinCrossings)
// cannot be met within DurationS.
func New(cfg Config) (*Scene, error) {
	cfg = cfg.withDefaults()
	if err := cfg.validate(); err != nil {
		return nil, err
	}
	s := &Scene{cfg: cfg, n: cfg.frames()}
	if s.n < 1 {
		return nil, fmt.Errorf("meadow: config DurationS = %g s at %g fps gives no frames", cfg.DurationS, cfg.FPS)
	}
	pxmm := cfg.PXPerMM
	len0 := cfg.BeeLengthMM * pxmm
	var err error
	s.flowers, err = layoutFlowers(cfg, newRNG(cfg.Seed, streamFlowers), len0)
	if err != nil {
		return nil, err
	}
	var unmet []string
	for attempt := 0; attempt < maxAttempts; attempt++ {
		s.planBees(attempt)
		s.placeLeaf()
		s.sample()
		s.buildTruth()
		unmet = s.unmet()
		if len(unmet) == 0 {
			break
		}
	}
	if len(unmet) > 0 {
		return nil, fmt.Errorf("meadow: after %d plans with seed %d, requirements not met: %s (a longer DurationS may help)",
			maxAttempts, cfg.Seed, strings.Join(unmet, "; "))
	}
	s.planCamera()
	s.applyShake()
	return s, nil
}

// planBees plans all bees with the random streams of the given attempt.
func (s *Scene) planBees(attempt int) {
	cfg := &s.cfg
	p := &planner{cfg: cfg, fs: s.flowers, pxmm: cfg.PXPerMM, tEnd: cfg.DurationS + 0.5}
	s.bees = s.bees[:0]
	for id := 0; id < cfg.Bees; id++ {
		p.rng = newRNG(cfg.Seed, uint64(streamBees+id+1000*attempt))
		lenPX := cfg.BeeLengthMM * cfg.PXPerMM
		if id > 0 {
			lenPX *= p.uniform(0.9, 1.1)
		}
		var script []action
		if id == 0 {
			script = p.script()
		}
		b := p.planBee(id, lenPX, script)
		p.others = append(p.others, b)
		s.bees = append(s.bees, &beeTrack{id: id, lenPX: lenPX, wPX: 0.5 * lenPX, plan: b, wingPh: p.uniform(0, 2*math.Pi)})
	}
}

// frameTime is the time of frame i, s.
func (s *Scene) frameTime(i int) float64 { return float64(i) / s.cfg.FPS }

// sample evaluates every bee's plan at every frame time.
func (s *Scene) sample() {
	cfg := &s.cfg
	n := s.n
	maxTurn := 1200 * math.Pi / 180 / cfg.FPS // rad per frame
	tau := 0.15                               // height smoothing, s
	alpha := 1 - math.Exp(-1/(cfg.FPS*tau))
	for _, b := range s.bees {
		b.present = make([]bool, n)
		b.x = make([]float64, n)
		b.y = make([]float64, n)
		b.head = make([]float64, n)
		b.height = make([]float64, n)
		b.state = make([]kinematics.State, n)
		b.event = make([]int, n)
		b.visible = make([]bool, n)
		segs := b.plan.segs
		k := 0
		prevPresent := false
		orient, height := 0.0, 0.0
		for i := 0; i < n; i++ {
			t := s.frameTime(i)
			b.event[i] = -1
			for k < len(segs) && segs[k].t1 <= t {
				k++
			}
			if k >= len(segs) || segs[k].t0 > t {
				prevPresent = false
				continue
			}
			sg := &segs[k]
			x, y, hd, ok := sg.pose(cfg, s.flowers, t)
			b.present[i] = true
			b.x[i], b.y[i] = x, y
			var target float64
			switch sg.kind {
			case segFly:
				b.state[i] = kinematics.Flying
				target = 2
			case segHover, segDescend:
				b.state[i] = kinematics.Hovering
				target = 1
				if sg.kind == segDescend {
					target = 0
				}
			default:
				b.state[i] = kinematics.Landed
				target = 0
			}
			b.event[i] = sg.event
			if !ok {
				hd = orient
			}
			if !prevPresent {
				orient = hd
				height = target
			} else {
				d := math.Remainder(hd-orient, 2*math.Pi)
				orient += math.Max(-maxTurn, math.Min(maxTurn, d))
				height += alpha * (target - height)
			}
			b.head[i] = orient
			b.height[i] = height
			prevPresent = true
		}
	}
	s.computeVelocity()
	s.computeVisibility()
}

// computeVelocity differentiates the sampled positions: central
// differences, one-sided at the ends of a presence run.
func (s *Scene) computeVelocity() {
	fps := s.cfg.FPS
	for _, b := range s.bees {
		b.vx = make([]float64, s.n)
		b.vy = make([]float64, s.n)
		for i := 0; i < s.n; i++ {
			if !b.present[i] {
				continue
			}
			a, z := i, i
			if i > 0 && b.present[i-1] {
				a = i - 1
			}
			if i+1 < s.n && b.present[i+1] {
				z = i + 1
			}
			if z > a {
				b.vx[i] = (b.x[z] - b.x[a]) * fps / float64(z-a)
				b.vy[i] = (b.y[z] - b.y[a]) * fps / float64(z-a)
			}
		}
	}
}

// inFrame reports whether a point lies inside the frame.
func (s *Scene) inFrame(x, y float64) bool {
	return x >= 0 && y >= 0 && x <= float64(s.cfg.WidthPX-1) && y <= float64(s.cfg.HeightPX-1)
}

// buildTruth derives truth points, landings, inspections and crossings from
// the sampled tracks (before camera shake).
func (s *Scene) buildTruth() {
	cfg := s.cfg
	tr := &Truth{
		Config: cfg, FPS: cfg.FPS, Frames: s.n, WidthPX: cfg.WidthPX, HeightPX: cfg.HeightPX,
		PXPerMM: cfg.PXPerMM, Flowers: flowerMap(cfg, s.flowers),
	}
	if s.leaf != nil {
		tr.Occluder = &Occluder{XPX: s.leaf.x, YPX: s.leaf.y, APX: s.leaf.a, BPX: s.leaf.b, AngleDeg: s.leaf.ang * 180 / math.Pi}
	}
	for _, b := range s.bees {
		for i := 0; i < s.n; i++ {
			if !b.present[i] || !s.inFrame(b.x[i], b.y[i]) {
				continue
			}
			hd := b.head[i] * 180 / math.Pi
			hd = math.Remainder(hd, 360)
			if hd <= -180 {
				hd += 360
			}
			tr.Points = append(tr.Points, TruthPoint{
				Frame: i, TimeS: s.frameTime(i), BeeID: b.id, XPX: b.x[i], YPX: b.y[i],
				State: b.state[i], HeadingDeg: hd, Visible: b.visible[i],
			})
		}
	}
	s.truth = tr
	s.buildEvents()
	s.findCrossings()
}

// eventFrames returns, per plan event of bee b, the first and last frame
// carrying it (-1 if none).
func (s *Scene) eventFrames(b *beeTrack) [][2]int {
	fr := make([][2]int, len(b.plan.events))
	for e := range fr {
		fr[e] = [2]int{-1, -1}
	}
	for i, e := range b.event {
		if e < 0 {
			continue
		}
		if fr[e][0] < 0 {
			fr[e][0] = i
		}
		fr[e][1] = i
	}
	return fr
}

// buildEvents fills the truth's landings and inspections.
func (s *Scene) buildEvents() {
	tr := s.truth
	var ls []visits.Landing
	var ins []visits.Inspection
	for _, b := range s.bees {
		fr := s.eventFrames(b)
		idx := 0
		landedOn := map[string]bool{}
		for e, ev := range b.plan.events {
			a, z := fr[e][0], fr[e][1]
			if a < 0 {
				continue
			}
			f := s.flowers[ev.flower]
			startS := s.frameTime(a)
			endS := s.frameTime(z + 1)
			switch ev.kind {
			case evLanding:
				idx++
				l := visits.Landing{
					TrackID: b.id, FlowerID: f.id, StartFrame: a, EndFrame: z,
					StartS: startS, EndS: endS, DurationS: endS - startS,
					ApproachSpeedMMPerS: math.NaN(), DepartureSpeedMMPerS: math.NaN(),
					Revisit: landedOn[f.id], SincePrevVisitS: math.NaN(), Index: idx,
					FlowerKind: kinds[f.kind].name, RewardUL: math.NaN(),
					CensoredStart: ev.t0 < 0 && a == 0,
					// Still landed at the (unrendered) frame after the clip.
					CensoredEnd: z == s.n-1 && ev.t1 > s.frameTime(s.n),
				}
				landedOn[f.id] = true
				ls = append(ls, l)
			case evInspection:
				minD := math.Inf(1)
				for i := a; i <= z; i++ {
					d := (math.Hypot(b.x[i]-f.x, b.y[i]-f.y) - f.r) / s.cfg.PXPerMM
					minD = math.Min(minD, math.Max(0, d))
				}
				ins = append(ins, visits.Inspection{
					TrackID: b.id, FlowerID: f.id, StartFrame: a, EndFrame: z,
					StartS: startS, EndS: endS, DurationS: endS - startS, MinDistMM: minD,
					FlowerKind:    kinds[f.kind].name,
					CensoredStart: ev.t0 < 0 && a == 0,
					CensoredEnd:   z == s.n-1 && ev.t1 > s.frameTime(s.n),
				})
			}
		}
	}
	sortLandings(ls)
	sortInspections(ins)
	// Time since the flower's previous landing by any bee ended.
	lastEnd := map[string]float64{}
	for i := range ls {
		if e, ok := lastEnd[ls[i].FlowerID]; ok {
			ls[i].SincePrevVisitS = ls[i].StartS - e
		}
		lastEnd[ls[i].FlowerID] = ls[i].EndS
	}
	tr.Landings, tr.Inspections = ls, ins
}

// findCrossings records close passes of two airborne bees.
func (s *Scene) findCrossings() {
	tr := s.truth
	tr.Crossings = nil
	lim := s.cfg.CrossingBodyLengths * s.cfg.BeeLengthMM * s.cfg.PXPerMM
	for ai := 0; ai < len(s.bees); ai++ {
		for bi := ai + 1; bi < len(s.bees); bi++ {
			A, B := s.bees[ai], s.bees[bi]
			var cur *Crossing
			for i := 0; i < s.n; i++ {
				ok := A.present[i] && B.present[i] && A.state[i] != kinematics.Landed && B.state[i] != kinematics.Landed &&
					s.inFrame(A.x[i], A.y[i]) && s.inFrame(B.x[i], B.y[i])
				d := math.Hypot(A.x[i]-B.x[i], A.y[i]-B.y[i])
				if ok && d < lim {
					if cur != nil && i-cur.EndFrame <= 3 {
						cur.EndFrame = i
						if d < cur.MinDistPX {
							cur.MinDistPX, cur.MinFrame = d, i
						}
						continue
					}
					if cur != nil {
						tr.Crossings = append(tr.Crossings, *cur)
					}
					cur = &Crossing{BeeA: A.id, BeeB: B.id, StartFrame: i, EndFrame: i, MinFrame: i, MinDistPX: d}
				}
			}
			if cur != nil {
				tr.Crossings = append(tr.Crossings, *cur)
			}
		}
	}
}

// unmet lists the requirements of the config the current plan misses.
func (s *Scene) unmet() []string {
	cfg := s.cfg
	tr := s.truth
	var out []string
	if cfg.MinLongLandingS > 0 {
		ok := false
		for _, l := range tr.Landings {
			if l.TrackID == 0 && !l.CensoredEnd && !l.CensoredStart && l.DurationS >= cfg.MinLongLandingS {
				ok = true
			}
		}
		if !ok {
			out = append(out, fmt.Sprintf("no complete landing of >= %g s (MinLongLandingS)", cfg.MinLongLandingS))
		}
	}
	if cfg.MinInspections > 0 {
		n := 0
		for _, in := range tr.Inspections {
			if in.TrackID == 0 && in.EndFrame < s.n-1 {
				n++
			}
		}
		if n < cfg.MinInspections {
			out = append(out, fmt.Sprintf("%d inspections, want %d (MinInspections)", n, cfg.MinInspections))
		}
	}
	if cfg.MinRevisits > 0 {
		n := 0
		for _, l := range tr.Landings {
			if l.TrackID == 0 && l.Revisit {
				n++
			}
		}
		if n < cfg.MinRevisits {
			out = append(out, fmt.Sprintf("%d revisits, want %d (MinRevisits)", n, cfg.MinRevisits))
		}
	}
	if cfg.MinExits > 0 {
		if n := s.reentries(0); n < cfg.MinExits {
			out = append(out, fmt.Sprintf("%d exits with re-entry, want %d (MinExits)", n, cfg.MinExits))
		}
	}
	if cfg.Occluder && s.leaf == nil {
		out = append(out, "no flight passes a place clear of flowers for the occluder leaf (Occluder)")
	}
	if cfg.MinCrossings > 0 && len(tr.Crossings) < cfg.MinCrossings {
		out = append(out, fmt.Sprintf("%d close passes, want %d (MinCrossings)", len(tr.Crossings), cfg.MinCrossings))
	}
	return out
}

// reentries counts how often bee id comes back into the frame after
// leaving it.
func (s *Scene) reentries(id int) int {
	b := s.bees[id]
	runs := 0
	prev := false
	for i := 0; i < s.n; i++ {
		in := b.present[i] && s.inFrame(b.x[i], b.y[i])
		if in && !prev {
			runs++
		}
		prev = in
	}
	return max(0, runs-1)
}

// planCamera computes per-frame camera shake (px) and brightness gain.
func (s *Scene) planCamera() {
	cfg := s.cfg
	rng := newRNG(cfg.Seed, streamNoise+1000)
	ph := make([]float64, 8)
	for k := range ph {
		ph[k] = rng.Float64() * 2 * math.Pi
	}
	t1 := 20 + 20*rng.Float64() // cloud periods, s
	t2 := 7 + 5*rng.Float64()
	s.shakeX = make([]float64, s.n)
	s.shakeY = make([]float64, s.n)
	s.gain = make([]float64, s.n)
	for i := 0; i < s.n; i++ {
		t := s.frameTime(i)
		if cfg.ShakePX > 0 {
			fr := newRNG(cfg.Seed, streamFrameBase+uint64(i)+1<<39)
			a := cfg.ShakePX
			s.shakeX[i] = a * (0.55*math.Sin(2*math.Pi*1.3*t+ph[0]) + 0.3*math.Sin(2*math.Pi*3.7*t+ph[1]) + 0.15*(2*fr.Float64()-1))
			s.shakeY[i] = a * (0.55*math.Sin(2*math.Pi*1.1*t+ph[2]) + 0.3*math.Sin(2*math.Pi*4.3*t+ph[3]) + 0.15*(2*fr.Float64()-1))
		}
		g := 1.0
		if cfg.IlluminationDrift > 0 {
			g *= 1 + cfg.IlluminationDrift*(0.65*math.Sin(2*math.Pi*t/t1+ph[4])+0.35*math.Sin(2*math.Pi*t/t2+ph[5]))
		}
		if cfg.FlickerDepth > 0 {
			// Light from mains flickers at twice the mains frequency;
			// sampling at the frame times aliases it to
			// |2*MainsHz - k*FPS| for the nearest integer k.
			g *= 1 + cfg.FlickerDepth*math.Sin(2*math.Pi*2*cfg.MainsHz*t+ph[6])
		}
		s.gain[i] = g
	}
}

// applyShake moves the truth points by the camera shake and drops points
// that leave the frame.
func (s *Scene) applyShake() {
	if s.cfg.ShakePX == 0 {
		return
	}
	tr := s.truth
	pts := tr.Points[:0]
	for _, p := range tr.Points {
		p.XPX += s.shakeX[p.Frame]
		p.YPX += s.shakeY[p.Frame]
		if s.inFrame(p.XPX, p.YPX) {
			pts = append(pts, p)
		}
	}
	tr.Points = pts
}

// Frames returns the number of frames of the clip.
func (s *Scene) Frames() int { return s.n }

// Size returns the frame size, px.
func (s *Scene) Size() (w, h int) { return s.cfg.WidthPX, s.cfg.HeightPX }

// FPS returns the frame rate, frames/s.
func (s *Scene) FPS() float64 { return s.cfg.FPS }

// Config returns the scene's configuration with defaults filled in.
func (s *Scene) Config() Config { return s.cfg }

// Truth returns the scene's ground truth. The caller must not modify it.
func (s *Scene) Truth() *Truth { return s.truth }

// Close frees the rendering state. The scene must not be rendered after.
func (s *Scene) Close() {
	if s.r != nil {
		s.r.close()
		s.r = nil
	}
}
