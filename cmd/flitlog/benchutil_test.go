package main

// Helpers of the throughput benchmarks in bench_test.go: the benchmark
// scenes and their cache, the in-process and subprocess measurements, and
// the summary table printed after the benchmarks (TestMain).
//
// How each figure is measured:
//   - decode-only frames/s: track.Open and Source.Next over every frame of
//     the clip, in the benchmark process, nothing else.
//   - pipeline frames/s: processClip in the benchmark process, exactly what
//     'flitlog run --no-plots' does for one clip: decode, segmentation,
//     tracking, kinematics, visits, tracks/visits/inspections/flights CSV
//     and summary.json. No plots and no overlay.
//   - decode and pipeline passes alternate, R rounds (FLITLOG_BENCH_ROUNDS,
//     default 3), so both see the same load on a shared machine; the
//     figures are medians over the rounds and the ratio is the median of
//     the per-round ratios pipeline/decode.
//   - peak resident memory: ru_maxrss of 'flitlog run --quiet --no-plots'
//     run as a subprocess (the binary is built once per benchmark run), so
//     rendering and the test process do not count. Decode-only peak memory
//     is ru_maxrss of this test binary re-run in decode-helper mode (see
//     TestMain), which only opens the clip and reads every frame.
//   - ru_maxrss pitfall: Linux keeps a process's ru_maxrss across execve
//     and folds in the high-water mark of the memory it replaced, which
//     for a child started by os/exec (vfork, memory shared until exec) is
//     the parent's. A child of the benchmark process, or of any process
//     linked against OpenCV (about 90 MB resident from the start), would
//     report at least that. So every measured command is started by a
//     tiny wrapper program without cgo (wrapperSource, built once per run)
//     that reports its child's rusage; the wrapper's own peak RSS, the
//     floor of the measurement, is printed beside the results.

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"text/tabwriter"
	"time"

	"gocv.io/x/gocv"

	"flitlog/track"
	"flitlog/track/meadow"
	"flitlog/visits"
)

// Environment of the benchmarks.
const (
	// envBenchCache overrides the clip cache folder (default
	// <module>/.cache/bench, git-ignored).
	envBenchCache = "FLITLOG_BENCH_CACHE"
	// envBenchRounds: rounds of each alternating measurement, default 3.
	envBenchRounds = "FLITLOG_BENCH_ROUNDS"
	// envBenchLong=1 adds the 10-minute clip to BenchmarkClipLength (its
	// first render takes about 12 minutes on 2 cores; cached afterwards).
	envBenchLong = "FLITLOG_BENCH_LONG"
	// envDecodeHelper, when set to a clip path, turns this test binary into
	// the decode-only helper process (see TestMain).
	envDecodeHelper = "FLITLOG_BENCH_DECODE_HELPER"
)

func TestMain(m *testing.M) {
	if clip := os.Getenv(envDecodeHelper); clip != "" {
		os.Exit(decodeHelperMain(clip, os.Stdout, os.Stderr))
	}
	report.loadStart = loadAverage()
	code := m.Run()
	printBenchReport(os.Stdout)
	if bins.dir != "" {
		os.RemoveAll(bins.dir)
	}
	os.Exit(code)
}

// decodeHelperMain reads every frame of clip and prints "FRAMES SECONDS".
func decodeHelperMain(clip string, stdout, stderr io.Writer) int {
	p, err := decodeOnly(clip)
	if err != nil {
		fmt.Fprintf(stderr, "decode helper: %v\n", err)
		return 1
	}
	fmt.Fprintf(stdout, "%d %.6f\n", p.Frames, p.WallS)
	return 0
}

// benchCacheDir is where the benchmark clips are rendered once and kept.
func benchCacheDir() string {
	if d := os.Getenv(envBenchCache); d != "" {
		return d
	}
	_, self, _, ok := runtime.Caller(0)
	if !ok {
		return filepath.Join(os.TempDir(), "flitlog-bench")
	}
	return filepath.Join(filepath.Dir(self), "..", "..", ".cache", "bench")
}

