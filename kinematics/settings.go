package kinematics

import (
	"fmt"
	"math"
)

// Settings tune Analyze. Every field names its unit; DefaultSettings gives
// the defaults, and a field whose zero value is not meaningful says which
// value zero stands for.
type Settings struct {
	// PolyOrder is the degree of the Savitzky-Golay polynomial, 2..6.
	// At least 2 because acceleration, turning rate and curvature need a
	// second derivative. Default 2; 0 means 2.
	PolyOrder int `toml:"poly_order" json:"poly_order"`
	// SmoothWindowS is the Savitzky-Golay window in seconds, converted to
	// an odd number of frames with the track's median frame interval
	// (rounded, then raised to the next odd number and to at least
	// PolyOrder+2 frames). Default 0.2 s (7 frames at 30 fps, 13 at
	// 60 fps); 0 means the default. Ignored when SmoothWindowFrames > 0.
	SmoothWindowS float64 `toml:"smooth_window_s" json:"smooth_window_s"`
	// SmoothWindowFrames, when > 0, sets the window in frames instead:
	// odd, at least PolyOrder+2. Default 0 (use SmoothWindowS).
	SmoothWindowFrames int `toml:"smooth_window_frames" json:"smooth_window_frames"`
	// MaxUnobservedS is the longest run of unobserved (coasted or
	// gap-filled) points, in seconds, that is smoothed through like
	// measured points. A longer run is a gap: its points get no
	// derivatives (NaN) and no flight bout, and the smoothing windows on
	// either side stop at it. >= 0; default 0.25 s.
	MaxUnobservedS float64 `toml:"max_unobserved_s" json:"max_unobserved_s"`
	// HeadingMinSpeedMMPerS: below this speed heading, turning rate and
	// curvature are NaN, because the direction of a nearly zero velocity
	// is noise. >= 0, mm/s; default 10 mm/s (about three times the speed
	// noise of 1 px position noise at 2 px/mm and 30 fps).
	HeadingMinSpeedMMPerS float64 `toml:"heading_min_speed_mm_per_s" json:"heading_min_speed_mm_per_s"`

	// Flight states (see doc.go). Speeds in mm/s, durations in s.

	// LandedEnterMMPerS: a point slower than this may start a landing.
	// > 0; default 8 mm/s; 0 means the default.
	LandedEnterMMPerS float64 `toml:"landed_enter_mm_per_s" json:"landed_enter_mm_per_s"`
	// LandedExitMMPerS: a landing goes on while the speed stays at or
	// below this (hysteresis). >= LandedEnterMMPerS; default 15 mm/s;
	// 0 means the default.
	LandedExitMMPerS float64 `toml:"landed_exit_mm_per_s" json:"landed_exit_mm_per_s"`
	// MinLandedS: a slow run shorter than this is not a landing
	// (it is hovering). >= 0 s; default 0.3 s.
	MinLandedS float64 `toml:"min_landed_s" json:"min_landed_s"`
	// MinAirborneS: a fast run between two landings shorter than this is
	// a jitter of the landing (a centroid jump while walking), not a
	// flight. >= 0 s; default 0.1 s.
	MinAirborneS float64 `toml:"min_airborne_s" json:"min_airborne_s"`
	// HoverEnterMMPerS: an airborne point slower than this may start
	// hovering. > LandedEnterMMPerS; default 50 mm/s; 0 means the default.
	HoverEnterMMPerS float64 `toml:"hover_enter_mm_per_s" json:"hover_enter_mm_per_s"`
	// HoverExitMMPerS: hovering goes on while the speed stays at or below
	// this. >= HoverEnterMMPerS; default 70 mm/s; 0 means the default.
	HoverExitMMPerS float64 `toml:"hover_exit_mm_per_s" json:"hover_exit_mm_per_s"`
	// MinHoverS: a slow airborne run shorter than this is part of the
	// flight around it (a turn), not hovering. >= 0 s; default 0.1 s.
	MinHoverS float64 `toml:"min_hover_s" json:"min_hover_s"`

	// SinuosityStepMM is the step length, in mm, to which a bout's path
	// is rediscretised before its sinuosity is computed (Benhamou 2004
	// recommends a constant step; a bee is about 12 mm long). > 0 mm;
	// default 5 mm. 0 uses the frame-to-frame steps of the smoothed path.
	SinuosityStepMM float64 `toml:"sinuosity_step_mm" json:"sinuosity_step_mm"`
}

// DefaultSettings returns the settings documented on each field of
// Settings.
func DefaultSettings() Settings {
	return Settings{
		PolyOrder:             2,
		SmoothWindowS:         0.2,
		MaxUnobservedS:        0.25,
		HeadingMinSpeedMMPerS: 10,
		LandedEnterMMPerS:     8,
		LandedExitMMPerS:      15,
		MinLandedS:            0.3,
		MinAirborneS:          0.1,
		HoverEnterMMPerS:      50,
		HoverExitMMPerS:       70,
		MinHoverS:             0.1,
		SinuosityStepMM:       5,
	}
}

