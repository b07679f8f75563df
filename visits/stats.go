package visits

import (
	"math"
	"sort"
)

// Stats describes a sample of durations (s) or other values. With N = 0
// every statistic is NaN.
type Stats struct {
	N      int     `json:"n"`
	Mean   float64 `json:"mean"`
	Median float64 `json:"median"`
	Q1     float64 `json:"q1"`  // 25th percentile
	Q3     float64 `json:"q3"`  // 75th percentile
	IQR    float64 `json:"iqr"` // Q3 - Q1
}

// describe returns the Stats of xs. Percentiles interpolate linearly
// between order statistics: quantile p of the sorted x_1..x_n is
// x_k + (h - k)(x_{k+1} - x_k) with h = (n - 1)p + 1, k = floor(h)
// (Hyndman & Fan 1996, definition 7; the default of R and NumPy).
func describe(xs []float64) Stats {
	st := Stats{N: len(xs), Mean: math.NaN(), Median: math.NaN(), Q1: math.NaN(), Q3: math.NaN(), IQR: math.NaN()}
	if len(xs) == 0 {
		return st
	}
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	var sum float64
	for _, x := range s {
		sum += x
	}
	st.Mean = sum / float64(len(s))
	st.Median = quantile(s, 0.5)
	st.Q1 = quantile(s, 0.25)
	st.Q3 = quantile(s, 0.75)
	st.IQR = st.Q3 - st.Q1
	return st
}

// quantile is Hyndman & Fan (1996) definition 7 on sorted s (0-based).
func quantile(s []float64, p float64) float64 {
	if len(s) == 0 {
		return math.NaN()
	}
	h := float64(len(s)-1) * p
	k := int(math.Floor(h))
	if k >= len(s)-1 {
		return s[len(s)-1]
	}
	return s[k] + (h-float64(k))*(s[k+1]-s[k])
}

// median of xs (not modified), NaN if empty.
func median(xs []float64) float64 {
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	return quantile(s, 0.5)
}

// BatemanIndex is Bateman's (1951) index of flower constancy for two
// kinds of flower A and B, from the counts of a bee's moves between
// consecutive flowers: aa from A to A, ab from A to B, ba from B to A,
// bb from B to B:
//
//	BI = (sqrt(aa*bb) - sqrt(ab*ba)) / (sqrt(aa*bb) + sqrt(ab*ba))
//
// It is +1 for complete constancy (never switching), 0 when switching is
// as frequent as expected from the proportions of moves (independence of
// the 2x2 table), and -1 for strict alternation. It is Yule's coefficient
// of colligation of the 2x2 table of moves. NaN when both products are
// zero (too few moves to say).
//
// Source: Bateman A.J. (1951) The measurement of specificity in pollinating
// insects. Heredity 5: 271-278; the formula as given in Waser N.M. (1986)
// Flower constancy: definition, cause, and measurement. American
// Naturalist 127: 593-603 (from memory).
func BatemanIndex(aa, ab, ba, bb int) float64 {
	if aa < 0 || ab < 0 || ba < 0 || bb < 0 {
		panic("visits: negative transition count")
	}
	p := math.Sqrt(float64(aa) * float64(bb))
	q := math.Sqrt(float64(ab) * float64(ba))
	if p+q == 0 {
		return math.NaN()
	}
	return (p - q) / (p + q)
}
