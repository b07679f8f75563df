package visits

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"flitlog/kinematics"
)

// A synthetic forager for tests (invented data, for ground truth only).
// The bee's true path is a sequence of pieces in continuous time: straight
// flights between points of rest whose speed rises and falls along half
// cosines (mean acceleration 2 to 4 m/s^2, cruise 250 to 500 mm/s),
// handling on a flower (still spells with short minimum-jerk walks; Flash
// & Hogan 1985), and hovering near a flower with a Lissajous wander. Positions are sampled at the frame times, Gaussian noise is
// added, and kinematics.Analyze computes the speeds, as in the pipeline.

type piece struct {
	t0, t1 float64
	pos    func(t float64) (x, y float64) // mm
	kind   int                            // pieceFly, pieceLanded, pieceHover
	flower int
}

const (
	pieceFly = iota
	pieceLanded
	pieceHover
)

type synthScene struct {
	fps, pxPerMM float64
	frames       int
	fm           FlowerMap
	pieces       [][]piece // per bee
}

// minJerk returns the minimum-jerk path from a to b over [t0, t1].
func minJerk(ax, ay, bx, by, t0, t1 float64) func(float64) (float64, float64) {
	return func(t float64) (float64, float64) {
		u := math.Max(0, math.Min(1, (t-t0)/(t1-t0)))
		s := u * u * u * (10 - 15*u + 6*u*u)
		return ax + s*(bx-ax), ay + s*(by-ay)
	}
}

// flight returns a straight flight from a to b starting at rest at t0
// and ending at rest, with cruise speed vc (mm/s) and mean acceleration
// acc (mm/s^2) in the half-cosine speed ramps, and its duration.
func flight(ax, ay, bx, by, t0, vc, acc float64) (func(float64) (float64, float64), float64) {
	d := math.Hypot(bx-ax, by-ay)
	ta := vc / acc
	if vc*ta > d { // too short to reach cruise speed
		vc = math.Sqrt(d * acc)
		ta = vc / acc
	}
	tc := (d - vc*ta) / vc
	T := 2*ta + tc
	// s(t): distance along the line. In a ramp v = vc/2 (1 - cos(pi t/ta)).
	ramp := func(t float64) float64 { return vc / 2 * (t - ta/math.Pi*math.Sin(math.Pi*t/ta)) }
	return func(t float64) (float64, float64) {
		u := math.Max(0, math.Min(T, t-t0))
		var s float64
		switch {
		case u < ta:
			s = ramp(u)
		case u < ta+tc:
			s = vc*ta/2 + vc*(u-ta)
		default:
			s = d - ramp(T-u)
		}
		if d == 0 {
			return ax, ay
		}
		return ax + s/d*(bx-ax), ay + s/d*(by-ay)
	}, T
}

// synthConfig sets up a synthetic scene.
type synthConfig struct {
	seed        uint64
	bees        int
	durationS   float64
	inspectProb float64
	startLanded bool // bee 0 is on a flower at frame 0 (censored start)
	endLanded   bool // bee 0 is on a flower at the last frame (censored end)
}

