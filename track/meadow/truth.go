package meadow

import (
	"flitlog/kinematics"
	"flitlog/visits"
)

// Truth is the exact ground truth of a scene.
type Truth struct {
	Config            Config // with defaults filled in
	FPS               float64
	Frames            int
	WidthPX, HeightPX int
	PXPerMM           float64
	// Flowers at rest, with FrameWidthPX/FrameHeightPX set. Flower heads
	// sway about these positions by up to Config.FlowerSwayPX.
	Flowers visits.FlowerMap
	// Points: one per bee per frame while the bee's body centre is inside
	// the frame, ordered by BeeID, then Frame.
	Points []TruthPoint
	// Landings and Inspections follow the conventions of package visits
	// (inclusive frames; EndS is the time of the frame after EndFrame),
	// ordered by StartFrame, then TrackID. TrackID is the BeeID.
	Landings    []visits.Landing
	Inspections []visits.Inspection
	// Crossings are the close passes of two airborne bees.
	Crossings []Crossing
	// Occluder is the leaf bees pass behind, nil if none.
	Occluder *Occluder
}

// TruthPoint is the true pose of one bee in one frame.
type TruthPoint struct {
	Frame int
	TimeS float64 // Frame / FPS
	BeeID int     // from 0
	// XPX, YPX: body centre in the image, px, with pixel centres at integer
	// coordinates (OpenCV convention). Includes camera shake and the sway
	// of the flower a landed bee sits on.
	XPX, YPX float64
	State    kinematics.State
	// HeadingDeg: direction the head points, atan2(dy, dx) in degrees for
	// an image step (dx, dy), in (-180, 180]. With the image y axis
	// pointing down, positive angles turn clockwise on screen; this is the
	// convention of kinematics.Sample.HeadingDeg with a plain px/mm scale.
	HeadingDeg float64
	// Visible is false when the body is wholly hidden behind the occluder.
	Visible bool
}

// Crossing is one close pass of bees BeeA < BeeB, both airborne and both
// in the frame, with centres closer than Config.CrossingBodyLengths body
// lengths of bee 0 from StartFrame to EndFrame (inclusive).
type Crossing struct {
	BeeA, BeeB           int
	StartFrame, EndFrame int
	MinFrame             int     // frame of the closest approach
	MinDistPX            float64 // centre distance at MinFrame, px
}

// Occluder is the leaf bees pass behind: an ellipse with centre (XPX, YPX)
// at rest, semi-axes APX and BPX, major axis at AngleDeg (image angle,
// clockwise on screen from +x, as OpenCV draws it).
type Occluder struct {
	XPX, YPX, APX, BPX, AngleDeg float64
}

// BeeIDs returns the ids of the bees that appear in the truth points, in
// increasing order.
func (t *Truth) BeeIDs() []int {
	seen := map[int]bool{}
	var ids []int
	for _, p := range t.Points {
		if !seen[p.BeeID] {
			seen[p.BeeID] = true
			ids = append(ids, p.BeeID)
		}
	}
	return ids
}

// Track returns the truth points of one bee, ordered by frame.
func (t *Truth) Track(beeID int) []TruthPoint {
	var ps []TruthPoint
	for _, p := range t.Points {
		if p.BeeID == beeID {
			ps = append(ps, p)
		}
	}
	return ps
}
