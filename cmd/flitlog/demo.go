package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"syscall"
	"text/tabwriter"

	"flitlog/track/meadow"
	"flitlog/track/mot"
	"flitlog/visits"
)

const demoUsage = `
usage: flitlog demo [--out DIR] [--overlay]

Renders the built-in demo scene (an invented place: bed 4 of the Quince Row
allotments, where two bumblebees work white clover and borage), scores it
with exactly the pipeline of 'flitlog run', and prints a scorecard that
compares what the pipeline wrote with the scene's ground truth: tracking
accuracy, landings, handling times and inspections.

Writes to DIR (default ./flitlog-demo):
  clips/<scene>.mp4             the rendered clip (H.264)
  clips/<scene>.flowers.json    its flower map
  truth/                        ground truth in flitlog's own formats
  <scene>/                      flitlog's outputs, as from 'flitlog run'
  scorecard.txt                 the scorecard printed at the end
`

func cmdDemo(args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("demo")
	out := fs.String("out", "flitlog-demo", "output `DIR`")
	overlay := fs.Bool("overlay", false, "also write overlay.mp4 with tracks and visits drawn on the clip")
	preset := fs.String("scene", "demo", "scene preset to render: "+strings.Join(meadow.PresetNames(), ", "))
	pos, code, done := parseArgs(fs, args, demoUsage, stdout, stderr)
	if done {
		return code
	}
	if len(pos) > 0 {
		fmt.Fprintf(stderr, "flitlog demo: takes no arguments (got %s); run 'flitlog demo --help'\n", strings.Join(pos, " "))
		return exitUsage
	}
	cfg, err := meadow.Preset(*preset)
	if err != nil {
		fmt.Fprintf(stderr, "flitlog demo: %v\n", err)
		return exitUsage
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()

	name := "allotment-" + *preset
	clipDir := filepath.Join(*out, "clips")
	truthDir := filepath.Join(*out, "truth")
	for _, d := range []string{clipDir, truthDir} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			fmt.Fprintf(stderr, "flitlog demo: %s: %s\n", d, errText(err))
			return exitSome
		}
	}
	clip := filepath.Join(clipDir, name+".mp4")
	fmt.Fprintf(stderr, "flitlog demo: rendering the demo scene to %s\n", clip)
	truth, err := meadow.WriteClip(cfg, clip, renderProgress(stderr))
	if err != nil {
		fmt.Fprintf(stderr, "flitlog demo: rendering %s: %v\n", clip, err)
		return exitSome
	}
	if err := truth.WriteDir(truthDir); err != nil {
		fmt.Fprintf(stderr, "flitlog demo: writing the truth to %s: %v\n", truthDir, err)
		return exitSome
	}
	flowers := filepath.Join(clipDir, name+".flowers.json")
	if err := writeFileAtomic(flowers, func(w io.Writer) error { return visits.WriteFlowerMap(w, truth.Flowers) }); err != nil {
		fmt.Fprintf(stderr, "flitlog demo: %s: %v\n", flowers, err)
		return exitSome
	}

	s := DefaultSettings()
	s.Calibration.PXPerMM = truth.PXPerMM
	s.Output.Overlay = *overlay
	fmt.Fprintf(stderr, "flitlog demo: scoring it as 'flitlog run --px-per-mm %g --out %s %s' would\n", truth.PXPerMM, *out, clip)
	opts := runOptions{OutDir: *out, Workers: 1, Force: true, Progress: stderr}
	status := runBatch(ctx, []string{clip}, s, opts, stderr)
	if status != exitOK {
		fmt.Fprintln(stderr, "flitlog demo: the pipeline did not finish cleanly; the scorecard covers what it wrote")
	}

	card, err := scorecard(filepath.Join(*out, name), truth)
	if err != nil {
		fmt.Fprintf(stderr, "flitlog demo: scorecard: %v\n", err)
		return exitSome
	}
	fmt.Fprint(stdout, card)
	if err := writeFileAtomic(filepath.Join(*out, "scorecard.txt"), func(w io.Writer) error {
		_, err := io.WriteString(w, card)
		return err
	}); err != nil {
		fmt.Fprintf(stderr, "flitlog demo: %v\n", err)
		return exitSome
	}
	fmt.Fprintf(stdout, "\nOutputs: %s (tables, summary.json, plots); truth: %s\n", filepath.Join(*out, name), truthDir)
	return status
}

func renderProgress(w io.Writer) func(done, total int) {
	last := -1
	return func(done, total int) {
		if total <= 0 {
			return
		}
		pct := 100 * done / total
		if pct/25 != last/25 || done == total {
			last = pct
			fmt.Fprintf(w, "flitlog demo: rendered %d/%d frames\n", done, total)
		}
	}
}

