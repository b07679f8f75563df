package main

import (
	"bytes"
	"image"
	"image/color"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gocv.io/x/gocv"

	"flitlog/visits"
)

// writeFlowerClip writes a short MJPEG clip: green ground, a white and a
// purple flower of radius 24 px, and a dark bee crossing (invented test
// scene).
func writeFlowerClip(t *testing.T, path string) {
	t.Helper()
	const w, h = 320, 240
	bg := gocv.NewMatWithSizeFromScalar(gocv.NewScalar(50, 120, 60, 0), h, w, gocv.MatTypeCV8UC3)
	defer bg.Close()
	gocv.Circle(&bg, image.Pt(80, 120), 24, color.RGBA{R: 240, G: 240, B: 235, A: 255}, -1)
	gocv.Circle(&bg, image.Pt(230, 100), 24, color.RGBA{R: 82, G: 110, B: 212, A: 255}, -1)
	vw, err := gocv.VideoWriterFile(path, "MJPG", 10, w, h, true)
	if err != nil {
		t.Fatal(err)
	}
	defer vw.Close()
	frame := gocv.NewMat()
	defer frame.Close()
	for i := 0; i < 30; i++ {
		bg.CopyTo(&frame)
		gocv.Circle(&frame, image.Pt(10+10*i, 120), 7, color.RGBA{R: 20, G: 20, B: 20, A: 255}, -1)
		if err := vw.Write(frame); err != nil {
			t.Fatal(err)
		}
	}
}

func TestCmdFlowers(t *testing.T) {
	dir := t.TempDir()
	clip := filepath.Join(dir, "plot4.avi")
	writeFlowerClip(t, clip)
	mapPath := filepath.Join(dir, "plot4.flowers.json")
	run := func(args ...string) (int, string, string) {
		var o, e bytes.Buffer
		code := cmdFlowers(args, &o, &e)
		return code, o.String(), e.String()
	}

	code, _, stderr := run("--px-per-mm", "2", "--preview", filepath.Join(dir, "check.png"), clip)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	fm, err := visits.LoadFlowerMap(mapPath)
	if err != nil {
		t.Fatal(err)
	}
	if len(fm.Flowers) != 2 || fm.Flowers[0].Kind != "white" || fm.Flowers[1].Kind != "purple" || fm.FrameWidthPX != 320 {
		t.Errorf("map %+v", fm)
	}
	if err := fm.Validate(320, 240); err != nil {
		t.Error(err)
	}
	if !strings.Contains(stderr, "2 flowers (1 purple, 1 white) written to "+mapPath) {
		t.Errorf("stderr %q", stderr)
	}
	if st, err := os.Stat(filepath.Join(dir, "check.png")); err != nil || st.Size() == 0 {
		t.Errorf("preview: %v", err)
	}

	cases := []struct {
		name   string
		args   []string
		code   int
		stderr string // part of the one-line message
		stdout string
	}{
		{"existing map kept", []string{"--px-per-mm", "2", clip}, exitSome, "exists and may hold your edits", ""},
		{"force", []string{"--px-per-mm", "2", "--force", clip}, exitOK, "written to", ""},
		{"stdout", []string{"--px-per-mm", "2", "--out", "-", "--colors", "white", clip}, exitOK, "1 flowers (1 white) written to standard output", `"kind":"white"`},
		{"own range", []string{"--px-per-mm", "2", "--out", "-", "--hsv", "lilac=100-140,60-255,60-255", clip}, exitOK, "1 lilac", `"kind":"lilac"`},
		{"nothing found", []string{"--px-per-mm", "2", "--out", "-", "--colors", "pink", clip}, exitSome, "no flowers found", ""},
		{"no scale", []string{"--out", "-", clip}, exitOK, "assumed 2 px/mm", `"id":"F01"`},
		{"missing clip", []string{filepath.Join(dir, "none.mp4")}, exitSome, "no such file", ""},
		{"folder", []string{dir}, exitSome, "is a folder", ""},
		{"no clip", nil, exitUsage, "want one CLIP", ""},
		{"bad colour", []string{"--colors", "green", clip}, exitUsage, `unknown colour "green"`, ""},
		{"bad hsv", []string{"--hsv", "x=1-2", clip}, exitUsage, "three ranges", ""},
		{"bad radius", []string{"--radius-mm", "40-4", clip}, exitUsage, "--radius-mm", ""},
		{"scale twice", []string{"--px-per-mm", "2", "--calibration", "c.json", clip}, exitUsage, "not both", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := run(c.args...)
			if code != c.code || !strings.Contains(stderr, c.stderr) || !strings.Contains(stdout, c.stdout) {
				t.Errorf("exit %d, stderr %q, stdout %q; want exit %d, stderr with %q, stdout with %q",
					code, stderr, stdout, c.code, c.stderr, c.stdout)
			}
			if c.code != exitOK && strings.Count(stderr, "\n") != 1 {
				t.Errorf("stderr is not one line: %q", stderr)
			}
		})
	}
	code, stdout, _ := run("--help")
	if code != exitOK || !strings.Contains(stdout, "usage: flitlog flowers") || !strings.Contains(stdout, "-radius-mm") {
		t.Errorf("--help: exit %d\n%s", code, stdout)
	}
}
