package visits

import (
	"math"
	"sort"

	"flitlog/kinematics"
)

// Stillness. From above, a bee hovering over a flower and a bee sitting on
// it are at the same place and both slow; what differs is that a hovering
// bee wanders back and forth by a millimetre or more several times a
// second, while a landed bee sits still for a while (and walks now and
// then, which the landing's hysteresis tolerates). The test used here is
// the scatter of the measured positions about their mean over a short
// window (StillWindowS): a resting bee's scatter is the tracker's position
// noise alone, a hovering bee's is larger, and so is that of a bee
// drifting down onto the flower. The noise is estimated from the clip
// itself (or given as PositionNoisePX).

// restResidualMM returns the root mean square distance, per axis, of the
// positions of samples i0..i1 (inclusive) from their mean, mm:
//
//	r^2 = (sum (x_i - mean x)^2 + sum (y_i - mean y)^2) / (2 n)
func restResidualMM(smp []kinematics.Sample, i0, i1 int) float64 {
	n := float64(i1 - i0 + 1)
	var mx, my float64
	for i := i0; i <= i1; i++ {
		mx += smp[i].XMM
		my += smp[i].YMM
	}
	mx /= n
	my /= n
	var ss float64
	for i := i0; i <= i1; i++ {
		dx, dy := smp[i].XMM-mx, smp[i].YMM-my
		ss += dx*dx + dy*dy
	}
	return math.Sqrt(ss / (2 * n))
}

// segmentBounds returns, for each sample, the first and last index of the
// run of consecutive frames it belongs to.
func segmentBounds(smp []kinematics.Sample) (lo, hi []int) {
	n := len(smp)
	lo, hi = make([]int, n), make([]int, n)
	for i := 0; i < n; {
		j := i
		for j+1 < n && smp[j+1].Frame == smp[j].Frame+1 {
			j++
		}
		for k := i; k <= j; k++ {
			lo[k], hi[k] = i, j
		}
		i = j + 1
	}
	return lo, hi
}

// centredResiduals returns restResidualMM over the window of half-width h
// frames centred on each sample, cut at track ends and gaps; NaN where
// fewer than minStillFrames samples remain.
func centredResiduals(smp []kinematics.Sample, h int) []float64 {
	lo, hi := segmentBounds(smp)
	out := make([]float64, len(smp))
	for i := range smp {
		a, b := max(lo[i], i-h), min(hi[i], i+h)
		if b-a+1 < minStillFrames {
			out[i] = math.NaN()
			continue
		}
		out[i] = restResidualMM(smp, a, b)
	}
	return out
}

// minStillFrames is the fewest samples a stillness window may have.
const minStillFrames = 5

// noiseSigmaMM estimates the tracker's position noise (standard deviation
// per axis, mm) from all tracks: over every 5 consecutive samples slower
// than maxSpeed, the residual sum of squares about a quadratic in time,
// s^2 = (RSS_x + RSS_y) / 4, is sigma^2 chi^2_4 / 4 for noise alone
// (5 points, 3 parameters, 2 axes); smooth motion over 5 frames adds
// little. sigma is estimated as sqrt(median(s^2) / 0.8392), 0.8392 being
// the median of chi^2_4 / 4. The median makes the estimate robust to the
// windows where the bee accelerates hard. NaN when no window qualifies.
func noiseSigmaMM(tracks []kinematics.Result, maxSpeed float64) float64 {
	var s2 []float64
	// Quadratic fit over t = -2..2: the residual is the projection onto
	// the orthogonal polynomials of degree 3 and 4 (Legendre-like, for 5
	// equally spaced points): p3 = (-1, 2, 0, -2, 1)/sqrt(10),
	// p4 = (1, -4, 6, -4, 1)/sqrt(70).
	p3 := [5]float64{-1, 2, 0, -2, 1}
	p4 := [5]float64{1, -4, 6, -4, 1}
	for _, tr := range tracks {
		smp := tr.Samples
		for i := 0; i+4 < len(smp); i++ {
			if smp[i+4].Frame != smp[i].Frame+4 {
				continue
			}
			ok := true
			for k := 0; k < 5; k++ {
				if !(smp[i+k].SpeedMMPerS <= maxSpeed) || !finite(smp[i+k].XMM) || !finite(smp[i+k].YMM) {
					ok = false
					break
				}
			}
			if !ok {
				continue
			}
			var c3x, c4x, c3y, c4y float64
			for k := 0; k < 5; k++ {
				c3x += p3[k] * smp[i+k].XMM
				c4x += p4[k] * smp[i+k].XMM
				c3y += p3[k] * smp[i+k].YMM
				c4y += p4[k] * smp[i+k].YMM
			}
			rss := c3x*c3x/10 + c4x*c4x/70 + c3y*c3y/10 + c4y*c4y/70
			s2 = append(s2, rss/4)
		}
	}
	if len(s2) == 0 {
		return math.NaN()
	}
	sort.Float64s(s2)
	return math.Sqrt(quantile(s2, 0.5) / chi2_4MedianOver4)
}

// chi2_4MedianOver4 is the median of a chi-squared variable with 4
// degrees of freedom divided by 4: chi^2_4 has CDF 1 - (1 + x/2) e^(-x/2),
// whose median is x = 3.35669 (solving numerically; from memory,
// checked in TestChiSquareMedian).
const chi2_4MedianOver4 = 3.356694 / 4
