package main

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"flitlog/calibration"
)

func runCalibrate(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := cmdCalibrate(args, &out, &errb)
	return code, out.String(), errb.String()
}

// oneLineErr checks that stderr is exactly one line containing want.
func oneLineErr(t *testing.T, stderr, want string) {
	t.Helper()
	if strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, want) {
		t.Errorf("stderr %q, want one line containing %q", stderr, want)
	}
}

func TestCalibrateUsage(t *testing.T) {
	cases := []struct {
		name     string
		args     []string
		code     int
		inStdout string
		inStderr string // one line
	}{
		{"help", []string{"--help"}, exitOK, "usage: flitlog calibrate scale|plane|chessboard", ""},
		{"scale help", []string{"scale", "--help"}, exitOK, "usage: flitlog calibrate scale --p1 X,Y", ""},
		{"plane help", []string{"plane", "-h"}, exitOK, "-point X,Y=XMM,YMM", ""},
		{"chessboard help", []string{"chessboard", "--help"}, exitOK, "-square-mm S", ""},
		{"unknown subcommand", []string{"ruler"}, exitUsage, "", `unknown subcommand "ruler": want scale, plane or chessboard`},
		{"unknown flag", []string{"scale", "--bogus", "1"}, exitUsage, "", "flitlog calibrate scale: flag provided but not defined: -bogus; run 'flitlog calibrate scale --help'"},
		{"bad point syntax", []string{"scale", "--p1", "212;540"}, exitUsage, "", "want pixel X,Y such as 212,540"},
		{"bad frame syntax", []string{"plane", "--frame", "1920by1080"}, exitUsage, "", "want WxH with whole numbers > 0"},
		{"bad plane point", []string{"plane", "--point", "1,2"}, exitUsage, "", "want X,Y=XMM,YMM"},
		{"missing length", []string{"scale", "--p1", "0,0", "--p2", "100,0", "--frame", "640x480", "--out", "x.json"}, exitUsage, "", "--length-mm is required"},
		{"missing frame", []string{"scale", "--p1", "0,0", "--p2", "100,0", "--length-mm", "50", "--out", "x.json"}, exitUsage, "", "--frame WxH is required"},
		{"stray argument", []string{"chessboard", "photos/"}, exitUsage, "", `unexpected argument "photos/"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := runCalibrate(c.args...)
			if code != c.code {
				t.Errorf("exit %d, want %d (stderr %q)", code, c.code, stderr)
			}
			if !strings.Contains(stdout, c.inStdout) {
				t.Errorf("stdout %q does not contain %q", stdout, c.inStdout)
			}
			if c.inStderr != "" {
				oneLineErr(t, stderr, c.inStderr)
			}
		})
	}
	if code, _, stderr := runCalibrate(); code != exitUsage || !strings.Contains(stderr, "usage:") {
		t.Errorf("no arguments: exit %d, stderr %q", code, stderr)
	}
}

// TestCalibrateScale: a 500 mm reference spanning 1500 px (synthetic)
// gives 3 px/mm, +- 2/500 px/mm.
func TestCalibrateScale(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "cam1.json")
	code, stdout, stderr := runCalibrate("scale", "--p1", "200,540", "--p2", "1700,540", "--length-mm", "500",
		"--frame", "1920x1080", "--out", out, "--note", "patch A")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	if !strings.Contains(stdout, "scale 3.0000 px/mm +- 0.0040 (0.13%") || !strings.Contains(stdout, "wrote "+out) {
		t.Errorf("stdout %q", stdout)
	}
	c, err := calibration.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	if c.PXPerMM != 3 || c.FrameWidthPX != 1920 || c.FrameHeightPX != 1080 || c.Note != "patch A" {
		t.Errorf("file %+v", c)
	}
	if err := c.CheckFrameSize(1280, 720); err == nil || !strings.Contains(err.Error(), "was made for 1920x1080 frames, this clip is 1280x720") {
		t.Errorf("CheckFrameSize: %v", err)
	}

	t.Run("bad input", func(t *testing.T) {
		for _, c := range []struct {
			name string
			args []string
			want string
		}{
			{"zero length", []string{"--length-mm", "0"}, "reference length 0 mm: give the real length"},
			{"negative length", []string{"--length-mm", "-3"}, "reference length -3 mm"},
			{"points too close", []string{"--length-mm", "10", "--p2", "203,540"}, "only 3.0 px apart"},
			{"missing lens file", []string{"--length-mm", "10", "--lens", filepath.Join(dir, "none.json")}, "none.json: no such file or directory"},
		} {
			t.Run(c.name, func(t *testing.T) {
				args := append([]string{"scale", "--p1", "200,540", "--p2", "1700,540", "--frame", "1920x1080", "--out", filepath.Join(dir, "bad.json")}, c.args...)
				code, _, stderr := runCalibrate(args...)
				if code != exitSome {
					t.Errorf("exit %d, want 1", code)
				}
				oneLineErr(t, stderr, c.want)
				if _, err := os.Stat(filepath.Join(dir, "bad.json")); err == nil {
					t.Error("a file was written")
				}
			})
		}
	})
	t.Run("short reference warns", func(t *testing.T) {
		code, stdout, stderr := runCalibrate("scale", "--p1", "200,540", "--p2", "260,540", "--length-mm", "20",
			"--frame", "1920x1080", "--out", filepath.Join(dir, "short.json"))
		if code != exitOK || !strings.Contains(stdout, "(3.33%") {
			t.Errorf("exit %d stdout %q", code, stdout)
		}
		oneLineErr(t, stderr, "warning: the scale is uncertain by 3.3%: click the ends of a longer reference (100 px or more")
	})
}

// planeArgs maps pixels through a synthetic projective map (px -> mm)
// and returns --point flags.
func planeArgs(h [9]float64, px [][2]float64) []string {
	var a []string
	for _, p := range px {
		w := h[6]*p[0] + h[7]*p[1] + h[8]
		x := (h[0]*p[0] + h[1]*p[1] + h[2]) / w
		y := (h[3]*p[0] + h[4]*p[1] + h[5]) / w
		a = append(a, "--point", fmt.Sprintf("%g,%g=%.6f,%.6f", p[0], p[1], x, y))
	}
	return a
}

var cliH = [9]float64{0.52, 0.07, -40, -0.03, 0.61, -25, 2e-4, 3.5e-4, 1} // synthetic oblique view

func TestCalibratePlane(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "cam2.json")
	px := [][2]float64{{100, 80}, {1800, 120}, {1750, 1000}, {150, 950}, {960, 540}, {500, 300}}
	args := append([]string{"plane", "--frame", "1920x1080", "--out", out}, planeArgs(cliH, px)...)
	code, stdout, stderr := runCalibrate(args...)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for _, want := range []string{"plane from 6 points:", "RMS reprojection error 0.00 px", "scale at the frame centre", "wrote " + out} {
		if !strings.Contains(stdout, want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout)
		}
	}
	c, err := calibration.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	// Points were printed with 6 decimals: 1e-3 mm.
	x, y := c.ToPlaneMM(960, 540)
	w := cliH[6]*960 + cliH[7]*540 + cliH[8]
	if math.Abs(x-(cliH[0]*960+cliH[1]*540+cliH[2])/w) > 1e-3 || math.Abs(y-(cliH[3]*960+cliH[4]*540+cliH[5])/w) > 1e-3 {
		t.Errorf("centre maps to (%g, %g)", x, y)
	}

	t.Run("outlier is named", func(t *testing.T) {
		a := append([]string{"plane", "--frame", "1920x1080", "--out", filepath.Join(dir, "o.json")}, planeArgs(cliH, px)...)
		a = append(a, "--point", "1000,900=5,5") // far from where the map puts it
		code, stdout, stderr := runCalibrate(a...)
		if code != exitOK || !strings.Contains(stdout, "left out") {
			t.Errorf("exit %d stdout %q", code, stdout)
		}
		oneLineErr(t, stderr, "warning: point 7 (1000,900=5,5) is")
	})
	for _, c := range []struct {
		name string
		pts  []string
		want string
	}{
		{"three points", planeArgs(cliH, px[:3]), "needs at least 4 points with known plane positions, got 3"},
		{"collinear", []string{"--point", "0,0=0,0", "--point", "100,100=10,0", "--point", "200,200=20,10", "--point", "300,300=0,30"}, "all 4 image points lie on one line"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runCalibrate(append([]string{"plane", "--frame", "1920x1080", "--out", filepath.Join(dir, "bad.json")}, c.pts...)...)
			if code != exitSome {
				t.Errorf("exit %d, want 1", code)
			}
			oneLineErr(t, stderr, c.want)
		})
	}
}

// TestCalibrateChessboardThenScale runs the chessboard subcommand on
// OpenCV's sample photos left01..left14 (opencv-doc; 9x6 inner corners),
// writes a lens file, then makes a scale calibration with it.
func TestCalibrateChessboardThenScale(t *testing.T) {
	const data = "/usr/share/doc/opencv-doc/examples/data"
	if _, err := os.Stat(filepath.Join(data, "left01.jpg")); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("sample data missing: %v (install opencv-doc)", err)
		}
		t.Skipf("sample data missing: %v", err)
	}
	dir := t.TempDir()
	photos := filepath.Join(dir, "photos")
	if err := os.Mkdir(photos, 0o755); err != nil {
		t.Fatal(err)
	}
	for i := 1; i <= 14; i++ {
		if i == 10 {
			continue
		}
		name := fmt.Sprintf("left%02d.jpg", i)
		if err := os.Symlink(filepath.Join(data, name), filepath.Join(photos, name)); err != nil {
			t.Fatal(err)
		}
	}
	os.WriteFile(filepath.Join(photos, "notes.txt"), []byte("not a photo"), 0o644) // ignored

	lens := filepath.Join(dir, "lens.json")
	code, stdout, stderr := runCalibrate("chessboard", "--dir", photos, "--inner", "9x6", "--square-mm", "25", "--out", lens)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for _, want := range []string{"board found in 13 of 13 photos (640x480 px)", "RMS reprojection error 0.4", "left02.jpg", "lens only"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout)
		}
	}
	if _, err := calibration.Load(lens); err == nil || !strings.Contains(err.Error(), "has a lens model but no scale") {
		t.Errorf("Load(lens file) = %v, want the lens-only error", err)
	}

	out := filepath.Join(dir, "cam.json")
	code, _, stderr = runCalibrate("scale", "--lens", lens, "--p1", "100,240", "--p2", "540,240", "--length-mm", "200", "--out", out)
	if code != exitOK {
		t.Fatalf("scale --lens: exit %d, stderr %q", code, stderr)
	}
	c, err := calibration.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	if c.Camera == nil || c.FrameWidthPX != 640 || c.FrameHeightPX != 480 || !(c.PXPerMM > 2.2) {
		// Barrel distortion shrinks the edges: the undistorted
		// reference is longer than 440 px.
		t.Errorf("calibration %+v", c)
	}

	code, _, stderr = runCalibrate("scale", "--lens", lens, "--frame", "1920x1080", "--p1", "100,240", "--p2", "540,240", "--length-mm", "200", "--out", out)
	if code != exitSome {
		t.Errorf("frame mismatch: exit %d", code)
	}
	oneLineErr(t, stderr, "--frame 1920x1080 but lens file "+lens+" was made for 640x480 frames")

	empty := filepath.Join(dir, "empty")
	os.Mkdir(empty, 0o755)
	fish, _ := os.ReadFile(filepath.Join(data, "HappyFish.jpg"))
	os.WriteFile(filepath.Join(empty, "fish.jpg"), fish, 0o644)
	code, _, stderr = runCalibrate("chessboard", "--dir", empty, "--inner", "9x6", "--square-mm", "25")
	if code != exitSome {
		t.Errorf("no board: exit %d", code)
	}
	oneLineErr(t, stderr, "no chessboard with 9x6 inner corners found in any of the 1 images: check --inner")
}
