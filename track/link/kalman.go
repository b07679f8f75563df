package link

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// NoiseModel selects how the unknown acceleration of a target enters the
// constant-velocity model as process noise.
type NoiseModel int

const (
	// DiscreteWNA is the discrete white-noise acceleration model (also
	// called piecewise-constant acceleration): the acceleration is constant
	// during one sampling interval T and independent between intervals,
	// with standard deviation sigma_a (px/s^2). Per axis
	//
	//	Q = sigma_a^2 [T^4/4  T^3/2]
	//	              [T^3/2  T^2  ]
	//
	// (Bar-Shalom, Li & Kirubarajan 2001, Sec. 6.3.3). Kalata's (1984)
	// alpha-beta relations hold for this model. It is the default.
	DiscreteWNA NoiseModel = iota

	// ContinuousWNA is the continuous white-noise acceleration model: the
	// acceleration is white noise in continuous time with power spectral
	// density q (px^2/s^3). Per axis
	//
	//	Q = q [T^3/3  T^2/2]
	//	      [T^2/2  T    ]
	//
	// (Bar-Shalom, Li & Kirubarajan 2001, Sec. 6.2.2).
	ContinuousWNA
)

// KalmanConfig holds the noise parameters of a constant-velocity Kalman
// filter in two image dimensions.
type KalmanConfig struct {
	// Model selects the process noise model; the zero value is DiscreteWNA.
	Model NoiseModel

	// AccelSigmaPXPerS2 is sigma_a, the standard deviation of the
	// acceleration held constant over one frame, px/s^2 (DiscreteWNA only).
	// Must be > 0 for DiscreteWNA.
	AccelSigmaPXPerS2 float64

	// AccelPSDPX2PerS3 is q, the power spectral density of continuous
	// white-noise acceleration, px^2/s^3 (ContinuousWNA only). Must be > 0
	// for ContinuousWNA.
	AccelPSDPX2PerS3 float64

	// MeasSigmaPX is sigma_v, the standard deviation of one measured
	// position coordinate, px. Must be > 0. R = sigma_v^2 I.
	MeasSigmaPX float64

	// InitVelSigmaPXPerS is the standard deviation of each velocity
	// component when a filter is started from one detection with velocity
	// 0, px/s. Must be >= 0.
	InitVelSigmaPXPerS float64
}

// Q returns the 4x4 process noise covariance for a step of dtS seconds in
// the state order [x y vx vy] (see NoiseModel for the per-axis blocks).
func (c KalmanConfig) Q(dtS float64) *mat.SymDense {
	var a, b, d float64 // per axis: [a b; b d]
	switch c.Model {
	case DiscreteWNA:
		s2 := c.AccelSigmaPXPerS2 * c.AccelSigmaPXPerS2
		a = s2 * dtS * dtS * dtS * dtS / 4
		b = s2 * dtS * dtS * dtS / 2
		d = s2 * dtS * dtS
	case ContinuousWNA:
		q := c.AccelPSDPX2PerS3
		a = q * dtS * dtS * dtS / 3
		b = q * dtS * dtS / 2
		d = q * dtS
	default:
		panic("link: unknown noise model")
	}
	return mat.NewSymDense(4, []float64{
		a, 0, b, 0,
		0, a, 0, b,
		b, 0, d, 0,
		0, b, 0, d,
	})
}

func (c KalmanConfig) validate() {
	switch {
	case c.Model == DiscreteWNA && !(c.AccelSigmaPXPerS2 > 0):
		panic("link: AccelSigmaPXPerS2 must be > 0")
	case c.Model == ContinuousWNA && !(c.AccelPSDPX2PerS3 > 0):
		panic("link: AccelPSDPX2PerS3 must be > 0")
	case c.Model != DiscreteWNA && c.Model != ContinuousWNA:
		panic("link: unknown noise model")
	case !(c.MeasSigmaPX > 0):
		panic("link: MeasSigmaPX must be > 0")
	case !(c.InitVelSigmaPXPerS >= 0):
		panic("link: InitVelSigmaPXPerS must be >= 0")
	}
}

// Kalman is a constant-velocity Kalman filter for one target in the image
// plane. The state is x = [x y vx vy]' in px and px/s, its covariance P;
// positions are measured, z = H x + v with H = [I 0] and R = sigma_v^2 I.
//
// The filter alternates Predict (time update) and Update (measurement
// update); Mahalanobis2 and LogDetS describe a candidate detection relative
// to the current prediction without changing the filter.
type Kalman struct {
	cfg KalmanConfig
	x   *mat.VecDense // state, [x y vx vy]
	p   *mat.SymDense // state covariance
	r   *mat.SymDense // measurement noise, 2x2
	h   *mat.Dense    // measurement matrix, 2x4
}

