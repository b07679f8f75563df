package link

import (
	"fmt"
	"image"
	"math"
)

// Settings tune the Linker. A zero field is replaced by its default when
// the Linker is made (NewLinker); defaults that are lengths scale with
// BodyLengthPX, so it must be set whenever such a field is left zero.
// DefaultSettings returns every field filled in, for printing.
//
// Abbreviations below: BL = BodyLengthPX, px = pixels of the full frame.
type Settings struct {
	// FPS is the frame rate of the clip, frames/s. Required, > 0.
	FPS float64 `toml:"-" json:"-"`

	// BodyLengthPX is the length of one bee in the image, px (> 0). It
	// only scales the defaults of the px fields below.
	BodyLengthPX float64 `toml:"-" json:"-"`

	// Model is the process noise model of the Kalman filter; zero is
	// DiscreteWNA.
	Model NoiseModel `toml:"-" json:"-"`

	// AccelSigmaPXPerS2 is the standard deviation of the acceleration in
	// the discrete white-noise acceleration model, px/s^2 (> 0). Default
	// 100 BL/s^2 (about 1.2 m/s^2 for a 12 mm bee). Larger values follow
	// sharp turns better but give noisier velocities and wider gates;
	// turns the filter misses are repaired by gap closing. With Model ContinuousWNA the
	// power spectral density is taken as AccelSigmaPXPerS2^2 / FPS, which
	// gives the same velocity variance per frame.
	AccelSigmaPXPerS2 float64 `toml:"accel_sigma_px_per_s2" json:"accel_sigma_px_per_s2"`

	// MeasSigmaPX is the standard deviation of a detection's centroid per
	// coordinate, px (> 0). Default max(1, 0.08 BL).
	MeasSigmaPX float64 `toml:"meas_sigma_px" json:"meas_sigma_px"`

	// InitVelSigmaPXPerS is the standard deviation of each velocity
	// component of a new track started with velocity 0, px/s (> 0).
	// Default MaxSpeedPXPerS / 2.
	InitVelSigmaPXPerS float64 `toml:"init_vel_sigma_px_per_s" json:"init_vel_sigma_px_per_s"`

	// GateProbability is p of the chi-square gate on the squared
	// Mahalanobis distance (2 degrees of freedom), in (0, 1). Default
	// 0.99, i.e. d^2 <= 9.21.
	GateProbability float64 `toml:"gate_probability" json:"gate_probability"`

	// MinGateRadiusPX: a detection this close to a prediction is inside
	// the gate even if the chi-square test rejects it (covers centroid
	// jumps of a blob larger than the filter expects), px (>= 0). Default
	// 0.5 BL.
	MinGateRadiusPX float64 `toml:"min_gate_radius_px" json:"min_gate_radius_px"`

	// MaxGateRadiusPX: a detection farther than this from a prediction is
	// outside the gate whatever the covariance (stops a long-coasting
	// track from reaching across the frame), px (> MinGateRadiusPX).
	// Default max(3 BL, 1.5 MaxSpeedPXPerS / FPS).
	MaxGateRadiusPX float64 `toml:"max_gate_radius_px" json:"max_gate_radius_px"`

	// MergeRadiusPX: when a confirmed track gets no detection but its
	// prediction is within this distance of another confirmed track's
	// and the other's detection lies in its gate, the two bees are taken
	// to form one blob; both tracks then predict through it without using
	// its centroid, px. Default 1 BL; a negative value turns merge
	// handling off.
	MergeRadiusPX float64 `toml:"merge_radius_px" json:"merge_radius_px"`

	// MaxMergeS: two tracks merged for longer than this are taken to
	// follow the same bee, and all but the one with the most detections
	// end, s (> 0). Default 2 s.
	MaxMergeS float64 `toml:"max_merge_s" json:"max_merge_s"`

	// StationaryRadiusPX: Finish drops a track that starts after the
	// clip's first second, ends before its last second and whose
	// detections all lie within this distance of their median position:
	// a bee does not appear and vanish in mid-picture without moving, but
	// flickering foliage does. px; default 1.5 BL; a negative value turns
	// the rule off.
	StationaryRadiusPX float64 `toml:"stationary_radius_px" json:"stationary_radius_px"`

	// MinHitsToConfirm is the number of detections a new (tentative)
	// track needs before it is confirmed and reported, >= 1. Default 3.
	MinHitsToConfirm int `toml:"min_hits_to_confirm" json:"min_hits_to_confirm"`

	// MaxTentativeMisses is the number of consecutive frames without a
	// detection after which a tentative track is dropped. Default 1; zero
	// means the default, a negative value means 0 (dropped at the first
	// miss).
	MaxTentativeMisses int `toml:"max_tentative_misses" json:"max_tentative_misses"`

	// StillSpeedPXPerS: a track whose speed over the last SpeedWindowS
	// before its latest detection is at most this is "still" (landed or
	// walking) and may coast for MaxCoastStillS, px/s (> 0). Default
	// 3 BL/s.
	StillSpeedPXPerS float64 `toml:"still_speed_px_per_s" json:"still_speed_px_per_s"`

	// SpeedWindowS is the time over which a track's recent speed is
	// measured from its detections, s (> 0). Default 0.25 s.
	SpeedWindowS float64 `toml:"speed_window_s" json:"speed_window_s"`

	// StillSigmaPX is the standard deviation of an unseen still bee's
	// position about where it was last reliably detected, px (> 0). While
	// a still track coasts, its prediction stays there with this
	// uncertainty added, instead of growing with the flight model; with
	// the 0.99 gate a still track re-acquires detections within about
	// 3 StillSigmaPX. Default 0.5 BL.
	StillSigmaPX float64 `toml:"still_sigma_px" json:"still_sigma_px"`

	// ReconfirmAfterMisses: after more than this many consecutive frames
	// without a detection, a confirmed track is "lost": a detection
	// assigned to it then counts only once MinHitsToConfirm detections
	// in a row (gaps of at most MaxTentativeMisses frames) have come, the
	// way a new track is confirmed. Until then the coasting time runs on,
	// and if the track ends those detections are dropped with it. This
	// stops a coasting track from living on single clutter detections.
	// Frames; default 1; zero means the default, a negative value means
	// never.
	ReconfirmAfterMisses int `toml:"reconfirm_after_misses" json:"reconfirm_after_misses"`

	// MaxCoastStillS is how long a still track is kept without detections
	// before it ends, s (> 0). A landed bee that stops moving can vanish
	// from the foreground for a long time. Default 10 s.
	MaxCoastStillS float64 `toml:"max_coast_still_s" json:"max_coast_still_s"`

	// MaxCoastMovingS is how long a moving track is kept without
	// detections, s (> 0). Longer gaps of flying bees are left to gap
	// closing, which also uses it as the longest overlap it cuts off and
	// the longest gap it bridges in mid-picture without a distance limit.
	// Default 0.5 s.
	MaxCoastMovingS float64 `toml:"max_coast_moving_s" json:"max_coast_moving_s"`

	// CoastVelHalfLifeS: while a track coasts, its velocity decays with
	// this half-life, so that an unseen target's prediction comes to rest,
	// s (> 0). Default 0.1 s.
	CoastVelHalfLifeS float64 `toml:"coast_vel_half_life_s" json:"coast_vel_half_life_s"`

	// MaxSpeedPXPerS is the highest plausible flight speed, px/s (> 0).
	// Gap closing joins two fragments only if the straight distance
	// between them can be flown at this speed in the gap. Default
	// 80 BL/s (about 1 m/s for a 12 mm bee).
	MaxSpeedPXPerS float64 `toml:"max_speed_px_per_s" json:"max_speed_px_per_s"`

	// MaxGapS is the longest gap that gap closing bridges between a track
	// ending and another starting elsewhere (exit and re-entry at the
	// frame border, occlusion), s (> 0). Default 5 s. Longer values join
	// more exits and re-entries but also join different bees leaving and
	// arriving at the border. Gaps longer than
	// MaxCoastMovingS in mid-picture are bridged only over at most
	// MaxGateRadiusPX and from an end that was flying. A gap of up to
	// MaxCoastStillS is bridged if both ends are within MinGateRadiusPX
	// (a bee that sat unseen where it vanished), or farther if the later
	// fragment flies away from the seat (it took off unseen; see
	// gapLinkCost).
	MaxGapS float64 `toml:"max_gap_s" json:"max_gap_s"`

	// HoverSigmaPX is the standard deviation, per coordinate and frame, of
	// a hovering or landed bee's movement in the hover model of the
	// two-model (IMM) filter, px (> 0). Default 0.08 BL. A negative value
	// turns the hover model off: every track then runs the
	// constant-velocity filter alone.
	HoverSigmaPX float64 `toml:"hover_sigma_px" json:"hover_sigma_px"`

	// ModeSwitchS is the mean time a bee keeps to one motion model
	// (flying or hovering) in the IMM filter, s (> 0): the probability of
	// a switch between two frames is 1/(FPS ModeSwitchS), at most 0.5.
	// Default 1 s.
	ModeSwitchS float64 `toml:"mode_switch_s" json:"mode_switch_s"`

	// TakeoffSpeedPXPerS is the standard deviation of each velocity
	// component of a bee that changes from hovering (or sitting) to
	// flying in the IMM filter, px/s (> 0): the hover model has no
	// velocity, and a bee taking off reaches flight speed within a few
	// frames. Default 10 BL/s. Larger values let a departing bee's
	// detection reach further from the hover point, but also let a
	// hovering track that misses its bee reach for clutter farther away.
	TakeoffSpeedPXPerS float64 `toml:"takeoff_speed_px_per_s" json:"takeoff_speed_px_per_s"`

	// MinDetectedFrac: Finish drops a track (after gap closing) whose
	// detections make up less than this fraction of its points: the
	// M-of-N deletion rule (Blackman & Popoli 1999, Sec. 6.2) applied to
	// the whole track. A chain of coasted and gap-filled stretches
	// between a few detections is what swaying grass makes; a bee's
	// track is mostly detected. A gap longer than MaxCoastMovingS filled
	// where the bee sat (detections on both sides within
	// StationaryRadiusPX) does not count: a bee sitting unseen for long
	// keeps its track. In (0, 1); 0 means the default 0.4; a negative
	// value turns the rule off.
	MinDetectedFrac float64 `toml:"min_detected_frac" json:"min_detected_frac"`

	// MinObservedPoints: a track with fewer detections than this is
	// dropped as noise before gap closing, and so is, after gap closing,
	// a piece of a track cut at a long coast that nothing joined. >= 1.
	// Default max(MinHitsToConfirm, ceil(0.2 FPS)).
	MinObservedPoints int `toml:"min_observed_points" json:"min_observed_points"`

	// EdgeMarginPX: gap closing takes a track end or start within this
	// distance of the frame's border for an exit from or an entry into
	// the picture, px (> 0). Default 2 BL.
	EdgeMarginPX float64 `toml:"edge_margin_px" json:"edge_margin_px"`

	// BoundsPX is the frame rectangle. When set (not empty), a confirmed
	// track that has no detection in a frame and whose prediction lies
	// outside it ends at once: the bee has left the picture; and gap
	// closing uses it to tell exits at the border from gaps in mid-picture.
	// Default: the zero rectangle: not known; gap closing then uses the
	// bounding box of all detections instead.
	BoundsPX image.Rectangle `toml:"-" json:"-"`
}

