package visits

import (
	"fmt"
	"math"
)

// Settings tune Analyze. Distances are in mm on the flower plane (converted
// to px with the clip's scale where flower outlines are concerned), speeds
// in mm/s, durations in s. A zero field takes the default given on it;
// DefaultSettings returns all defaults. The defaults assume bees of 10 to
// 16 mm body length filmed from above at about 2 px/mm and 30 frames/s
// with speeds smoothed over about 0.2 s (kinematics' default).
type Settings struct {
	// MarginMM widens every flower outline for the landing test: a bee
	// clinging to the rim has its centroid outside the petals. Range
	// (-radius, 20] mm; default 3 mm (a quarter of a bee's length, plus
	// a pixel or two of error in a hand-drawn or found flower map).
	MarginMM float64 `toml:"margin_mm" json:"margin_mm"`
	// ExitMarginMM: a landed bee stays landed while within this distance
	// of the outline (hysteresis on position, so that walking along the
	// rim does not end the visit). >= MarginMM; default MarginMM + 3 mm.
	ExitMarginMM float64 `toml:"exit_margin_mm" json:"exit_margin_mm"`
	// LandSpeedMMPerS: a bee on a flower (with MarginMM) that is still
	// (see StillWindowS) and slower than this starts a landing. > 0 mm/s;
	// default 20 mm/s: above a walking bee (about 5 to 15 mm/s) and the
	// speed noise of a still bee after smoothing.
	LandSpeedMMPerS float64 `toml:"land_speed_mm_per_s" json:"land_speed_mm_per_s"`
	// TakeOffSpeedMMPerS: a landing ends when the bee is faster than this
	// (or leaves the flower with ExitMarginMM). >= LandSpeedMMPerS;
	// default 60 mm/s: handling movements (turning on the flower, a quick
	// step to the next floret) stay below it, while a take-off passes it
	// within a frame or two.
	TakeOffSpeedMMPerS float64 `toml:"take_off_speed_mm_per_s" json:"take_off_speed_mm_per_s"`
	// StillWindowS: a bee is still at a frame when its measured positions
	// over this window, centred on the frame, scatter about their mean by
	// no more than the stillness threshold
	// sqrt((StillNoiseFactor*sigma)^2 + StillFloorMM^2) (root mean square
	// per axis), sigma being the tracker's position noise per axis. A
	// hovering bee wanders by a millimetre or more at a few hertz and
	// fails the test, as does a bee drifting down onto the flower; a bee
	// sitting on it passes. > 0 s (at least 5 frames are used); default
	// 0.5 s (15 frames at 30 fps: most of one wander period of a hovering
	// bee at 1.5 to 3.5 Hz).
	StillWindowS float64 `toml:"still_window_s" json:"still_window_s"`
	// StillNoiseFactor: see StillWindowS. > 0; default 1.2. The scatter
	// of noise alone over 15 frames is about 0.97 sigma with a relative
	// spread of about 0.13, so it passes 1.2 sigma in about 1 window in
	// 30, while a hover wandering by +-1 mm at 2 px/mm and 1 px noise
	// scatters by about 1.7 sigma; a landing needs MinLandingS of
	// consecutive still frames, which a bee sitting on a flower for a
	// second or more provides many times over.
	StillNoiseFactor float64 `toml:"still_noise_factor" json:"still_noise_factor"`
	// StillFloorMM: see StillWindowS; allows for a flower swaying in the
	// wind and for the bends of a walk. >= 0 mm; default 0.3 mm.
	StillFloorMM float64 `toml:"still_floor_mm" json:"still_floor_mm"`
	// PositionNoisePX is the tracker's position noise, standard deviation
	// per axis, px. 0 (default): estimated from the clip, from the scatter
	// of slow track points about local quadratics (see doc.go).
	PositionNoisePX float64 `toml:"position_noise_px" json:"position_noise_px"`
	// RestTolSigma: the first frame of a landing is the change point
	// between samples farther than sqrt((RestTolSigma*sigma)^2 +
	// StillFloorMM^2) from the resting place (the approach) and samples
	// nearer (the landing), see doc.go. > 0; default 2: noise alone
	// puts a resting bee outside in about 1 frame in 7, which the change
	// point absorbs, while a bee more than about 2 sigma from its resting
	// place (1 mm at 1 px noise and 2 px/mm) counts as approaching.
	RestTolSigma float64 `toml:"rest_tol_sigma" json:"rest_tol_sigma"`
	// MinLandingS: shorter landed runs are dropped (a bee touching a
	// flower in passing, or hovering very still). >= 0 s; default 0.3 s:
	// shorter than the briefest landings of rejecting bees (about 0.5 s,
	// from memory), longer than a touch-and-go.
	MinLandingS float64 `toml:"min_landing_s" json:"min_landing_s"`
	// MinCensoredLandingS replaces MinLandingS for a landing cut by the
	// clip's or the track's start or end, which may be the visible part
	// of a long visit. >= 0 s; default 0.1 s.
	MinCensoredLandingS float64 `toml:"min_censored_landing_s" json:"min_censored_landing_s"`
	// MergeGapS: two landed runs on the same flower separated by at most
	// this long (fast handling movements, a few frames of tracking
	// jitter, or short runs on an overlapping flower) are one landing.
	// Default 0.3 s; a negative value switches merging off.
	MergeGapS float64 `toml:"merge_gap_s" json:"merge_gap_s"`

	// InspectRadiusMM: a bee within this distance of a flower's outline
	// can be inspecting it. > 0 mm; default 20 mm (bees examine a flower
	// from about one to two body lengths before accepting or rejecting
	// it, from memory).
	InspectRadiusMM float64 `toml:"inspect_radius_mm" json:"inspect_radius_mm"`
	// HoverSpeedMMPerS: inspecting means slower than this near a flower.
	// > 0 mm/s; default 150 mm/s: well below cruising flight between
	// flowers (300 to 1000 mm/s) and above the drift of a hovering bee.
	HoverSpeedMMPerS float64 `toml:"hover_speed_mm_per_s" json:"hover_speed_mm_per_s"`
	// MinInspectionS: shorter slow passes near a flower are not
	// inspections (a turn in flight). >= 0 s; default 0.2 s.
	MinInspectionS float64 `toml:"min_inspection_s" json:"min_inspection_s"`

	// ApproachWindowS, DepartureWindowS: the approach (departure) speed of
	// a landing is the mean speed over this long before its first frame
	// (after its last frame). > 0 s; default 0.2 s (6 frames at 30 fps):
	// the last part of the approach flight, after the turn towards the
	// flower.
	ApproachWindowS  float64 `toml:"approach_window_s" json:"approach_window_s"`
	DepartureWindowS float64 `toml:"departure_window_s" json:"departure_window_s"`

	// RewardEveryLanding: when true every landing takes the flower's
	// reward_ul (flowers refilled between visits, as with artificial
	// flowers); when false (default) only the first landing on a flower
	// in the clip takes it and later ones take 0 (the standing crop was
	// removed and refilling within a clip is ignored).
	RewardEveryLanding bool `toml:"reward_every_landing" json:"reward_every_landing"`
}

