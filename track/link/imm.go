package link

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Motion models of the interacting multiple model filter (imm).
const (
	modelFly   = iota // constant velocity, the flight model (Kalman)
	modelHover        // zero velocity: a hovering or landed bee
	numModels
)

// imm is an interacting multiple model (IMM) filter with two models of a
// bee's motion (Blom & Bar-Shalom 1988; Bar-Shalom, Li & Kirubarajan 2001,
// Sec. 11.6):
//
//   - fly: the constant-velocity model of Kalman (KalmanConfig noise);
//   - hover: the bee stays where it is: x_k+1 = x_k + w, velocity 0, with
//     F_h = [I 0; 0 0] and Q_h = diag(sh^2, sh^2, svh^2, svh^2), sh =
//     HoverSigmaPX per frame and svh = StillSpeedPXPerS.
//
// The model in force switches between frames as a Markov chain with
// p_ij = P(model j at k+1 | model i at k); for i != j the caller
// (Linker.predict) passes p_ij = min(0.5, dt/ModeSwitchS), dt the frame
// interval in s, and p_ii = 1 - p_ij. One cycle is
//
//	mixing:   c_j = sum_i p_ij mu_i,  mu_i|j = p_ij mu_i / c_j
//	          x0_j = sum_i mu_i|j x_i
//	          P0_j = sum_i mu_i|j (P_i + (x_i - x0_j)(x_i - x0_j)')
//	          where, for j = fly, the hover state enters with its velocity
//	          replaced by the take-off prior N(0, TakeoffSpeedPXPerS^2 I):
//	          the hover model has no velocity (Granstrom et al. 2015)
//	predict:  each model from (x0_j, P0_j) with its own F_j, Q_j
//	update:   each model with z; Lambda_j = N(z; H x_j, S_j)
//	          mu_j = c_j Lambda_j / sum_i c_i Lambda_i
//	combine:  x = sum_j mu_j x_j,  P = sum_j mu_j (P_j + (x_j - x)(x_j - x)')
//
// Association uses the mixture likelihood sum_j c_j Lambda_j (see cost).
// The point of the second model: a hovering bee's next position is known
// to a few px, while a bee that takes off beside it accelerates out of any
// single constant-velocity prediction; with the hover model the hovering
// track claims the detection that stayed and leaves the departing one to
// the track it came from.
type imm struct {
	f  [numModels]*Kalman
	mu [numModels]float64 // model probabilities after the latest update
	c  [numModels]float64 // predicted model probabilities c_j
}

// newIMM starts an IMM from filter k (copied into both models) with model
// probabilities mu.
func newIMM(k *Kalman, mu [numModels]float64) *imm {
	m := &imm{mu: mu, c: mu}
	for j := range m.f {
		m.f[j] = k.clone()
	}
	return m
}

func (m *imm) clone() *imm {
	c := *m
	for j := range c.f {
		c.f[j] = m.f[j].clone()
	}
	return &c
}

// predict runs the mixing and the model-conditioned predictions for a
// step of dtS seconds; pSwitch is p_ij for i != j (in [0, 1]),
// hoverSigmaPX (px per frame) and hoverVelSigmaPXPerS (px/s) the hover
// model's position and velocity noise, and takeoffSigmaPXPerS (px/s) the
// take-off velocity prior (see imm).
func (m *imm) predict(dtS, pSwitch, hoverSigmaPX, hoverVelSigmaPXPerS, takeoffSigmaPXPerS float64) {
	var p [numModels][numModels]float64
	for i := range p {
		for j := range p[i] {
			if i == j {
				p[i][j] = 1 - pSwitch
			} else {
				p[i][j] = pSwitch
			}
		}
	}
	var x0 [numModels]*mat.VecDense
	var p0 [numModels]*mat.SymDense
	for j := range m.f {
		c := 0.0
		for i := range m.f {
			c += p[i][j] * m.mu[i]
		}
		m.c[j] = c
		var w [numModels]float64
		for i := range m.f {
			w[i] = p[i][j] * m.mu[i] / c
		}
		if j == modelFly {
			// Hover -> fly: the hover model knows no velocity; a bee
			// taking off has velocity N(0, takeoffSigmaPXPerS^2 I).
			hx := m.f[modelHover].x
			hp := m.f[modelHover].p
			t2 := takeoffSigmaPXPerS * takeoffSigmaPXPerS
			aug := &Kalman{x: mat.NewVecDense(4, []float64{hx.AtVec(0), hx.AtVec(1), 0, 0}),
				p: mat.NewSymDense(4, []float64{
					hp.At(0, 0), hp.At(0, 1), 0, 0,
					hp.At(1, 0), hp.At(1, 1), 0, 0,
					0, 0, t2, 0,
					0, 0, 0, t2,
				})}
			x0[j], p0[j] = mixture([]*Kalman{m.f[modelFly], aug}, w[:])
			continue
		}
		x0[j], p0[j] = mixture(m.f[:], w[:])
	}
	for j, k := range m.f {
		k.x, k.p = x0[j], p0[j]
	}
	m.f[modelFly].Predict(dtS)
	h := m.f[modelHover]
	s2, v2 := hoverSigmaPX*hoverSigmaPX, hoverVelSigmaPXPerS*hoverVelSigmaPXPerS
	// x = F_h x, P = F_h P F_h' + Q_h: the position block is kept, the
	// velocity is forgotten.
	h.x = mat.NewVecDense(4, []float64{h.x.AtVec(0), h.x.AtVec(1), 0, 0})
	h.p = mat.NewSymDense(4, []float64{
		h.p.At(0, 0) + s2, h.p.At(0, 1), 0, 0,
		h.p.At(1, 0), h.p.At(1, 1) + s2, 0, 0,
		0, 0, v2, 0,
		0, 0, 0, v2,
	})
}

