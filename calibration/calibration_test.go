package calibration

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestFromScale(t *testing.T) {
	for _, v := range []float64{0, -2, math.NaN(), math.Inf(1)} {
		_, err := FromScale(v)
		if err == nil || !strings.Contains(err.Error(), "give the pixels per millimetre") || strings.Contains(err.Error(), "\n") {
			t.Errorf("FromScale(%g): %v", v, err)
		}
	}
	c, err := FromScale(2.5)
	if err != nil {
		t.Fatal(err)
	}
	if x, y := c.ToPlaneMM(250, 100); x != 100 || y != 40 {
		t.Errorf("ToPlaneMM(250, 100) = %g, %g; want 100, 40", x, y)
	}
	if c.NominalPXPerMM() != 2.5 || c.CheckFrameSize(1234, 567) != nil {
		t.Error("plain scale: wrong nominal scale or frame check")
	}
}

func TestCheckFrameSize(t *testing.T) {
	c := &Calibration{Format: FormatName, Version: FormatVersion, FrameWidthPX: 1920, FrameHeightPX: 1080, PXPerMM: 3}
	path := filepath.Join(t.TempDir(), "cam1.json")
	if err := c.Save(path); err != nil {
		t.Fatal(err)
	}
	c, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := c.CheckFrameSize(1920, 1080); err != nil {
		t.Error(err)
	}
	want := "calibration " + path + " was made for 1920x1080 frames, this clip is 1280x720: make a calibration for this camera setting"
	if err := c.CheckFrameSize(1280, 720); err == nil || err.Error() != want {
		t.Errorf("got %v\nwant %s", err, want)
	}
}

// TestSaveLoadRoundTrip: every kind of calibration survives Save and Load
// and maps pixels to the same mm.
func TestSaveLoadRoundTrip(t *testing.T) {
	h := trueH
	cam := &Camera{FXPX: leftRef.fx, FYPX: leftRef.fy, CXPX: leftRef.cx, CYPX: leftRef.cy,
		K1: leftRef.k1, K2: leftRef.k2, P1: leftRef.p1, P2: leftRef.p2, K3: leftRef.k3, RMSPX: 0.4, Views: 13}
	ref := [4]float64{10, 20, 410, 20}
	cases := []struct {
		name string
		c    Calibration
	}{
		{"scale", Calibration{FrameWidthPX: 1280, FrameHeightPX: 720, PXPerMM: 2.25, PXPerMMUncertainty: 0.01, ReferenceLengthMM: 200, ReferencePX: &ref}},
		{"plane", Calibration{FrameWidthPX: 1920, FrameHeightPX: 1080, HomographyPXToMM: &h, PlaneRMSPX: 0.3,
			PlanePoints: []Correspondence{{1, 2, 3, 4}}}},
		{"lens and scale", Calibration{FrameWidthPX: 640, FrameHeightPX: 480, PXPerMM: 1.5, Camera: cam, Note: "bench test"}},
	}
	dir := t.TempDir()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(dir, c.name+".json")
			if err := c.c.Save(p); err != nil {
				t.Fatal(err)
			}
			got, err := Load(p)
			if err != nil {
				t.Fatal(err)
			}
			for _, px := range [][2]float64{{0, 0}, {320, 240}, {600, 50}} {
				x0, y0 := c.c.ToPlaneMM(px[0], px[1])
				x1, y1 := got.ToPlaneMM(px[0], px[1])
				if x0 != x1 || y0 != y1 {
					t.Errorf("pixel %v: before save (%g, %g), after load (%g, %g)", px, x0, y0, x1, x1)
				}
			}
			if got.Path() != p {
				t.Errorf("Path() = %q", got.Path())
			}
			matches, _ := filepath.Glob(filepath.Join(dir, ".*tmp*"))
			if len(matches) != 0 {
				t.Errorf("temporary files left: %v", matches)
			}
		})
	}
}

func TestLoadErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	head := `"format": "flitlog-calibration", "version": 1, "frame_width_px": 640, "frame_height_px": 480`
	cases := []struct {
		name, body, wantIn string
	}{
		{"syntax", "{\n" + head + ",\n\"px_per_mm\": 2,,\n}", "line 3: invalid character"},
		{"unknown key", "{" + head + `, "px_per_mm": 2, "px_per_cm": 20}`, `unknown field "px_per_cm"`},
		{"not ours", `{"px_per_mm": 2}`, "not a flitlog calibration file"},
		{"newer version", `{"format": "flitlog-calibration", "version": 2, "px_per_mm": 2}`, "format version 2"},
		{"no scale", "{" + head + "}", "has neither px_per_mm nor homography_px_to_mm: make one with 'flitlog calibrate scale'"},
		{"lens only", "{" + head + `, "camera": {"fx_px": 500, "fy_px": 500, "cx_px": 320, "cy_px": 240}}`, "has a lens model but no scale: add one with 'flitlog calibrate scale --lens FILE"},
		{"both", "{" + head + `, "px_per_mm": 2, "homography_px_to_mm": [1,0,0,0,1,0,0,0,1]}`, "has both px_per_mm and homography_px_to_mm"},
		{"negative scale", "{" + head + `, "px_per_mm": -2}`, "px_per_mm is -2: want > 0"},
		{"singular homography", "{" + head + `, "homography_px_to_mm": [1,2,3,2,4,6,0,0,1]}`, "singular"},
		{"homography without frame", `{"format": "flitlog-calibration", "version": 1, "homography_px_to_mm": [1,0,0,0,1,0,0,0,1]}`, "needs the frame size"},
		{"half a frame size", `{"format": "flitlog-calibration", "version": 1, "frame_width_px": 640, "px_per_mm": 2}`, "frame size 640x0"},
		{"bad camera", "{" + head + `, "px_per_mm": 2, "camera": {"fx_px": 0, "fy_px": 500}}`, "focal lengths"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := write(strings.ReplaceAll(c.name, " ", "_")+".json", c.body)
			_, err := Load(p)
			if err == nil {
				t.Fatal("no error")
			}
			msg := err.Error()
			if !strings.Contains(msg, p) || !strings.Contains(msg, c.wantIn) || strings.Contains(msg, "\n") {
				t.Errorf("error %q, want one line naming the file and containing %q", msg, c.wantIn)
			}
		})
	}
	t.Run("missing file", func(t *testing.T) {
		p := filepath.Join(dir, "nope.json")
		_, err := Load(p)
		if err == nil || err.Error() != "calibration "+p+": no such file or directory" {
			t.Errorf("got %v", err)
		}
	})
	t.Run("lens file", func(t *testing.T) {
		p := write("lens.json", "{"+head+`, "camera": {"fx_px": 500, "fy_px": 500, "cx_px": 320, "cy_px": 240, "k1": -0.1}}`)
		cam, w, h, err := LoadLens(p)
		if err != nil || cam.K1 != -0.1 || w != 640 || h != 480 {
			t.Errorf("LoadLens: %+v %d %d %v", cam, w, h, err)
		}
		q := write("nolens.json", "{"+head+`, "px_per_mm": 2}`)
		if _, _, _, err := LoadLens(q); err == nil || !strings.Contains(err.Error(), "has no lens model") {
			t.Errorf("LoadLens without camera: %v", err)
		}
	})
}

// TestNominalPXPerMM: for a homography the local scale at the frame
// centre is 1/sqrt(|det J|) with J the Jacobian of the map, here computed
// analytically for trueH (quotient rule) and compared with the finite
// differences NominalPXPerMM uses (1e-6 relative); for a homography that
// is a pure scale of 4 px/mm it is exactly 4.
func TestNominalPXPerMM(t *testing.T) {
	h := trueH
	c := &Calibration{Format: FormatName, Version: FormatVersion, FrameWidthPX: 1920, FrameHeightPX: 1080, HomographyPXToMM: &h}
	u, v := 960.0, 540.0
	w := h[6]*u + h[7]*v + h[8]
	X := (h[0]*u + h[1]*v + h[2]) / w
	Y := (h[3]*u + h[4]*v + h[5]) / w
	j11, j12 := (h[0]-X*h[6])/w, (h[1]-X*h[7])/w
	j21, j22 := (h[3]-Y*h[6])/w, (h[4]-Y*h[7])/w
	want := 1 / math.Sqrt(math.Abs(j11*j22-j12*j21))
	if got := c.NominalPXPerMM(); math.Abs(got/want-1) > 1e-6 {
		t.Errorf("NominalPXPerMM = %.9g, analytic %.9g", got, want)
	}
	s := [9]float64{0.25, 0, 0, 0, 0.25, 0, 0, 0, 1}
	c.HomographyPXToMM = &s
	if got := c.NominalPXPerMM(); math.Abs(got-4) > 1e-9 {
		t.Errorf("pure scale homography: %g px/mm, want 4", got)
	}
}

// TestToPlaneMMBeyondHorizon: a pixel on the far side of the plane's
// horizon has no plane position.
func TestToPlaneMMBeyondHorizon(t *testing.T) {
	h := [9]float64{1, 0, 0, 0, 1, 0, 0, -0.002, 1} // horizon at y = 500 px
	c := &Calibration{Format: FormatName, Version: FormatVersion, FrameWidthPX: 640, FrameHeightPX: 480, HomographyPXToMM: &h}
	if err := c.Validate(); err != nil {
		t.Fatal(err)
	}
	if x, y := c.ToPlaneMM(100, 600); !math.IsNaN(x) || !math.IsNaN(y) {
		t.Errorf("beyond the horizon: (%g, %g), want NaN", x, y)
	}
	if x, _ := c.ToPlaneMM(100, 250); math.Abs(x-200) > 1e-9 {
		t.Errorf("x = %g, want 100/(1-0.5) = 200", x)
	}
}

func BenchmarkToPlaneMM(b *testing.B) {
	h := trueH
	cam := &Camera{FXPX: leftRef.fx, FYPX: leftRef.fy, CXPX: leftRef.cx, CYPX: leftRef.cy,
		K1: leftRef.k1, K2: leftRef.k2, P1: leftRef.p1, P2: leftRef.p2, K3: leftRef.k3}
	c := &Calibration{HomographyPXToMM: &h, Camera: cam}
	for i := 0; i < b.N; i++ {
		c.ToPlaneMM(float64(i%640), float64(i%480))
	}
}