// NewKalman returns a filter started at the detection (xPX, yPX) with
// velocity 0 and covariance P0 = diag(sigma_v^2, sigma_v^2, s0^2, s0^2),
// where s0 is cfg.InitVelSigmaPXPerS. It panics if cfg is invalid.
func NewKalman(cfg KalmanConfig, xPX, yPX float64) *Kalman {
	cfg.validate()
	r2 := cfg.MeasSigmaPX * cfg.MeasSigmaPX
	v2 := cfg.InitVelSigmaPXPerS * cfg.InitVelSigmaPXPerS
	return &Kalman{
		cfg: cfg,
		x:   mat.NewVecDense(4, []float64{xPX, yPX, 0, 0}),
		p:   mat.NewSymDense(4, []float64{r2, 0, 0, 0, 0, r2, 0, 0, 0, 0, v2, 0, 0, 0, 0, v2}),
		r:   mat.NewSymDense(2, []float64{r2, 0, 0, r2}),
		h:   mat.NewDense(2, 4, []float64{1, 0, 0, 0, 0, 1, 0, 0}),
	}
}

// State returns the current state estimate: position (px) and velocity
// (px/s).
func (k *Kalman) State() (xPX, yPX, vxPXPerS, vyPXPerS float64) {
	return k.x.AtVec(0), k.x.AtVec(1), k.x.AtVec(2), k.x.AtVec(3)
}

// Cov returns a copy of the 4x4 state covariance P.
func (k *Kalman) Cov() *mat.SymDense {
	return mat.NewSymDense(4, append([]float64(nil), k.p.RawSymmetric().Data...))
}

// Predict advances the filter by dtS seconds (dtS > 0):
//
//	x = F x
//	P = F P F' + Q
//
// with F = [I dtS*I; 0 I] and Q from the configured noise model.
func (k *Kalman) Predict(dtS float64) { k.PredictDamped(dtS, 1) }

// PredictDamped is Predict with the velocity multiplied by velFactor in
// [0, 1] after the step, i.e. with transition D F where
// D = diag(1, 1, velFactor, velFactor):
//
//	x = D F x
//	P = (D F) P (D F)' + Q
//
// The linker uses it while a track coasts without detections, so that the
// prediction of an unseen target comes to rest instead of drifting away.
func (k *Kalman) PredictDamped(dtS, velFactor float64) {
	if !(dtS > 0) {
		panic("link: Predict time step must be > 0")
	}
	if !(velFactor >= 0 && velFactor <= 1) {
		panic("link: velocity factor out of [0, 1]")
	}
	f := velFactor
	F := mat.NewDense(4, 4, []float64{
		1, 0, dtS, 0,
		0, 1, 0, dtS,
		0, 0, f, 0,
		0, 0, 0, f,
	})
	// x = F x
	var x mat.VecDense
	x.MulVec(F, k.x)
	k.x = &x
	// P = F P F' + Q
	var fp, fpf mat.Dense
	fp.Mul(F, k.p)
	fpf.Mul(&fp, F.T())
	fpf.Add(&fpf, k.cfg.Q(dtS))
	k.p = symmetrize(&fpf)
}

// Hold replaces the state by a target at rest at (xPX, yPX): the velocity
// becomes 0 and the covariance block-diagonal,
//
//	x = [xPX yPX 0 0]'
//	P = [posCov   0              ]
//	    [0        velSigma^2 I   ]
//
// with posCov a 2x2 position covariance in px^2 and velSigmaPXPerS >= 0.
// The linker uses it in place of Predict while a still track (a landed
// bee) coasts: an unseen bee at rest has not moved much, so its position
// uncertainty should not grow with the flight model's process noise. The
// zero position-velocity covariance means the next Update moves the
// position only; the velocity is learnt from the detections after it.
func (k *Kalman) Hold(xPX, yPX float64, posCov mat.Symmetric, velSigmaPXPerS float64) {
	if posCov.SymmetricDim() != 2 {
		panic("link: Hold needs a 2x2 position covariance")
	}
	if !(velSigmaPXPerS >= 0) {
		panic("link: Hold velocity sigma must be >= 0")
	}
	v2 := velSigmaPXPerS * velSigmaPXPerS
	k.x = mat.NewVecDense(4, []float64{xPX, yPX, 0, 0})
	k.p = mat.NewSymDense(4, []float64{
		posCov.At(0, 0), posCov.At(0, 1), 0, 0,
		posCov.At(1, 0), posCov.At(1, 1), 0, 0,
		0, 0, v2, 0,
		0, 0, 0, v2,
	})
}

// setState replaces the state estimate, keeping P.
func (k *Kalman) setState(xPX, yPX, vxPXPerS, vyPXPerS float64) {
	k.x = mat.NewVecDense(4, []float64{xPX, yPX, vxPXPerS, vyPXPerS})
}

// PosCov returns the 2x2 position block of P, px^2.
func (k *Kalman) PosCov() *mat.SymDense {
	return mat.NewSymDense(2, []float64{k.p.At(0, 0), k.p.At(0, 1), k.p.At(1, 0), k.p.At(1, 1)})
}

