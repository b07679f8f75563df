package main

// Throughput benchmarks: the pipeline against the video decoder, peak
// memory against clip length, and batch scaling with workers. They render
// their synthetic clips once into .cache/bench (see benchutil_test.go for
// how each figure is measured) and are run by 'make bench':
//
//	go test -run '^$' -bench . -benchtime 1x ./cmd/flitlog/
//
// Each benchmark reports custom metrics (ns/op is suppressed: one op is
// several passes over a clip and means nothing on its own), so benchstat
// can compare commits:
//
//	go test -run '^$' -bench . -benchtime 1x -count 5 ./cmd/flitlog/ > new.txt
//	benchstat old.txt new.txt
//
// Where the time goes:
//
//	FLITLOG_BENCH_ROUNDS=1 go test -run '^$' -bench 'Pipeline/1080p30' -benchtime 1x \
//	    -cpuprofile cpu.prof ./cmd/flitlog/ && go tool pprof -top cpu.prof
//
// The profile covers the in-process passes (decode-only and pipeline), not
// the subprocesses.

import (
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"testing"
	"time"
)

func ftoaBench(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// BenchmarkPipeline measures, on each benchmark clip, decode-only frames/s
// and full-pipeline frames/s in alternating rounds, their ratio, the
// real-time factor, and the peak resident memory of 'flitlog run' and of a
// decode-only process. Metrics: decode_fps, pipeline_fps, ratio,
// realtime_x, peak_rss_MB, decode_rss_MB, cli_fps, free_cores (what the
// shared machine had to give, see freeCores), and the accuracy of the
// pipeline's outputs against the scene's truth (mota, idf1, landing_f1),
// so that speed is never bought with accuracy unnoticed.
func BenchmarkPipeline(b *testing.B) {
	for _, sc := range []benchScene{scene1080p30(), scene720p60()} {
		b.Run(sc.ID, func(b *testing.B) { benchPipeline(b, sc) })
	}
}

func benchPipeline(b *testing.B, sc benchScene) {
	dir := b.TempDir()
	clip, flowers, truth := renderScene(b, sc, dir)
	out := filepath.Join(dir, "out")
	rounds := benchRounds()
	row := clipRow{ID: sc.ID, Desc: sc.Desc, Frames: truth.Frames, ClipFPS: truth.FPS, Rounds: rounds}
	measureIdle(b)

	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var dec, pip, ratio, free []float64
		for r := 1; r <= rounds; r++ {
			runtime.GC()
			free = append(free, freeCores(500*time.Millisecond))
			d, err := decodeOnly(clip)
			if err != nil {
				b.Fatalf("%s: decode-only: %v", sc.ID, err)
			}
			runtime.GC()
			p, err := pipelineInProcess(clip, flowers, truth.PXPerMM, out)
			if err != nil {
				b.Fatalf("%s: %v", sc.ID, err)
			}
			if d.Frames != truth.Frames || p.Frames != truth.Frames {
				b.Fatalf("%s: decode-only read %d frames, the pipeline %d, the clip has %d", sc.ID, d.Frames, p.Frames, truth.Frames)
			}
			b.Logf("%s round %d/%d: %.2f free cores; decode-only %.1f s (CPU %.0f %%) = %.1f fps; pipeline %.1f s (CPU %.0f %%) = %.1f fps; ratio %.3f; beyond decoding %.2f ms/frame",
				sc.ID, r, rounds, free[len(free)-1], d.WallS, d.CPUPct(), d.FPS(), p.WallS, p.CPUPct(), p.FPS(), p.FPS()/d.FPS(),
				1000*(p.WallS-d.WallS)/float64(truth.Frames))
			dec = append(dec, d.FPS())
			pip = append(pip, p.FPS())
			ratio = append(ratio, p.FPS()/d.FPS())
		}
		row.DecodeFPS, row.PipelineFPS, row.Ratio = median(dec), median(pip), median(ratio)
		row.RealtimeX = row.PipelineFPS / truth.FPS
		row.FreeCores = median(free)

		acc, err := scoreOutputs(filepath.Join(out, "clip"), truth)
		if err != nil {
			b.Errorf("%s: scoring the outputs: %v", sc.ID, err)
		}
		row.Acc = acc

		// Peak memory of the real CLI, and of decoding alone.
		cr, err := runCLI(b, "--px-per-mm", ftoaBench(truth.PXPerMM), "--flowers", flowers, "--workers", "1",
			"--out", filepath.Join(dir, "cli"), clip)
		if err != nil {
			b.Fatalf("%s: %v", sc.ID, err)
		}
		row.PeakRSSMB, row.CLIFPS = cr.MaxRSSMB, float64(truth.Frames)/cr.WallS
		dp, dr, err := decodeSubprocess(b, clip)
		if err != nil {
			b.Fatalf("%s: %v", sc.ID, err)
		}
		if dp.Frames != truth.Frames {
			b.Fatalf("%s: decode helper read %d frames, the clip has %d", sc.ID, dp.Frames, truth.Frames)
		}
		row.DecodeRSSMB = dr.MaxRSSMB
		b.Logf("%s: flitlog run %.1f s (CPU %.0f %%) = %.1f fps, peak RSS %.0f MB; decode-only process %.1f fps, peak RSS %.0f MB (measurement floor %.0f MB)",
			sc.ID, cr.WallS, 100*cr.CPUS/cr.WallS, row.CLIFPS, cr.MaxRSSMB, dp.FPS(), dr.MaxRSSMB, max(cr.FloorMB, dr.FloorMB))
		noteFloor(cr, dr)
		b.Logf("%s: accuracy of the outputs: MOTA %.3f, IDF1 %.3f, RMSE %.2f px, landing F1 %.3f",
			sc.ID, acc.MOTA, acc.IDF1, acc.RMSEPX, acc.LandingF1)
	}
	b.StopTimer()

	b.ReportMetric(0, "ns/op")
	reportMetric(b, row.DecodeFPS, "decode_fps")
	reportMetric(b, row.PipelineFPS, "pipeline_fps")
	reportMetric(b, row.Ratio, "ratio")
	reportMetric(b, row.RealtimeX, "realtime_x")
	reportMetric(b, row.PeakRSSMB, "peak_rss_MB")
	reportMetric(b, row.DecodeRSSMB, "decode_rss_MB")
	reportMetric(b, row.CLIFPS, "cli_fps")
	reportMetric(b, row.FreeCores, "free_cores")
	reportMetric(b, row.Acc.MOTA, "mota")
	reportMetric(b, row.Acc.IDF1, "idf1")
	reportMetric(b, row.Acc.LandingF1, "landing_f1")
	report.Lock()
	report.clips = append(report.clips, row)
	report.Unlock()
}

