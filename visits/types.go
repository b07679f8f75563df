package visits

// Landing is one landing of one bee on one flower: a flower visit.
//
// Frames are inclusive: StartFrame is the first frame the bee is landed on
// the flower, EndFrame the last. StartS is the time of StartFrame and EndS
// the time of the frame after EndFrame (the take-off frame; extrapolated by
// one frame period at the clip's end), so DurationS = EndS - StartS is the
// handling time and a one-frame landing lasts one frame period.
type Landing struct {
	TrackID    int
	FlowerID   string
	StartFrame int
	EndFrame   int
	StartS     float64
	EndS       float64
	DurationS  float64 // handling time, s
	// Mean speed over the approach and departure windows, mm/s
	// (NaN where the track does not cover the window).
	ApproachSpeedMMPerS  float64
	DepartureSpeedMMPerS float64
	Revisit              bool    // this bee landed on this flower before in the clip
	SincePrevVisitS      float64 // since this flower's previous landing by any bee ended, s; NaN if none
	Index                int     // 1-based position in this bee's sequence of landings
	// Censored: the landing is cut by the clip's start or end (or the
	// track's), so its true duration is longer than DurationS.
	CensoredStart bool
	CensoredEnd   bool

	// Added fields (beyond the first contract).
	FlowerKind string  // the flower's kind from the flower map ("" if not given)
	RewardUL   float64 // nectar taken, uL: the flower's reward_ul on its first landing in the clip, 0 on later ones; NaN where the map gives no reward
}

// Inspection is an approach to a flower with hovering near it that ends
// without a landing. Frames are inclusive as for Landing.
type Inspection struct {
	TrackID    int
	FlowerID   string
	StartFrame int
	EndFrame   int
	StartS     float64
	EndS       float64
	DurationS  float64
	MinDistMM  float64 // closest approach to the flower's edge, mm (NaN if unknown)

	// Added fields (beyond the first contract).
	FlowerKind    string // the flower's kind from the flower map ("" if not given)
	CensoredStart bool   // cut by the clip's or track's start
	CensoredEnd   bool   // cut by the clip's or track's end
}