// cost returns -2 ln sum_j c_j Lambda_j(z) up to the constant 2 ln 2 pi,
// with -2 ln Lambda_j = d_j^2 + ln det S_j: the single-model cost
// d^2 + ln det S of assocCost, generalised to the mixture; and the
// smallest d_j^2 over the models.
func (m *imm) cost(zx, zy float64) (cost, minD2 float64) {
	var e [numModels]float64
	best := math.Inf(1)
	minD2 = math.Inf(1)
	for j, k := range m.f {
		d2 := k.Mahalanobis2(zx, zy)
		minD2 = math.Min(minD2, d2)
		e[j] = d2 + k.LogDetS() - 2*math.Log(m.c[j])
		best = math.Min(best, e[j])
	}
	// -2 ln sum_j exp(-e_j/2), evaluated around the smallest e_j.
	sum := 0.0
	for _, v := range e {
		sum += math.Exp(-(v - best) / 2)
	}
	return best - 2*math.Log(sum), minD2
}

// update incorporates the detection (zx, zy) in every model and updates
// the model probabilities.
func (m *imm) update(zx, zy float64) {
	var e [numModels]float64
	best := math.Inf(1)
	for j, k := range m.f {
		e[j] = k.Mahalanobis2(zx, zy) + k.LogDetS() - 2*math.Log(m.c[j])
		best = math.Min(best, e[j])
	}
	sum := 0.0
	for j, v := range e {
		m.mu[j] = math.Exp(-(v - best) / 2)
		sum += m.mu[j]
	}
	// Keep both models alive: a probability that underflows to 0 could
	// never recover through mixing.
	total := 0.0
	for j := range m.mu {
		m.mu[j] = math.Max(m.mu[j]/sum, 1e-9)
		total += m.mu[j]
	}
	for j := range m.mu {
		m.mu[j] /= total
	}
	for _, k := range m.f {
		k.Update(zx, zy)
	}
}

// combined writes the moment-matched combination of the models, weighted
// by w (mu after an update, c after a prediction), into k.
func (m *imm) combined(k *Kalman, w [numModels]float64) {
	k.x, k.p = mixture(m.f[:], w[:])
}

// mixture returns the mean and covariance of the Gaussian mixture of the
// filters' states with weights w (summing to 1):
//
//	x = sum_i w_i x_i,  P = sum_i w_i (P_i + (x_i - x)(x_i - x)').
func mixture(fs []*Kalman, w []float64) (*mat.VecDense, *mat.SymDense) {
	x := mat.NewVecDense(4, nil)
	for i, k := range fs {
		x.AddScaledVec(x, w[i], k.x)
	}
	p := mat.NewSymDense(4, nil)
	var d mat.VecDense
	for i, k := range fs {
		d.SubVec(k.x, x)
		for r := 0; r < 4; r++ {
			for c := r; c < 4; c++ {
				p.SetSym(r, c, p.At(r, c)+w[i]*(k.p.At(r, c)+d.AtVec(r)*d.AtVec(c)))
			}
		}
	}
	return x, p
}
