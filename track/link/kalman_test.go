package link

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// kalata returns the steady-state alpha and beta of the alpha-beta filter
// for tracking index lambda = sigma_w T^2 / sigma_v under the discrete
// white-noise (piecewise-constant) acceleration model, Kalata (1984):
//
//	r     = (4 + lambda - sqrt(8 lambda + lambda^2)) / 4
//	alpha = 1 - r^2
//	beta  = 2 (1 - r)^2
//
// which solves Kalata's relations beta^2 / (1 - alpha) = lambda^2 and
// beta = 2 (2 - alpha) - 4 sqrt(1 - alpha) (closed form as given in
// Bar-Shalom, Li & Kirubarajan 2001, Sec. 6.5.3; from memory).
func kalata(lambda float64) (alpha, beta float64) {
	r := (4 + lambda - math.Sqrt(8*lambda+lambda*lambda)) / 4
	return 1 - r*r, 2 * (1 - r) * (1 - r)
}

// TestKalataSteadyState runs the DiscreteWNA filter to its steady state
// and compares its gain K = [alpha, 0, beta/T, 0]' (x measurement) with
// Kalata's alpha-beta relations for the same tracking index. The test is
// for the discrete (piecewise-constant) acceleration model, for which
// Kalata's relations are exact; the continuous model gives other gains
// (checked to differ below).
func TestKalataSteadyState(t *testing.T) {
	cases := []struct {
		name                string
		sigmaA, sigmaV, dtS float64
	}{
		{"lambda 0.1 at 30 fps", 90, 1, 1.0 / 30}, // 90 (1/30)^2 / 1 = 0.1
		{"lambda 0.04 at 25 fps", 50, 2, 1.0 / 25},
		{"lambda 4.17 at 30 fps", 6000, 1.6, 1.0 / 30},
		{"lambda 1", 1, 1, 1},
		{"lambda 10", 10, 1, 1},
		{"lambda 0.001", 0.001, 1, 1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			cfg := KalmanConfig{AccelSigmaPXPerS2: tc.sigmaA, MeasSigmaPX: tc.sigmaV, InitVelSigmaPXPerS: 100}
			k := NewKalman(cfg, 0, 0)
			var K *mat.Dense
			for i := 0; i < 3000; i++ {
				k.Predict(tc.dtS)
				K = k.Gain()
				k.Update(0, 0)
			}
			lambda := tc.sigmaA * tc.dtS * tc.dtS / tc.sigmaV
			wantA, wantB := kalata(lambda)
			gotA, gotB := K.At(0, 0), K.At(2, 0)*tc.dtS
			if math.Abs(gotA-wantA) > 1e-6 || math.Abs(gotB-wantB) > 1e-6 {
				t.Errorf("lambda %.4g: alpha %.8f beta %.8f, Kalata %.8f %.8f", lambda, gotA, gotB, wantA, wantB)
			}
			t.Logf("lambda %.4g: alpha %.6f beta %.6f (Kalata %.6f %.6f)", lambda, gotA, gotB, wantA, wantB)
			// Kalata's defining relation beta^2/(1-alpha) = lambda^2.
			if rel := gotB * gotB / (1 - gotA); math.Abs(math.Sqrt(rel)-lambda) > 1e-5*(1+lambda) {
				t.Errorf("beta^2/(1-alpha) = %v, want lambda^2 = %v", rel, lambda*lambda)
			}
			// The axes are independent: no cross gain.
			if math.Abs(K.At(1, 0)) > 1e-12 || math.Abs(K.At(3, 0)) > 1e-12 {
				t.Errorf("cross-axis gain %v %v", K.At(1, 0), K.At(3, 0))
			}
		})
	}

	// The continuous model with the same velocity variance per step
	// (q = sigma_a^2 T) does not reproduce Kalata's gains.
	sigmaA, sigmaV, dt := 10.0, 1.0, 1.0
	k := NewKalman(KalmanConfig{Model: ContinuousWNA, AccelPSDPX2PerS3: sigmaA * sigmaA * dt, MeasSigmaPX: sigmaV, InitVelSigmaPXPerS: 100}, 0, 0)
	var K *mat.Dense
	for i := 0; i < 2000; i++ {
		k.Predict(dt)
		K = k.Gain()
		k.Update(0, 0)
	}
	a, _ := kalata(sigmaA * dt * dt / sigmaV)
	if math.Abs(K.At(0, 0)-a) < 1e-3 {
		t.Errorf("continuous model alpha %v equals Kalata's discrete-model alpha %v", K.At(0, 0), a)
	}
}