// scorecard compares the tables the pipeline wrote in dir with the truth.
// It reads only files, so it scores exactly what a user would get.
func scorecard(dir string, truth *meadow.Truth) (string, error) {
	var b strings.Builder
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintf(&b, "\nflitlog demo scorecard (%d frames, %.1f s, %dx%d px, %.2f px/mm)\n\n",
		truth.Frames, float64(truth.Frames)/truth.FPS, truth.WidthPX, truth.HeightPX, truth.PXPerMM)

	if sc, err := scoreTracking(filepath.Join(dir, fileTracks), truth); err != nil {
		fmt.Fprintf(&b, "tracking: not scored: %v\n", err)
	} else {
		fmt.Fprintf(tw, "tracking (points with a detection)\tvalue\ttarget (test scenes)\t\n")
		row(tw, "MOTA (Bernardin & Stiefelhagen 2008)", sc.MOTA, "%.3f", ">= 0.98 (one bee)")
		row(tw, "IDF1 (Ristani et al. 2016)", sc.IDF1, "%.3f", ">= 0.90")
		row(tw, "position RMSE, px", sc.RMSEPX, "%.2f", "<= 1.5")
		fmt.Fprintf(tw, "identity switches\t%d\t\t\n", sc.IDSwitches)
		fmt.Fprintf(tw, "misses / false positives (frames)\t%d / %d\t\t\n", sc.Misses, sc.FalsePositives)
		tw.Flush()
		b.WriteString("\n")
	}

	gotL, errL := readLandings(filepath.Join(dir, fileVisits))
	gotI, errI := readInspections(filepath.Join(dir, fileInspections))
	switch {
	case errL != nil:
		fmt.Fprintf(&b, "landings: not scored: %v\n", errL)
	case errI != nil:
		fmt.Fprintf(&b, "inspections: not scored: %v\n", errI)
	default:
		vs := visits.ScoreAgainstTruth(truth.Landings, truth.Inspections, gotL, gotI)
		fmt.Fprintf(tw, "landings and inspections\tvalue\ttarget (test scenes)\t\n")
		fmt.Fprintf(tw, "landings: truth / found\t%d / %d\t\t\n", len(truth.Landings), len(gotL))
		if vs.IgnoredTruthLandings > 0 || vs.IgnoredFoundLandings > 0 {
			fmt.Fprintf(tw, "  not scored (cut short by the clip)\t%d / %d\t\t\n", vs.IgnoredTruthLandings, vs.IgnoredFoundLandings)
		}
		row(tw, "landing F1", vs.LandingF1, "%.3f", ">= 0.98")
		row(tw, "onset error, median frames", vs.OnsetErrMedianFrames, "%.1f", "<= 1")
		row(tw, "onset error, 95th pct frames", vs.OnsetErrP95Frames, "%.1f", "<= 3")
		row(tw, "offset error, median frames", vs.OffsetErrMedianFrames, "%.1f", "<= 1")
		row(tw, "offset error, 95th pct frames", vs.OffsetErrP95Frames, "%.1f", "<= 3")
		fmt.Fprintf(tw, "inspections: truth / found\t%d / %d\t\t\n", len(truth.Inspections), len(gotI))
		row(tw, "inspection recall", vs.InspectionRecall, "%.3f", ">= 0.9")
		row(tw, "inspections taken for landings", vs.InspectionsAsLandingsFrac, "%.3f", "<= 0.05")
		row(tw, "mean handling time, truth s", meanDur(truth.Landings), "%.2f", "")
		row(tw, "mean handling time, flitlog s", meanDur(gotL), "%.2f", "")
		tw.Flush()
	}
	return b.String(), nil
}

// scoreTracking scores the detection-backed points of a tracks.csv against
// the visible truth points with CLEAR MOT and IDF1 (package mot); a point
// matches a bee within half a body length, i.e. on its body.
func scoreTracking(tracksCSV string, truth *meadow.Truth) (mot.Scores, error) {
	hyp, err := readTracksCSV(tracksCSV)
	if err != nil {
		return mot.Scores{}, err
	}
	var gt []mot.Obs
	for _, p := range truth.Points {
		if p.Visible {
			gt = append(gt, mot.Obs{Frame: p.Frame, ID: p.BeeID, XPX: p.XPX, YPX: p.YPX})
		}
	}
	return mot.Evaluate(gt, hyp, 0.5*truth.Config.BeeLengthMM*truth.PXPerMM)
}

func row(w io.Writer, name string, v float64, f, target string) {
	val := "n/a"
	if !math.IsNaN(v) {
		val = fmt.Sprintf(f, v)
	}
	fmt.Fprintf(w, "%s\t%s\t%s\t\n", name, val, target)
}

func meanDur(ls []visits.Landing) float64 {
	return meanHandlingS(ls)
}

func readLandings(path string) ([]visits.Landing, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %s", path, errText(err))
	}
	defer f.Close()
	return visits.ReadLandingsCSV(f)
}

func readInspections(path string) ([]visits.Inspection, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %s", path, errText(err))
	}
	defer f.Close()
	return visits.ReadInspectionsCSV(f)
}

// readTracksCSV reads frame, track_id, x_px, y_px of a tracks.csv: the
// points backed by a detection (observed), leaving out the positions that
// coasting and gap closing filled in, which the truth may not have (a bee
// outside the frame between an exit and its re-entry).
func readTracksCSV(path string) ([]mot.Obs, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %s", path, errText(err))
	}
	defer f.Close()
	r := csv.NewReader(f)
	head, err := r.Read()
	if err != nil {
		return nil, fmt.Errorf("%s: %v", path, err)
	}
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	for _, need := range []string{"frame", "track_id", "x_px", "y_px", "observed"} {
		if _, ok := col[need]; !ok {
			return nil, fmt.Errorf("%s: no column %q", path, need)
		}
	}
	var obs []mot.Obs
	for line := 2; ; line++ {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %v", path, err)
		}
		fr, e1 := strconv.Atoi(rec[col["frame"]])
		id, e2 := strconv.Atoi(rec[col["track_id"]])
		x, e3 := strconv.ParseFloat(rec[col["x_px"]], 64)
		y, e4 := strconv.ParseFloat(rec[col["y_px"]], 64)
		if e1 != nil || e2 != nil || e3 != nil || e4 != nil {
			return nil, fmt.Errorf("%s: line %d: bad number", path, line)
		}
		if rec[col["observed"]] != "true" {
			continue
		}
		obs = append(obs, mot.Obs{Frame: fr, ID: id, XPX: x, YPX: y})
	}
	sort.SliceStable(obs, func(i, j int) bool { return obs[i].Frame < obs[j].Frame })
	return obs, nil
}