func benchRounds() int {
	if v := os.Getenv(envBenchRounds); v != "" {
		if n, err := strconv.Atoi(v); err == nil && n >= 1 {
			return n
		}
	}
	return 3
}

// benchScene is one synthetic clip of the benchmarks.
type benchScene struct {
	ID   string // short name used in benchmark names and the table, e.g. "1080p30"
	Desc string // e.g. "1920x1080 30 fps 60 s, 3 bees"
	Cfg  meadow.Config
}

func mustPreset(name string) meadow.Config {
	c, err := meadow.Preset(name)
	if err != nil {
		panic("bench: " + err.Error())
	}
	return c
}

// scene1080p30 is the "three" preset as it is: 3 bees, 10 flowers,
// 1920x1080 at 30 fps, 60 s, with every outdoor effect on.
func scene1080p30() benchScene {
	return benchScene{ID: "1080p30", Desc: "1920x1080 30 fps 60 s H.264, 3 bees", Cfg: mustPreset("three")}
}

// scene720p60 is the "single" preset (1 bee, 7 flowers, a long landing,
// inspections, a revisit, an exit, a leaf occluder) at 60 fps for 60 s.
func scene720p60() benchScene {
	c := mustPreset("single")
	c.Name = "bench-single-60fps"
	c.FPS = 60
	c.DurationS = 60
	return benchScene{ID: "720p60", Desc: "1280x720 60 fps 60 s H.264, 1 bee", Cfg: c}
}

// scene720p30 is the "single" preset at 30 fps lasting durS seconds.
func scene720p30(id string, durS float64) benchScene {
	c := mustPreset("single")
	c.Name = "bench-single-" + id
	c.DurationS = durS
	return benchScene{ID: id, Desc: fmt.Sprintf("1280x720 30 fps %s H.264, 1 bee", fmtDur(durS)), Cfg: c}
}

// batchScene is clip i of the batch: the "single" preset's look and bee
// with its own seed, 12 s long, without the preset's requirements (they
// need a longer clip).
func batchScene(i int) benchScene {
	c := mustPreset("single")
	c.Name = "bench-batch"
	c.Seed = int64(100 + i)
	c.DurationS = 12
	c.MinLongLandingS, c.MinInspections, c.MinRevisits, c.MinExits = 0, 0, 0, 0
	c.Occluder = false
	return benchScene{ID: fmt.Sprintf("batch%02d", i), Desc: "1280x720 30 fps 12 s H.264, 1 bee", Cfg: c}
}

func fmtDur(s float64) string {
	if s >= 60 && math.Mod(s, 60) == 0 {
		return fmt.Sprintf("%g min", s/60)
	}
	return fmt.Sprintf("%g s", s)
}

// renderScene returns the cached clip of sc and its truth, rendering it
// first if needed, and a flower map file for it in dir.
func renderScene(b *testing.B, sc benchScene, dir string) (clip, flowers string, truth *meadow.Truth) {
	b.Helper()
	t0 := time.Now()
	clip, truth, err := meadow.CachedClip(sc.Cfg, benchCacheDir(), ".mp4")
	if err != nil {
		b.Fatalf("%s: rendering the clip: %v", sc.ID, err)
	}
	if d := time.Since(t0); d > 5*time.Second {
		b.Logf("%s: rendered %d frames in %.0f s into %s (cached for later runs)", sc.ID, truth.Frames, d.Seconds(), filepath.Dir(clip))
	}
	flowers = filepath.Join(dir, sc.ID+".flowers.json")
	if err := writeFileAtomic(flowers, func(w io.Writer) error { return visits.WriteFlowerMap(w, truth.Flowers) }); err != nil {
		b.Fatal(err)
	}
	return clip, flowers, truth
}

// pass is one timed pass over a clip.
type pass struct {
	Frames int
	WallS  float64 // wall-clock time, s
	CPUS   float64 // user + system CPU time of the process, s
}

