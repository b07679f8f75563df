package kinematics

import (
	"fmt"
	"math"
	"sort"
)

// maxWindowFrames bounds the smoothing window so that a window in seconds
// at a very high frame rate cannot make Analyze quadratic in track length.
const maxWindowFrames = 1001

// PointError is a bad point of a track given to Analyze.
type PointError struct {
	TrackID int
	Index   int // index into Track.Points
	Frame   int
	Problem string
}

func (e *PointError) Error() string {
	return fmt.Sprintf("track %d, point %d (frame %d): %s", e.TrackID, e.Index, e.Frame, e.Problem)
}

// Analyze computes the kinematics of one track: smoothed positions,
// velocity, speed, acceleration, heading, turning rate and curvature per
// point, the flight state of each point, and the flight bouts with their
// path metrics. See the package documentation for the method.
//
// Points must be sorted by strictly increasing Frame with strictly
// increasing, finite TimeS and finite XMM, YMM; otherwise Analyze returns
// a *PointError naming the point. Bad settings give a *SettingsError.
// An empty track gives an empty Result.
func Analyze(tr Track, s Settings) (Result, error) {
	res := Result{ID: tr.ID}
	s, err := s.withDefaults()
	if err != nil {
		return res, err
	}
	pts := tr.Points
	if err := checkPoints(tr); err != nil {
		return res, err
	}
	n := len(pts)
	if n == 0 {
		return res, nil
	}
	dtS := medianFrameInterval(pts)
	window := s.windowFrames(dtS)
	if window > maxWindowFrames {
		return res, &SettingsError{Field: "SmoothWindowS", Value: s.SmoothWindowS,
			Want: fmt.Sprintf("at most %d frames at this track's %.4g frames/s", maxWindowFrames, 1/dtS)}
	}

	res.Samples = make([]Sample, n)
	for i, p := range pts {
		res.Samples[i] = Sample{Point: p, SmoothXMM: p.XMM, SmoothYMM: p.YMM}
		nanDerivatives(&res.Samples[i])
	}
	// Duration each point stands for: up to the next frame, or the
	// median frame interval at a gap and at the end.
	durS := make([]float64, n)
	for i := range pts {
		if i+1 < n && pts[i+1].Frame == pts[i].Frame+1 {
			durS[i] = pts[i+1].TimeS - pts[i].TimeS
		} else if !math.IsNaN(dtS) {
			durS[i] = dtS
		}
	}

	cache := sgCache{}
	stateSpeed := make([]float64, n)
	for _, seg := range hardSegments(pts) {
		a, b := seg[0], seg[1]
		fill := longUnobserved(pts[a:b], dtS, s.MaxUnobservedS)
		for k := a; k < b; k++ {
			stateSpeed[k] = math.NaN()
		}
		// Smooth and differentiate each run of usable points.
		forRuns(fill, func(ra, rb int, isFill bool) {
			if isFill {
				fillSpeed(pts, a, b, a+ra, a+rb, stateSpeed)
				return
			}
			differentiate(cache, pts[a+ra:a+rb], res.Samples[a+ra:a+rb], window, s)
			for k := a + ra; k < a+rb; k++ {
				stateSpeed[k] = res.Samples[k].SpeedMMPerS
			}
		})
		states := segmentStates(stateSpeed[a:b], durS[a:b], s)
		for k := a; k < b; k++ {
			res.Samples[k].State = states[k-a]
			res.Samples[k].Gap = fill[k-a]
		}
		// Bouts: maximal airborne runs not broken by a long unobserved run.
		airborne := make([]bool, b-a)
		for k := range airborne {
			airborne[k] = states[k] != Landed && !fill[k]
		}
		forRuns(airborne, func(ra, rb int, air bool) {
			if air {
				res.Bouts = append(res.Bouts, makeBout(res.Samples[a+ra:a+rb], durS[a+ra:a+rb], s))
			}
		})
	}
	for i, smp := range res.Samples {
		switch smp.State {
		case Flying:
			res.FlyingS += durS[i]
		case Hovering:
			res.HoveringS += durS[i]
		case Landed:
			res.LandedS += durS[i]
		}
	}
	return res, nil
}

