package plots_test

import (
	"bytes"
	"fmt"
	"image"
	"image/png"
	"log"

	"flitlog/cmd/flitlog/internal/plots"
	"flitlog/kinematics"
	"flitlog/visits"
)

func ExamplePathPlot() {
	fm := visits.FlowerMap{FrameWidthPX: 640, FrameHeightPX: 360,
		Flowers: []visits.Flower{{ID: "A1", XPX: 320, YPX: 180, RPX: 30}}}
	tr := kinematics.Result{ID: 1}
	for k := 0; k < 30; k++ {
		tr.Samples = append(tr.Samples, kinematics.Sample{Point: kinematics.Point{
			Frame: k, TimeS: float64(k) / 30, XPX: 20 + 10*float64(k), YPX: 180, Observed: true}})
	}
	frame := image.NewGray(image.Rect(0, 0, 640, 360)) // the clip's background frame
	var buf bytes.Buffer
	if err := plots.PathPlot(&buf, frame, fm, []kinematics.Result{tr}, nil, plots.Options{Title: "bee 1"}); err != nil {
		log.Fatal(err)
	}
	img, err := png.Decode(&buf)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(img.Bounds().Size())
	// Output: (1600,900)
}

func ExampleSpeedPlot() {
	tr := kinematics.Result{ID: 1}
	for k := 0; k < 60; k++ {
		st := kinematics.Flying
		if k >= 30 {
			st = kinematics.Landed
		}
		tr.Samples = append(tr.Samples, kinematics.Sample{
			Point:       kinematics.Point{Frame: k, TimeS: float64(k) / 30},
			SpeedMMPerS: 300 - 10*float64(k%30), State: st})
	}
	var buf bytes.Buffer
	if err := plots.SpeedPlot(&buf, []kinematics.Result{tr}, plots.Options{WidthPX: 1200}); err != nil {
		log.Fatal(err)
	}
	img, err := png.Decode(&buf)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(img.Bounds().Size())
	// Output: (1200,900)
}

func ExampleTimelinePlot() {
	fm := visits.FlowerMap{Flowers: []visits.Flower{{ID: "A1"}, {ID: "B2"}}}
	landings := []visits.Landing{
		{TrackID: 1, FlowerID: "A1", StartS: 1, EndS: 3.5, DurationS: 2.5},
		{TrackID: 1, FlowerID: "B2", StartS: 4, EndS: 5, DurationS: 1, CensoredEnd: true},
	}
	inspections := []visits.Inspection{{TrackID: 2, FlowerID: "A1", StartS: 0.2, EndS: 0.8}}
	var buf bytes.Buffer
	if err := plots.TimelinePlot(&buf, fm, landings, inspections, 5, plots.Options{}); err != nil {
		log.Fatal(err)
	}
	img, err := png.Decode(&buf)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(img.Bounds().Size())
	// Output: (1600,600)
}

func ExampleTrackColor() {
	for _, id := range []int{1, 2, 8} {
		c := plots.TrackColor(id)
		fmt.Printf("track %d: #%02X%02X%02X\n", id, c.R, c.G, c.B)
	}
	// Output:
	// track 1: #E69F00
	// track 2: #56B4E9
	// track 8: #E69F00
}
