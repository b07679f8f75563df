package calibration_test

import (
	"fmt"

	"flitlog/calibration"
)

// A plain scale: 2.5 px per mm on the flower plane.
func ExampleFromScale() {
	c, err := calibration.FromScale(2.5)
	if err != nil {
		fmt.Println(err)
		return
	}
	x, y := c.ToPlaneMM(640, 360)
	fmt.Printf("pixel (640, 360) is at (%.0f, %.0f) mm; %.1f px/mm\n", x, y, c.NominalPXPerMM())
	_, err = calibration.FromScale(0)
	fmt.Println(err)
	// Output:
	// pixel (640, 360) is at (256, 144) mm; 2.5 px/mm
	// scale 0 px/mm is not usable: give the pixels per millimetre on the flower plane, > 0 (measure a ruler in the frame, or use 'flitlog calibrate scale')
}

// A 300 mm ruler lying on the patch spans 900 px in the frame.
func ExampleScaleFromPoints() {
	s, err := calibration.ScaleFromPoints(200, 500, 1100, 500, 300, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.3f +- %.4f px/mm (%.2f%%)\n", s.PXPerMM, s.UncertaintyPXPerMM, 100*s.RelativeUncertainty())
	// Output:
	// 3.000 +- 0.0067 px/mm (0.22%)
}

// Frame times from an fps override, the container's timestamps or the
// nominal rate, in that order.
func ExampleNewTimeBase() {
	tb, err := calibration.NewTimeBase([]float64{3.0, 3.02, 3.04, 3.06}, 50, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: frame 2 at %.2f s, frame 10 at %.2f s\n", tb.Source(), tb.Seconds(2), tb.Seconds(10))
	// Output:
	// container timestamps: frame 2 at 0.04 s, frame 10 at 0.20 s
}