// clone returns an independent copy of k.
func (k *Kalman) clone() *Kalman {
	c := *k
	c.x = mat.VecDenseCopyOf(k.x)
	c.p = mat.NewSymDense(4, nil)
	c.p.CopySym(k.p)
	return &c
}

// innovation returns nu = z - H x and S = H P H' + R.
func (k *Kalman) innovation(zx, zy float64) (*mat.VecDense, *mat.SymDense) {
	nu := mat.NewVecDense(2, []float64{zx - k.x.AtVec(0), zy - k.x.AtVec(1)})
	// S = H P H' + R; with H = [I 0] this is the position block of P plus R.
	s := mat.NewSymDense(2, []float64{
		k.p.At(0, 0) + k.r.At(0, 0), k.p.At(0, 1),
		k.p.At(1, 0), k.p.At(1, 1) + k.r.At(1, 1),
	})
	return nu, s
}

// S returns the innovation covariance S = H P H' + R (2x2, px^2) of the
// current prediction.
func (k *Kalman) S() *mat.SymDense {
	_, s := k.innovation(0, 0)
	return s
}

// Mahalanobis2 returns the squared Mahalanobis distance of the measurement
// (zx, zy) from the current prediction,
//
//	d^2 = nu' S^-1 nu,  nu = z - H x,  S = H P H' + R.
//
// For a correct filter, d^2 of the target's own detection is chi-square
// distributed with 2 degrees of freedom.
func (k *Kalman) Mahalanobis2(zx, zy float64) float64 {
	nu, s := k.innovation(zx, zy)
	var ch mat.Cholesky
	if !ch.Factorize(s) {
		panic("link: innovation covariance not positive definite")
	}
	var w mat.VecDense
	if err := ch.SolveVecTo(&w, nu); err != nil {
		panic("link: " + err.Error())
	}
	return mat.Dot(nu, &w)
}

// LogDetS returns ln det S of the current prediction (S in px^2).
func (k *Kalman) LogDetS() float64 {
	var ch mat.Cholesky
	if !ch.Factorize(k.S()) {
		panic("link: innovation covariance not positive definite")
	}
	return ch.LogDet()
}

// Gain returns the Kalman gain K = P H' S^-1 (4x2) that Update would use
// now, i.e. for the current predicted covariance.
func (k *Kalman) Gain() *mat.Dense {
	_, s := k.innovation(0, 0)
	var sInv mat.Dense
	if err := sInv.Inverse(s); err != nil {
		panic("link: innovation covariance singular")
	}
	var pht, g mat.Dense
	pht.Mul(k.p, k.h.T()) // P H'
	g.Mul(&pht, &sInv)    // K = P H' S^-1
	return &g
}

// Update incorporates the measured position (zx, zy) in px:
//
//	nu = z - H x
//	S  = H P H' + R
//	K  = P H' S^-1
//	x  = x + K nu
//	P  = (I - K H) P (I - K H)' + K R K'
//
// The covariance uses the Joseph form: it is a sum of two symmetric
// positive semi-definite terms, so P stays symmetric and positive
// semi-definite under rounding, whereas the short form P = (I - K H) P
// subtracts nearly equal numbers and can lose both properties after many
// steps with a small R (Bucy & Joseph 1968; Bar-Shalom et al. 2001,
// Sec. 5.2.3). It is also correct for a gain that is not exactly optimal.
func (k *Kalman) Update(zx, zy float64) {
	nu, _ := k.innovation(zx, zy)
	K := k.Gain()
	// x = x + K nu
	var dx mat.VecDense
	dx.MulVec(K, nu)
	k.x.AddVec(k.x, &dx)
	// I - K H
	var ikh mat.Dense
	ikh.Mul(K, k.h)
	ikh.Scale(-1, &ikh)
	for i := 0; i < 4; i++ {
		ikh.Set(i, i, ikh.At(i, i)+1)
	}
	// P = (I - K H) P (I - K H)' + K R K'
	var a, b, krk, kr mat.Dense
	a.Mul(&ikh, k.p)
	b.Mul(&a, ikh.T())
	kr.Mul(K, k.r)
	krk.Mul(&kr, K.T())
	b.Add(&b, &krk)
	k.p = symmetrize(&b)
}

// symmetrize returns (A + A')/2 as a SymDense; it removes the rounding
// asymmetry of a product like F P F'.
func symmetrize(a *mat.Dense) *mat.SymDense {
	n, _ := a.Dims()
	s := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			s.SetSym(i, j, (a.At(i, j)+a.At(j, i))/2)
		}
	}
	return s
}

// gateRadiusPX returns the radius of the circle that contains the gate
// ellipse {z : d^2(z) <= g}: sqrt(g * lambda_max(S)).
func gateRadiusPX(s *mat.SymDense, g float64) float64 {
	a, b, d := s.At(0, 0), s.At(0, 1), s.At(1, 1)
	// Largest eigenvalue of [a b; b d].
	l := (a+d)/2 + math.Sqrt((a-d)*(a-d)/4+b*b)
	return math.Sqrt(g * l)
}
