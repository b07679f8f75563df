package kinematics_test

import (
	"fmt"

	"flitlog/kinematics"
)

// A bee sits on a blossom for 1 s, flies 300 mm straight to the next one
// in 1 s, and sits there for 1 s; 30 frames per second. The smoothing
// window (0.2 s) spreads the abrupt take-off and landing over a few
// frames, so the bout starts 3 frames early and its path is 2 mm longer
// than the 300 mm flown.
func ExampleAnalyze() {
	tr := kinematics.Track{ID: 1}
	x := 0.0
	for f := 0; f < 90; f++ {
		if f >= 30 && f < 60 {
			x += 10 // mm per frame: 300 mm/s
		}
		tr.Points = append(tr.Points, kinematics.Point{
			Frame: f, TimeS: float64(f) / 30, XMM: x, YMM: 40, Observed: true,
		})
	}
	res, err := kinematics.Analyze(tr, kinematics.DefaultSettings())
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("frame 45: %.0f mm/s, heading %.0f deg, %v\n",
		res.Samples[45].SpeedMMPerS, res.Samples[45].HeadingDeg, res.Samples[45].State)
	for _, b := range res.Bouts {
		fmt.Printf("bout frames %d-%d: path %.0f mm, straightness %.2f, median speed %.0f mm/s\n",
			b.StartFrame, b.EndFrame, b.PathLengthMM, b.StraightnessIndex, b.SpeedMedianMMPerS)
	}
	fmt.Printf("landed %.1f s, flying %.1f s, hovering %.1f s\n", res.LandedS, res.FlyingS, res.HoveringS)
	// Output:
	// frame 45: 300 mm/s, heading 0 deg, flying
	// bout frames 27-61: path 302 mm, straightness 1.00, median speed 300 mm/s
	// landed 1.8 s, flying 1.2 s, hovering 0.0 s
}
