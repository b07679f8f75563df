package kinematics

import (
	"math"
	"testing"
)

// TestSavitzkyGolayWeightsTables checks the centred weights against the
// published convolution tables. Source for every row: Savitzky & Golay
// (1964), Analytical Chemistry 36:1627, Tables I-VI (smoothing,
// first and second derivative), as corrected by Steinier, Termonia &
// Deltour (1972), Analytical Chemistry 44:1906. (Table numbers from
// memory; the integers and normalisers are those printed.)
func TestSavitzkyGolayWeightsTables(t *testing.T) {
	cases := []struct {
		name                 string
		window, order, deriv int
		num                  []float64
		norm                 float64
	}{
		{"smooth 5-pt quadratic", 5, 2, 0, []float64{-3, 12, 17, 12, -3}, 35},
		{"smooth 5-pt cubic (same as quadratic)", 5, 3, 0, []float64{-3, 12, 17, 12, -3}, 35},
		{"smooth 7-pt quadratic", 7, 2, 0, []float64{-2, 3, 6, 7, 6, 3, -2}, 21},
		{"smooth 9-pt quadratic", 9, 2, 0, []float64{-21, 14, 39, 54, 59, 54, 39, 14, -21}, 231},
		{"smooth 7-pt quartic", 7, 4, 0, []float64{5, -30, 75, 131, 75, -30, 5}, 231},
		{"smooth 9-pt quartic", 9, 4, 0, []float64{15, -55, 30, 135, 179, 135, 30, -55, 15}, 429},
		{"1st derivative 5-pt quadratic", 5, 2, 1, []float64{-2, -1, 0, 1, 2}, 10},
		{"1st derivative 7-pt quadratic", 7, 2, 1, []float64{-3, -2, -1, 0, 1, 2, 3}, 28},
		{"1st derivative 5-pt cubic", 5, 3, 1, []float64{1, -8, 0, 8, -1}, 12},
		{"1st derivative 7-pt cubic", 7, 3, 1, []float64{22, -67, -58, 0, 58, 67, -22}, 252},
		{"2nd derivative 5-pt quadratic", 5, 2, 2, []float64{2, -1, -2, -1, 2}, 7},
		{"2nd derivative 7-pt quadratic", 7, 2, 2, []float64{5, 0, -3, -4, -3, 0, 5}, 42},
	}
	const tol = 1e-12
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w := SavitzkyGolayWeights(c.window, c.order, c.deriv, c.window/2)
			for j := range w {
				want := c.num[j] / c.norm
				if math.Abs(w[j]-want) > tol {
					t.Errorf("w[%d] = %.15g, want %g/%g = %.15g", j, w[j], c.num[j], c.norm, want)
				}
			}
		})
	}
}

// TestSavitzkyGolayPolynomialsExact checks the defining property of the
// filter at every evaluation position, including the off-centre ones used
// at track ends: a polynomial of degree <= order is reproduced exactly,
// and so are its derivatives.
func TestSavitzkyGolayPolynomialsExact(t *testing.T) {
	poly := []float64{0.7, -1.3, 0.25, 0.04, -0.003} // synthetic coefficients
	eval := func(deg, deriv int, x float64) float64 {
		s := 0.0
		for k := deriv; k <= deg; k++ {
			f := 1.0
			for m := 0; m < deriv; m++ {
				f *= float64(k - m)
			}
			s += poly[k] * f * math.Pow(x, float64(k-deriv))
		}
		return s
	}
	for _, c := range []struct{ window, order int }{{5, 2}, {7, 2}, {13, 2}, {9, 3}, {11, 4}} {
		for at := 0; at < c.window; at++ {
			for d := 0; d <= 2; d++ {
				w := SavitzkyGolayWeights(c.window, c.order, d, at)
				got := 0.0
				for j, wj := range w {
					got += wj * eval(c.order, 0, float64(j))
				}
				want := eval(c.order, d, float64(at))
				if math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
					t.Errorf("window %d order %d deriv %d at %d: got %.12g, want %.12g", c.window, c.order, d, at, got, want)
				}
			}
		}
	}
}

// TestSavitzkyGolayCutoff checks the cut-off frequencies claimed in
// doc.go: the -3 dB point of the quadratic smoothing filter is at 0.32 of
// the Nyquist frequency for 7 frames and 0.17 for 13 frames (computed
// here from the weights' frequency response H(f) = sum_j w_j cos(2 pi f j)).
func TestSavitzkyGolayCutoff(t *testing.T) {
	for _, c := range []struct {
		window   int
		wantNyq  float64
		tolerNyq float64
	}{{7, 0.32, 0.01}, {13, 0.17, 0.01}} {
		w := SavitzkyGolayWeights(c.window, 2, 0, c.window/2)
		m := c.window / 2
		f := 0.0
		for ; f < 0.5; f += 1e-5 {
			h := 0.0
			for j, wj := range w {
				h += wj * math.Cos(2*math.Pi*f*float64(j-m))
			}
			if math.Abs(h) < 1/math.Sqrt2 {
				break
			}
		}
		if got := 2 * f; math.Abs(got-c.wantNyq) > c.tolerNyq {
			t.Errorf("window %d: -3 dB at %.3f of Nyquist, doc.go says %.2f", c.window, got, c.wantNyq)
		}
	}
}

func TestSavitzkyGolayWeightsPanics(t *testing.T) {
	for _, c := range []struct{ window, order, deriv, at int }{
		{2, 2, 0, 0}, {5, 2, 3, 2}, {5, -1, 0, 2}, {5, 2, 0, 5}, {5, 2, 0, -1},
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("SavitzkyGolayWeights%v did not panic", c)
				}
			}()
			SavitzkyGolayWeights(c.window, c.order, c.deriv, c.at)
		}()
	}
}
