package flowerfind_test

import (
	"math/rand/v2"
	"testing"

	"flitlog/kinematics"
	"flitlog/track/meadow"
	"flitlog/visits"
)

// meadowTracks turns the truth points of a scene into kinematics results:
// one track per bee and stretch of consecutive frames (a bee leaving the
// frame comes back as a new track, as from a tracker), with Gaussian
// position noise of sigmaPX per axis, through kinematics.Analyze.
func meadowTracks(t *testing.T, tr *meadow.Truth, sigmaPX float64, seed uint64) []kinematics.Result {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 99))
	var out []kinematics.Result
	id := 0
	for _, bee := range tr.BeeIDs() {
		ps := tr.Track(bee)
		var cur kinematics.Track
		flush := func() {
			if len(cur.Points) > 0 {
				r, err := kinematics.Analyze(cur, kinematics.DefaultSettings())
				if err != nil {
					t.Fatalf("kinematics: %v", err)
				}
				out = append(out, r)
			}
			id++
			cur = kinematics.Track{ID: id}
		}
		flush()
		for i, p := range ps {
			if i > 0 && p.Frame != ps[i-1].Frame+1 {
				flush()
			}
			x := p.XPX + sigmaPX*rng.NormFloat64()
			y := p.YPX + sigmaPX*rng.NormFloat64()
			cur.Points = append(cur.Points, kinematics.Point{Frame: p.Frame, TimeS: p.TimeS, XPX: x, YPX: y,
				XMM: x / tr.PXPerMM, YMM: y / tr.PXPerMM, Observed: true})
		}
		flush()
	}
	return out
}

func TestMeadowExplore(t *testing.T) {
	for _, name := range []string{"single", "three"} {
		cfg, err := meadow.Preset(name)
		if err != nil {
			t.Fatal(err)
		}
		sc, err := meadow.New(cfg)
		if err != nil {
			t.Fatal(err)
		}
		tr := sc.Truth()
		for _, sig := range []float64{0, 0.7, 1} {
		for _, k := range []float64{1.0, 1.5, 2, 2.5} {
			ks := meadowTracks(t, tr, sig, 1)
			clip := visits.Clip{Frames: tr.Frames, FPS: tr.FPS, PXPerMM: tr.PXPerMM}
			set := visits.DefaultSettings()
			set.RestTolSigma = k
			set.StillNoiseFactor = 1.2
			res, err := visits.Analyze(ks, tr.Flowers, clip, set)
			if err != nil {
				t.Fatal(err)
			}
			sc := visits.ScoreAgainstTruth(tr.Landings, tr.Inspections, res.Landings, res.Inspections)
			t.Logf("%s sigma %.1f k %.1f: est %.3f (true %.3f) %v", name, sig, k, res.Summary.Clip.PositionNoiseMM, sig/tr.PXPerMM, sc)
		}
		}
		sc.Close()
	}
}