func (p pass) FPS() float64 { return float64(p.Frames) / p.WallS }

// CPUPct is the CPU time over wall time, % (200 % = both cores busy).
func (p pass) CPUPct() float64 { return 100 * p.CPUS / p.WallS }

func tvS(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }

func selfCPUS() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return tvS(ru.Utime) + tvS(ru.Stime)
}

// freeCores measures how many cores the machine gives this process right
// now: runtime.NumCPU() goroutines spin for d, and the process's CPU time
// over the wall time is the answer (2.0 = both cores free on a 2-core
// machine; about 1.3 when one other busy thread competes). On a shared
// machine it says whether a scaling figure could be reached at all.
func freeCores(d time.Duration) float64 {
	n := runtime.NumCPU()
	var wg sync.WaitGroup
	var sink atomic.Int64
	c0, t0 := selfCPUS(), time.Now()
	for i := 0; i < n; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			x := 0
			for time.Since(t0) < d {
				for j := 0; j < 100000; j++ {
					x += j ^ i
				}
			}
			sink.Add(int64(x))
		}()
	}
	wg.Wait()
	return (selfCPUS() - c0) / time.Since(t0).Seconds()
}

// decodeOnly opens clip and reads every frame through track.Source, as the
// pipeline does, and nothing else.
func decodeOnly(clip string) (pass, error) {
	t0, c0 := time.Now(), selfCPUS()
	src, err := track.Open(clip, track.SourceOptions{})
	if err != nil {
		return pass{}, err
	}
	defer src.Close()
	frame := gocv.NewMat()
	defer frame.Close()
	n := 0
	for {
		_, err := src.Next(&frame)
		if err == io.EOF {
			break
		}
		if err != nil {
			return pass{}, err
		}
		n++
	}
	return pass{Frames: n, WallS: time.Since(t0).Seconds(), CPUS: selfCPUS() - c0}, nil
}

// benchSettings are the settings of 'flitlog run --px-per-mm X --flowers
// F --no-plots': defaults otherwise.
func benchSettings(flowers string, pxPerMM float64) Settings {
	s := DefaultSettings()
	s.Calibration.PXPerMM = pxPerMM
	s.Flowers.File = flowers
	s.Output.Plots = false
	s.Output.Overlay = false
	return s
}

// pipelineInProcess scores clip as 'flitlog run --no-plots --force' does
// for one clip, writing the outputs to outDir/clip.
func pipelineInProcess(clip, flowers string, pxPerMM float64, outDir string) (pass, error) {
	if err := os.MkdirAll(outDir, 0o755); err != nil {
		return pass{}, err
	}
	s := benchSettings(flowers, pxPerMM)
	if err := s.Validate(); err != nil {
		return pass{}, err
	}
	opts := runOptions{OutDir: outDir, Workers: 1, Force: true, Quiet: true, Progress: io.Discard}
	t0, c0 := time.Now(), selfCPUS()
	r := processClip(context.Background(), clipJob{Path: clip, OutName: "clip"}, s, opts, noProgress{})
	p := pass{Frames: r.Frames, WallS: time.Since(t0).Seconds(), CPUS: selfCPUS() - c0}
	if r.Status != statusOK {
		return p, fmt.Errorf("pipeline on %s: %s: %s", clip, r.Status, r.Reason)
	}
	return p, nil
}

// procRun is a finished subprocess.
type procRun struct {
	WallS    float64
	CPUS     float64 // user + system CPU time of the command, s
	MaxRSSMB float64 // peak resident memory of the command, MB (10^6 bytes)
	FloorMB  float64 // peak RSS of the wrapper that started it: MaxRSSMB cannot be lower
	Stdout   string
}

