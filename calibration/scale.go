package calibration

import (
	"fmt"
	"math"
)

// ClickErrorPX is the click precision assumed for scale uncertainty: each
// end of the reference may be off by this many pixels.
const ClickErrorPX = 1.0

// MinScaleDistancePX is the shortest reference ScaleFromPoints accepts:
// below it a 1 px click error alone is over 10% of the scale.
const MinScaleDistancePX = 10.0

// Scale is a px/mm scale measured from a reference object of known length
// in the image.
type Scale struct {
	PXPerMM    float64 // DistancePX / length, px/mm
	DistancePX float64 // distance between the two clicked points (undistorted), px
	// UncertaintyPXPerMM is the largest change of PXPerMM that a click
	// error of ClickErrorPX at each end can cause: both ends moved
	// outwards (or inwards) along the reference change its length by
	// 2 ClickErrorPX, so the uncertainty is 2 ClickErrorPX / length, px/mm,
	// and the relative uncertainty 2 ClickErrorPX / DistancePX.
	UncertaintyPXPerMM float64
}

// RelativeUncertainty is UncertaintyPXPerMM / PXPerMM.
func (s Scale) RelativeUncertainty() float64 { return s.UncertaintyPXPerMM / s.PXPerMM }

// ScaleFromPoints measures px/mm from the two ends (x1, y1), (x2, y2) of
// a reference of known length lengthMM (a ruler, a marked stick, a
// blossom disc of known diameter) lying on the flower plane. With cam !=
// nil the points are undistorted first.
func ScaleFromPoints(x1, y1, x2, y2, lengthMM float64, cam *Camera) (Scale, error) {
	for _, v := range []float64{x1, y1, x2, y2} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Scale{}, fmt.Errorf("reference points (%g,%g) and (%g,%g) must be finite pixel positions", x1, y1, x2, y2)
		}
	}
	if !(lengthMM > 0) || math.IsInf(lengthMM, 0) {
		return Scale{}, fmt.Errorf("reference length %g mm: give the real length of the object between the two points, > 0 mm", lengthMM)
	}
	if cam != nil {
		x1, y1 = cam.Undistort(x1, y1)
		x2, y2 = cam.Undistort(x2, y2)
	}
	d := math.Hypot(x2-x1, y2-y1)
	if d < MinScaleDistancePX {
		return Scale{}, fmt.Errorf("the two reference points are only %.1f px apart: click the ends of a longer object (100 px or more keeps the scale within 2%%)", d)
	}
	return Scale{
		PXPerMM:            d / lengthMM,
		DistancePX:         d,
		UncertaintyPXPerMM: 2 * ClickErrorPX / lengthMM,
	}, nil
}
