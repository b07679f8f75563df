package kinematics

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// SavitzkyGolayWeights returns the convolution weights w of a
// Savitzky-Golay filter: the least-squares polynomial of degree order is
// fitted to window equally spaced samples y_0 ... y_{window-1}, and its
// deriv-th derivative at sample evalAt (0 <= evalAt < window) is
//
//	sum_j w_j y_j
//
// in units of y per sample^deriv (divide by dt^deriv for a time
// derivative). With evalAt = (window-1)/2 these are the classic centred
// weights of Savitzky & Golay (1964), e.g. (-3, 12, 17, 12, -3)/35 for
// smoothing with a 5-point quadratic; other values of evalAt give the
// asymmetric weights used at the ends of a series (the end polynomial is
// evaluated off-centre, Gorry 1990).
//
// The weights are row deriv of the pseudo-inverse (A'A)^-1 A' of the
// Vandermonde matrix A_jk = ((j-evalAt)/s)^k, times deriv!/s^deriv, where
// the scale s = max(1, window/2) keeps A'A well conditioned.
//
// SavitzkyGolayWeights panics if order < 0, window < order+1,
// deriv > order or evalAt is outside the window: these are programmer
// errors.
func SavitzkyGolayWeights(window, order, deriv, evalAt int) []float64 {
	if order < 0 || window < order+1 || deriv < 0 || deriv > order || evalAt < 0 || evalAt >= window {
		panic(fmt.Sprintf("kinematics: bad Savitzky-Golay parameters window=%d order=%d deriv=%d evalAt=%d", window, order, deriv, evalAt))
	}
	s := math.Max(1, float64(window)/2)
	a := mat.NewDense(window, order+1, nil)
	for j := 0; j < window; j++ {
		t := float64(j-evalAt) / s
		p := 1.0
		for k := 0; k <= order; k++ {
			a.Set(j, k, p)
			p *= t
		}
	}
	// Solve (A'A) X = A' for X = (A'A)^-1 A' by Cholesky: A'A is
	// symmetric positive definite for distinct sample positions.
	var ata mat.SymDense
	ata.SymOuterK(1, a.T())
	var chol mat.Cholesky
	if !chol.Factorize(&ata) {
		panic("kinematics: Savitzky-Golay normal matrix is not positive definite")
	}
	var x mat.Dense
	if err := chol.SolveTo(&x, a.T()); err != nil {
		panic("kinematics: Savitzky-Golay solve: " + err.Error())
	}
	f := 1.0
	for k := 2; k <= deriv; k++ {
		f *= float64(k)
	}
	f /= math.Pow(s, float64(deriv))
	w := make([]float64, window)
	for j := range w {
		w[j] = f * x.At(deriv, j)
	}
	return w
}

// sgKey identifies one set of weights in a sgCache.
type sgKey struct{ window, order, deriv, evalAt int }

// sgCache memoises SavitzkyGolayWeights within one Analyze call.
type sgCache map[sgKey][]float64

func (c sgCache) get(window, order, deriv, evalAt int) []float64 {
	k := sgKey{window, order, deriv, evalAt}
	w, ok := c[k]
	if !ok {
		w = SavitzkyGolayWeights(window, order, deriv, evalAt)
		c[k] = w
	}
	return w
}

// sgFilter applies a Savitzky-Golay filter to one gap-free series y (one
// value per frame) and writes the deriv-th derivative per frame^deriv at
// every sample into out (len(out) == len(y)).
//
// End rule: a sample closer than half a window to an end uses the window
// that starts (ends) at that end, and the polynomial is evaluated at the
// sample's off-centre position. A series shorter than window uses a single
// window of all its samples with the degree lowered to len(y)-1 when
// needed; derivatives above that degree are NaN.
func sgFilter(c sgCache, y []float64, window, order, deriv int, out []float64) {
	n := len(y)
	if n == 0 {
		return
	}
	if n < window {
		window = n
		if order > n-1 {
			order = n - 1
		}
	}
	if deriv > order {
		for i := range out[:n] {
			out[i] = math.NaN()
		}
		return
	}
	half := window / 2
	for i := 0; i < n; i++ {
		start, at := i-half, half
		switch {
		case start < 0:
			start, at = 0, i
		case start+window > n:
			start = n - window
			at = i - start
		}
		w := c.get(window, order, deriv, at)
		sum := 0.0
		for j, wj := range w {
			sum += wj * y[start+j]
		}
		out[i] = sum
	}
}
