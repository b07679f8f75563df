package kinematics

// Point is one position of a track as it enters kinematics: already
// calibrated (mm on the flower plane) and timed (seconds from the clip's
// first frame). Pixel coordinates are kept alongside so that later stages
// (flower maps are in pixels) and plots can use them.
type Point struct {
	Frame    int     // frame index, from 0
	TimeS    float64 // seconds from the clip's first frame
	XPX, YPX float64 // image position, px (as measured, before undistortion)
	XMM, YMM float64 // position on the flower plane, mm
	// Observed is false where the tracker had no detection for this frame
	// (a coasted or gap-filled position).
	Observed bool
}

// Track is one bee's path. Points are ordered by Frame; a jump of more than
// one frame between consecutive points is a gap, and no derivative is taken
// across it.
type Track struct {
	ID     int
	Points []Point
}

// State is a flight state of one track point.
type State int

const (
	Flying   State = iota // moving through the air
	Hovering              // airborne and nearly still (inspecting, approaching)
	Landed                // on a surface, walking or still
)

// String returns the state's name as written in CSV files.
func (s State) String() string {
	switch s {
	case Flying:
		return "flying"
	case Hovering:
		return "hovering"
	case Landed:
		return "landed"
	}
	return "unknown"
}

// ParseState is the inverse of State.String.
func ParseState(s string) (State, bool) {
	switch s {
	case "flying":
		return Flying, true
	case "hovering":
		return Hovering, true
	case "landed":
		return Landed, true
	}
	return 0, false
}

// Sample is a track point with its derived kinematics. Quantities that are
// undefined at a point (heading while still, turning rate at a track end)
// are NaN.
type Sample struct {
	Point
	VXMMPerS, VYMMPerS float64 // velocity on the plane, mm/s
	SpeedMMPerS        float64 // |v|, mm/s
	AccelMMPerS2       float64 // |a|, mm/s^2
	HeadingDeg         float64 // direction of travel, deg, counter-clockwise from +x in (-180, 180]
	TurnRateDegPerS    float64 // d(heading)/dt, deg/s
	CurvaturePerMM     float64 // |v x a| / |v|^3, 1/mm
	State              State

	// Added fields (beyond the first contract).

	// SmoothXMM, SmoothYMM: the Savitzky-Golay smoothed position, mm
	// (equal to XMM, YMM where no smoothing applies: in a gap).
	SmoothXMM, SmoothYMM float64
	// Gap is true for points in a run of unobserved points longer than
	// Settings.MaxUnobservedS: their derivatives are NaN and their State
	// comes from the mean speed across the run.
	Gap bool
}

// Result is the kinematics of one track.
type Result struct {
	ID      int
	Samples []Sample
	Bouts   []Bout

	// Added fields (beyond the first contract): time in each flight state
	// over the whole track, s (each point counts for the interval to the
	// next frame).
	FlyingS, HoveringS, LandedS float64
}

// Bout is one flight bout: a maximal run of airborne (flying or hovering)
// points of a track between landings, track ends or gaps.
type Bout struct {
	StartFrame        int     `json:"start_frame"`           // inclusive
	EndFrame          int     `json:"end_frame"`             // inclusive
	StartS            float64 `json:"start_s"`               // time of StartFrame
	EndS              float64 `json:"end_s"`                 // time of EndFrame
	PathLengthMM      float64 `json:"path_length_mm"`        // sum of step lengths
	NetDisplacementMM float64 `json:"net_displacement_mm"`   // start to end, straight line
	StraightnessIndex float64 `json:"straightness_index"`    // net displacement / path length (Batschelet 1981)
	Sinuosity         float64 `json:"sinuosity_per_sqrt_mm"` // Benhamou (2004), mm^-1/2; NaN where undefined
	SpeedMeanMMPerS   float64 `json:"speed_mean_mm_s"`
	SpeedMedianMMPerS float64 `json:"speed_median_mm_s"`
	SpeedP95MMPerS    float64 `json:"speed_p95_mm_s"`
	FlyingS           float64 `json:"flying_s"`   // time flying within the bout
	HoveringS         float64 `json:"hovering_s"` // time hovering within the bout
}
