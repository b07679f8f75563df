package main

import (
	"encoding/csv"
	"encoding/json"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gocv.io/x/gocv"

	"flitlog/track"
	"flitlog/track/meadow"
	"flitlog/visits"
)

// opencvSample returns a file of Debian's opencv-doc sample data; in CI
// (CI=true) a missing file fails the test, elsewhere it skips.
func opencvSample(t testing.TB, name string) string {
	t.Helper()
	p := filepath.Join("/usr/share/doc/opencv-doc/examples/data", name)
	if _, err := os.Stat(p); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s missing: 'make test' installs Debian's opencv-doc", p)
		}
		t.Skipf("%s missing (install opencv-doc)", p)
	}
	return p
}

// readCSV reads a CSV file into header-keyed rows.
func readCSV(t testing.TB, path string) []map[string]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(recs) == 0 {
		t.Fatalf("%s: no header", path)
	}
	var rows []map[string]string
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = r[i]
		}
		rows = append(rows, m)
	}
	return rows
}

func readSummary(t testing.TB, path string) map[string]any {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return m
}

// TestRunEndToEndSingleBee scores the single-bee scene through the CLI and
// checks the written tables against the scene's truth, with the targets
// of the tracking and visit issues.
func TestRunEndToEndSingleBee(t *testing.T) {
	// The single-bee scene of track/accuracy_test.go (the 75 s single
	// preset: a landing of 30 s or more, partly on a dark flower centre,
	// inspections, a revisit, an exit and re-entry); the same config
	// shares its rendered clip through the cache.
	cfg, err := meadow.Preset("single")
	if err != nil {
		t.Fatal(err)
	}
	clip, truth, err := meadow.CachedClip(cfg, meadow.TestCacheDir(), ".mp4")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	flowers := filepath.Join(dir, "flowers.json")
	f, _ := os.Create(flowers)
	visits.WriteFlowerMap(f, truth.Flowers)
	f.Close()
	out := filepath.Join(dir, "out")
	code, stdout, stderr := runMain("run", "--quiet", "--px-per-mm", ftoa(truth.PXPerMM), "--flowers", flowers, "--out", out, clip)
	if code != exitOK {
		t.Fatalf("exit %d\nstdout %s\nstderr %s", code, stdout, stderr)
	}
	cd := filepath.Join(out, "clip")
	for _, name := range []string{fileTracks, fileVisits, fileInspections, fileFlights, fileSummary, filePathPlot, fileSpeedPlot, fileTimeline} {
		if st, err := os.Stat(filepath.Join(cd, name)); err != nil || st.Size() == 0 {
			t.Errorf("%s missing or empty: %v", name, err)
		}
	}
	sum := readSummary(t, filepath.Join(cd, fileSummary))
	if sum["status"] != "ok" {
		t.Errorf("summary status %v", sum["status"])
	}
	clipInfo := sum["clip"].(map[string]any)
	if int(clipInfo["frames_read"].(float64)) != truth.Frames {
		t.Errorf("frames_read %v, truth has %d frames", clipInfo["frames_read"], truth.Frames)
	}
	if len(clipInfo["sha256"].(string)) != 64 {
		t.Errorf("sha256 %q", clipInfo["sha256"])
	}

	// Tracking: targets of the tracking issue for one bee.
	sc, err := scoreTracking(filepath.Join(cd, fileTracks), truth)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("tracking: MOTA %.4f IDF1 %.4f RMSE %.2f px, %d ID switches, %d misses, %d false positives",
		sc.MOTA, sc.IDF1, sc.RMSEPX, sc.IDSwitches, sc.Misses, sc.FalsePositives)
	if sc.MOTA < 0.98 || sc.RMSEPX > 1.5 || sc.IDSwitches > 0 {
		t.Errorf("tracking misses the single-bee targets (MOTA >= 0.98, RMSE <= 1.5 px, no switch)")
	}

	// Visits: targets of the visits issue.
	gotL, err := readLandings(filepath.Join(cd, fileVisits))
	if err != nil {
		t.Fatal(err)
	}
	gotI, err := readInspections(filepath.Join(cd, fileInspections))
	if err != nil {
		t.Fatal(err)
	}
	vs := visits.ScoreAgainstTruth(truth.Landings, truth.Inspections, gotL, gotI)
	t.Logf("visits: truth %d landings, found %d; F1 %.3f; onset median %.1f p95 %.1f; offset median %.1f p95 %.1f frames; inspection recall %.2f, as landings %.2f",
		len(truth.Landings), len(gotL), vs.LandingF1, vs.OnsetErrMedianFrames, vs.OnsetErrP95Frames,
		vs.OffsetErrMedianFrames, vs.OffsetErrP95Frames, vs.InspectionRecall, vs.InspectionsAsLandingsFrac)
	if vs.LandingF1 < 0.98 || vs.OnsetErrMedianFrames > 1 || vs.OnsetErrP95Frames > 3 ||
		vs.OffsetErrMedianFrames > 1 || vs.OffsetErrP95Frames > 3 || vs.InspectionRecall < 0.9 ||
		vs.InspectionsAsLandingsFrac > 0.05 {
		t.Errorf("visits miss the targets (F1 >= 0.98, onset/offset median <= 1 and p95 <= 3 frames, inspection recall >= 0.9, <= 5%% as landings)")
	}
	// The long landing of the preset is one landing of 30 s or more.
	long := false
	for _, l := range gotL {
		if l.DurationS >= 30 {
			long = true
		}
	}
	if !long {
		t.Error("no landing of 30 s or more found; the preset has one")
	}

	// tracks.csv: RFC 4180 with units in the header and states named.
	rows := readCSV(t, filepath.Join(cd, fileTracks))
	states := map[string]int{}
	for _, r := range rows {
		states[r["state"]]++
	}
	for _, s := range []string{"flying", "hovering", "landed"} {
		if states[s] == 0 {
			t.Errorf("no %s rows in tracks.csv (%v)", s, states)
		}
	}
	// clips.csv
	cr := readCSV(t, filepath.Join(out, "clips.csv"))
	if len(cr) != 1 || cr[0]["status"] != "ok" || cr[0]["landings"] != itoa(len(gotL)) {
		t.Errorf("clips.csv %v", cr)
	}
}