func nanDerivatives(s *Sample) {
	nan := math.NaN()
	s.VXMMPerS, s.VYMMPerS, s.SpeedMMPerS, s.AccelMMPerS2 = nan, nan, nan, nan
	s.HeadingDeg, s.TurnRateDegPerS, s.CurvaturePerMM = nan, nan, nan
}

func checkPoints(tr Track) error {
	for i, p := range tr.Points {
		bad := func(problem string) error {
			return &PointError{TrackID: tr.ID, Index: i, Frame: p.Frame, Problem: problem}
		}
		switch {
		case math.IsNaN(p.XMM) || math.IsInf(p.XMM, 0) || math.IsNaN(p.YMM) || math.IsInf(p.YMM, 0):
			return bad(fmt.Sprintf("position (%g, %g) mm is not a finite number: check the calibration maps this pixel", p.XMM, p.YMM))
		case math.IsNaN(p.TimeS) || math.IsInf(p.TimeS, 0):
			return bad(fmt.Sprintf("time %g s is not a finite number", p.TimeS))
		case p.Frame < 0:
			return bad("negative frame number")
		}
		if i == 0 {
			continue
		}
		q := tr.Points[i-1]
		if p.Frame <= q.Frame {
			return bad(fmt.Sprintf("follows frame %d: points must be sorted by frame, without repeats", q.Frame))
		}
		if p.TimeS <= q.TimeS {
			return bad(fmt.Sprintf("time %g s is not after the previous point's %g s: frame times must increase", p.TimeS, q.TimeS))
		}
	}
	return nil
}

// medianFrameInterval is the median of (t_i - t_{i-1}) / (f_i - f_{i-1})
// in seconds, NaN for a one-point track.
func medianFrameInterval(pts []Point) float64 {
	if len(pts) < 2 {
		return math.NaN()
	}
	d := make([]float64, len(pts)-1)
	for i := 1; i < len(pts); i++ {
		d[i-1] = (pts[i].TimeS - pts[i-1].TimeS) / float64(pts[i].Frame-pts[i-1].Frame)
	}
	sort.Float64s(d)
	return Quantile(0.5, d)
}

// hardSegments splits points at frame jumps > 1 into [a, b) index ranges.
func hardSegments(pts []Point) [][2]int {
	var segs [][2]int
	a := 0
	for i := 1; i <= len(pts); i++ {
		if i == len(pts) || pts[i].Frame != pts[i-1].Frame+1 {
			segs = append(segs, [2]int{a, i})
			a = i
		}
	}
	return segs
}

// longUnobserved marks the points of runs of Observed=false whose
// duration (points x dtS) exceeds maxS.
func longUnobserved(pts []Point, dtS, maxS float64) []bool {
	fill := make([]bool, len(pts))
	obs := make([]bool, len(pts))
	for i, p := range pts {
		obs[i] = p.Observed
	}
	forRuns(obs, func(a, b int, o bool) {
		if !o && float64(b-a)*dtS > maxS {
			for i := a; i < b; i++ {
				fill[i] = true
			}
		}
	})
	return fill
}

// fillSpeed gives the points [ra, rb) of a long unobserved run the mean
// speed across it, from the last point before to the first point after
// the run within the frame-contiguous stretch [a, b), for the state rules
// (a bee hidden inside a flower for a second reads as landed).
func fillSpeed(pts []Point, a, b, ra, rb int, out []float64) {
	i, j := ra, rb-1
	if i > a {
		i--
	}
	if j+1 < b {
		j++
	}
	v := math.NaN()
	if j > i {
		v = math.Hypot(pts[j].XMM-pts[i].XMM, pts[j].YMM-pts[i].YMM) / (pts[j].TimeS - pts[i].TimeS)
	}
	for k := ra; k < rb; k++ {
		out[k] = v
	}
}

