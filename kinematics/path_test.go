package kinematics

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestPathMetrics(t *testing.T) {
	cases := []struct {
		name                string
		xs, ys              []float64
		path, net, straight float64
	}{
		// Synthetic paths with hand-computed values.
		{"straight", []float64{0, 1, 2, 3}, []float64{0, 1, 2, 3}, 3 * math.Sqrt2, 3 * math.Sqrt2, 1},
		{"L 3-4-5", []float64{0, 3, 3}, []float64{0, 0, 4}, 7, 5, 5.0 / 7},
		{"there and back", []float64{0, 2, 0}, []float64{0, 0, 0}, 4, 0, 0},
		{"one point", []float64{1}, []float64{1}, 0, 0, math.NaN()},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			check := func(what string, got, want float64) {
				if math.IsNaN(want) {
					if !math.IsNaN(got) {
						t.Errorf("%s = %g, want NaN", what, got)
					}
					return
				}
				if math.Abs(got-want) > 1e-12 {
					t.Errorf("%s = %.15g, want %.15g", what, got, want)
				}
			}
			check("PathLength", PathLength(c.xs, c.ys), c.path)
			check("NetDisplacement", NetDisplacement(c.xs, c.ys), c.net)
			check("StraightnessIndex", StraightnessIndex(c.xs, c.ys), c.straight)
		})
	}
}

func TestRediscretize(t *testing.T) {
	// L path of length 7; steps of 2 along it land at arc lengths 0, 2, 4, 6:
	// (0,0), (2,0), (3,1), (3,3); the last 1 mm is dropped.
	rx, ry := Rediscretize([]float64{0, 3, 3}, []float64{0, 0, 4}, 2)
	wantX, wantY := []float64{0, 2, 3, 3}, []float64{0, 0, 1, 3}
	if len(rx) != len(wantX) {
		t.Fatalf("got %d points %v %v, want %d", len(rx), rx, ry, len(wantX))
	}
	for i := range rx {
		if math.Abs(rx[i]-wantX[i]) > 1e-12 || math.Abs(ry[i]-wantY[i]) > 1e-12 {
			t.Errorf("point %d = (%g, %g), want (%g, %g)", i, rx[i], ry[i], wantX[i], wantY[i])
		}
	}
	// Many short input segments: output steps are all stepLen apart
	// along a straight line.
	xs := make([]float64, 101)
	for i := range xs {
		xs[i] = 0.37 * float64(i)
	}
	rx, _ = Rediscretize(xs, make([]float64, len(xs)), 5)
	if want := int(37/5) + 1; len(rx) != want {
		t.Errorf("straight: %d points, want %d", len(rx), want)
	}
	for i := 1; i < len(rx); i++ {
		if math.Abs(rx[i]-rx[i-1]-5) > 1e-9 {
			t.Errorf("straight: step %d = %g, want 5", i, rx[i]-rx[i-1])
		}
	}
}

func TestQuantile(t *testing.T) {
	x := []float64{10, 1, 9, 2, 8, 3, 7, 4, 6, 5, math.NaN()}
	// Expected values by definition 7 of Hyndman & Fan (1996) for 1..10,
	// as R's quantile(1:10, c(0, .25, .5, .95, 1)) prints (type 7, the
	// default): 1, 3.25, 5.5, 9.55, 10 (from memory; checked by hand:
	// h = 9q).
	for _, c := range []struct{ q, want float64 }{{0, 1}, {0.25, 3.25}, {0.5, 5.5}, {0.95, 9.55}, {1, 10}} {
		if got := Quantile(c.q, x); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("Quantile(%g) = %g, want %g", c.q, got, c.want)
		}
	}
	if !math.IsNaN(Quantile(0.5, []float64{math.NaN()})) {
		t.Error("Quantile of no values is not NaN")
	}
}

// crw simulates a correlated random walk of n steps: step lengths from
// step(), turning angles from turn(), starting along +x.
func crw(n int, step, turn func() float64) (xs, ys []float64) {
	xs, ys = make([]float64, n+1), make([]float64, n+1)
	h := 0.0
	for i := 1; i <= n; i++ {
		h += turn()
		l := step()
		xs[i], ys[i] = xs[i-1]+l*math.Cos(h), ys[i-1]+l*math.Sin(h)
	}
	return xs, ys
}

// crwCase is a correlated random walk with known step length
// distribution (mean p, coefficient of variation b) and turning-angle
// distribution (mean cosine c), all synthetic.
type crwCase struct {
	name    string
	p, b, c float64
	step    func(r *rand.Rand) float64
	turn    func(r *rand.Rand) float64
}

