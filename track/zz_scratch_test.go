package track

import (
	"strconv"
	"fmt"
	"math"
	"os"
	"testing"
	"time"

	"flitlog/track/meadow"
	"flitlog/track/mot"
)

func diag(t *testing.T, name string, truth *meadow.Truth, tracks []Track, s Settings) {
	gt := truthObs(truth)
	hyp := mot.FromTracks(tracks, false)
	sc, _ := mot.Evaluate(gt, hyp, 0.5*s.BodyLengthPX())
	t.Logf("%s: tracks %d MOTA %.4f RMSE %.3f IDF1 %.3f sw %d miss %d fp %d false %v", name, len(tracks), sc.MOTA, sc.RMSEPX, sc.IDF1, sc.IDSwitches, sc.Misses, sc.FalsePositives, sc.FalseTracks)
	pairs, _ := mot.MatchPairs(gt, hyp, 0.5*s.BodyLengthPX())
	type key struct{ f, id int }
	tp := map[key]meadow.TruthPoint{}
	for _, p := range truth.Points {
		tp[key{p.Frame, p.BeeID + 1}] = p
	}
	hp := map[key]mot.Obs{}
	for _, h := range hyp {
		hp[key{h.Frame, h.ID}] = h
	}
	obs := map[key]bool{}
	for _, tr := range tracks {
		for _, p := range tr.Points {
			obs[key{p.Frame, tr.ID}] = p.Observed
		}
	}
	agg := map[string][4]float64{}
	for _, p := range pairs {
		g := tp[key{p.Frame, p.TruthID}]
		h := hp[key{p.Frame, p.HypID}]
		k := fmt.Sprintf("%v obs=%v vis=%v", g.State, obs[key{p.Frame, p.HypID}], g.Visible)
		if g.State.String() == "landed" {
			k += fmt.Sprintf(" at (%.0f,%.0f)", math.Round(g.XPX/40)*40, math.Round(g.YPX/40)*40)
		}
		a := agg[k]
		a[0]++
		a[1] += h.XPX - g.XPX
		a[2] += h.YPX - g.YPX
		a[3] += (h.XPX-g.XPX)*(h.XPX-g.XPX) + (h.YPX-g.YPX)*(h.YPX-g.YPX)
		agg[k] = a
	}
	for k, a := range agg {
		t.Logf("  %-30s n=%5.0f bias=(%.2f,%.2f) rmse=%.2f", k, a[0], a[1]/a[0], a[2]/a[0], math.Sqrt(a[3]/a[0]))
	}
	for _, p := range pairs {
		if p.Switch {
			t.Logf("switch at frame %d truth %d -> hyp %d", p.Frame, p.TruthID, p.HypID)
		}
	}
	so, _ := mot.Evaluate(gt, mot.FromTracks(tracks, true), 0.5*s.BodyLengthPX())
	t.Logf("observed only: MOTA %.4f RMSE %.3f IDF1 %.3f sw %d miss %d fp %d false %v", so.MOTA, so.RMSEPX, so.IDF1, so.IDSwitches, so.Misses, so.FalsePositives, so.FalseTracks)
	matched := map[key]bool{}
	for _, p := range pairs {
		matched[key{p.Frame, p.HypID}] = true
	}
	fpFrames := []int{}
	for _, h := range hyp {
		if !matched[key{h.Frame, h.ID}] {
			fpFrames = append(fpFrames, h.Frame)
		}
	}
	if len(fpFrames) > 40 {
		fpFrames = fpFrames[:40]
	}
	t.Logf("FP frames: %v", fpFrames)
	for _, tr := range tracks {
		n, sx, sy := 0, 0.0, 0.0
		for _, p := range tr.Points {
			if p.Observed {
				n++
			}
			sx += p.XPX
			sy += p.YPX
		}
		np := float64(len(tr.Points))
		t.Logf("  track %d frames %d-%d obs %d mean (%.0f,%.0f)", tr.ID, tr.Points[0].Frame, tr.Points[len(tr.Points)-1].Frame, n, sx/np, sy/np)
	}
}

func TestScratchMeadow(t *testing.T) {
	name := os.Getenv("SCENE")
	cfg, _ := meadow.Preset(name)
	path, truth := renderScene(t, name, cfg)
	t0 := time.Now()
	s := sceneSettings(truth)
	s.Stabilize = os.Getenv("STAB") != ""
	if v, err := strconv.ParseFloat(os.Getenv("ACC"), 64); err == nil {
		s.Link.AccelSigmaPXPerS2 = v * s.BodyLengthPX()
	}
	if v, err := strconv.ParseFloat(os.Getenv("MING"), 64); err == nil {
		s.Link.MinGateRadiusPX = v * s.BodyLengthPX()
	}
	tracks, st, _, err := trackFile(t, path, s)
	t.Logf("track %v err %v stats %+v", time.Since(t0), err, st)
	diag(t, name, truth, tracks, s)
}