// runMeasured runs the command args through the wrapper (see
// wrapperSource) with extra environment variables env. A non-zero exit is
// an error carrying the end of stderr.
func runMeasured(b *testing.B, env []string, args ...string) (procRun, error) {
	wrap := benchBinaries(b).wrapper
	f, err := os.CreateTemp("", "flitlog-bench-rusage-")
	if err != nil {
		return procRun{}, err
	}
	f.Close()
	defer os.Remove(f.Name())
	cmd := exec.Command(wrap, append([]string{f.Name()}, args...)...)
	cmd.Env = append(os.Environ(), env...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	fail := func(err error) (procRun, error) {
		tail := errb.String()
		if len(tail) > 2000 {
			tail = "..." + tail[len(tail)-2000:]
		}
		return procRun{}, fmt.Errorf("%s: %v\n%s", strings.Join(args, " "), err, tail)
	}
	if err := cmd.Run(); err != nil {
		return fail(err)
	}
	res, err := os.ReadFile(f.Name())
	if err != nil {
		return fail(err)
	}
	var wall, user, sys float64
	var maxKB, floorKB int64
	var code int
	if _, err := fmt.Sscan(string(res), &wall, &maxKB, &user, &sys, &floorKB, &code); err != nil {
		return fail(fmt.Errorf("wrapper wrote %q: %v", res, err))
	}
	if code != 0 {
		return fail(fmt.Errorf("exit status %d", code))
	}
	// Linux reports ru_maxrss and VmHWM in kilobytes (getrusage(2), proc(5)).
	kb := func(v int64) float64 { return float64(v) * 1024 / 1e6 }
	return procRun{WallS: wall, CPUS: user + sys, MaxRSSMB: kb(maxKB), FloorMB: kb(floorKB), Stdout: out.String()}, nil
}

// wrapperSource is the program that starts every measured command: it
// runs os.Args[2:], waits, and writes "WALL_S MAXRSS_KB USER_S SYS_S
// FLOOR_KB EXIT" to the file os.Args[1]: the command's wall time,
// ru_maxrss, CPU times, the wrapper's own VmHWM (a floor under the
// command's ru_maxrss, see the top of this file) and the exit status.
// Without cgo it stays a few MB resident.
const wrapperSource = `package main

import (
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"syscall"
	"time"
)

func tv(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }

func hwmKB() int64 {
	b, _ := os.ReadFile("/proc/self/status")
	for _, line := range strings.Split(string(b), "\n") {
		if f := strings.Fields(line); len(f) >= 2 && f[0] == "VmHWM:" {
			v, _ := strconv.ParseInt(f[1], 10, 64)
			return v
		}
	}
	return -1
}

func main() {
	if len(os.Args) < 3 {
		fmt.Fprintln(os.Stderr, "usage: wrapper OUTFILE COMMAND [ARG...]")
		os.Exit(2)
	}
	cmd := exec.Command(os.Args[2], os.Args[3:]...)
	cmd.Stdin, cmd.Stdout, cmd.Stderr = os.Stdin, os.Stdout, os.Stderr
	t0 := time.Now()
	err := cmd.Run()
	wall := time.Since(t0).Seconds()
	if cmd.ProcessState == nil {
		fmt.Fprintln(os.Stderr, "wrapper:", err)
		os.Exit(2)
	}
	ru := cmd.ProcessState.SysUsage().(*syscall.Rusage)
	line := fmt.Sprintf("%.6f %d %.6f %.6f %d %d\n", wall, ru.Maxrss, tv(ru.Utime), tv(ru.Stime), hwmKB(), cmd.ProcessState.ExitCode())
	if err := os.WriteFile(os.Args[1], []byte(line), 0o644); err != nil {
		fmt.Fprintln(os.Stderr, "wrapper:", err)
		os.Exit(2)
	}
}
`

// benchBins are the programs the subprocess measurements run, built once
// per benchmark run into a temporary folder that TestMain removes:
// flitlog from this package, and the wrapper.
type benchBins struct {
	once             sync.Once
	dir              string
	flitlog, wrapper string
	err              error
}

var bins benchBins

func benchBinaries(b *testing.B) *benchBins {
	b.Helper()
	bins.once.Do(func() { bins.err = buildBinaries() })
	if bins.err != nil {
		b.Fatal(bins.err)
	}
	return &bins
}

func buildBinaries() error {
	dir, err := os.MkdirTemp("", "flitlog-bench-bin-")
	if err != nil {
		return err
	}
	bins.dir = dir
	gobin, err := exec.LookPath("go")
	if err != nil {
		gobin = filepath.Join(runtime.GOROOT(), "bin", "go")
	}
	build := func(srcDir, out string, env ...string) error {
		cmd := exec.Command(gobin, "build", "-o", out, ".")
		cmd.Dir = srcDir
		cmd.Env = append(os.Environ(), env...)
		if b, err := cmd.CombinedOutput(); err != nil {
			return fmt.Errorf("go build %s: %v\n%s", out, err, b)
		}
		return nil
	}
	bins.flitlog = filepath.Join(dir, "flitlog")
	if err := build(".", bins.flitlog, "CGO_ENABLED=1"); err != nil {
		return err
	}
	src := filepath.Join(dir, "wrapper-src")
	if err := os.Mkdir(src, 0o755); err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(src, "go.mod"), []byte("module wrapper\n\ngo 1.21\n"), 0o644); err != nil {
		return err
	}
	if err := os.WriteFile(filepath.Join(src, "main.go"), []byte(wrapperSource), 0o644); err != nil {
		return err
	}
	bins.wrapper = filepath.Join(dir, "wrapper")
	return build(src, bins.wrapper, "CGO_ENABLED=0", "GOWORK=off", "GOFLAGS=")
}