// BenchmarkClipLength measures the peak resident memory of 'flitlog run'
// on a 1-minute 720p30 clip and, with FLITLOG_BENCH_LONG=1, on a
// 10-minute clip of the same scene: frames stream, so the two should be
// close. Metrics: peak_rss_MB, cli_fps, realtime_x.
func BenchmarkClipLength(b *testing.B) {
	scenes := []benchScene{scene720p30("720p30_1min", 60)}
	if os.Getenv(envBenchLong) == "1" {
		scenes = append(scenes, scene720p30("720p30_10min", 600))
	} else {
		b.Logf("the 10-minute clip is left out: set %s=1 to add it (first render about 12 min on 2 cores, cached afterwards)", envBenchLong)
	}
	for _, sc := range scenes {
		b.Run(sc.ID, func(b *testing.B) {
			dir := b.TempDir()
			clip, flowers, truth := renderScene(b, sc, dir)
			row := lengthRow{ID: sc.ID, Desc: sc.Desc, Frames: truth.Frames}
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				cr, err := runCLI(b, "--px-per-mm", ftoaBench(truth.PXPerMM), "--flowers", flowers, "--workers", "1",
					"--out", filepath.Join(dir, "cli"), clip)
				if err != nil {
					b.Fatalf("%s: %v", sc.ID, err)
				}
				row.PeakRSSMB, row.CLIFPS = cr.MaxRSSMB, float64(truth.Frames)/cr.WallS
				row.RealtimeX = row.CLIFPS / truth.FPS
				b.Logf("%s: %d frames, flitlog run %.1f s (CPU %.0f %%) = %.1f fps, peak RSS %.0f MB (measurement floor %.0f MB)",
					sc.ID, truth.Frames, cr.WallS, 100*cr.CPUS/cr.WallS, row.CLIFPS, cr.MaxRSSMB, cr.FloorMB)
				noteFloor(cr)
			}
			b.StopTimer()
			b.ReportMetric(0, "ns/op")
			reportMetric(b, row.PeakRSSMB, "peak_rss_MB")
			reportMetric(b, row.CLIFPS, "cli_fps")
			reportMetric(b, row.RealtimeX, "realtime_x")
			report.Lock()
			report.lengths = append(report.lengths, row)
			report.Unlock()
		})
	}
}