// DefaultSettings returns the settings for a clip at fps frames/s in which
// a bee is bodyLengthPX pixels long, with every field set to its default.
// It panics if fps or bodyLengthPX is not > 0.
func DefaultSettings(fps, bodyLengthPX float64) Settings {
	return Settings{FPS: fps, BodyLengthPX: bodyLengthPX}.withDefaults()
}

// withDefaults returns s with zero fields replaced by their defaults.
func (s Settings) withDefaults() Settings {
	if !(s.FPS > 0) || math.IsInf(s.FPS, 0) {
		panic(fmt.Sprintf("link: FPS %v must be > 0", s.FPS))
	}
	bl := func(field string) float64 {
		if !(s.BodyLengthPX > 0) || math.IsInf(s.BodyLengthPX, 0) {
			panic(fmt.Sprintf("link: BodyLengthPX %v must be > 0 for the default of %s", s.BodyLengthPX, field))
		}
		return s.BodyLengthPX
	}
	if s.AccelSigmaPXPerS2 == 0 {
		s.AccelSigmaPXPerS2 = 100 * bl("AccelSigmaPXPerS2")
	}
	if s.MeasSigmaPX == 0 {
		s.MeasSigmaPX = math.Max(1, 0.08*bl("MeasSigmaPX"))
	}
	if s.MaxSpeedPXPerS == 0 {
		s.MaxSpeedPXPerS = 80 * bl("MaxSpeedPXPerS")
	}
	if s.InitVelSigmaPXPerS == 0 {
		s.InitVelSigmaPXPerS = s.MaxSpeedPXPerS / 2
	}
	if s.GateProbability == 0 {
		s.GateProbability = 0.99
	}
	if s.MinGateRadiusPX == 0 {
		s.MinGateRadiusPX = 0.5 * bl("MinGateRadiusPX")
	}
	if s.MaxGateRadiusPX == 0 {
		s.MaxGateRadiusPX = math.Max(3*bl("MaxGateRadiusPX"), 1.5*s.MaxSpeedPXPerS/s.FPS)
	}
	if s.MergeRadiusPX == 0 {
		s.MergeRadiusPX = bl("MergeRadiusPX")
	}
	if s.MaxMergeS == 0 {
		s.MaxMergeS = 2
	}
	if s.EdgeMarginPX == 0 {
		s.EdgeMarginPX = 2 * bl("EdgeMarginPX")
	}
	if s.StationaryRadiusPX == 0 {
		s.StationaryRadiusPX = 1.5 * bl("StationaryRadiusPX")
	}
	if s.MinHitsToConfirm == 0 {
		s.MinHitsToConfirm = 3
	}
	if s.MaxTentativeMisses == 0 {
		s.MaxTentativeMisses = 1
	}
	if s.StillSpeedPXPerS == 0 {
		s.StillSpeedPXPerS = 3 * bl("StillSpeedPXPerS")
	}
	if s.SpeedWindowS == 0 {
		s.SpeedWindowS = 0.25
	}
	if s.StillSigmaPX == 0 {
		s.StillSigmaPX = 0.5 * bl("StillSigmaPX")
	}
	if s.ReconfirmAfterMisses == 0 {
		s.ReconfirmAfterMisses = 1
	}
	if s.MaxCoastStillS == 0 {
		s.MaxCoastStillS = 10
	}
	if s.MaxCoastMovingS == 0 {
		s.MaxCoastMovingS = 0.5
	}
	if s.CoastVelHalfLifeS == 0 {
		s.CoastVelHalfLifeS = 0.1
	}
	if s.MaxGapS == 0 {
		s.MaxGapS = 5
	}
	if s.MinDetectedFrac == 0 {
		s.MinDetectedFrac = 0.4
	}
	if s.HoverSigmaPX == 0 {
		s.HoverSigmaPX = 0.08 * bl("HoverSigmaPX")
	}
	if s.TakeoffSpeedPXPerS == 0 {
		s.TakeoffSpeedPXPerS = 10 * bl("TakeoffSpeedPXPerS")
	}
	if s.ModeSwitchS == 0 {
		s.ModeSwitchS = 1
	}
	if s.MinObservedPoints == 0 {
		s.MinObservedPoints = max(s.MinHitsToConfirm, int(math.Ceil(0.2*s.FPS)))
	}
	s.validate()
	return s
}