var idleOnce sync.Once

// measureIdle records, once, the peak RSS of flitlog doing nothing but
// start, print its settings and exit: what the program and its shared
// libraries (OpenCV, FFmpeg) take before any clip.
func measureIdle(b *testing.B) {
	idleOnce.Do(func() {
		pr, err := runMeasured(b, nil, benchBinaries(b).flitlog, "run", "--print-config")
		if err != nil {
			b.Errorf("flitlog run --print-config: %v", err)
			return
		}
		noteFloor(pr)
		report.Lock()
		report.idleMB = pr.MaxRSSMB
		report.Unlock()
	})
}

// runCLI runs 'flitlog run --quiet --no-plots --force ARGS...'.
func runCLI(b *testing.B, args ...string) (procRun, error) {
	bin := benchBinaries(b).flitlog
	return runMeasured(b, nil, append([]string{bin, "run", "--quiet", "--no-plots", "--force"}, args...)...)
}

// decodeSubprocess runs this test binary as the decode-only helper on
// clip and returns its frames, its own timing and its resource use.
func decodeSubprocess(b *testing.B, clip string) (pass, procRun, error) {
	self, err := os.Executable()
	if err != nil {
		return pass{}, procRun{}, err
	}
	pr, err := runMeasured(b, []string{envDecodeHelper + "=" + clip}, self)
	if err != nil {
		return pass{}, pr, err
	}
	var p pass
	if _, err := fmt.Sscan(pr.Stdout, &p.Frames, &p.WallS); err != nil {
		return pass{}, pr, fmt.Errorf("decode helper printed %q: %v", pr.Stdout, err)
	}
	return p, pr, nil
}

// accuracy scores the outputs in dir against the truth, as the demo
// scorecard does: MOTA and IDF1 with a gate of half a body length, and
// landing F1.
type accuracy struct {
	MOTA, IDF1, RMSEPX, LandingF1 float64
}

