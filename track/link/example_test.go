package link_test

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"flitlog/track/link"
)

func ExampleAssign() {
	// Three workers, three jobs; +Inf forbids worker 2 from job 0.
	cost := mat.NewDense(3, 3, []float64{
		15, 10, 9,
		9, 15, 10,
		math.Inf(1), 12, 8,
	})
	rowToCol, total := link.Assign(cost)
	fmt.Println(rowToCol, total)
	// Output: [1 0 2] 27
}

// The 0.99 quantile of chi-square with 2 degrees of freedom is 9.210 in
// any statistical table (NIST/SEMATECH e-Handbook, upper critical values
// of the chi-square distribution; see gate_test.go).
func ExampleGateD2() {
	fmt.Printf("%.3f\n", link.GateD2(0.99))
	// Output: 9.210
}

func ExampleLinker() {
	// Two bees fly across a 640x480 frame at 30 frames/s, one of them
	// missed in frames 10-12; the other lands at frame 20 and sits.
	l := link.NewLinker(link.DefaultSettings(30, 20))
	for f := 0; f < 40; f++ {
		var dets []link.Detection
		if f < 10 || f > 12 {
			dets = append(dets, link.Detection{XPX: 50 + 6*float64(f), YPX: 100})
		}
		x := 300 + 4*float64(min(f, 20))
		dets = append(dets, link.Detection{XPX: x, YPX: 300})
		l.Step(f, dets)
	}
	for _, tr := range l.Finish() {
		observed := 0
		for _, p := range tr.Points {
			if p.Observed {
				observed++
			}
		}
		first, last := tr.Points[0], tr.Points[len(tr.Points)-1]
		fmt.Printf("track %d: frames %d-%d, %d detected, ends at (%.0f, %.0f)\n",
			tr.ID, first.Frame, last.Frame, observed, last.XPX, last.YPX)
	}
	// Output:
	// track 1: frames 0-39, 37 detected, ends at (284, 100)
	// track 2: frames 0-39, 40 detected, ends at (380, 300)
}