func (s Settings) validate() {
	pos := func(name string, v float64) {
		if !(v > 0) || math.IsInf(v, 0) {
			panic(fmt.Sprintf("link: %s %v must be > 0", name, v))
		}
	}
	pos("AccelSigmaPXPerS2", s.AccelSigmaPXPerS2)
	pos("MeasSigmaPX", s.MeasSigmaPX)
	pos("InitVelSigmaPXPerS", s.InitVelSigmaPXPerS)
	pos("MaxGateRadiusPX", s.MaxGateRadiusPX)
	pos("StillSpeedPXPerS", s.StillSpeedPXPerS)
	pos("SpeedWindowS", s.SpeedWindowS)
	pos("StillSigmaPX", s.StillSigmaPX)
	pos("MaxCoastStillS", s.MaxCoastStillS)
	pos("MaxCoastMovingS", s.MaxCoastMovingS)
	pos("CoastVelHalfLifeS", s.CoastVelHalfLifeS)
	pos("MaxSpeedPXPerS", s.MaxSpeedPXPerS)
	pos("MaxGapS", s.MaxGapS)
	pos("MaxMergeS", s.MaxMergeS)
	pos("EdgeMarginPX", s.EdgeMarginPX)
	pos("ModeSwitchS", s.ModeSwitchS)
	pos("TakeoffSpeedPXPerS", s.TakeoffSpeedPXPerS)
	switch {
	case !(s.GateProbability > 0 && s.GateProbability < 1):
		panic(fmt.Sprintf("link: GateProbability %v not in (0, 1)", s.GateProbability))
	case !(s.MinGateRadiusPX >= 0) || s.MinGateRadiusPX >= s.MaxGateRadiusPX:
		panic(fmt.Sprintf("link: MinGateRadiusPX %v must be in [0, MaxGateRadiusPX %v)", s.MinGateRadiusPX, s.MaxGateRadiusPX))
	case s.MinHitsToConfirm < 1:
		panic(fmt.Sprintf("link: MinHitsToConfirm %d must be >= 1", s.MinHitsToConfirm))
	case !(s.MinDetectedFrac < 1):
		panic(fmt.Sprintf("link: MinDetectedFrac %v must be < 1", s.MinDetectedFrac))
	case s.MinObservedPoints < 1:
		panic(fmt.Sprintf("link: MinObservedPoints %d must be >= 1", s.MinObservedPoints))
	case s.Model != DiscreteWNA && s.Model != ContinuousWNA:
		panic("link: unknown noise model")
	}
}

// kalmanConfig returns the filter configuration of s.
func (s Settings) kalmanConfig() KalmanConfig {
	return KalmanConfig{
		Model:              s.Model,
		AccelSigmaPXPerS2:  s.AccelSigmaPXPerS2,
		AccelPSDPX2PerS3:   s.AccelSigmaPXPerS2 * s.AccelSigmaPXPerS2 / s.FPS,
		MeasSigmaPX:        s.MeasSigmaPX,
		InitVelSigmaPXPerS: s.InitVelSigmaPXPerS,
	}
}

// frames converts a duration in s to a whole number of frames (at least 1).
func (s Settings) frames(durS float64) int {
	return max(1, int(math.Round(durS*s.FPS)))
}