func ftoa(x float64) string { return fmtFloat(x, 6) }
func itoa(i int) string     { return fmtFloat(float64(i), 0) }

// tinyClips renders n short small clips (MJPEG, fast) into dir.
func tinyClips(t testing.TB, dir string, n int) []string {
	t.Helper()
	var paths []string
	for i := 0; i < n; i++ {
		cfg := meadow.Config{Seed: int64(100 + i), WidthPX: 320, HeightPX: 240, FPS: 30, DurationS: 3, Flowers: 3,
			FlowerRadiusMinMM: 25, FlowerRadiusMaxMM: 35, PXPerMM: 0.8, EntryMaxS: 0.2, TextureContrast: 1, NoiseSigma: 2}
		src, _, err := meadow.CachedClip(cfg, meadow.TestCacheDir(), ".avi")
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, "tiny"+itoa(i)+".avi")
		copyFile(t, src, p)
		paths = append(paths, p)
	}
	return paths
}

func copyFile(t testing.TB, src, dst string) {
	t.Helper()
	in, err := os.Open(src)
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	out, err := os.Create(dst)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := io.Copy(out, in); err != nil {
		t.Fatal(err)
	}
	if err := out.Close(); err != nil {
		t.Fatal(err)
	}
}

// modTimes maps every file under dir to its modification time.
func modTimes(t testing.TB, dir string) map[string]int64 {
	m := map[string]int64{}
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() && filepath.Base(p) != "clips.csv" {
			st, _ := d.Info()
			m[p] = st.ModTime().UnixNano()
		}
		return nil
	})
	return m
}