// newSynth plans a scene: flowers in a 1280x720 frame at 2 px/mm and
// 30 frames/s, bees visiting them.
func newSynth(c synthConfig) *synthScene {
	rng := rand.New(rand.NewPCG(c.seed, 7))
	sc := &synthScene{fps: 30, pxPerMM: 2, frames: int(c.durationS * 30)}
	sc.fm = FlowerMap{FrameWidthPX: 1280, FrameHeightPX: 720}
	kinds := []string{"clover", "vetch"}
	for len(sc.fm.Flowers) < 9 {
		r := (12 + 13*rng.Float64()) * sc.pxPerMM
		x, y := 60+rng.Float64()*1160, 60+rng.Float64()*600
		ok := true
		for _, f := range sc.fm.Flowers {
			if math.Hypot(x-f.XPX, y-f.YPX) < r+f.RPX+40*sc.pxPerMM {
				ok = false
			}
		}
		if ok {
			reward := 0.5 + 3*rng.Float64()
			sc.fm.Flowers = append(sc.fm.Flowers, Flower{ID: fmt.Sprintf("F%02d", len(sc.fm.Flowers)+1),
				XPX: x, YPX: y, RPX: r, Kind: kinds[rng.IntN(2)], RewardUL: &reward})
		}
	}
	mm := func(f Flower) (x, y, r float64) { return f.XPX / sc.pxPerMM, f.YPX / sc.pxPerMM, f.RPX / sc.pxPerMM }
	end := c.durationS + 1
	for b := 0; b < c.bees; b++ {
		var ps []piece
		var t, x, y float64
		nf := len(sc.fm.Flowers)
		fi := rng.IntN(nf)
		if b == 0 && c.startLanded {
			fx, fy, fr := mm(sc.fm.Flowers[fi])
			x, y = fx+0.3*fr, fy
			t = -1.5
		} else {
			// Enter from the left edge.
			x, y = -20, 50+rng.Float64()*260
			t = rng.Float64() * 2
			fi = -1
		}
		landedNow := b == 0 && c.startLanded
		for t < end {
			if landedNow {
				// Handle flower fi from t: still spells with walks.
				fx, fy, fr := mm(sc.fm.Flowers[fi])
				h := math.Exp(math.Log(3) + 0.6*rng.NormFloat64())
				h = math.Max(1, math.Min(15, h))
				if b == 0 && c.endLanded && t+h+3 > c.durationS && t < c.durationS-0.5 {
					h = end - t + 1 // stay to the end
				}
				t1 := t + h
				tt := t
				for tt < t1 {
					still := 0.6 + 1.5*rng.Float64()
					sx, sy := x, y
					ps = append(ps, piece{tt, math.Min(t1, tt+still), func(float64) (float64, float64) { return sx, sy }, pieceLanded, fi})
					tt += still
					if tt >= t1 {
						break
					}
					// Walk 2-5 mm at 6-10 mm/s, staying within 0.6 r.
					d := 2 + 3*rng.Float64()
					a := rng.Float64() * 2 * math.Pi
					nx, ny := x+d*math.Cos(a), y+d*math.Sin(a)
					if math.Hypot(nx-fx, ny-fy) > 0.6*fr {
						nx, ny = x+(fx-x)*0.4, y+(fy-y)*0.4
					}
					dur := math.Hypot(nx-x, ny-y)/(6+4*rng.Float64()) + 0.1
					we := math.Min(t1, tt+dur)
					ps = append(ps, piece{tt, we, minJerk(x, y, nx, ny, tt, tt+dur), pieceLanded, fi})
					x, y = nx, ny
					tt = we
				}
				t = t1
				landedNow = false
				continue
			}
			// Choose the next flower (not the current one).
			next := rng.IntN(nf)
			for next == fi {
				next = rng.IntN(nf)
			}
			fx, fy, fr := mm(sc.fm.Flowers[next])
			inspect := rng.Float64() < c.inspectProb
			var tx, ty float64
			if inspect {
				// Hover point from half a radius inside the edge to
				// 10 mm outside it, on the side the bee comes from.
				a := math.Atan2(y-fy, x-fx) + 0.6*(rng.Float64()-0.5)
				d := fr*(0.5+0.5*rng.Float64()) + 10*rng.Float64()
				tx, ty = fx+d*math.Cos(a), fy+d*math.Sin(a)
			} else {
				a := rng.Float64() * 2 * math.Pi
				d := 0.5 * fr * math.Sqrt(rng.Float64())
				tx, ty = fx+d*math.Cos(a), fy+d*math.Sin(a)
			}
			pos, fly := flight(x, y, tx, ty, t, 250+250*rng.Float64(), 2000+2000*rng.Float64())
			ps = append(ps, piece{t, t + fly, pos, pieceFly, -1})
			t += fly
			x, y, fi = tx, ty, next
			if inspect {
				// Wander 1.2-3 mm at 2-4 Hz, ramped in and out over 0.1 s.
				dur := 0.5 + rng.Float64()
				A := 1.2 + 1.8*rng.Float64()
				f1, f2 := 2+2*rng.Float64(), 2+2*rng.Float64()
				p1, p2 := rng.Float64()*2*math.Pi, rng.Float64()*2*math.Pi
				h0, hx, hy := t, x, y
				ps = append(ps, piece{t, t + dur, func(tt float64) (float64, float64) {
					u := tt - h0
					env := math.Min(1, math.Min(u, h0+dur-tt)/0.1)
					env = math.Max(0, env)
					return hx + env*A*(math.Sin(2*math.Pi*f1*u+p1)-math.Sin(p1)*0),
						hy + env*A*math.Sin(2*math.Pi*f2*u+p2)
				}, pieceHover, next})
				t += dur
				continue
			}
			landedNow = true
		}
		sc.pieces = append(sc.pieces, ps)
	}
	return sc
}

