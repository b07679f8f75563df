package flowerfind_test

import (
	"math"
	"testing"

	"flitlog/track/meadow"
)

func TestExploreOnset(t *testing.T) {
	cfg, _ := meadow.Preset("single")
	sc, _ := meadow.New(cfg)
	tr := sc.Truth()
	ks := meadowTracks(t, tr, 1, 1)
	for _, c := range [][2]int{{1286, 1260}, {1537, 1515}, {50, 40}} {
		ps := tr.Track(0)
		var rx, ry float64
		for _, p := range ps {
			if p.Frame == c[0]+3 {
				rx, ry = p.XPX, p.YPX
			}
		}
		for _, k := range ks {
			for _, s := range k.Samples {
				if s.Frame >= c[1] && s.Frame <= c[0]+3 {
					var tp meadow.TruthPoint
					for _, p := range ps {
						if p.Frame == s.Frame {
							tp = p
						}
					}
					t.Logf("frame %d state %v truthdist %.2f mm noisydist %.2f speed %.1f", s.Frame, tp.State, math.Hypot(tp.XPX-rx, tp.YPX-ry)/tr.PXPerMM, math.Hypot(s.XPX-rx, s.YPX-ry)/tr.PXPerMM, s.SpeedMMPerS)
				}
			}
		}
	}
}
