package kinematics

import "math"

// segmentStates labels one frame-contiguous stretch of a track with flight
// states from its speeds (mm/s; NaN = no evidence, the previous label is
// kept) and the duration each point stands for (s). The rules, in order:
//
//  1. Landed candidates by a Schmitt trigger: a point is landed if its
//     speed is below LandedEnterMMPerS, or the previous point is landed and
//     its speed is at most LandedExitMMPerS.
//  2. An airborne run between two landed runs lasting less than
//     MinAirborneS becomes landed (a jitter of the landing).
//  3. A landed run lasting less than MinLandedS becomes airborne.
//  4. Airborne points: hovering by a second Schmitt trigger
//     (HoverEnterMMPerS / HoverExitMMPerS), restarted after each landing;
//     flying otherwise.
//  5. A hovering run lasting less than MinHoverS becomes flying.
//
// A stretch with no speed at all is labelled flying.
func segmentStates(speed, durS []float64, s Settings) []State {
	n := len(speed)
	st := make([]State, n)
	landed := make([]bool, n)
	prev := false
	for i, v := range speed {
		switch {
		case math.IsNaN(v):
			landed[i] = prev
		case v < s.LandedEnterMMPerS:
			landed[i] = true
		case prev && v <= s.LandedExitMMPerS:
			landed[i] = true
		}
		prev = landed[i]
	}
	// 2: fill short airborne runs flanked by landings.
	forRuns(landed, func(a, b int, val bool) {
		if !val && a > 0 && b < n && runS(durS, a, b) < s.MinAirborneS-durTolS {
			for i := a; i < b; i++ {
				landed[i] = true
			}
		}
	})
	// 3: drop short landings.
	forRuns(landed, func(a, b int, val bool) {
		if val && runS(durS, a, b) < s.MinLandedS-durTolS {
			for i := a; i < b; i++ {
				landed[i] = false
			}
		}
	})
	// 4: hovering or flying among airborne points.
	hover := make([]bool, n)
	prev = false
	for i, v := range speed {
		if landed[i] {
			st[i] = Landed
			prev = false
			continue
		}
		switch {
		case math.IsNaN(v):
			hover[i] = prev
		case v < s.HoverEnterMMPerS:
			hover[i] = true
		case prev && v <= s.HoverExitMMPerS:
			hover[i] = true
		}
		prev = hover[i]
	}
	// 5: drop short hovering.
	forRuns(hover, func(a, b int, val bool) {
		if val && runS(durS, a, b) < s.MinHoverS-durTolS {
			for i := a; i < b; i++ {
				hover[i] = false
			}
		}
	})
	for i := range st {
		if landed[i] {
			continue
		}
		if hover[i] {
			st[i] = Hovering
		} else {
			st[i] = Flying
		}
	}
	return st
}

// forRuns calls f for each maximal run [a, b) of equal values of v, in
// order. f may change values inside its own run.
func forRuns(v []bool, f func(a, b int, val bool)) {
	for a := 0; a < len(v); {
		b := a + 1
		for b < len(v) && v[b] == v[a] {
			b++
		}
		f(a, b, v[a])
		a = b
	}
}

// durTolS absorbs rounding when a run's duration is compared with a
// minimum (3 frames at 30 fps add up to 0.09999... s).
const durTolS = 1e-9

// runS is the duration of points [a, b).
func runS(durS []float64, a, b int) float64 {
	t := 0.0
	for _, d := range durS[a:b] {
		t += d
	}
	return t
}
