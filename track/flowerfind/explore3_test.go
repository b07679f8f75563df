package flowerfind_test

import (
	"testing"

	"flitlog/track/meadow"
	"flitlog/visits"
)

func TestExploreSigned(t *testing.T) {
	for _, name := range []string{"single", "three"} {
		cfg, _ := meadow.Preset(name)
		sc, _ := meadow.New(cfg)
		tr := sc.Truth()
		for _, sig := range []float64{0, 1} {
			ks := meadowTracks(t, tr, sig, 1)
			set := visits.DefaultSettings()
			set.RestTolSigma = 2
			set.StillNoiseFactor = 1.2
			res, _ := visits.Analyze(ks, tr.Flowers, visits.Clip{Frames: tr.Frames, FPS: tr.FPS, PXPerMM: tr.PXPerMM}, set)
			for _, l := range tr.Landings {
				for _, g := range res.Landings {
					if g.FlowerID == l.FlowerID && g.StartFrame <= l.EndFrame && l.StartFrame <= g.EndFrame {
						t.Logf("%s sig %.0f flower %s truth %d-%d got %d-%d  d0 %+d d1 %+d cens %v%v", name, sig, l.FlowerID, l.StartFrame, l.EndFrame, g.StartFrame, g.EndFrame, g.StartFrame-l.StartFrame, g.EndFrame-l.EndFrame, l.CensoredStart, l.CensoredEnd)
					}
				}
			}
			for _, g := range res.Landings {
				ok := false
				for _, l := range tr.Landings {
					if g.FlowerID == l.FlowerID && g.StartFrame <= l.EndFrame && l.StartFrame <= g.EndFrame {
						ok = true
					}
				}
				if !ok {
					t.Logf("%s sig %.0f FALSE landing %+v", name, sig, g)
				}
			}
		}
	}
}
