package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"syscall"

	"flitlog/calibration"
	"flitlog/visits"
)

const runUsage = `
usage: flitlog run [flags] PATH...

Scores each clip given, and every video clip in each folder given (searched
recursively; .mp4 .mov .avi .mkv .m4v .mts .m2ts .webm .mpg .mpeg .wmv .3gp,
in any case). Clips run in parallel workers.

For each clip, DIR/<clip name>/ gets:
  tracks.csv       one row per bee per frame: position px and mm, speed, state
  visits.csv       one row per landing on a flower: start, end, handling time
  inspections.csv  approaches to a flower that ended without landing
  flights.csv      flights between consecutive landings (inter-visit intervals)
  summary.json     per-bee and per-clip summaries, settings, input hash, warnings
  path.png, speed.png, timeline.png   pictures to check by eye
  overlay.mp4      the clip with tracks and visits drawn on it (--overlay)
and DIR/clips.csv lists every clip with its status (ok, partial, failed).

Flowers: --flowers FILE applies to every clip; without it, a clip uses
CLIP.flowers.json beside it if present ('flitlog flowers CLIP' proposes one).
Scale: --px-per-mm X, or --calibration FILE from 'flitlog calibrate'.

Running the same command again skips clips whose outputs are complete and
whose input and settings are unchanged; --force redoes them. Ctrl-C stops
promptly and keeps the clips already finished.

Exit status: 0 all clips ok, 1 some clip failed or partial, 2 usage error.

Examples:
  flitlog run --px-per-mm 2.1 --flowers patch.json clip01.mp4
  flitlog run --calibration cam1.json --out results/ --workers 2 season2026/
  flitlog run --print-config > settings.toml; flitlog run --config settings.toml clips/
`

// videoExts are the file endings searched for in folders (lower case).
var videoExts = map[string]bool{
	".mp4": true, ".mov": true, ".avi": true, ".mkv": true, ".m4v": true,
	".mts": true, ".m2ts": true, ".webm": true, ".mpg": true, ".mpeg": true,
	".wmv": true, ".3gp": true,
}

// runOptions are the choices of a batch that do not change a clip's results.
type runOptions struct {
	OutDir   string
	Workers  int
	Force    bool
	Quiet    bool
	Progress io.Writer // stderr
}

func defaultWorkers() int {
	n := runtime.NumCPU()
	if n > 4 {
		n = 4
	}
	return n
}

func cmdRun(args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("run")
	var (
		flowers     = fs.String("flowers", "", "flower map `FILE` (JSON) for every clip")
		pxPerMM     = fs.Float64("px-per-mm", 0, "scale on the flower plane, pixels per millimetre (`X` > 0)")
		calib       = fs.String("calibration", "", "calibration `FILE` from 'flitlog calibrate'")
		fps         = fs.Float64("fps", 0, "frame rate override, frames/s (`F` > 0); default: the clip's own timestamps")
		out         = fs.String("out", "flitlog-out", "output `DIR`")
		workers     = fs.Int("workers", defaultWorkers(), "clips processed in parallel (`N`)")
		overlay     = fs.Bool("overlay", false, "also write overlay.mp4 with tracks and visits drawn on the clip")
		noPlots     = fs.Bool("no-plots", false, "do not write the PNG plots")
		config      = fs.String("config", "", "settings `FILE` (TOML); flags override it")
		printConfig = fs.Bool("print-config", false, "print the effective settings with their defaults and units, then exit")
		force       = fs.Bool("force", false, "redo clips even when their outputs are complete and unchanged")
		quiet       = fs.Bool("quiet", false, "no progress output; errors still go to stderr")
		bodyLen     = fs.Float64("body-length-mm", 0, "expected bee body length, mm (default from settings)")
		roi         = fs.String("roi", "", "region-of-interest mask `IMAGE` (white = analyse), same size as the clips")
		stabilize   = fs.Bool("stabilize", false, "compensate camera shake (hand-held or wind-shaken tripod)")
	)
	pos, code, done := parseArgs(fs, args, runUsage, stdout, stderr)
	if done {
		return code
	}

	s := DefaultSettings()
	if *config != "" {
		if err := LoadSettingsFile(*config, &s); err != nil {
			fmt.Fprintf(stderr, "flitlog run: %v\n", err)
			return exitUsage
		}
	}
	var bad error
	fs.Visit(func(f *flag.Flag) {
		switch f.Name {
		case "flowers":
			s.Flowers.File = *flowers
		case "px-per-mm":
			if !(*pxPerMM > 0) {
				bad = fmt.Errorf("--px-per-mm must be > 0, got %s: measure a scale bar in the frame, or use 'flitlog calibrate scale'", f.Value)
			}
			s.Calibration.PXPerMM = *pxPerMM
		case "calibration":
			s.Calibration.File = *calib
		case "fps":
			if !(*fps > 0) {
				bad = fmt.Errorf("--fps must be > 0, got %s: give the capture frame rate, or leave it out to use the clip's timestamps", f.Value)
			}
			s.Video.FPS = *fps
		case "overlay":
			s.Output.Overlay = *overlay
		case "no-plots":
			s.Output.Plots = !*noPlots
		case "body-length-mm":
			if !(*bodyLen > 0) {
				bad = fmt.Errorf("--body-length-mm must be > 0, got %s", f.Value)
			}
			s.Track.BodyLengthMM = *bodyLen
		case "roi":
			s.Track.ROIMaskPath = *roi
		case "stabilize":
			s.Track.Stabilize = *stabilize
		}
	})
	if bad == nil {
		bad = s.Validate()
	}
	if bad != nil {
		fmt.Fprintf(stderr, "flitlog run: %v\n", bad)
		return exitUsage
	}
	if err := checkSharedFiles(s); err != nil {
		fmt.Fprintf(stderr, "flitlog run: %v\n", err)
		return exitUsage
	}
	if *printConfig {
		if err := s.WriteTOML(stdout); err != nil {
			fmt.Fprintf(stderr, "flitlog run: %v\n", err)
			return exitSome
		}
		return exitOK
	}
	if len(pos) == 0 {
		fmt.Fprintln(stderr, "flitlog run: no clips given: name clip files or folders, e.g. 'flitlog run --px-per-mm 2 clips/'")
		return exitUsage
	}
	if *workers < 1 {
		fmt.Fprintf(stderr, "flitlog run: --workers must be at least 1, got %d\n", *workers)
		return exitUsage
	}

	opts := runOptions{OutDir: *out, Workers: *workers, Force: *force, Quiet: *quiet, Progress: stderr}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	return runBatch(ctx, pos, s, opts, stderr)
}

