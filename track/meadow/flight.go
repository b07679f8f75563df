package meadow

import (
	"math"
	"math/rand/v2"
)

// flight is one flight from a start point to an end point along a cubic
// Bézier curve, with a smooth speed profile: speed rises from v0 to the
// cruise speed vc, holds, and falls to v1, each change following a
// half-cosine (so acceleration is continuous within the flight). A
// sideways zigzag of amplitude zigA (px) and frequency zigF (Hz), scaled by
// speed/vc, is added to the curve.
type flight struct {
	p          [4][2]float64 // control points, px
	arcS       []float64     // arc length at parameter k/(len-1), px
	length     float64       // px
	v0, vc, v1 float64       // px/s
	ta, tc, td float64       // s
	sa, sc     float64       // distance covered in accel and cruise, px
	zigA, zigF float64
	zigPh      float64
}

const arcSamples = 96

// newFlight plans a flight. accel is the mean acceleration (px/s^2); it is
// raised where the distance is too short to change speed at that rate.
func newFlight(rng *rand.Rand, x0, y0, x1, y1, v0, vc, v1, accel, zigA, bend float64) *flight {
	f := &flight{v0: v0, v1: v1, zigA: zigA}
	dx, dy := x1-x0, y1-y0
	d := math.Hypot(dx, dy)
	nx, ny := 0.0, 0.0
	if d > 0 {
		nx, ny = -dy/d, dx/d
	}
	c1 := rng.NormFloat64() * bend * d
	c2 := rng.NormFloat64() * bend * d
	f.p[0] = [2]float64{x0, y0}
	f.p[1] = [2]float64{x0 + dx/3 + nx*c1, y0 + dy/3 + ny*c1}
	f.p[2] = [2]float64{x0 + 2*dx/3 + nx*c2, y0 + 2*dy/3 + ny*c2}
	f.p[3] = [2]float64{x1, y1}
	f.arcS = make([]float64, arcSamples+1)
	px, py := x0, y0
	for k := 1; k <= arcSamples; k++ {
		x, y := f.bezier(float64(k) / arcSamples)
		f.arcS[k] = f.arcS[k-1] + math.Hypot(x-px, y-py)
		px, py = x, y
	}
	f.length = f.arcS[arcSamples]
	f.zigF = 3 + 2*rng.Float64()
	f.zigPh = rng.Float64() * 2 * math.Pi

	L := f.length
	dist := func(vc, a float64) float64 {
		return (v0+vc)/2*math.Abs(vc-v0)/a + (vc+v1)/2*math.Abs(vc-v1)/a
	}
	lo := math.Max(v0, v1)
	if dist(vc, accel) > L {
		if dist(lo, accel) > L {
			vc = lo
			accel = dist(lo, 1) / L * 1.0001
		} else {
			a, b := lo, vc
			for it := 0; it < 60; it++ {
				m := (a + b) / 2
				if dist(m, accel) > L {
					b = m
				} else {
					a = m
				}
			}
			vc = a
		}
	}
	f.vc = vc
	f.ta = math.Abs(vc-v0) / accel
	f.td = math.Abs(vc-v1) / accel
	f.sa = (v0 + vc) / 2 * f.ta
	sd := (vc + v1) / 2 * f.td
	f.sc = math.Max(0, L-f.sa-sd)
	if vc > 0 {
		f.tc = f.sc / vc
	}
	return f
}

func (f *flight) bezier(u float64) (x, y float64) {
	a := 1 - u
	b0, b1, b2, b3 := a*a*a, 3*a*a*u, 3*a*u*u, u*u*u
	return b0*f.p[0][0] + b1*f.p[1][0] + b2*f.p[2][0] + b3*f.p[3][0],
		b0*f.p[0][1] + b1*f.p[1][1] + b2*f.p[2][1] + b3*f.p[3][1]
}

func (f *flight) duration() float64 { return f.ta + f.tc + f.td }

// profile returns distance along the curve (px) and speed (px/s) at time
// tau from the start of the flight.
func (f *flight) profile(tau float64) (s, v float64) {
	switch {
	case tau <= 0:
		return 0, f.v0
	case tau < f.ta:
		w := math.Pi / f.ta
		return f.v0*tau + (f.vc-f.v0)/2*(tau-math.Sin(w*tau)/w), f.v0 + (f.vc-f.v0)*(1-math.Cos(w*tau))/2
	case tau < f.ta+f.tc:
		return f.sa + f.vc*(tau-f.ta), f.vc
	case tau < f.duration():
		sg := tau - f.ta - f.tc
		w := math.Pi / f.td
		return f.sa + f.sc + f.vc*sg + (f.v1-f.vc)/2*(sg-math.Sin(w*sg)/w), f.vc + (f.v1-f.vc)*(1-math.Cos(w*sg))/2
	}
	return f.length, f.v1
}

// paramAt returns the Bézier parameter at arc length s.
func (f *flight) paramAt(s float64) float64 {
	if s <= 0 {
		return 0
	}
	if s >= f.length {
		return 1
	}
	lo, hi := 0, arcSamples
	for hi-lo > 1 {
		m := (lo + hi) / 2
		if f.arcS[m] <= s {
			lo = m
		} else {
			hi = m
		}
	}
	seg := f.arcS[hi] - f.arcS[lo]
	frac := 0.0
	if seg > 0 {
		frac = (s - f.arcS[lo]) / seg
	}
	return (float64(lo) + frac) / arcSamples
}

// pos returns the position at time tau from the start of the flight, px.
func (f *flight) pos(tau float64) (x, y float64) {
	s, v := f.profile(tau)
	u := f.paramAt(s)
	x, y = f.bezier(u)
	if f.zigA != 0 && f.vc > 0 {
		// Tangent by finite difference of the curve.
		u2 := math.Min(1, u+1e-3)
		u1 := math.Max(0, u-1e-3)
		ax, ay := f.bezier(u1)
		bx, by := f.bezier(u2)
		tx, ty := bx-ax, by-ay
		n := math.Hypot(tx, ty)
		if n > 0 {
			off := f.zigA * (v / f.vc) * math.Sin(2*math.Pi*f.zigF*tau+f.zigPh)
			x += -ty / n * off
			y += tx / n * off
		}
	}
	return x, y
}

// smoothstep is 3u^2 - 2u^3 on [0, 1], clamped outside.
func smoothstep(u float64) float64 {
	if u <= 0 {
		return 0
	}
	if u >= 1 {
		return 1
	}
	return u * u * (3 - 2*u)
}
