package link_test

import (
	"math/rand/v2"
	"testing"

	"flitlog/track/mot"
)

func TestDiagFoliage(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	const n = 1800
	truth := append(meander(1, n, 200, 200, 150, rng), meander(2, n, 450, 300, 150, rng)...)
	leaves := [][2]float64{{100, 80}, {320, 60}, {560, 100}, {80, 400}, {330, 420}, {580, 380}}
	tracks, _ := scene{truth: truth, frames: n, sigmaPX: 1, pDetect: 0.95, leaves: leaves, leafP: 0.3, leafPX: 15, seed: 6}.run(t)
	hyp := mot.FromTracks(tracks, false)
	pairs, _ := mot.MatchPairs(truth, hyp, blPX)
	m := map[[2]int]int{}
	for _, p := range pairs {
		m[[2]int{p.HypID, p.TruthID}]++
	}
	for _, tr := range tracks {
		obs := 0
		for _, p := range tr.Points {
			if p.Observed {
				obs++
				if tr.ID == 3 {
					t.Logf("   f %d (%.1f,%.1f)", p.Frame, p.XPX, p.YPX)
				}
			}
		}
		t.Logf("track %d frames %d-%d len %d observed %d matched1 %d matched2 %d start (%.0f,%.0f)", tr.ID, tr.Points[0].Frame, tr.Points[len(tr.Points)-1].Frame, len(tr.Points), obs, m[[2]int{tr.ID, 1}], m[[2]int{tr.ID, 2}], tr.Points[0].XPX, tr.Points[0].YPX)
	}
}
