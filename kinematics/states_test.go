package kinematics

import (
	"math"
	"strings"
	"testing"
)

// TestSegmentStates checks the state rules on synthetic speed series at
// 30 fps (each point 1/30 s) with the default thresholds (landed below
// 8 mm/s, staying up to 15; hovering below 50, staying up to 70; minimum
// landing 0.3 s = 9 frames, airborne blip 0.1 s = 3 frames, hovering
// 0.1 s = 3 frames).
func TestSegmentStates(t *testing.T) {
	rep := func(v float64, n int) []float64 {
		s := make([]float64, n)
		for i := range s {
			s[i] = v
		}
		return s
	}
	cat := func(parts ...[]float64) []float64 {
		var s []float64
		for _, p := range parts {
			s = append(s, p...)
		}
		return s
	}
	alt := func(a, b float64, n int) []float64 {
		s := make([]float64, n)
		for i := range s {
			if i%2 == 0 {
				s[i] = a
			} else {
				s[i] = b
			}
		}
		return s
	}
	// Expected labels: one letter per point, L landed, H hovering, F flying.
	cases := []struct {
		name  string
		speed []float64
		want  string
	}{
		{"still then flying", cat(rep(2, 12), rep(300, 6)), "LLLLLLLLLLLLFFFFFF"},
		{"hysteresis keeps a landing around 8 mm/s",
			cat(rep(3, 10), alt(7, 12, 20)), strings.Repeat("L", 30)},
		{"without the exit band it would flicker: 16 mm/s leaves",
			cat(rep(3, 10), rep(16, 10)), strings.Repeat("L", 10) + strings.Repeat("H", 10)},
		{"too short to be a landing (0.2 s)", cat(rep(300, 6), rep(2, 6), rep(300, 6)), "FFFFFFHHHHHHFFFFFF"},
		{"airborne blip inside a landing is absorbed",
			cat(rep(2, 10), rep(30, 2), rep(2, 10)), strings.Repeat("L", 22)},
		{"airborne run of 0.1 s between landings is a flight",
			cat(rep(2, 10), rep(30, 3), rep(2, 10)), strings.Repeat("L", 10) + "HHH" + strings.Repeat("L", 10)},
		{"short slow dip in flight stays flying", cat(rep(300, 6), rep(30, 2), rep(300, 6)), strings.Repeat("F", 14)},
		{"hover exit band", cat(rep(300, 4), rep(45, 4), rep(65, 4), rep(45, 4), rep(75, 4)), "FFFFHHHHHHHHHHHHFFFF"},
		{"NaN holds the state", cat(rep(2, 10), rep(math.NaN(), 3), rep(2, 10)), strings.Repeat("L", 23)},
		{"all NaN is flying", rep(math.NaN(), 4), "FFFF"},
	}
	letter := map[State]byte{Landed: 'L', Hovering: 'H', Flying: 'F'}
	s, _ := DefaultSettings().withDefaults()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dur := make([]float64, len(c.speed))
			for i := range dur {
				dur[i] = 1.0 / 30
			}
			st := segmentStates(c.speed, dur, s)
			got := make([]byte, len(st))
			for i, x := range st {
				got[i] = letter[x]
			}
			if string(got) != c.want {
				t.Errorf("got  %s\nwant %s", got, c.want)
			}
		})
	}
}

func TestStateString(t *testing.T) {
	for _, s := range []State{Flying, Hovering, Landed} {
		back, ok := ParseState(s.String())
		if !ok || back != s {
			t.Errorf("ParseState(%q) = %v, %v", s.String(), back, ok)
		}
	}
}
