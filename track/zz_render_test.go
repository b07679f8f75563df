package track

import (
	"os"
	"testing"
	"time"
)

func TestScratchRender(t *testing.T) {
	for _, name := range []string{"t_single", "t_three", "t_windy"} {
		if os.Getenv("ONLY") != "" && os.Getenv("ONLY") != name {
			continue
		}
		t0 := time.Now()
		_, truth := renderScene(t, name, testScenes[name])
		t.Logf("%s: %v frames %d points %d landings %d crossings %d", name, time.Since(t0), truth.Frames, len(truth.Points), len(truth.Landings), len(truth.Crossings))
		for _, l := range truth.Landings {
			t.Logf("   landing %+v", l)
		}
	}
}