func scoreOutputs(dir string, truth *meadow.Truth) (accuracy, error) {
	acc := accuracy{math.NaN(), math.NaN(), math.NaN(), math.NaN()}
	sc, err := scoreTracking(filepath.Join(dir, fileTracks), truth)
	if err != nil {
		return acc, err
	}
	acc.MOTA, acc.IDF1, acc.RMSEPX = sc.MOTA, sc.IDF1, sc.RMSEPX
	gotL, err := readLandings(filepath.Join(dir, fileVisits))
	if err != nil {
		return acc, err
	}
	gotI, err := readInspections(filepath.Join(dir, fileInspections))
	if err != nil {
		return acc, err
	}
	acc.LandingF1 = visits.ScoreAgainstTruth(truth.Landings, truth.Inspections, gotL, gotI).LandingF1
	return acc, nil
}

func median(xs []float64) float64 {
	if len(xs) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// reportMetric reports v unless it is NaN or infinite (benchstat cannot
// read those).
func reportMetric(b *testing.B, v float64, unit string) {
	if !math.IsNaN(v) && !math.IsInf(v, 0) {
		b.ReportMetric(v, unit)
	}
}

// The results gathered for the table printed after the benchmarks.
var report struct {
	sync.Mutex
	loadStart string
	floorMB   float64 // largest wrapper peak RSS: no ru_maxrss below it is meaningful
	idleMB    float64 // peak RSS of 'flitlog run --print-config': the program at rest
	clips     []clipRow
	lengths   []lengthRow
	batches   []batchRow
}

type clipRow struct {
	ID, Desc    string
	Frames      int
	ClipFPS     float64
	Rounds      int
	DecodeFPS   float64 // median over rounds
	PipelineFPS float64 // median over rounds
	Ratio       float64 // median of per-round pipeline/decode
	RealtimeX   float64 // PipelineFPS / ClipFPS
	PeakRSSMB   float64 // flitlog run subprocess
	DecodeRSSMB float64 // decode-only helper subprocess
	CLIFPS      float64 // frames / wall time of the flitlog run subprocess
	FreeCores   float64 // median of freeCores probes before each round
	Acc         accuracy
}

type lengthRow struct {
	ID, Desc  string
	Frames    int
	PeakRSSMB float64
	CLIFPS    float64
	RealtimeX float64
}

type batchRow struct {
	Desc       string
	Clips      int
	Rounds     int
	Workers1S  float64 // median wall time, s
	Workers2S  float64
	Speedup    float64 // median of per-round workers1/workers2
	CPU1S      float64 // median CPU time (user + system) of the whole batch, s
	CPU2S      float64
	FreeCores  float64 // median of freeCores probes before each run
	PeakRSSMB1 float64 // largest over rounds
	PeakRSSMB2 float64
}

// BusyCoresW1 is U, the cores one worker keeps busy: CPU time over wall
// time of the batch with --workers 1 (medians).
func (r batchRow) BusyCoresW1() float64 { return r.CPU1S / r.Workers1S }

// Ceiling is the largest speed-up of --workers N = nproc over --workers 1
// when one worker already keeps U cores busy: nproc/U (a resource bound, with
// the machine's cores as the only resource; it ignores memory bandwidth and
// the serial end of a batch, so the true limit is lower).
func (r batchRow) Ceiling() float64 { return float64(runtime.NumCPU()) / r.BusyCoresW1() }

// noteFloor records the measurement floor of subprocess runs.
func noteFloor(rs ...procRun) {
	report.Lock()
	defer report.Unlock()
	for _, r := range rs {
		report.floorMB = math.Max(report.floorMB, r.FloorMB)
	}
}

func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "?"
	}
	f := strings.Fields(string(b))
	if len(f) < 3 {
		return "?"
	}
	return strings.Join(f[:3], " ")
}

