package meadow_test

import (
	"fmt"
	"log"

	"gocv.io/x/gocv"

	"flitlog/track/meadow"
)

// Plan the "single" preset, check what it promises, and render one frame.
func ExampleNew() {
	cfg, err := meadow.Preset("single")
	if err != nil {
		log.Fatal(err)
	}
	s, err := meadow.New(cfg)
	if err != nil {
		log.Fatal(err)
	}
	defer s.Close()
	w, h := s.Size()
	fmt.Printf("%d frames of %dx%d at %g fps\n", s.Frames(), w, h, s.FPS())

	tr := s.Truth()
	long := 0
	for _, l := range tr.Landings {
		if l.DurationS >= 30 && !l.CensoredEnd {
			long++
		}
	}
	fmt.Printf("flowers: %d, landings of 30 s or more: %d\n", len(tr.Flowers.Flowers), long)

	frame := gocv.NewMat()
	defer frame.Close()
	s.Render(100, &frame)
	fmt.Println("frame 100:", frame.Cols(), "x", frame.Rows(), "channels", frame.Channels())
	// Output:
	// 2250 frames of 1280x720 at 30 fps
	// flowers: 7, landings of 30 s or more: 1
	// frame 100: 1280 x 720 channels 3
}
