package visits

// Flight is the movement of one bee between two consecutive landings: the
// inter-visit interval. It starts at take-off, the frame after the earlier
// landing's EndFrame, and ends at the later landing's StartFrame, so
//
//	StartS = from.EndS, EndS = to.StartS, DurationS = EndS - StartS.
//
// From and to may be the same flower (the bee left and came back).
type Flight struct {
	TrackID      int
	FromFlowerID string
	ToFlowerID   string
	FromKind     string // kinds from the flower map ("" if not given)
	ToKind       string
	FromIndex    int // Index of the earlier landing in the bee's sequence (1-based)
	StartFrame   int // take-off: first frame after the earlier landing
	EndFrame     int // first frame of the next landing
	StartS       float64
	EndS         float64
	DurationS    float64 // inter-visit interval, s
	// DistanceMM is the straight line from the take-off point (the bee's
	// position on the last landed frame) to the landing point (its
	// position on the first landed frame of the next landing), mm on the
	// flower plane.
	DistanceMM float64
	// FlowerDistanceMM is the straight line between the two flowers'
	// centres, px converted with the clip's PXPerMM; NaN if that is unknown.
	FlowerDistanceMM float64
	// PathLengthMM is the sum of the step lengths of the track from the
	// last landed frame to the first landed frame of the next landing, mm.
	// Across a gap in the track the straight line is counted (see
	// UnseenS).
	PathLengthMM    float64
	MeanSpeedMMPerS float64 // PathLengthMM / DurationS
	Inspections     int     // inspections this bee made during the flight
	// UnseenS is the time of the flight for which the track has no
	// point: the bee was out of the picture. Where it is above zero,
	// PathLengthMM and MeanSpeedMMPerS count a straight line for that
	// part and understate the flight.
	UnseenS float64
}
