package kinematics

import (
	"math"
	"sort"
)

// PathLength returns the sum of the step lengths of the path (xs[i], ys[i]),
// sum_i |p_i - p_{i-1}|, in the unit of the coordinates; 0 for fewer than
// two points. It panics if the slices differ in length.
func PathLength(xs, ys []float64) float64 {
	checkLen(xs, ys)
	l := 0.0
	for i := 1; i < len(xs); i++ {
		l += math.Hypot(xs[i]-xs[i-1], ys[i]-ys[i-1])
	}
	return l
}

// NetDisplacement returns |p_last - p_first|; 0 for fewer than two points.
// It panics if the slices differ in length.
func NetDisplacement(xs, ys []float64) float64 {
	checkLen(xs, ys)
	n := len(xs)
	if n < 2 {
		return 0
	}
	return math.Hypot(xs[n-1]-xs[0], ys[n-1]-ys[0])
}

// StraightnessIndex returns net displacement / path length (Batschelet
// 1981): 1 for a straight path, towards 0 for a tortuous one. It is NaN
// for a path of length 0. It panics if the slices differ in length.
func StraightnessIndex(xs, ys []float64) float64 {
	l := PathLength(xs, ys)
	if l == 0 {
		return math.NaN()
	}
	return NetDisplacement(xs, ys) / l
}

// Sinuosity returns the sinuosity of the path (xs[i], ys[i]) by Benhamou
// (2004, eq. 8):
//
//	S = 2 [ p ((1 + c)/(1 - c) + b^2) ]^(-1/2)
//
// with p the mean step length, c the mean cosine of the turning angles
// between successive steps, and b the coefficient of variation of the step
// length (standard deviation / mean, population form). S has the unit
// (coordinate unit)^(-1/2), e.g. mm^-1/2; it is 0 for a straight path and
// grows with tortuosity. Steps of zero length are dropped (they have no
// direction). S is NaN with fewer than two steps left. Benhamou
// recommends a path rediscretised to a constant step length (see
// Rediscretize), where b = 0. It panics if the slices differ in length.
func Sinuosity(xs, ys []float64) float64 {
	checkLen(xs, ys)
	var lens, dx, dy []float64
	for i := 1; i < len(xs); i++ {
		ex, ey := xs[i]-xs[i-1], ys[i]-ys[i-1]
		l := math.Hypot(ex, ey)
		if l == 0 {
			continue
		}
		lens = append(lens, l)
		dx, dy = append(dx, ex/l), append(dy, ey/l)
	}
	if len(lens) < 2 {
		return math.NaN()
	}
	p := 0.0
	for _, l := range lens {
		p += l
	}
	p /= float64(len(lens))
	v := 0.0
	for _, l := range lens {
		v += (l - p) * (l - p)
	}
	b := math.Sqrt(v/float64(len(lens))) / p
	c := 0.0
	for i := 1; i < len(lens); i++ {
		c += dx[i-1]*dx[i] + dy[i-1]*dy[i] // cosine of the turning angle
	}
	c /= float64(len(lens) - 1)
	return SinuosityFromParams(p, c, b)
}

// SinuosityFromParams evaluates Benhamou's (2004, eq. 8) formula
// S = 2 [p ((1+c)/(1-c) + b^2)]^(-1/2) for mean step length p, mean cosine
// of turning angles c (< 1) and coefficient of variation of step length b.
// It returns 0 for c = 1 (a straight path) and NaN for p <= 0.
func SinuosityFromParams(p, c, b float64) float64 {
	if !(p > 0) {
		return math.NaN()
	}
	if c >= 1 {
		return 0
	}
	return 2 / math.Sqrt(p*((1+c)/(1-c)+b*b))
}

// Rediscretize returns the points along the path (xs, ys), taken as
// straight segments, at successive arc-length steps of stepLen from its
// first point (the remainder shorter than stepLen at the end is dropped).
// This is the constant-step rediscretisation of Bovet & Benhamou (1988)
// with steps measured along the path. It panics if stepLen <= 0 or the
// slices differ in length.
func Rediscretize(xs, ys []float64, stepLen float64) (rx, ry []float64) {
	checkLen(xs, ys)
	if !(stepLen > 0) {
		panic("kinematics: Rediscretize step length must be > 0")
	}
	if len(xs) == 0 {
		return nil, nil
	}
	rx, ry = []float64{xs[0]}, []float64{ys[0]}
	need := stepLen // arc length still to go to the next output point
	for i := 1; i < len(xs); i++ {
		ax, ay := xs[i-1], ys[i-1]
		seg := math.Hypot(xs[i]-ax, ys[i]-ay)
		pos := 0.0 // arc length already used along this segment
		for seg-pos >= need {
			pos += need
			f := pos / seg
			rx = append(rx, ax+f*(xs[i]-ax))
			ry = append(ry, ay+f*(ys[i]-ay))
			need = stepLen
		}
		need -= seg - pos
	}
	return rx, ry
}

// Quantile returns the q-quantile (0 <= q <= 1) of the non-NaN values of
// x by linear interpolation between order statistics, definition 7 of
// Hyndman & Fan (1996) (R's default type 7, NumPy's default): with the n
// sorted values x_(1..n), h = (n-1) q, the result is
// x_(floor h) + (h - floor h)(x_(floor h + 1) - x_(floor h)) counting from 0.
// It is NaN when no value is left. x is not modified.
func Quantile(q float64, x []float64) float64 {
	if q < 0 || q > 1 || math.IsNaN(q) {
		panic("kinematics: quantile outside [0, 1]")
	}
	v := make([]float64, 0, len(x))
	for _, e := range x {
		if !math.IsNaN(e) {
			v = append(v, e)
		}
	}
	if len(v) == 0 {
		return math.NaN()
	}
	sort.Float64s(v)
	h := float64(len(v)-1) * q
	lo := int(math.Floor(h))
	if lo >= len(v)-1 {
		return v[len(v)-1]
	}
	return v[lo] + (h-float64(lo))*(v[lo+1]-v[lo])
}

func checkLen(xs, ys []float64) {
	if len(xs) != len(ys) {
		panic("kinematics: slice lengths do not match")
	}
}