func crwCases() []crwCase {
	return []crwCase{
		{
			// Uniform steps on [2, 8] mm: mean 5, sd 6/sqrt(12).
			// Wrapped normal turns, sd 0.5 rad: E cos = exp(-sd^2/2).
			name: "uniform steps, wrapped normal turns",
			p:    5, b: (6 / math.Sqrt(12)) / 5, c: math.Exp(-0.5 * 0.5 / 2),
			step: func(r *rand.Rand) float64 { return 2 + 6*r.Float64() },
			turn: func(r *rand.Rand) float64 { return 0.5 * r.NormFloat64() },
		},
		{
			// Exponential steps, mean 3 mm: CV 1. Uniform turns on
			// [-1, 1] rad: E cos = sin(1)/1.
			name: "exponential steps, uniform turns",
			p:    3, b: 1, c: math.Sin(1),
			step: func(r *rand.Rand) float64 { return 3 * r.ExpFloat64() },
			turn: func(r *rand.Rand) float64 { return 2*r.Float64() - 1 },
		},
		{
			// Constant steps of 5 mm, wrapped normal turns sd 1.2 rad:
			// a tortuous search path.
			name: "constant steps, wide turns",
			p:    5, b: 0, c: math.Exp(-1.2 * 1.2 / 2),
			step: func(r *rand.Rand) float64 { return 5 },
			turn: func(r *rand.Rand) float64 { return 1.2 * r.NormFloat64() },
		},
	}
}

// TestSinuosityCRWEstimate: Sinuosity computed from a long simulated
// path agrees with Benhamou's (2004, eq. 8) formula evaluated at the known
// parameters of the walk. Tolerance 3%: with 100000 steps the sampling
// error of c is about 0.002 and moves S by at most about 1%.
func TestSinuosityCRWEstimate(t *testing.T) {
	for i, c := range crwCases() {
		t.Run(c.name, func(t *testing.T) {
			r := rand.New(rand.NewPCG(uint64(i+1), 42))
			xs, ys := crw(100000, func() float64 { return c.step(r) }, func() float64 { return c.turn(r) })
			want := SinuosityFromParams(c.p, c.c, c.b)
			got := Sinuosity(xs, ys)
			t.Logf("S from path %.5f, from known parameters %.5f mm^-1/2 (%.2f%%)", got, want, 100*(got/want-1))
			if math.Abs(got/want-1) > 0.03 {
				t.Errorf("Sinuosity = %.5f, formula at known parameters = %.5f", got, want)
			}
		})
	}
}

// TestSinuosityCRWDisplacement checks the formula itself against what it
// summarises: for a correlated random walk the expected squared net
// displacement after n steps is (Kareiva & Shigesada 1983, eq. 2, for
// turning angles symmetric about 0)
//
//	E[R_n^2] = n E[l^2] + 2 E[l]^2 c/(1-c) (n - (1-c^n)/(1-c))
//
// and Benhamou (2004) defines S so that E[R_n^2] / L -> 4/S^2 for path
// length L = n p as n grows. The test simulates 8000 walks of 1000 steps,
// checks the mean of R^2 against the exact expression (within 4 standard
// errors of the simulated mean), and S = 2 / sqrt(mean R^2 / L) against
// the formula (within 3%: the 1.1% standard error of mean R^2 halves to
// 0.6% in S, plus the finite-n term, < 0.5% here).
func TestSinuosityCRWDisplacement(t *testing.T) {
	const walks, n = 8000, 1000
	for i, c := range crwCases() {
		t.Run(c.name, func(t *testing.T) {
			r := rand.New(rand.NewPCG(uint64(i+100), 7))
			var sum, sum2 float64
			for k := 0; k < walks; k++ {
				xs, ys := crw(n, func() float64 { return c.step(r) }, func() float64 { return c.turn(r) })
				r2 := xs[n]*xs[n] + ys[n]*ys[n]
				sum += r2
				sum2 += r2 * r2
			}
			mean := sum / walks
			se := math.Sqrt((sum2/walks - mean*mean) / walks)
			el2 := c.p * c.p * (1 + c.b*c.b)
			fn := float64(n)
			ks := fn*el2 + 2*c.p*c.p*c.c/(1-c.c)*(fn-(1-math.Pow(c.c, fn))/(1-c.c))
			if math.Abs(mean-ks) > 4*se {
				t.Errorf("mean R^2 = %.0f +- %.0f, Kareiva & Shigesada = %.0f", mean, se, ks)
			}
			sSim := 2 / math.Sqrt(mean/(fn*c.p))
			sFormula := SinuosityFromParams(c.p, c.c, c.b)
			t.Logf("mean R^2 %.0f (se %.0f) vs exact %.0f; S from displacement %.5f vs formula %.5f (%.2f%%)",
				mean, se, ks, sSim, sFormula, 100*(sSim/sFormula-1))
			if math.Abs(sSim/sFormula-1) > 0.03 {
				t.Errorf("S from displacement %.5f, formula %.5f", sSim, sFormula)
			}
		})
	}
}

func TestSinuosityDegenerate(t *testing.T) {
	if s := Sinuosity([]float64{0, 1, 2, 3}, []float64{0, 0, 0, 0}); s != 0 {
		t.Errorf("straight path: S = %g, want 0", s)
	}
	if s := Sinuosity([]float64{0, 1}, []float64{0, 0}); !math.IsNaN(s) {
		t.Errorf("one step: S = %g, want NaN", s)
	}
	if s := Sinuosity([]float64{0, 0, 0}, []float64{0, 0, 0}); !math.IsNaN(s) {
		t.Errorf("no movement: S = %g, want NaN", s)
	}
}
