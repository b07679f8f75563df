package overlay_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"

	"flitlog/cmd/flitlog/internal/overlay"
	"flitlog/kinematics"
	"flitlog/visits"

	"gocv.io/x/gocv"
)

func ExampleTimeline_At() {
	fm := visits.FlowerMap{Flowers: []visits.Flower{{ID: "A1", XPX: 100, YPX: 100, RPX: 20}}}
	bee := kinematics.Result{ID: 4}
	for f := 0; f < 90; f++ {
		bee.Samples = append(bee.Samples, kinematics.Sample{
			Point: kinematics.Point{Frame: f, TimeS: float64(f) / 30, XPX: 100, YPX: 100, Observed: true},
			State: kinematics.Landed})
	}
	landings := []visits.Landing{{TrackID: 4, FlowerID: "A1", StartFrame: 15, EndFrame: 89, StartS: 0.5, EndS: 3}}
	tl := overlay.NewTimeline(fm, []kinematics.Result{bee}, landings, nil)
	st := tl.At(60, 2.0)
	m := st.Tracks[0]
	fmt.Printf("bee %d %s on %s for %.1f s, trail of %d points\n", m.ID, m.State, m.FlowerID, m.OnFlowerS, len(m.Trail))
	// Output: bee 4 landed on A1 for 1.5 s, trail of 31 points
}

func ExampleCreate() {
	dir, err := os.MkdirTemp("", "overlay-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	w, err := overlay.Create(filepath.Join(dir, "overlay.mp4"), 320, 240, 25)
	if err != nil {
		log.Fatal(err)
	}
	frame := gocv.NewMatWithSize(240, 320, gocv.MatTypeCV8UC3)
	defer frame.Close()
	for f := 0; f < 10; f++ {
		// A real pass decodes the clip again and asks a Timeline for the state.
		if err := w.Draw(&frame, f, overlay.FrameState{Frame: f, TimeS: float64(f) / 25}); err != nil {
			log.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		log.Fatal(err)
	}
	fmt.Println(w.Frames(), "frames written")
	// Output: 10 frames written
}
