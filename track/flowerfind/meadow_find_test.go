package flowerfind_test

import (
	"math"
	"testing"
	"time"

	"gocv.io/x/gocv"

	"flitlog/track/flowerfind"
	"flitlog/track/meadow"
)

// meadowKind maps the scene's flower kinds to the colour presets.
var meadowKind = map[string]string{"white clover": "white", "dandelion": "yellow", "borage": "purple", "red campion": "pink"}

// TestFindOnMeadowBackground renders frames spread over the "single",
// "three" and "demo" scenes (with texture, grass, wind, noise and bees),
// takes their median as the background and checks the proposed flower
// map against the scene's truth: every flower found (centre within a
// quarter of its radius) with the preset of its colour, radius within
// 15 %, no false flowers.
func TestFindOnMeadowBackground(t *testing.T) {
	for _, preset := range []string{"single", "three", "demo"} {
		t.Run(preset, func(t *testing.T) {
			cfg, err := meadow.Preset(preset)
			if err != nil {
				t.Fatal(err)
			}
			sc, err := meadow.New(cfg)
			if err != nil {
				t.Fatal(err)
			}
			defer sc.Close()
			t0 := time.Now()
			const n = 9
			var frames []gocv.Mat
			for k := 0; k < n; k++ {
				m := gocv.NewMat()
				sc.Render(k*(sc.Frames()-1)/(n-1), &m)
				frames = append(frames, m)
			}
			bg, err := flowerfind.MedianBackground(frames)
			for _, f := range frames {
				f.Close()
			}
			if err != nil {
				t.Fatal(err)
			}
			defer bg.Close()
			tr := sc.Truth()
			fm, err := flowerfind.Find(bg, flowerfind.Options{PXPerMM: tr.PXPerMM})
			if err != nil {
				t.Fatal(err)
			}
			matched, kindsOK := 0, 0
			var maxCentre, maxRadius float64
			used := map[int]bool{}
			for _, f := range tr.Flowers.Flowers {
				best, bd := -1, 0.25*f.RPX
				for j, g := range fm.Flowers {
					if d := math.Hypot(g.XPX-f.XPX, g.YPX-f.YPX); !used[j] && d < bd {
						best, bd = j, d
					}
				}
				if best < 0 {
					t.Logf("missed %s (%s) at %.0f,%.0f r %.1f", f.ID, f.Kind, f.XPX, f.YPX, f.RPX)
					continue
				}
				used[best] = true
				matched++
				g := fm.Flowers[best]
				maxCentre = math.Max(maxCentre, bd)
				maxRadius = math.Max(maxRadius, math.Abs(g.RPX-f.RPX)/f.RPX)
				if g.Kind == meadowKind[f.Kind] {
					kindsOK++
				}
			}
			for j, g := range fm.Flowers {
				if !used[j] {
					t.Logf("false flower %s (%s) at %.0f,%.0f r %.1f", g.ID, g.Kind, g.XPX, g.YPX, g.RPX)
				}
			}
			t.Logf("%s: %d flowers, %d found, %d matched, kinds right %d, centre error max %.2f px, radius error max %.1f%% (%.1f s)",
				preset, len(tr.Flowers.Flowers), len(fm.Flowers), matched, kindsOK, maxCentre, 100*maxRadius, time.Since(t0).Seconds())
			if matched != len(tr.Flowers.Flowers) || kindsOK != matched || len(fm.Flowers) != matched || maxRadius > 0.15 {
				t.Errorf("%s: %d of %d found, kinds right %d, %d proposed, radius error %.3f", preset,
					matched, len(tr.Flowers.Flowers), kindsOK, len(fm.Flowers), maxRadius)
			}
		})
	}
}
