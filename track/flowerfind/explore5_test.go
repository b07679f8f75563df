package flowerfind_test

import (
	"fmt"
	"sort"
	"testing"

	"flitlog/track/meadow"
	"flitlog/visits"
)

func TestExplorePooled(t *testing.T) {
	for _, sig := range []float64{0.3, 0.7, 1} {
		for _, k := range []float64{1.5, 2} {
			hist0 := map[int]int{}
			hist1 := map[int]int{}
			var sc []visits.Score
			for _, name := range []string{"single", "three"} {
				cfg, _ := meadow.Preset(name)
				scn, _ := meadow.New(cfg)
				tr := scn.Truth()
				for seed := uint64(1); seed <= 5; seed++ {
					ks := meadowTracks(t, tr, sig, seed)
					set := visits.DefaultSettings()
					set.RestTolSigma = k
					set.StillNoiseFactor = 1.2
					res, _ := visits.Analyze(ks, tr.Flowers, visits.Clip{Frames: tr.Frames, FPS: tr.FPS, PXPerMM: tr.PXPerMM}, set)
					sc = append(sc, visits.ScoreAgainstTruth(tr.Landings, tr.Inspections, res.Landings, res.Inspections))
					for _, l := range tr.Landings {
						for _, g := range res.Landings {
							if g.FlowerID == l.FlowerID && g.StartFrame <= l.EndFrame && l.StartFrame <= g.EndFrame {
								if !l.CensoredStart && !g.CensoredStart {
									hist0[g.StartFrame-l.StartFrame]++
								}
								if !l.CensoredEnd && !g.CensoredEnd {
									hist1[g.EndFrame-l.EndFrame]++
								}
							}
						}
					}
				}
			}
			show := func(h map[int]int) string {
				var ks []int
				for k := range h {
					ks = append(ks, k)
				}
				sort.Ints(ks)
				s := ""
				for _, k := range ks {
					s += fmt.Sprintf(" %+d:%d", k, h[k])
				}
				return s
			}
			minF1, minIR, maxIL := 1.0, 1.0, 0.0
			for _, s := range sc {
				minF1 = min(minF1, s.LandingF1)
				minIR = min(minIR, s.InspectionRecall)
				maxIL = max(maxIL, s.InspectionsAsLandingsFrac)
			}
			t.Logf("sig %.1f k %.1f minF1 %.3f minInspRecall %.3f maxInspAsL %.3f onset%s | offset%s", sig, k, minF1, minIR, maxIL, show(hist0), show(hist1))
		}
	}
}