func TestRunResume(t *testing.T) {
	dir := t.TempDir()
	clips := filepath.Join(dir, "clips")
	os.Mkdir(clips, 0o755)
	paths := tinyClips(t, clips, 3)
	out := filepath.Join(dir, "out")
	args := []string{"run", "--quiet", "--px-per-mm", "0.8", "--no-plots", "--out", out, clips}
	if code, _, stderr := runMain(args...); code != exitOK {
		t.Fatalf("first run: exit %d: %s", code, stderr)
	}
	first := modTimes(t, out)
	if len(first) == 0 {
		t.Fatal("first run wrote nothing")
	}

	// Second run: nothing redone.
	if code, _, stderr := runMain(args...); code != exitOK {
		t.Fatalf("second run: exit %d: %s", code, stderr)
	}
	for _, r := range readCSV(t, filepath.Join(out, "clips.csv")) {
		if r["resumed"] != "true" {
			t.Errorf("second run redid %s", r["clip"])
		}
	}
	if got := modTimes(t, out); !equalTimes(got, first) {
		t.Error("second run rewrote outputs")
	}

	// Touching one input redoes that clip only.
	st, _ := os.Stat(paths[1])
	os.Chtimes(paths[1], st.ModTime().Add(2e9), st.ModTime().Add(2e9))
	if code, _, stderr := runMain(args...); code != exitOK {
		t.Fatalf("third run: exit %d: %s", code, stderr)
	}
	for _, r := range readCSV(t, filepath.Join(out, "clips.csv")) {
		want := "true"
		if r["clip"] == paths[1] {
			want = "false"
		}
		if r["resumed"] != want {
			t.Errorf("after touching %s: %s resumed=%s, want %s", paths[1], r["clip"], r["resumed"], want)
		}
	}

	// A changed setting redoes every clip.
	cfg := filepath.Join(dir, "s.toml")
	os.WriteFile(cfg, []byte("[kinematics]\nsmooth_window_s = 0.3\n"), 0o644)
	if code, _, stderr := runMain(append([]string{"run", "--config", cfg}, args[1:]...)...); code != exitOK {
		t.Fatalf("fourth run: exit %d: %s", code, stderr)
	}
	for _, r := range readCSV(t, filepath.Join(out, "clips.csv")) {
		if r["resumed"] != "false" {
			t.Errorf("after a settings change %s was not redone", r["clip"])
		}
	}
	// --force redoes everything.
	if code, _, _ := runMain(append([]string{"run", "--force", "--config", cfg}, args[1:]...)...); code != exitOK {
		t.Fatal("forced run failed")
	}
	for _, r := range readCSV(t, filepath.Join(out, "clips.csv")) {
		if r["resumed"] != "false" {
			t.Errorf("--force did not redo %s", r["clip"])
		}
	}
	assertNoTempFiles(t, out)
}

func equalTimes(a, b map[string]int64) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if b[k] != v {
			return false
		}
	}
	return true
}

func assertNoTempFiles(t testing.TB, dir string) {
	t.Helper()
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err == nil && strings.Contains(filepath.Base(p), ".tmp-") {
			t.Errorf("temporary file left behind: %s", p)
		}
		return nil
	})
}

// TestRunBadInputs runs one batch holding every kind of bad clip beside a
// good one: each bad clip gets a one-line reason naming it, the good clip
// and the decodable part of the truncated one are still scored.
func TestRunBadInputs(t *testing.T) {
	dir := t.TempDir()
	clips := filepath.Join(dir, "clips")
	os.Mkdir(clips, 0o755)
	good := tinyClips(t, clips, 1)[0]

	// A truncated H.264 clip in Matroska: the first 60 % of a rendered one
	// (the decodable part must be scored) and the same cut of an MP4, whose
	// index is written at the end, so nothing of it can be decoded.
	cfg := meadow.Config{Seed: 7, WidthPX: 320, HeightPX: 240, FPS: 30, DurationS: 4, Flowers: 3,
		FlowerRadiusMinMM: 25, FlowerRadiusMaxMM: 35, PXPerMM: 0.8, EntryMaxS: 0.2, TextureContrast: 1, NoiseSigma: 2}
	truncate := func(ext string) string {
		src, _, err := meadow.CachedClip(cfg, meadow.TestCacheDir(), ext)
		if err != nil {
			t.Fatal(err)
		}
		b, _ := os.ReadFile(src)
		p := filepath.Join(clips, "truncated"+ext)
		os.WriteFile(p, b[:len(b)*6/10], 0o644)
		return p
	}
	truncated := truncate(".mkv")
	noIndex := truncate(".mp4")

	notVideo := filepath.Join(clips, "notes.MP4") // extension in another case
	os.WriteFile(notVideo, []byte("field notes, 3 June: sunny, 24 C, wind light\n"), 0o644)
	empty := filepath.Join(clips, "empty.mov")
	os.WriteFile(empty, nil, 0o644)
	// Unreadable: tests run as root, so a dangling link stands in for a file
	// the user may not read.
	unreadable := filepath.Join(clips, "gone.avi")
	os.Symlink(filepath.Join(dir, "nowhere.avi"), unreadable)
	corrupt := filepath.Join(clips, "Megamind_bugy.avi")
	copyFile(t, opencvSample(t, "Megamind_bugy.avi"), corrupt)
	noClips := filepath.Join(dir, "empty-folder")
	os.Mkdir(noClips, 0o755)

	out := filepath.Join(dir, "out")
	code, _, stderr := runMain("run", "--quiet", "--px-per-mm", "0.8", "--no-plots", "--out", out, clips, noClips)
	if code != exitSome {
		t.Errorf("exit %d, want %d", code, exitSome)
	}
	rows := readCSV(t, filepath.Join(out, "clips.csv"))
	status := map[string]string{}
	for _, r := range rows {
		status[r["clip"]] = r["status"]
	}
	want := map[string]string{good: "ok", truncated: "partial", noIndex: "failed", notVideo: "failed", empty: "failed", unreadable: "failed"}
	for p, w := range want {
		if status[p] != w {
			t.Errorf("%s: status %q, want %q", filepath.Base(p), status[p], w)
		}
	}
	if s := status[corrupt]; s != "partial" && s != "ok" {
		t.Errorf("Megamind_bugy.avi: status %q, want partial (or ok if its damage is skipped)", s)
	}
	// One line on stderr per problem, naming the file.
	for _, p := range []string{truncated, noIndex, notVideo, empty, unreadable, noClips} {
		n := 0
		for _, line := range strings.Split(stderr, "\n") {
			if strings.Contains(line, p) {
				n++
			}
		}
		if n == 0 {
			t.Errorf("no error line names %s:\n%s", p, stderr)
		}
	}
	// The truncated clip's decodable part was scored and written.
	for _, r := range rows {
		if r["clip"] == truncated {
			if r["frames"] == "0" || r["frames"] == "" {
				t.Errorf("truncated clip: no frames scored: %v", r)
			}
			if _, err := os.Stat(filepath.Join(r["out_dir"], fileTracks)); err != nil {
				t.Errorf("truncated clip: %v", err)
			}
		}
	}
	assertNoTempFiles(t, out)
}

func TestRunFlowerMapAndScaleErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte("{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 10, \"y_px\": 10, \"r_px\": 5},\n {\"id\": \"A\", \"x_px\": 50, \"y_px\": 50, \"r_px\": 5}\n]}"), 0o644)
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"missing map", []string{"--flowers", filepath.Join(dir, "none.json")}, []string{"none.json"}},
		{"duplicate ids", []string{"--flowers", bad}, []string{"bad.json", "A"}},
		{"missing calibration", []string{"--calibration", filepath.Join(dir, "cal.json")}, []string{"cal.json"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			args := append([]string{"run"}, c.args...)
			code, _, stderr := runMain(append(args, filepath.Join(dir, "x.mp4"))...)
			if code != exitUsage {
				t.Errorf("exit %d, want %d", code, exitUsage)
			}
			if strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
				t.Errorf("not one line: %q", stderr)
			}
			for _, w := range c.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("%q lacks %q", stderr, w)
				}
			}
		})
	}
}

// TestRunOverlay: --overlay writes overlay.mp4 with every frame of the clip.
func TestRunOverlay(t *testing.T) {
	dir := t.TempDir()
	clip := tinyClips(t, dir, 1)[0]
	out := filepath.Join(dir, "out")
	if code, _, stderr := runMain("run", "--quiet", "--overlay", "--px-per-mm", "0.8", "--out", out, clip); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	ov := filepath.Join(out, clipBase(clip), fileOverlay)
	src, err := track.Open(ov, track.SourceOptions{})
	if err != nil {
		t.Fatalf("overlay does not open: %v", err)
	}
	defer src.Close()
	in, err := track.Open(clip, track.SourceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	oi, ii := src.Info(), in.Info()
	if oi.WidthPX != ii.WidthPX || oi.HeightPX != ii.HeightPX || oi.FourCC != "avc1" && oi.FourCC != "h264" {
		t.Errorf("overlay %dx%d %s, clip %dx%d", oi.WidthPX, oi.HeightPX, oi.FourCC, ii.WidthPX, ii.HeightPX)
	}
	n := 0
	m := gocv.NewMat()
	defer m.Close()
	for {
		if _, err := src.Next(&m); err != nil {
			break
		}
		n++
	}
	sum := readSummary(t, filepath.Join(out, clipBase(clip), fileSummary))
	if want := int(sum["clip"].(map[string]any)["frames_read"].(float64)); n != want {
		t.Errorf("overlay has %d frames, the clip %d", n, want)
	}
}