// machine describes the CPU and memory from /proc.
func machine() string {
	model := "unknown CPU"
	if f, err := os.Open("/proc/cpuinfo"); err == nil {
		sc := bufio.NewScanner(f)
		for sc.Scan() {
			if k, v, ok := strings.Cut(sc.Text(), ":"); ok && strings.TrimSpace(k) == "model name" {
				model = strings.TrimSpace(v)
				break
			}
		}
		f.Close()
	}
	mem := ""
	if b, err := os.ReadFile("/proc/meminfo"); err == nil {
		for _, line := range strings.Split(string(b), "\n") {
			if f := strings.Fields(line); len(f) >= 2 && f[0] == "MemTotal:" {
				if kb, err := strconv.ParseFloat(f[1], 64); err == nil {
					mem = fmt.Sprintf(", %.0f GiB RAM", kb/(1<<20))
				}
			}
		}
	}
	return fmt.Sprintf("%s, %d logical CPUs (nproc)%s", model, runtime.NumCPU(), mem)
}

func verdict(ok bool) string {
	if ok {
		return "met"
	}
	return "MISSED"
}

// printBenchReport prints the summary table of whatever benchmarks ran.
func printBenchReport(w io.Writer) {
	report.Lock()
	defer report.Unlock()
	if len(report.clips)+len(report.lengths)+len(report.batches) == 0 {
		return
	}
	fmt.Fprintf(w, "\nflitlog throughput\n")
	fmt.Fprintf(w, "machine: %s\n", machine())
	fmt.Fprintf(w, "software: %s, OpenCV %s; load average (1, 5, 15 min) %s at start, %s at end\n\n",
		runtime.Version(), gocv.OpenCVVersion(), report.loadStart, loadAverage())
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	if len(report.clips) > 0 {
		fmt.Fprintf(tw, "clip\tframes\tdecode fps\tpipeline fps\tratio\treal time\tpeak RSS MB\tdecode RSS MB\tCLI fps\tfree cores\t\n")
		for _, r := range report.clips {
			fmt.Fprintf(tw, "%s (%s)\t%d\t%.1f\t%.1f\t%.2f\t%.2fx\t%.0f\t%.0f\t%.1f\t%.2f\t\n", r.ID, r.Desc, r.Frames,
				r.DecodeFPS, r.PipelineFPS, r.Ratio, r.RealtimeX, r.PeakRSSMB, r.DecodeRSSMB, r.CLIFPS, r.FreeCores)
		}
		tw.Flush()
		fmt.Fprintf(w, `decode and pipeline fps: median of %d alternating rounds in one process; ratio: median of the
per-round pipeline/decode; real time: pipeline fps / clip fps. pipeline = 'flitlog run --no-plots' for one
clip: tracking, kinematics, visits, CSV and summary.json; no plots, no overlay. peak RSS: ru_maxrss of
'flitlog run --quiet --no-plots' as a subprocess (CLI fps: its frames / wall time, one run); decode RSS:
ru_maxrss of a process that only decodes the clip; both started by a tiny wrapper whose own peak RSS
(%.0f MB) is the floor of these figures. flitlog at rest ('run --print-config': start, load OpenCV and
FFmpeg, exit) peaks at %.0f MB. free cores: CPU time / wall time of %d spinning threads for 0.5 s before
each round (median): 2.00 = both cores were free.

`, report.clips[0].Rounds, report.floorMB, report.idleMB, runtime.NumCPU())
		fmt.Fprintf(tw, "accuracy at benchmark settings\tMOTA\tIDF1\tRMSE px\tlanding F1\t\n")
		for _, r := range report.clips {
			fmt.Fprintf(tw, "%s\t%.3f\t%.3f\t%.2f\t%.3f\t\n", r.ID, r.Acc.MOTA, r.Acc.IDF1, r.Acc.RMSEPX, r.Acc.LandingF1)
		}
		tw.Flush()
		fmt.Fprintln(w)
	}
	if len(report.lengths) > 0 {
		fmt.Fprintf(tw, "memory vs clip length\tframes\tpeak RSS MB\tCLI fps\treal time\t\n")
		for _, r := range report.lengths {
			fmt.Fprintf(tw, "%s (%s)\t%d\t%.0f\t%.1f\t%.2fx\t\n", r.ID, r.Desc, r.Frames, r.PeakRSSMB, r.CLIFPS, r.RealtimeX)
		}
		tw.Flush()
		fmt.Fprintln(w)
	}
	if len(report.batches) > 0 {
		fmt.Fprintf(tw, "batch\t--workers 1 s\t--workers 2 s\tspeed-up\tCPU s w1 / w2\tfree cores\tpeak RSS MB w1 / w2\t\n")
		for _, r := range report.batches {
			fmt.Fprintf(tw, "%d clips, %s\t%.1f\t%.1f\t%.2fx\t%.1f / %.1f\t%.2f\t%.0f / %.0f\t\n", r.Clips, r.Desc,
				r.Workers1S, r.Workers2S, r.Speedup, r.CPU1S, r.CPU2S, r.FreeCores, r.PeakRSSMB1, r.PeakRSSMB2)
		}
		tw.Flush()
		fmt.Fprintf(w, "wall and CPU time: median of %d rounds (alternating order); speed-up: median of per-round ratios;\n", report.batches[0].Rounds)
		fmt.Fprintf(w, "free cores: as above, before each run (median); 2 workers cannot beat 1 by much more than that.\n")
		for _, r := range report.batches {
			u := r.BusyCoresW1()
			fmt.Fprintf(w, "ceiling: one worker keeps U = CPU s / wall s = %.1f / %.1f = %.2f cores busy (FFmpeg decodes H.264\n", r.CPU1S, r.Workers1S, u)
			fmt.Fprintf(w, "on several threads), so %d workers on %d cores can be at most nproc/U = %d/%.2f = %.2fx\n",
				runtime.NumCPU(), runtime.NumCPU(), runtime.NumCPU(), u, r.Ceiling())
			fmt.Fprintf(w, "faster than 1 (with f free cores: f/U); measured %.2fx = %.0f %% of that ceiling.\n", r.Speedup, 100*r.Speedup/r.Ceiling())
		}
		fmt.Fprintln(w)
	}

	// The targets of the throughput issue.
	fmt.Fprintf(w, "targets\n")
	maxRSS := 0.0
	for _, r := range report.clips {
		switch r.ID {
		case "1080p30":
			fmt.Fprintf(w, "  1080p30 pipeline >= 50%% of decode fps: %.0f %%  %s\n", 100*r.Ratio, verdict(r.Ratio >= 0.5))
			fmt.Fprintf(w, "  1080p30 >= 2x real time: %.2fx  %s\n", r.RealtimeX, verdict(r.RealtimeX >= 2))
		case "720p60":
			fmt.Fprintf(w, "  720p60 >= 1.5x real time: %.2fx  %s\n", r.RealtimeX, verdict(r.RealtimeX >= 1.5))
		}
		maxRSS = math.Max(maxRSS, r.PeakRSSMB)
	}
	for _, r := range report.lengths {
		maxRSS = math.Max(maxRSS, r.PeakRSSMB)
	}
	for _, r := range report.batches {
		// One clip at a time with one worker; two at once with two workers
		// is shown in the batch table but is not "a clip".
		maxRSS = math.Max(maxRSS, r.PeakRSSMB1)
		note := ""
		if r.FreeCores < 1.8 && r.Speedup < 1.6 {
			note = fmt.Sprintf(" (only %.2f free cores during the runs: re-measure on a quiet machine)", r.FreeCores)
		}
		fmt.Fprintf(w, "  batch of %d, 2 workers >= 1.6x faster than 1: %.2fx  %s%s; ceiling nproc/U = %.2fx\n", r.Clips, r.Speedup, verdict(r.Speedup >= 1.6), note, r.Ceiling())
	}
	fmt.Fprintf(w, "  peak RSS <= 400 MB (largest single-clip run): %.0f MB  %s\n", maxRSS, verdict(maxRSS <= 400))
	if len(report.lengths) < 2 {
		fmt.Fprintf(w, "  (memory vs clip length: set %s=1 to add the 10-minute clip)\n", envBenchLong)
	}
}