// checkSharedFiles loads the files that every clip of the batch uses, so
// that a missing or malformed one is reported once, before any work.
func checkSharedFiles(s Settings) error {
	if s.Flowers.File != "" {
		if _, err := visits.LoadFlowerMap(s.Flowers.File); err != nil {
			return err
		}
	}
	if s.Calibration.File != "" {
		if _, err := calibration.Load(s.Calibration.File); err != nil {
			return err
		}
	}
	if s.Track.ROIMaskPath != "" {
		if _, err := os.Stat(s.Track.ROIMaskPath); err != nil {
			return fmt.Errorf("region-of-interest mask %s: %s", s.Track.ROIMaskPath, errText(err))
		}
	}
	return nil
}

// clipJob is one clip of a batch.
type clipJob struct {
	Index   int
	Path    string
	OutName string // folder name under the output folder
}

// collectClips expands the paths into clips in a deterministic order and
// returns one-line problems for paths that give none.
func collectClips(paths []string, outDir string) ([]clipJob, []string) {
	var jobs []clipJob
	var problems []string
	seen := map[string]bool{}
	absOut, _ := filepath.Abs(outDir)
	add := func(p string) {
		abs, err := filepath.Abs(p)
		if err != nil || seen[abs] {
			return
		}
		seen[abs] = true
		jobs = append(jobs, clipJob{Path: p})
	}
	for _, p := range paths {
		fi, err := os.Stat(p)
		if err != nil {
			problems = append(problems, fmt.Sprintf("%s: %s", p, errText(err)))
			continue
		}
		if !fi.IsDir() {
			add(p)
			continue
		}
		var found []string
		filepath.WalkDir(p, func(q string, d os.DirEntry, err error) error {
			if err != nil {
				problems = append(problems, fmt.Sprintf("%s: %s", q, errText(err)))
				return nil
			}
			if d.IsDir() {
				if abs, _ := filepath.Abs(q); abs == absOut || (q != p && strings.HasPrefix(d.Name(), ".")) {
					return filepath.SkipDir
				}
				return nil
			}
			if videoExts[strings.ToLower(filepath.Ext(q))] && !strings.HasPrefix(d.Name(), ".") {
				found = append(found, q)
			}
			return nil
		})
		if len(found) == 0 {
			problems = append(problems, fmt.Sprintf("%s: folder has no video clips (%s): check the path", p, extList()))
		}
		sort.Strings(found)
		for _, q := range found {
			add(q)
		}
	}
	// Output folder names: the clip's name without extension; clips of the
	// same name in different folders get their parent folder's name too.
	count := map[string]int{}
	for _, j := range jobs {
		count[clipBase(j.Path)]++
	}
	used := map[string]bool{}
	for i := range jobs {
		name := clipBase(jobs[i].Path)
		if count[name] > 1 {
			name = filepath.Base(filepath.Dir(jobs[i].Path)) + "_" + name
		}
		base := name
		for k := 2; used[name]; k++ {
			name = base + "_" + strconv.Itoa(k)
		}
		used[name] = true
		jobs[i].Index = i
		jobs[i].OutName = name
	}
	return jobs, problems
}