// DefaultSettings returns the defaults documented on each field.
func DefaultSettings() Settings {
	return Settings{
		MarginMM:            3,
		ExitMarginMM:        6,
		LandSpeedMMPerS:     20,
		StillWindowS:        0.5,
		StillNoiseFactor:    1.2,
		StillFloorMM:        0.3,
		RestTolSigma:        2,
		TakeOffSpeedMMPerS:  60,
		MinLandingS:         0.3,
		MinCensoredLandingS: 0.1,
		MergeGapS:           0.3,
		InspectRadiusMM:     20,
		HoverSpeedMMPerS:    150,
		MinInspectionS:      0.2,
		ApproachWindowS:     0.2,
		DepartureWindowS:    0.2,
	}
}

// SettingsError is a Settings field out of range.
type SettingsError struct {
	Field string // Go field name of Settings
	Value float64
	Want  string
}

func (e *SettingsError) Error() string {
	return fmt.Sprintf("visits setting %s = %g: want %s", e.Field, e.Value, e.Want)
}

// withDefaults fills zero fields with their defaults and checks ranges.
func (s Settings) withDefaults() (Settings, error) {
	d := DefaultSettings()
	def := func(p *float64, v float64) {
		if *p == 0 {
			*p = v
		}
	}
	def(&s.MarginMM, d.MarginMM)
	def(&s.ExitMarginMM, s.MarginMM+3)
	def(&s.LandSpeedMMPerS, d.LandSpeedMMPerS)
	def(&s.TakeOffSpeedMMPerS, math.Max(d.TakeOffSpeedMMPerS, s.LandSpeedMMPerS))
	def(&s.StillWindowS, d.StillWindowS)
	def(&s.StillNoiseFactor, d.StillNoiseFactor)
	def(&s.StillFloorMM, d.StillFloorMM)
	def(&s.RestTolSigma, d.RestTolSigma)
	def(&s.MinLandingS, d.MinLandingS)
	def(&s.MinCensoredLandingS, d.MinCensoredLandingS)
	def(&s.MergeGapS, d.MergeGapS)
	def(&s.InspectRadiusMM, d.InspectRadiusMM)
	def(&s.HoverSpeedMMPerS, d.HoverSpeedMMPerS)
	def(&s.MinInspectionS, d.MinInspectionS)
	def(&s.ApproachWindowS, d.ApproachWindowS)
	def(&s.DepartureWindowS, d.DepartureWindowS)
	bad := func(f string, v float64, want string) (Settings, error) {
		return s, &SettingsError{Field: f, Value: v, Want: want}
	}
	pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	nonneg := func(v float64) bool { return v >= 0 && !math.IsInf(v, 0) }
	switch {
	case !(s.MarginMM <= 20) || math.IsNaN(s.MarginMM):
		return bad("MarginMM", s.MarginMM, "<= 20 mm")
	case !(s.ExitMarginMM >= s.MarginMM) || math.IsInf(s.ExitMarginMM, 0):
		return bad("ExitMarginMM", s.ExitMarginMM, fmt.Sprintf(">= MarginMM = %g mm", s.MarginMM))
	case !pos(s.LandSpeedMMPerS):
		return bad("LandSpeedMMPerS", s.LandSpeedMMPerS, "> 0 mm/s")
	case !(s.TakeOffSpeedMMPerS >= s.LandSpeedMMPerS) || math.IsInf(s.TakeOffSpeedMMPerS, 0):
		return bad("TakeOffSpeedMMPerS", s.TakeOffSpeedMMPerS, fmt.Sprintf(">= LandSpeedMMPerS = %g mm/s", s.LandSpeedMMPerS))
	case !pos(s.StillWindowS):
		return bad("StillWindowS", s.StillWindowS, "> 0 s")
	case !pos(s.StillNoiseFactor):
		return bad("StillNoiseFactor", s.StillNoiseFactor, "> 0")
	case !nonneg(s.StillFloorMM):
		return bad("StillFloorMM", s.StillFloorMM, ">= 0 mm")
	case !nonneg(s.PositionNoisePX):
		return bad("PositionNoisePX", s.PositionNoisePX, ">= 0 px (0: estimate)")
	case !pos(s.RestTolSigma):
		return bad("RestTolSigma", s.RestTolSigma, "> 0")
	case !nonneg(s.MinLandingS):
		return bad("MinLandingS", s.MinLandingS, ">= 0 s")
	case !nonneg(s.MinCensoredLandingS):
		return bad("MinCensoredLandingS", s.MinCensoredLandingS, ">= 0 s")
	case math.IsNaN(s.MergeGapS) || math.IsInf(s.MergeGapS, 0):
		return bad("MergeGapS", s.MergeGapS, "a number of seconds (negative: no merging)")
	case !pos(s.InspectRadiusMM):
		return bad("InspectRadiusMM", s.InspectRadiusMM, "> 0 mm")
	case !pos(s.HoverSpeedMMPerS):
		return bad("HoverSpeedMMPerS", s.HoverSpeedMMPerS, "> 0 mm/s")
	case !nonneg(s.MinInspectionS):
		return bad("MinInspectionS", s.MinInspectionS, ">= 0 s")
	case !pos(s.ApproachWindowS):
		return bad("ApproachWindowS", s.ApproachWindowS, "> 0 s")
	case !pos(s.DepartureWindowS):
		return bad("DepartureWindowS", s.DepartureWindowS, "> 0 s")
	}
	return s, nil
}

// Validate reports the first field out of range as a *SettingsError, so a
// settings file can be checked before any clip is read.
func (s Settings) Validate() error {
	_, err := s.withDefaults()
	return err
}