// TestQContinuous checks the ContinuousWNA Q against its definition
// Q = int_0^T F(t) G q G' F(t)' dt, F(t) = [1 t; 0 1], G = [0 1]'
// (Bar-Shalom et al. 2001, Sec. 6.2.2), by Simpson quadrature, and the
// DiscreteWNA Q against sigma_a^2 Gamma Gamma', Gamma = [T^2/2 T]'.
func TestQContinuous(t *testing.T) {
	const q, T = 7.0, 0.3
	n := 200 // Simpson intervals
	var a, b, d float64
	for i := 0; i <= n; i++ {
		s := T * float64(i) / float64(n)
		w := 2.0
		switch {
		case i == 0 || i == n:
			w = 1
		case i%2 == 1:
			w = 4
		}
		// F(s) G = [s 1]'; integrand q [s^2 s; s 1].
		a += w * q * s * s
		b += w * q * s
		d += w * q
	}
	h := T / float64(n) / 3
	a, b, d = a*h, b*h, d*h
	Q := KalmanConfig{Model: ContinuousWNA, AccelPSDPX2PerS3: q}.Q(T)
	for _, c := range []struct {
		i, j int
		want float64
	}{{0, 0, a}, {1, 1, a}, {0, 2, b}, {1, 3, b}, {2, 2, d}, {3, 3, d}, {0, 1, 0}, {0, 3, 0}, {2, 3, 0}} {
		if got := Q.At(c.i, c.j); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("continuous Q[%d][%d] = %v, quadrature %v", c.i, c.j, got, c.want)
		}
	}
	const sa = 3.0
	Qd := KalmanConfig{Model: DiscreteWNA, AccelSigmaPXPerS2: sa}.Q(T)
	g := []float64{T * T / 2, T}
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			want := sa * sa * g[i] * g[j]
			if got := Qd.At(2*i, 2*j); math.Abs(got-want) > 1e-15 {
				t.Errorf("discrete Q[%d][%d] = %v, want %v", 2*i, 2*j, got, want)
			}
		}
	}
}

// TestJosephMatchesShortForm: with the optimal gain the Joseph-form
// update equals the short form P = (I - K H) P (two implementations agree),
// and P stays symmetric positive definite over many steps.
func TestJosephMatchesShortForm(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	k := NewKalman(KalmanConfig{AccelSigmaPXPerS2: 500, MeasSigmaPX: 0.5, InitVelSigmaPXPerS: 300}, 10, 20)
	H := mat.NewDense(2, 4, []float64{1, 0, 0, 0, 0, 1, 0, 0})
	for step := 0; step < 500; step++ {
		k.Predict(1.0 / 30)
		K := k.Gain()
		var kh, short mat.Dense
		kh.Mul(K, H)
		ikh := mat.NewDense(4, 4, nil)
		for i := 0; i < 4; i++ {
			ikh.Set(i, i, 1)
		}
		ikh.Sub(ikh, &kh)
		short.Mul(ikh, k.p)
		k.Update(10+rng.NormFloat64(), 20+rng.NormFloat64())
		for i := 0; i < 4; i++ {
			for j := 0; j < 4; j++ {
				if diff := math.Abs(k.p.At(i, j) - short.At(i, j)); diff > 1e-9*(1+math.Abs(short.At(i, j))) {
					t.Fatalf("step %d P[%d][%d]: Joseph %v short %v", step, i, j, k.p.At(i, j), short.At(i, j))
				}
			}
		}
		var ch mat.Cholesky
		if !ch.Factorize(k.p) {
			t.Fatalf("step %d: P not positive definite", step)
		}
	}
}

// TestMahalanobisHandWorked: P position block [3 1; 1 2], R = I, so
// S = [4 1; 1 3], det S = 11, S^-1 = [3 -1; -1 4]/11; for nu = (1, 2),
// d^2 = (3 - 4 + 16)/11 = 15/11 and ln det S = ln 11 (worked by hand).
func TestMahalanobisHandWorked(t *testing.T) {
	k := NewKalman(KalmanConfig{AccelSigmaPXPerS2: 1, MeasSigmaPX: 1}, 5, 7)
	k.p = mat.NewSymDense(4, []float64{3, 1, 0, 0, 1, 2, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1})
	if got, want := k.Mahalanobis2(6, 9), 15.0/11; math.Abs(got-want) > 1e-12 {
		t.Errorf("d^2 = %v, want %v", got, want)
	}
	if got, want := k.LogDetS(), math.Log(11); math.Abs(got-want) > 1e-12 {
		t.Errorf("ln det S = %v, want %v", got, want)
	}
	if got, want := gateRadiusPX(k.S(), 9), 3*math.Sqrt(3.5+math.Sqrt(0.25+1)); math.Abs(got-want) > 1e-12 {
		t.Errorf("gate radius %v, want %v", got, want)
	}
}

