package track

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"

	"gocv.io/x/gocv"

	"flitlog/track/meadow"
	"flitlog/track/mot"
)

// renderScene writes the meadow scene cfg as an H.264 .mp4 into a
// temporary folder and returns its path and ground truth. With the
// environment variable FLITLOG_TRACK_CLIPS set to a folder, clips are
// kept there between runs (for tuning only; CI renders afresh).
func renderScene(t testing.TB, name string, cfg meadow.Config) (string, *meadow.Truth) {
	t.Helper()
	dir := os.Getenv("FLITLOG_TRACK_CLIPS")
	if dir == "" {
		dir = t.TempDir()
	}
	path := filepath.Join(dir, name+".mp4")
	tdir := filepath.Join(dir, name+".truth")
	if _, err := os.Stat(path); err == nil {
		if tr, err := meadow.ReadTruthDir(tdir); err == nil {
			return path, tr
		}
	}
	tr, err := meadow.WriteClip(cfg, path, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := tr.WriteDir(tdir); err != nil {
		t.Fatal(err)
	}
	return path, tr
}

// trackFile runs a Tracker over a whole clip.
func trackFile(t testing.TB, path string, s Settings) ([]Track, Stats, VideoInfo, error) {
	t.Helper()
	src, err := Open(path, SourceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	tr, err := NewTracker(s, src.Info())
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	m := gocv.NewMat()
	defer m.Close()
	var endErr error
	for {
		fi, err := src.Next(&m)
		if err != nil {
			if !errors.Is(err, io.EOF) {
				endErr = err
			}
			break
		}
		if err := tr.Step(fi, m); err != nil {
			t.Fatal(err)
		}
	}
	return tr.Finish(), tr.Stats(), src.Info(), endErr
}

// truthObs turns meadow ground truth into scoring observations (IDs from 1).
func truthObs(tr *meadow.Truth) []mot.Obs {
	out := make([]mot.Obs, 0, len(tr.Points))
	for _, p := range tr.Points {
		out = append(out, mot.Obs{Frame: p.Frame, ID: p.BeeID + 1, XPX: p.XPX, YPX: p.YPX})
	}
	return out
}

// sceneSettings are the tracker settings that match a scene's camera.
func sceneSettings(tr *meadow.Truth) Settings {
	return Settings{PXPerMM: tr.PXPerMM, BodyLengthMM: tr.Config.BeeLengthMM}
}

// testScenes are the synthetic scenes of the accuracy tests, kept short
// for the test-time budget: each is the shortest clip that still holds
// the events its targets are about.
var testScenes = map[string]meadow.Config{
	// One bee, a landing of at least 30 s, an inspection, an exit and
	// re-entry, a leaf it passes behind.
	"t_single": func() meadow.Config {
		c, _ := meadow.Preset("single")
		c.Name, c.DurationS = "t_single", 48
		c.MinInspections, c.MinRevisits, c.MinExits = 1, 0, 1
		return c
	}(),
	// Three bees with close passes, at 720p.
	"t_three": func() meadow.Config {
		c, _ := meadow.Preset("three")
		c.Name, c.WidthPX, c.HeightPX, c.PXPerMM, c.DurationS = "t_three", 1280, 720, 1280.0/600, 30
		c.Flowers = 8
		return c
	}(),
	// Strong wind and camera shake.
	"t_windy": func() meadow.Config {
		c, _ := meadow.Preset("windy")
		c.Name, c.DurationS = "t_windy", 25
		return c
	}(),
}