func clipBase(p string) string {
	b := filepath.Base(p)
	return strings.TrimSuffix(b, filepath.Ext(b))
}

func extList() string {
	var e []string
	for k := range videoExts {
		e = append(e, k)
	}
	sort.Strings(e)
	return strings.Join(e, " ")
}

// runBatch processes the clips of paths with opts.Workers workers and
// writes DIR/clips.csv. It returns the exit status.
func runBatch(ctx context.Context, paths []string, s Settings, opts runOptions, stderr io.Writer) int {
	jobs, problems := collectClips(paths, opts.OutDir)
	status := exitOK
	for _, p := range problems {
		fmt.Fprintf(stderr, "flitlog run: %s\n", p)
		status = exitSome
	}
	if len(jobs) == 0 {
		fmt.Fprintln(stderr, "flitlog run: no clips to process")
		return exitSome
	}
	if err := os.MkdirAll(opts.OutDir, 0o755); err != nil {
		fmt.Fprintf(stderr, "flitlog run: output folder %s: %s\n", opts.OutDir, errText(err))
		return exitSome
	}

	prog := newBatchProgress(jobs, opts)
	results := make([]clipResult, len(jobs))
	work := make(chan clipJob)
	var wg sync.WaitGroup
	for w := 0; w < opts.Workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range work {
				r := processClip(ctx, j, s, opts, prog.clip(j))
				results[j.Index] = r
				prog.done(j, r)
			}
		}()
	}
feed:
	for _, j := range jobs {
		select {
		case work <- j:
		case <-ctx.Done():
			break feed
		}
	}
	close(work)
	wg.Wait()
	prog.finish()

	for i, j := range jobs {
		r := &results[i]
		if r.Status == "" {
			*r = clipResult{Path: j.Path, OutDir: filepath.Join(opts.OutDir, j.OutName), Status: statusFailed,
				Reason: "not started: the run was interrupted; run the same command again to continue"}
		}
		if r.Status != statusOK {
			status = exitSome
			fmt.Fprintf(stderr, "flitlog run: %s: %s: %s\n", r.Path, r.Status, r.Reason)
		}
	}
	if err := writeFileAtomic(filepath.Join(opts.OutDir, "clips.csv"), func(w io.Writer) error {
		return writeClipsCSV(w, results)
	}); err != nil {
		fmt.Fprintf(stderr, "flitlog run: writing %s: %v\n", filepath.Join(opts.OutDir, "clips.csv"), err)
		status = exitSome
	}
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "flitlog run: interrupted; finished clips are kept, run the same command again to continue")
		status = exitSome
	}
	return status
}

const (
	statusOK      = "ok"
	statusPartial = "partial"
	statusFailed  = "failed"
)

// clipResult is one row of clips.csv.
type clipResult struct {
	Path          string
	OutDir        string
	Status        string // ok, partial, failed
	Reason        string // why not ok; empty when ok
	Skipped       bool   // outputs were complete and unchanged: not redone
	Frames        int
	DurationS     float64
	Tracks        int
	Landings      int
	MeanHandlingS float64 // NaN without landings
	Warnings      []string
}

func writeClipsCSV(w io.Writer, rs []clipResult) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"clip", "status", "reason", "frames", "duration_s", "tracks", "landings", "mean_handling_s", "resumed", "out_dir"})
	for _, r := range rs {
		cw.Write([]string{r.Path, r.Status, r.Reason, strconv.Itoa(r.Frames), fmtFloat(r.DurationS, 3),
			strconv.Itoa(r.Tracks), strconv.Itoa(r.Landings), fmtFloat(r.MeanHandlingS, 3),
			strconv.FormatBool(r.Skipped), r.OutDir})
	}
	cw.Flush()
	return cw.Error()
}

// fmtFloat formats x with prec decimals, locale-free; NaN is an empty field.
func fmtFloat(x float64, prec int) string {
	if x != x {
		return ""
	}
	return strconv.FormatFloat(x, 'f', prec, 64)
}
