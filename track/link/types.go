package link

import "image"

// Detection is one foreground blob of one frame that passed the size and
// shape gates: a bee candidate. Positions are in pixels of the full-size
// frame with sub-pixel precision.
type Detection struct {
	Frame    int
	XPX, YPX float64 // intensity-weighted centroid, px
	AreaPX   float64 // blob area, px^2
	// Fitted ellipse (second moments of the blob): full axis lengths in px
	// and orientation of the major axis in degrees, counter-clockwise from
	// the image x axis in [0, 180).
	MajorPX, MinorPX float64
	AngleDeg         float64
	Box              image.Rectangle // bounding box, px
}

// Point is one position of a track. Observed is false where the track was
// coasted (Kalman prediction, no detection) or filled in by gap closing.
type Point struct {
	Frame    int
	XPX, YPX float64
	Observed bool
	AreaPX   float64 // of the matched detection; 0 when not observed
}

// Track is one bee's path through a clip in frame order, one point per
// frame from its first to its last frame, except while the bee was out of
// the picture: gap closing joins an exit at the frame's border to the
// re-entry but gives the frames in between no points (the frame numbers
// jump). Other gaps closed by linking (occlusion, a missed detection) are
// filled by linear interpolation and marked not observed.
type Track struct {
	ID     int
	Points []Point
}