// SettingsError is a bad Settings field.
type SettingsError struct {
	Field string // Go field name of Settings
	Value float64
	Want  string // the valid range, in words
}

func (e *SettingsError) Error() string {
	return fmt.Sprintf("kinematics setting %s = %g: want %s", e.Field, e.Value, e.Want)
}

// withDefaults returns s with zero fields that stand for a default filled
// in, and checks every field.
func (s Settings) withDefaults() (Settings, error) {
	d := DefaultSettings()
	if s.PolyOrder == 0 {
		s.PolyOrder = d.PolyOrder
	}
	if s.SmoothWindowS == 0 {
		s.SmoothWindowS = d.SmoothWindowS
	}
	if s.LandedEnterMMPerS == 0 {
		s.LandedEnterMMPerS = d.LandedEnterMMPerS
	}
	if s.LandedExitMMPerS == 0 {
		s.LandedExitMMPerS = math.Max(d.LandedExitMMPerS, s.LandedEnterMMPerS)
	}
	if s.HoverEnterMMPerS == 0 {
		s.HoverEnterMMPerS = d.HoverEnterMMPerS
	}
	if s.HoverExitMMPerS == 0 {
		s.HoverExitMMPerS = math.Max(d.HoverExitMMPerS, s.HoverEnterMMPerS)
	}
	bad := func(field string, v float64, want string) (Settings, error) {
		return s, &SettingsError{Field: field, Value: v, Want: want}
	}
	nonneg := func(v float64) bool { return v >= 0 && !math.IsInf(v, 0) } // false for NaN
	switch {
	case s.PolyOrder < 2 || s.PolyOrder > 6:
		return bad("PolyOrder", float64(s.PolyOrder), "2..6")
	case s.SmoothWindowFrames < 0 || (s.SmoothWindowFrames > 0 && (s.SmoothWindowFrames%2 == 0 || s.SmoothWindowFrames < s.PolyOrder+2)):
		return bad("SmoothWindowFrames", float64(s.SmoothWindowFrames), fmt.Sprintf("0 or an odd number >= PolyOrder+2 = %d", s.PolyOrder+2))
	case !(s.SmoothWindowS > 0) || math.IsInf(s.SmoothWindowS, 0):
		return bad("SmoothWindowS", s.SmoothWindowS, "> 0 s")
	case !nonneg(s.MaxUnobservedS):
		return bad("MaxUnobservedS", s.MaxUnobservedS, ">= 0 s")
	case !nonneg(s.HeadingMinSpeedMMPerS):
		return bad("HeadingMinSpeedMMPerS", s.HeadingMinSpeedMMPerS, ">= 0 mm/s")
	case !(s.LandedEnterMMPerS > 0) || math.IsInf(s.LandedEnterMMPerS, 0):
		return bad("LandedEnterMMPerS", s.LandedEnterMMPerS, "> 0 mm/s")
	case !(s.LandedExitMMPerS >= s.LandedEnterMMPerS) || math.IsInf(s.LandedExitMMPerS, 0):
		return bad("LandedExitMMPerS", s.LandedExitMMPerS, fmt.Sprintf(">= LandedEnterMMPerS = %g mm/s", s.LandedEnterMMPerS))
	case !(s.HoverEnterMMPerS > s.LandedEnterMMPerS) || math.IsInf(s.HoverEnterMMPerS, 0):
		return bad("HoverEnterMMPerS", s.HoverEnterMMPerS, fmt.Sprintf("> LandedEnterMMPerS = %g mm/s", s.LandedEnterMMPerS))
	case !(s.HoverExitMMPerS >= s.HoverEnterMMPerS) || math.IsInf(s.HoverExitMMPerS, 0):
		return bad("HoverExitMMPerS", s.HoverExitMMPerS, fmt.Sprintf(">= HoverEnterMMPerS = %g mm/s", s.HoverEnterMMPerS))
	case !nonneg(s.MinLandedS):
		return bad("MinLandedS", s.MinLandedS, ">= 0 s")
	case !nonneg(s.MinAirborneS):
		return bad("MinAirborneS", s.MinAirborneS, ">= 0 s")
	case !nonneg(s.MinHoverS):
		return bad("MinHoverS", s.MinHoverS, ">= 0 s")
	case !nonneg(s.SinuosityStepMM):
		return bad("SinuosityStepMM", s.SinuosityStepMM, ">= 0 mm")
	}
	return s, nil
}

// windowFrames returns the smoothing window in frames for a track whose
// median frame interval is dtS seconds (NaN for a one-point track).
func (s Settings) windowFrames(dtS float64) int {
	n := s.SmoothWindowFrames
	if n <= 0 {
		if math.IsNaN(dtS) || dtS <= 0 {
			n = s.PolyOrder + 2
		} else {
			n = int(math.Round(s.SmoothWindowS / dtS))
		}
		if n < s.PolyOrder+2 {
			n = s.PolyOrder + 2
		}
		if n%2 == 0 {
			n++
		}
	}
	return n
}

// Validate reports the first field out of range as a *SettingsError, so a
// settings file can be checked before any clip is read.
func (s Settings) Validate() error {
	_, err := s.withDefaults()
	return err
}