// differentiate fills the smoothed positions and derivatives of one
// frame-contiguous run of usable points.
//
// With x1, x2 the first and second derivatives per frame from the
// Savitzky-Golay filter and t1, t2 those of the frame times, the chain
// rule gives
//
//	v = x1/t1,  a = (x2 t1 - x1 t2) / t1^3
//
// which for a constant frame rate is v = x1/dt, a = x2/dt^2 and stays
// right for variable frame rates.
func differentiate(c sgCache, pts []Point, out []Sample, window int, s Settings) {
	n := len(pts)
	x, y, t := make([]float64, n), make([]float64, n), make([]float64, n)
	for i, p := range pts {
		x[i], y[i], t[i] = p.XMM, p.YMM, p.TimeS
	}
	x0, y0, t0 := x[0], y[0], t[0]
	for i := range x { // centre for rounding
		x[i] -= x0
		y[i] -= y0
		t[i] -= t0
	}
	sx, sy := make([]float64, n), make([]float64, n)
	x1, y1, t1 := make([]float64, n), make([]float64, n), make([]float64, n)
	x2, y2, t2 := make([]float64, n), make([]float64, n), make([]float64, n)
	sgFilter(c, x, window, s.PolyOrder, 0, sx)
	sgFilter(c, y, window, s.PolyOrder, 0, sy)
	sgFilter(c, x, window, s.PolyOrder, 1, x1)
	sgFilter(c, y, window, s.PolyOrder, 1, y1)
	sgFilter(c, t, window, s.PolyOrder, 1, t1)
	sgFilter(c, x, window, s.PolyOrder, 2, x2)
	sgFilter(c, y, window, s.PolyOrder, 2, y2)
	sgFilter(c, t, window, s.PolyOrder, 2, t2)
	for i := range out {
		o := &out[i]
		o.SmoothXMM, o.SmoothYMM = sx[i]+x0, sy[i]+y0
		if n < 2 {
			continue
		}
		vx, vy := x1[i]/t1[i], y1[i]/t1[i]
		ax := (x2[i]*t1[i] - x1[i]*t2[i]) / (t1[i] * t1[i] * t1[i])
		ay := (y2[i]*t1[i] - y1[i]*t2[i]) / (t1[i] * t1[i] * t1[i])
		o.VXMMPerS, o.VYMMPerS = vx, vy
		sp := math.Hypot(vx, vy)
		o.SpeedMMPerS = sp
		o.AccelMMPerS2 = math.Hypot(ax, ay) // NaN when the run is too short for a second derivative
		if sp >= s.HeadingMinSpeedMMPerS && sp > 0 {
			o.HeadingDeg = headingDeg(vx, vy)
			cross := vx*ay - vy*ax
			o.TurnRateDegPerS = cross / (sp * sp) * 180 / math.Pi
			o.CurvaturePerMM = math.Abs(cross) / (sp * sp * sp)
		}
	}
}

// headingDeg is atan2(vy, vx) in degrees in (-180, 180].
func headingDeg(vx, vy float64) float64 {
	h := math.Atan2(vy, vx) * 180 / math.Pi
	if h <= -180 {
		h += 360
	}
	return h
}

// makeBout computes the metrics of one flight bout from its samples.
func makeBout(smp []Sample, durS []float64, s Settings) Bout {
	n := len(smp)
	b := Bout{
		StartFrame: smp[0].Frame, EndFrame: smp[n-1].Frame,
		StartS: smp[0].TimeS, EndS: smp[n-1].TimeS,
	}
	xs, ys := make([]float64, n), make([]float64, n)
	speeds := make([]float64, 0, n)
	for i, p := range smp {
		xs[i], ys[i] = p.SmoothXMM, p.SmoothYMM
		if !math.IsNaN(p.SpeedMMPerS) {
			speeds = append(speeds, p.SpeedMMPerS)
		}
		switch p.State {
		case Flying:
			b.FlyingS += durS[i]
		case Hovering:
			b.HoveringS += durS[i]
		}
	}
	b.PathLengthMM = PathLength(xs, ys)
	b.NetDisplacementMM = NetDisplacement(xs, ys)
	b.StraightnessIndex = StraightnessIndex(xs, ys)
	if s.SinuosityStepMM > 0 {
		rx, ry := Rediscretize(xs, ys, s.SinuosityStepMM)
		b.Sinuosity = Sinuosity(rx, ry)
	} else {
		b.Sinuosity = Sinuosity(xs, ys)
	}
	b.SpeedMeanMMPerS = math.NaN()
	if len(speeds) > 0 {
		sum := 0.0
		for _, v := range speeds {
			sum += v
		}
		b.SpeedMeanMMPerS = sum / float64(len(speeds))
	}
	b.SpeedMedianMMPerS = Quantile(0.5, speeds)
	b.SpeedP95MMPerS = Quantile(0.95, speeds)
	return b
}
