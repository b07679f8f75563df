package track

import (
	"errors"
	"io"
	"math"
	"testing"

	"gocv.io/x/gocv"

	"flitlog/track/meadow"
	"flitlog/track/mot"
)

// renderScene returns the meadow scene cfg as an H.264 .mp4 and its ground
// truth, rendered once into the module's clip cache (.cache/clips, which a
// fresh checkout does not have; see meadow.CachedClip) and shared with the
// other packages' tests that use the same scene.
func renderScene(t testing.TB, name string, cfg meadow.Config) (string, *meadow.Truth) {
	t.Helper()
	path, tr, err := meadow.CachedClip(cfg, meadow.TestCacheDir(), ".mp4")
	if err != nil {
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
	// One bee, the whole single preset (75 s): a landing of at least
	// 30 s, half of it on a borage flower whose dark centre is as dark as
	// the bee, two inspections, a revisit, an exit and re-entry, a leaf it
	// passes behind.
	"single": func() meadow.Config {
		c, _ := meadow.Preset("single")
		return c
	}(),
	// The preset "three" (1920x1080, 30 fps) cut at 52 s of its 60 s. The
	// scene is planned ahead, so the first 52 s are frame for frame those
	// of the preset (the truth points agree exactly; checked when this
	// was written). They hold all four close passes of the preset (frames
	// 56-58, 498-506, 1116-1120, 1142) and both take-offs beside another
	// bee: bee 1 leaves a flower past bee 0 hovering 1 body length away
	// (frame 1116), and bee 0 leaves its hover 0.5 body lengths from bee
	// 1 sitting on the flower (frame 1487). The last 8 s add landings
	// only, and the render time they cost. The test checks the close
	// passes and that at least two take-offs from a flower happen within
	// 3 body lengths of another bee (frames 1116 and 1248); the departure
	// from a hover at 1487 is not checked.
	"t_three": func() meadow.Config {
		c, _ := meadow.Preset("three")
		c.Name, c.DurationS = "t_three", 52
		return c
	}(),
	// Strong wind and camera shake.
	"t_windy": func() meadow.Config {
		c, _ := meadow.Preset("windy")
		c.Name, c.DurationS = "t_windy", 25
		return c
	}(),
}

// score evaluates tracks against a scene's truth with CLEAR MOT and IDF1
// (package mot; Bernardin & Stiefelhagen 2008, Ristani et al. 2016). A
// track point corresponds to a bee within half a body length: on the
// bee's body (common practice for point targets: a gate of the order of
// the object's size). observedOnly scores only the points the tracker
// detected, leaving out those filled in by coasting and gap closing.
func score(t *testing.T, truth *meadow.Truth, tracks []Track, observedOnly bool) mot.Scores {
	t.Helper()
	maxD := 0.5 * truth.Config.BeeLengthMM * truth.PXPerMM
	sc, err := mot.Evaluate(truthObs(truth), mot.FromTracks(tracks, observedOnly), maxD)
	if err != nil {
		t.Fatal(err)
	}
	return sc
}

func logScores(t *testing.T, what string, sc mot.Scores) {
	t.Helper()
	t.Logf("%s: MOTA %.4f  MOTP %.2f px  RMSE %.2f px  IDF1 %.3f  ID switches %d  misses %d  false positives %d  tracks %d  false tracks %v",
		what, sc.MOTA, sc.MOTP, sc.RMSEPX, sc.IDF1, sc.IDSwitches, sc.Misses, sc.FalsePositives, sc.HypTracks, sc.FalseTracks)
}

// TestAccuracySingleBee tracks one bee through the 75 s single preset: a
// landing of at least 30 s on a borage flower (the bee sits partly or
// wholly on its dark centre, where only colour shows it; see chroma in
// segment.go), two inspections, a revisit, an exit and re-entry, and a
// leaf it flies behind. Targets of issue 3: MOTA >= 0.98, position RMSE
// <= 1.5 px, no identity switch, the track kept through the long landing.
//
// MOTA and RMSE are taken on the observed points (positions the tracker
// detected); all points, including those filled in by coasting behind
// the leaf, are scored separately and logged. While the bee is out of the
// picture its track has no points (package link keeps the identity
// without inventing positions).
func TestAccuracySingleBee(t *testing.T) {
	t.Parallel()
	path, truth := renderScene(t, "single", testScenes["single"])
	// The scene holds what the doc comment says.
	revisits, exits := 0, 0
	for _, l := range truth.Landings {
		if l.Revisit {
			revisits++
		}
	}
	for i := 1; i < len(truth.Points); i++ {
		if truth.Points[i].Frame > truth.Points[i-1].Frame+1 {
			exits++
		}
	}
	if len(truth.Inspections) < 2 || revisits < 1 || exits < 1 || truth.Occluder == nil {
		t.Fatalf("scene has %d inspections, %d revisits, %d exits, leaf %v; want >= 2, >= 1, >= 1, a leaf", len(truth.Inspections), revisits, exits, truth.Occluder != nil)
	}
	tracks, st, _, err := trackFile(t, path, sceneSettings(truth))
	if err != nil {
		t.Fatal(err)
	}
	obs := score(t, truth, tracks, true)
	all := score(t, truth, tracks, false)
	logScores(t, "observed points", obs)
	logScores(t, "all points", all)
	t.Logf("tracker: %+v", st)
	if obs.MOTA < 0.98 {
		t.Errorf("MOTA %.4f < 0.98", obs.MOTA)
	}
	if obs.RMSEPX > 1.5 {
		t.Errorf("position RMSE %.2f px > 1.5 px", obs.RMSEPX)
	}
	if obs.IDSwitches != 0 || all.IDSwitches != 0 || len(tracks) != 1 {
		t.Errorf("%d tracks, %d / %d identity switches (observed / all points); want 1 track, 0 switches", len(tracks), obs.IDSwitches, all.IDSwitches)
	}
	// The long landing: every frame of it matched, all to one track.
	var long *visitsLanding
	for _, l := range truth.Landings {
		if l.DurationS >= 30 && (long == nil || l.DurationS > long.durS) {
			l := l
			long = &visitsLanding{l.StartFrame, l.EndFrame, l.DurationS}
		}
	}
	if long == nil {
		t.Fatal("scene has no landing of 30 s or more")
	}
	pairs, err := mot.MatchPairs(truthObs(truth), mot.FromTracks(tracks, true), 0.5*truth.Config.BeeLengthMM*truth.PXPerMM)
	if err != nil {
		t.Fatal(err)
	}
	ids := map[int]int{}
	for _, p := range pairs {
		if p.Frame >= long.start && p.Frame <= long.end {
			ids[p.HypID]++
		}
	}
	n := long.end - long.start + 1
	best := 0
	for _, c := range ids {
		best = max(best, c)
	}
	t.Logf("landing of %.1f s (frames %d-%d): detected and matched in %d of %d frames, tracks %v", long.durS, long.start, long.end, best, n, ids)
	if len(ids) != 1 || float64(best) < 0.99*float64(n) {
		t.Errorf("landing of %.1f s: matched frames per track %v of %d; want one track in >= 99 %%", long.durS, ids, n)
	}
}

// takeoffsBeside returns the frames at which a bee of the scene takes
// off (the frame after a landing's last) while another bee is within
// maxPX of it.
func takeoffsBeside(truth *meadow.Truth, maxPX float64) []int {
	at := map[[2]int][2]float64{} // (bee, frame) -> position
	for _, p := range truth.Points {
		at[[2]int{p.BeeID, p.Frame}] = [2]float64{p.XPX, p.YPX}
	}
	var out []int
	for _, l := range truth.Landings {
		f := l.EndFrame + 1
		me, ok := at[[2]int{l.TrackID, f}]
		if !ok {
			continue
		}
		for b := 0; b < truth.Config.Bees; b++ {
			if o, ok := at[[2]int{b, f}]; ok && b != l.TrackID && math.Hypot(o[0]-me[0], o[1]-me[1]) <= maxPX {
				out = append(out, f)
				break
			}
		}
	}
	return out
}

type visitsLanding struct {
	start, end int
	durS       float64
}

// TestAccuracyThreeBees tracks three bees that pass close to each other
// and take off beside one another (t_three: the preset "three", 1920x1080,
// cut at 52 s). Targets of issue 3: IDF1 >= 0.90 and at most 2 identity
// switches per minute, on all points and on the detected points alone.
// Track points are only where the tracker put them: gap closing leaves
// the time a bee spends out of the picture without points, so points
// invented there would count as false positives.
func TestAccuracyThreeBees(t *testing.T) {
	t.Parallel()
	path, truth := renderScene(t, "t_three", testScenes["t_three"])
	bl := truth.Config.BeeLengthMM * truth.PXPerMM
	if len(truth.Crossings) < 4 {
		t.Fatalf("scene has %d close passes, want >= 4", len(truth.Crossings))
	}
	if tb := takeoffsBeside(truth, 3*bl); len(tb) < 2 {
		t.Fatalf("scene has take-offs beside another bee (within 3 body lengths) at frames %v, want >= 2", tb)
	} else {
		t.Logf("take-offs beside another bee at frames %v", tb)
	}
	tracks, st, _, err := trackFile(t, path, sceneSettings(truth))
	if err != nil {
		t.Fatal(err)
	}
	for _, observed := range []bool{false, true} {
		sc := score(t, truth, tracks, observed)
		what := "all points"
		if observed {
			what = "observed points"
		}
		logScores(t, what, sc)
		perMin := mot.PerMinute(sc.IDSwitches, truth.Frames, truth.FPS)
		if sc.IDF1 < 0.90 || perMin > 2 {
			t.Errorf("%s: IDF1 %.3f (want >= 0.90), %.1f identity switches per minute (want <= 2)", what, sc.IDF1, perMin)
		}
	}
	t.Logf("close passes: %+v; tracker: %+v", truth.Crossings, st)
}

// TestAccuracyWindy: strong wind sways grass (14 px) and flowers (6 px)
// and the camera shakes (3 px); with Stabilize, at most 1 false track per
// minute (issue 3). A false track is one of whose points fewer than half
// lie on a bee (mot.Scores.FalseTracks). The bee keeps one identity:
// IDF1 >= 0.90 on all points, so fragments on swaying grass that gap
// closing chains to the bee's track count against it (our target; issue
// 3 sets none for this scene).
func TestAccuracyWindy(t *testing.T) {
	t.Parallel()
	path, truth := renderScene(t, "t_windy", testScenes["t_windy"])
	s := sceneSettings(truth)
	s.Stabilize = true
	tracks, st, _, err := trackFile(t, path, s)
	if err != nil {
		t.Fatal(err)
	}
	sc := score(t, truth, tracks, false)
	logScores(t, "all points", sc)
	logScores(t, "observed points", score(t, truth, tracks, true))
	perMin := mot.PerMinute(len(sc.FalseTracks), truth.Frames, truth.FPS)
	t.Logf("false tracks: %d in %.0f s = %.1f per minute; tracker: %+v", len(sc.FalseTracks), float64(truth.Frames)/truth.FPS, perMin, st)
	if perMin > 1 {
		t.Errorf("%.1f false tracks per minute, want <= 1", perMin)
	}
	// The scene shakes by up to about 3 px: the stabiliser must have seen it.
	if st.MeanShiftPX < 0.5 || st.MeanShiftPX > 10 || math.IsNaN(st.MeanShiftPX) {
		t.Errorf("mean estimated shake %.2f px, want a few px", st.MeanShiftPX)
	}
	// And the bee is followed for most of the clip, by one track.
	if sc.MOTA < 0.5 {
		t.Errorf("MOTA %.3f: the bee is lost", sc.MOTA)
	}
	if sc.IDF1 < 0.90 {
		t.Errorf("IDF1 %.3f, want >= 0.90: the bee's track is fragmented or carries false pieces", sc.IDF1)
	}
}
