package link

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestIMMModelProbabilities: fed a target at rest (jitter of the
// measurement noise only), the IMM filter settles on the hover model; fed
// a target at constant velocity, on the fly model (Blom & Bar-Shalom 1988:
// the model probabilities follow the likelihood of the model in force).
func TestIMMModelProbabilities(t *testing.T) {
	s := DefaultSettings(30, 20)
	cases := []struct {
		name      string
		vxPXPerS  float64
		wantModel int
	}{
		{"at rest", 0, modelHover},
		{"walking 1 BL/s", 20, modelHover},
		{"flying 10 BL/s", 200, modelFly},
		{"flying 40 BL/s", 800, modelFly},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(4, 4))
			m := newIMM(NewKalman(s.kalmanConfig(), 100, 100), [numModels]float64{0.5, 0.5})
			for f := 1; f <= 60; f++ {
				m.predict(1/s.FPS, 1/(s.FPS*s.ModeSwitchS), s.HoverSigmaPX, s.StillSpeedPXPerS, s.TakeoffSpeedPXPerS)
				x := 100 + tc.vxPXPerS*float64(f)/s.FPS
				m.update(x+0.5*rng.NormFloat64(), 100+0.5*rng.NormFloat64())
			}
			if m.mu[tc.wantModel] < 0.8 {
				t.Errorf("model probabilities %v, want model %d >= 0.8", m.mu, tc.wantModel)
			}
			if sum := m.mu[0] + m.mu[1]; math.Abs(sum-1) > 1e-9 {
				t.Errorf("model probabilities sum to %v", sum)
			}
		})
	}
}

// TestMixtureOfEqualFilters: the moment-matched mixture of identical
// Gaussians is that Gaussian; of two means it adds the spread of the means
// (x = sum w_i x_i, P = sum w_i (P_i + (x_i - x)(x_i - x)')).
func TestMixtureOfEqualFilters(t *testing.T) {
	cfg := DefaultSettings(30, 20).kalmanConfig()
	a := NewKalman(cfg, 10, 20)
	a.Predict(1.0 / 30)
	x, p := mixture([]*Kalman{a, a.clone()}, []float64{0.3, 0.7})
	for i := 0; i < 4; i++ {
		if math.Abs(x.AtVec(i)-a.x.AtVec(i)) > 1e-9 {
			t.Errorf("x[%d] = %v, want %v", i, x.AtVec(i), a.x.AtVec(i))
		}
		for j := 0; j < 4; j++ {
			if math.Abs(p.At(i, j)-a.p.At(i, j)) > 1e-9*math.Max(1, math.Abs(a.p.At(i, j))) {
				t.Errorf("P[%d][%d] = %v, want %v", i, j, p.At(i, j), a.p.At(i, j))
			}
		}
	}
	b := a.clone()
	b.x.SetVec(0, a.x.AtVec(0)+10) // 10 px to the right
	x, p = mixture([]*Kalman{a, b}, []float64{0.5, 0.5})
	// Mean halfway; variance of x grows by 0.5*5^2 + 0.5*5^2 = 25.
	if math.Abs(x.AtVec(0)-(a.x.AtVec(0)+5)) > 1e-9 || math.Abs(p.At(0, 0)-(a.p.At(0, 0)+25)) > 1e-9 {
		t.Errorf("mixture x %v P00 %v, want %v and %v", x.AtVec(0), p.At(0, 0), a.x.AtVec(0)+5, a.p.At(0, 0)+25)
	}
}