// batchClips is the size of the batch of BenchmarkBatch.
const batchClips = 8

// BenchmarkBatch runs 'flitlog run' on a folder of 8 clips (720p30, 12 s
// each) with --workers 1 and --workers 2, alternating the order between
// rounds. Metrics: w1_s and w2_s (median wall time, s), speedup_x (median
// of the per-round ratios w1/w2), cpu_s_w1 and cpu_s_w2 (median CPU time
// of the batch, s), free_cores, busy_cores_w1 (U = cpu_s_w1 / w1_s, the
// cores one worker keeps busy), ceiling_x (nproc/U, the most 2 workers can
// gain on 2 cores), peak_rss_MB_w1 and peak_rss_MB_w2.
func BenchmarkBatch(b *testing.B) {
	b.Run(fmt.Sprintf("%dx720p30_12s", batchClips), func(b *testing.B) {
		dir := b.TempDir()
		clips := filepath.Join(dir, "clips")
		if err := os.Mkdir(clips, 0o755); err != nil {
			b.Fatal(err)
		}
		pxPerMM := 0.0
		var desc string
		for i := 0; i < batchClips; i++ {
			sc := batchScene(i)
			desc = sc.Desc
			// The flower map goes beside the clip as CLIP.flowers.json,
			// where 'flitlog run' looks for it.
			clip, _, truth := renderScene(b, sc, clips)
			if err := os.Symlink(clip, filepath.Join(clips, sc.ID+".mp4")); err != nil {
				b.Fatal(err)
			}
			if i > 0 && truth.PXPerMM != pxPerMM {
				b.Fatalf("batch clips differ in scale: %g and %g px/mm", pxPerMM, truth.PXPerMM)
			}
			pxPerMM = truth.PXPerMM
		}
		rounds := benchRounds()
		row := batchRow{Desc: desc, Clips: batchClips, Rounds: rounds}
		b.ResetTimer()
		for i := 0; i < b.N; i++ {
			var w1, w2, speed, cpu1, cpu2, free []float64
			for r := 0; r < rounds; r++ {
				order := []int{1, 2}
				if r%2 == 1 {
					order = []int{2, 1}
				}
				var wall [3]float64
				for _, w := range order {
					runtime.GC()
					fc := freeCores(500 * time.Millisecond)
					free = append(free, fc)
					cr, err := runCLI(b, "--px-per-mm", ftoaBench(pxPerMM), "--workers", strconv.Itoa(w),
						"--out", filepath.Join(dir, "out"+strconv.Itoa(w)), clips)
					if err != nil {
						b.Fatal(err)
					}
					wall[w] = cr.WallS
					if w == 1 {
						row.PeakRSSMB1 = max(row.PeakRSSMB1, cr.MaxRSSMB)
						cpu1 = append(cpu1, cr.CPUS)
					} else {
						row.PeakRSSMB2 = max(row.PeakRSSMB2, cr.MaxRSSMB)
						cpu2 = append(cpu2, cr.CPUS)
					}
					b.Logf("batch round %d/%d: --workers %d: %.1f s, CPU %.1f s (%.0f %%), peak RSS %.0f MB; %.2f free cores before",
						r+1, rounds, w, cr.WallS, cr.CPUS, 100*cr.CPUS/cr.WallS, cr.MaxRSSMB, fc)
					noteFloor(cr)
				}
				w1 = append(w1, wall[1])
				w2 = append(w2, wall[2])
				speed = append(speed, wall[1]/wall[2])
			}
			row.Workers1S, row.Workers2S, row.Speedup = median(w1), median(w2), median(speed)
			row.CPU1S, row.CPU2S, row.FreeCores = median(cpu1), median(cpu2), median(free)
		}
		b.StopTimer()
		b.ReportMetric(0, "ns/op")
		reportMetric(b, row.Workers1S, "w1_s")
		reportMetric(b, row.Workers2S, "w2_s")
		reportMetric(b, row.Speedup, "speedup_x")
		reportMetric(b, row.CPU1S, "cpu_s_w1")
		reportMetric(b, row.CPU2S, "cpu_s_w2")
		reportMetric(b, row.FreeCores, "free_cores")
		reportMetric(b, row.BusyCoresW1(), "busy_cores_w1")
		reportMetric(b, row.Ceiling(), "ceiling_x")
		reportMetric(b, row.PeakRSSMB1, "peak_rss_MB_w1")
		reportMetric(b, row.PeakRSSMB2, "peak_rss_MB_w2")
		report.Lock()
		report.batches = append(report.batches, row)
		report.Unlock()
	})
}