// truth returns the true landings and inspections: the frames whose time
// falls in a landed (hover) piece, joined per visit.
func (sc *synthScene) truth() ([]Landing, []Inspection) {
	var ls []Landing
	var is []Inspection
	for b, ps := range sc.pieces {
		state, flower := sc.frameStates(ps)
		for i := 0; i < sc.frames; {
			if state[i] != pieceLanded && state[i] != pieceHover {
				i++
				continue
			}
			j := i
			for j+1 < sc.frames && state[j+1] == state[i] && flower[j+1] == flower[i] {
				j++
			}
			f := sc.fm.Flowers[flower[i]]
			startS, endS := float64(i)/sc.fps, float64(j+1)/sc.fps
			if state[i] == pieceLanded {
				ls = append(ls, Landing{TrackID: b, FlowerID: f.ID, StartFrame: i, EndFrame: j, StartS: startS, EndS: endS,
					DurationS: endS - startS, CensoredStart: i == 0, CensoredEnd: j == sc.frames-1, FlowerKind: f.Kind})
			} else {
				is = append(is, Inspection{TrackID: b, FlowerID: f.ID, StartFrame: i, EndFrame: j, StartS: startS, EndS: endS,
					DurationS: endS - startS, CensoredStart: i == 0, CensoredEnd: j == sc.frames-1, FlowerKind: f.Kind})
			}
			i = j + 1
		}
	}
	return ls, is
}

// frameStates returns the piece kind (-1 outside all pieces) and flower of
// each frame.
func (sc *synthScene) frameStates(ps []piece) ([]int, []int) {
	state := make([]int, sc.frames)
	flower := make([]int, sc.frames)
	k := 0
	for i := range state {
		t := float64(i) / sc.fps
		state[i] = -1
		for k < len(ps) && ps[k].t1 <= t {
			k++
		}
		if k < len(ps) && ps[k].t0 <= t {
			state[i], flower[i] = ps[k].kind, ps[k].flower
		}
	}
	return state, flower
}

// tracks samples the bees' paths at the frame times with Gaussian noise
// of sigmaPX per axis and runs kinematics.Analyze with its defaults. A bee
// is tracked while inside the frame; each stretch in the frame is a track.
func (sc *synthScene) tracks(t testing.TB, sigmaPX float64, seed uint64) []kinematics.Result {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 11))
	var out []kinematics.Result
	id := 0
	for _, ps := range sc.pieces {
		var cur kinematics.Track
		flush := func() {
			if len(cur.Points) > 1 {
				r, err := kinematics.Analyze(cur, kinematics.DefaultSettings())
				if err != nil {
					t.Fatalf("kinematics.Analyze: %v", err)
				}
				out = append(out, r)
			}
			id++
			cur = kinematics.Track{ID: id}
		}
		flush()
		k := 0
		for i := 0; i < sc.frames; i++ {
			tt := float64(i) / sc.fps
			for k < len(ps) && ps[k].t1 <= tt {
				k++
			}
			if k >= len(ps) || ps[k].t0 > tt {
				flush()
				continue
			}
			x, y := ps[k].pos(tt)
			xp := x*sc.pxPerMM + sigmaPX*rng.NormFloat64()
			yp := y*sc.pxPerMM + sigmaPX*rng.NormFloat64()
			if xp < 0 || yp < 0 || xp > 1279 || yp > 719 {
				flush()
				continue
			}
			cur.Points = append(cur.Points, kinematics.Point{Frame: i, TimeS: tt, XPX: xp, YPX: yp,
				XMM: xp / sc.pxPerMM, YMM: yp / sc.pxPerMM, Observed: true})
		}
		flush()
	}
	return out
}

func (sc *synthScene) clip() Clip {
	return Clip{Frames: sc.frames, FPS: sc.fps, PXPerMM: sc.pxPerMM}
}