// TestNIS: on targets simulated with the filter's own model (discrete
// white-noise acceleration, Gaussian measurement noise), the normalised
// innovation squared d^2 is chi-square with 2 degrees of freedom: its mean
// is 2 and 99 % fall inside GateD2(0.99) (Bar-Shalom et al. 2001,
// Sec. 5.4.2, the NIS consistency test).
func TestNIS(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	const dt, sa, sv = 1.0 / 30, 2000.0, 1.5
	cfg := KalmanConfig{AccelSigmaPXPerS2: sa, MeasSigmaPX: sv, InitVelSigmaPXPerS: 1000}
	gate := GateD2(0.99)
	var sum float64
	n, inside := 0, 0
	for run := 0; run < 20; run++ {
		x, y, vx, vy := 100.0, 100.0, 200*rng.NormFloat64(), 200*rng.NormFloat64()
		k := NewKalman(cfg, x+sv*rng.NormFloat64(), y+sv*rng.NormFloat64())
		for step := 0; step < 400; step++ {
			ax, ay := sa*rng.NormFloat64(), sa*rng.NormFloat64()
			x += vx*dt + ax*dt*dt/2
			y += vy*dt + ay*dt*dt/2
			vx += ax * dt
			vy += ay * dt
			k.Predict(dt)
			zx, zy := x+sv*rng.NormFloat64(), y+sv*rng.NormFloat64()
			d2 := k.Mahalanobis2(zx, zy)
			if step >= 20 {
				sum += d2
				n++
				if d2 <= gate {
					inside++
				}
			}
			k.Update(zx, zy)
		}
	}
	mean, frac := sum/float64(n), float64(inside)/float64(n)
	// n = 7600: standard error of the mean is 2/sqrt(n) = 0.023 and of
	// the fraction sqrt(0.99*0.01/n) = 0.0011.
	if math.Abs(mean-2) > 0.1 || math.Abs(frac-0.99) > 0.005 {
		t.Errorf("NIS mean %.4f (want 2), inside gate %.4f (want 0.99)", mean, frac)
	}
	t.Logf("NIS mean %.4f, inside 0.99 gate %.4f over %d innovations", mean, frac, n)
}

// TestPredictDamped: the velocity factor scales the velocity and the
// position moves by the undamped velocity over the step.
func TestPredictDamped(t *testing.T) {
	k := NewKalman(KalmanConfig{AccelSigmaPXPerS2: 1, MeasSigmaPX: 1}, 0, 0)
	k.x.SetVec(2, 30)
	k.x.SetVec(3, -60)
	k.PredictDamped(0.1, 0.5)
	x, y, vx, vy := k.State()
	for _, c := range []struct{ got, want float64 }{{x, 3}, {y, -6}, {vx, 15}, {vy, -30}} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("state (%v %v %v %v), want (3 -6 15 -30)", x, y, vx, vy)
			break
		}
	}
}

func TestKalmanPanics(t *testing.T) {
	for name, f := range map[string]func(){
		"zero sigma":    func() { NewKalman(KalmanConfig{MeasSigmaPX: 1}, 0, 0) },
		"zero meas":     func() { NewKalman(KalmanConfig{AccelSigmaPXPerS2: 1}, 0, 0) },
		"zero dt":       func() { NewKalman(KalmanConfig{AccelSigmaPXPerS2: 1, MeasSigmaPX: 1}, 0, 0).Predict(0) },
		"bad damping":   func() { NewKalman(KalmanConfig{AccelSigmaPXPerS2: 1, MeasSigmaPX: 1}, 0, 0).PredictDamped(1, 2) },
		"unknown model": func() { NewKalman(KalmanConfig{Model: 7, AccelSigmaPXPerS2: 1, MeasSigmaPX: 1}, 0, 0) },
	} {
		t.Run(name, func(t *testing.T) {
			defer func() {
				if r := recover(); r == nil {
					t.Error("no panic")
				}
			}()
			f()
		})
	}
}
