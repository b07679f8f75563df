package main

import (
	"bufio"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"flitlog/track/meadow"
)

// buildFlitlog builds the command into a temporary folder.
func buildFlitlog(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "flitlog")
	out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput()
	if err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// longerClips copies n clips of 20 s (600 frames) into dir, so that a run
// is still busy when the test stops it.
func longerClips(t *testing.T, dir string, n int) []string {
	t.Helper()
	cfg := meadow.Config{Seed: 31, WidthPX: 320, HeightPX: 240, FPS: 30, DurationS: 20, Flowers: 3,
		FlowerRadiusMinMM: 25, FlowerRadiusMaxMM: 35, PXPerMM: 0.8, EntryMaxS: 0.2, TextureContrast: 1, NoiseSigma: 2}
	src, _, err := meadow.CachedClip(cfg, meadow.TestCacheDir(), ".avi")
	if err != nil {
		t.Fatal(err)
	}
	var paths []string
	for i := 0; i < n; i++ {
		p := filepath.Join(dir, "clip"+itoa(i)+".avi")
		copyFile(t, src, p)
		paths = append(paths, p)
	}
	return paths
}

// startRun starts flitlog run and returns once the first clip has
// finished, with the process still running.
func startRun(t *testing.T, bin string, args ...string) (*exec.Cmd, *strings.Builder, chan error) {
	t.Helper()
	cmd := exec.Command(bin, args...)
	pipe, err := cmd.StderrPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	var log strings.Builder
	firstDone := make(chan struct{})
	done := make(chan error, 1)
	go func() {
		sc := bufio.NewScanner(pipe)
		signalled := false
		for sc.Scan() {
			line := sc.Text()
			log.WriteString(line + "\n")
			if !signalled && strings.Contains(line, ": ok,") {
				signalled = true
				close(firstDone)
			}
		}
		done <- cmd.Wait()
	}()
	select {
	case <-firstDone:
	case err := <-done:
		t.Fatalf("run ended before a clip finished: %v\n%s", err, log.String())
	case <-time.After(3 * time.Minute):
		cmd.Process.Kill()
		t.Fatalf("no clip finished within 3 minutes:\n%s", log.String())
	}
	return cmd, &log, done
}

// TestInterruptKeepsFinishedClips stops a batch with Ctrl-C (SIGINT) and
// with SIGKILL after its first clip: finished clips stay whole, no file is
// left half-written under its final name, and a new run completes the
// batch.
func TestInterruptKeepsFinishedClips(t *testing.T) {
	bin := buildFlitlog(t)
	dir := t.TempDir()
	clips := filepath.Join(dir, "clips")
	os.Mkdir(clips, 0o755)
	paths := longerClips(t, clips, 4)
	out := filepath.Join(dir, "out")
	args := []string{"run", "--workers", "1", "--no-plots", "--px-per-mm", "0.8", "--out", out, clips}

	// Ctrl-C: prompt stop, exit status 1, clips.csv written.
	cmd, log, done := startRun(t, bin, args...)
	stopAt := time.Now()
	cmd.Process.Signal(os.Interrupt)
	select {
	case err := <-done:
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != exitSome {
			t.Errorf("after Ctrl-C: %v, want exit status %d\n%s", err, exitSome, log.String())
		}
	case <-time.After(30 * time.Second):
		cmd.Process.Kill()
		t.Fatal("flitlog did not stop within 30 s of Ctrl-C")
	}
	t.Logf("stopped %.2f s after Ctrl-C", time.Since(stopAt).Seconds())
	rows := readCSV(t, filepath.Join(out, "clips.csv"))
	if len(rows) != len(paths) {
		t.Fatalf("clips.csv has %d rows, want %d", len(rows), len(paths))
	}
	okN := 0
	for _, r := range rows {
		switch r["status"] {
		case "ok":
			okN++
			readSummary(t, filepath.Join(r["out_dir"], fileSummary))
		case "failed":
			if !strings.Contains(r["reason"], "interrupted") && !strings.Contains(r["reason"], "not started") {
				t.Errorf("%s: reason %q", r["clip"], r["reason"])
			}
			if _, err := os.Stat(r["out_dir"]); err == nil {
				t.Errorf("%s: unfinished clip has an output folder", r["clip"])
			}
		default:
			t.Errorf("%s: status %q", r["clip"], r["status"])
		}
	}
	if okN == 0 || okN == len(paths) {
		t.Errorf("%d of %d clips finished; the test wants the run stopped mid-batch", okN, len(paths))
	}
	assertNoTempFiles(t, out)

	// SIGKILL mid-batch (a closed lid, a power cut): whatever exists under
	// a final name is whole; the next run finishes the batch and clears
	// the temporary folders.
	cmd, _, done = startRun(t, bin, append([]string{args[0], "--force"}, args[1:]...)...)
	cmd.Process.Signal(syscall.SIGKILL)
	<-done
	entries, _ := os.ReadDir(out)
	for _, e := range entries {
		if !e.IsDir() || strings.HasPrefix(e.Name(), ".") {
			continue
		}
		// A clip folder only ever appears whole, by rename.
		readSummary(t, filepath.Join(out, e.Name(), fileSummary))
	}
	code := exec.Command(bin, append([]string{args[0], "--quiet"}, args[1:]...)...).Run()
	if code != nil {
		t.Fatalf("run after SIGKILL: %v", code)
	}
	for _, r := range readCSV(t, filepath.Join(out, "clips.csv")) {
		if r["status"] != "ok" {
			t.Errorf("after the rerun %s is %s", r["clip"], r["status"])
		}
	}
	assertNoTempFiles(t, out)
}
