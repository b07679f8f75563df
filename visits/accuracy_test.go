package visits

import (
	"testing"
)

// TestAccuracySynthetic checks the landing and inspection detector against
// the ground truth of synthetic foragers (synth_test.go) with position
// noise of about 1 px at 2 px/mm and 30 frames/s, speeds from
// kinematics.Analyze. Targets from issue 5: landing F1 >= 0.98, onset
// and offset error median <= 1 frame and 95th percentile <= 3 frames,
// inspection recall >= 0.9, at most 5 % of inspections reported as
// landings.
func TestAccuracySynthetic(t *testing.T) {
	cases := []struct {
		name    string
		sigmaPX float64 // per axis
	}{
		{"noise 0.7 px per axis (1 px radial rms)", 0.7},
		{"noise 1 px per axis", 1.0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var truthL, gotL []Landing
			var truthI, gotI []Inspection
			for seed := uint64(1); seed <= 4; seed++ {
				sc := newSynth(synthConfig{seed: seed, bees: 2, durationS: 90, inspectProb: 0.3,
					startLanded: true, endLanded: true})
				tl, ti := sc.truth()
				res, err := Analyze(sc.tracks(t, c.sigmaPX, seed), sc.fm, sc.clip(), DefaultSettings())
				if err != nil {
					t.Fatal(err)
				}
				// Scenes are scored together; offset frames so that
				// different scenes never overlap.
				off := int(seed) * 100000
				for _, l := range tl {
					l.StartFrame, l.EndFrame = l.StartFrame+off, l.EndFrame+off
					truthL = append(truthL, l)
				}
				for _, l := range res.Landings {
					l.StartFrame, l.EndFrame = l.StartFrame+off, l.EndFrame+off
					gotL = append(gotL, l)
				}
				for _, in := range ti {
					in.StartFrame, in.EndFrame = in.StartFrame+off, in.EndFrame+off
					truthI = append(truthI, in)
				}
				for _, in := range res.Inspections {
					in.StartFrame, in.EndFrame = in.StartFrame+off, in.EndFrame+off
					gotI = append(gotI, in)
				}
			}
			sc := ScoreAgainstTruth(truthL, truthI, gotL, gotI)
			t.Logf("%v", sc)
			if sc.TruthLandings < 40 || sc.TruthInspections < 15 {
				t.Fatalf("scene too small to score: %d landings, %d inspections", sc.TruthLandings, sc.TruthInspections)
			}
			if err := sc.MeetsTargets(); err != nil {
				t.Error(err)
			}
		})
	}
}
