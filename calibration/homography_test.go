package calibration

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// trueH is a synthetic projective map from image px to plane mm: a camera
// looking at the patch at an angle (non-zero perspective row).
var trueH = [9]float64{
	0.52, 0.07, -40,
	-0.03, 0.61, -25,
	2e-4, 3.5e-4, 1,
}

// correspondences maps the image points through h (synthetic ground
// truth).
func correspondences(t *testing.T, h [9]float64, px [][2]float64) []Correspondence {
	var c []Correspondence
	for _, p := range px {
		x, y, ok := applyH(h, p[0], p[1])
		if !ok {
			t.Fatalf("point %v beyond the horizon", p)
		}
		c = append(c, Correspondence{XPX: p[0], YPX: p[1], XMM: x, YMM: y})
	}
	return c
}

var eightPX = [][2]float64{{100, 80}, {1800, 120}, {1750, 1000}, {150, 950}, {960, 540}, {500, 300}, {1400, 700}, {900, 150}}

// TestFitPlaneExact: a known projective map is recovered from exact
// correspondences (4 and 8 points) up to the rounding of OpenCV's
// findHomography, which converts the points to 32-bit floats (relative
// precision 6e-8, so about 1e-4 px at 2000 px): the fitted homography
// equals the true one element by element (after scaling H[8] = 1) to 2e-6
// relative, and maps a grid over a 1920x1080 frame to the same mm within
// 1e-3 mm.
func TestFitPlaneExact(t *testing.T) {
	for _, n := range []int{4, 8} {
		fit, err := FitPlane(correspondences(t, trueH, eightPX[:n]), nil)
		if err != nil {
			t.Fatal(err)
		}
		for i := range trueH {
			if math.Abs(fit.PXToMM[i]-trueH[i]) > 2e-6*math.Max(math.Abs(trueH[i]), 1e-3) {
				t.Errorf("%d points: H[%d] = %.10g, want %.10g", n, i, fit.PXToMM[i], trueH[i])
			}
		}
		var maxErr float64
		for y := 0.0; y <= 1080; y += 120 {
			for x := 0.0; x <= 1920; x += 160 {
				gx, gy, _ := applyH(fit.PXToMM, x, y)
				wx, wy, _ := applyH(trueH, x, y)
				maxErr = math.Max(maxErr, math.Hypot(gx-wx, gy-wy))
			}
		}
		t.Logf("%d points: max grid error %.2g mm, RMS %.2g px", n, maxErr, fit.RMSPX)
		if maxErr > 1e-3 || fit.RMSPX > 1e-3 {
			t.Errorf("%d points: grid error %g mm, RMS %g px", n, maxErr, fit.RMSPX)
		}
		for i, in := range fit.Inlier {
			if !in {
				t.Errorf("%d points: exact point %d marked outlier", n, i+1)
			}
		}
	}
}

// TestFitPlaneNoiseAndOutlier: 12 points with 0.3 px Gaussian click noise
// and one point off by 40 px. RANSAC must reject exactly that point, the
// RMS over the rest must be of the order of the noise (0.1-0.5 px: the
// fit absorbs part of it), and mapped positions stay within 0.5 mm.
func TestFitPlaneNoiseAndOutlier(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	var px [][2]float64
	for i := 0; i < 12; i++ {
		px = append(px, [2]float64{100 + 1700*r.Float64(), 80 + 900*r.Float64()})
	}
	c := correspondences(t, trueH, px)
	for i := range c {
		c[i].XPX += 0.3 * r.NormFloat64()
		c[i].YPX += 0.3 * r.NormFloat64()
	}
	c[7].XPX += 40
	fit, err := FitPlane(c, nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("RMS %.3f px, max %.3f px, outlier error %.1f px", fit.RMSPX, fit.MaxPX, fit.ErrorPX[7])
	for i, in := range fit.Inlier {
		if in == (i == 7) {
			t.Errorf("point %d: inlier %v", i+1, in)
		}
	}
	if fit.RMSPX < 0.1 || fit.RMSPX > 0.5 || fit.ErrorPX[7] < 30 {
		t.Errorf("RMS %g px, outlier error %g px", fit.RMSPX, fit.ErrorPX[7])
	}
	for _, p := range px {
		gx, gy, _ := applyH(fit.PXToMM, p[0], p[1])
		wx, wy, _ := applyH(trueH, p[0], p[1])
		if d := math.Hypot(gx-wx, gy-wy); d > 0.5 {
			t.Errorf("pixel %v maps %g mm off", p, d)
		}
	}
}

// TestFitPlaneWithLens: clicked pixels seen through a distorting lens
// (the leftRef lens) are undistorted before the fit, so the projective
// map of undistorted pixels is recovered (to 1e-4 mm: single-precision
// findHomography, see TestFitPlaneExact); without the lens model the
// same points miss by over 1 mm.
func TestFitPlaneWithLens(t *testing.T) {
	cam := &Camera{FXPX: leftRef.fx, FYPX: leftRef.fy, CXPX: leftRef.cx, CYPX: leftRef.cy,
		K1: leftRef.k1, K2: leftRef.k2, P1: leftRef.p1, P2: leftRef.p2, K3: leftRef.k3}
	ideal := [][2]float64{{60, 50}, {590, 40}, {600, 430}, {40, 440}, {320, 240}, {200, 350}}
	c := correspondences(t, trueH, ideal)
	for i := range c {
		c[i].XPX, c[i].YPX = cam.Distort(c[i].XPX, c[i].YPX)
	}
	fit, err := FitPlane(c, cam)
	if err != nil {
		t.Fatal(err)
	}
	cal := &Calibration{Format: FormatName, Version: FormatVersion, FrameWidthPX: 640, FrameHeightPX: 480, HomographyPXToMM: &fit.PXToMM, Camera: cam}
	if err := cal.Validate(); err != nil {
		t.Fatal(err)
	}
	for i, p := range c {
		x, y := cal.ToPlaneMM(p.XPX, p.YPX)
		if math.Hypot(x-p.XMM, y-p.YMM) > 1e-4 {
			t.Errorf("point %d: (%g, %g) mm, want (%g, %g)", i+1, x, y, p.XMM, p.YMM)
		}
	}
	noLens, err := FitPlane(c, nil)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for _, p := range c {
		x, y, _ := applyH(noLens.PXToMM, p.XPX, p.YPX)
		worst = math.Max(worst, math.Hypot(x-p.XMM, y-p.YMM))
	}
	t.Logf("without the lens model: worst point %.2f mm off, RMS %.2f px", worst, noLens.RMSPX)
	if worst < 1 {
		t.Errorf("without the lens model the worst point is only %g mm off: the test lens does not distort", worst)
	}
}

func TestFitPlaneBadInput(t *testing.T) {
	square := []Correspondence{{100, 100, 0, 0}, {900, 100, 400, 0}, {900, 700, 400, 300}, {100, 700, 0, 300}}
	cases := []struct {
		name   string
		pts    []Correspondence
		wantIn string
	}{
		{"three points", square[:3], "needs at least 4 points with known plane positions, got 3"},
		{"collinear image points", []Correspondence{{100, 100, 0, 0}, {200, 200, 100, 0}, {300, 300, 100, 100}, {400, 400, 0, 100}, {500, 500, 50, 50}},
			"all 5 image points lie on one line"},
		{"collinear plane points", []Correspondence{{100, 100, 0, 0}, {900, 100, 100, 0}, {900, 700, 200, 0}, {100, 700, 300, 0}},
			"all 4 plane points lie on one line"},
		{"three of four in line", []Correspondence{{100, 100, 0, 0}, {500, 100, 200, 0}, {900, 101, 400, 0.5}, {100, 700, 0, 300}},
			"points 1, 2 and 3 lie on one line"},
		{"repeated point", []Correspondence{{100, 100, 0, 0}, {900, 100, 400, 0}, {900, 700, 400, 300}, {100, 100, 0, 300}},
			"points 1 and 4 are at the same image position"},
		{"NaN", []Correspondence{{100, 100, 0, 0}, {900, 100, 400, 0}, {900, 700, 400, 300}, {100, 700, math.NaN(), 300}},
			"point 4 (100,700=NaN,300) is not a finite number"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := FitPlane(c.pts, nil)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.wantIn) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %q, want one line containing %q", err, c.wantIn)
			}
		})
	}
	if _, err := FitPlane(square, nil); err != nil {
		t.Errorf("square: %v", err)
	}
}

// TestScaleFromPoints: a reference of 250 mm spanning 500 px (a 3-4-5
// triangle: 300 px across, 400 px down) gives 2 px/mm; a 1 px click error
// at each end changes the length by up to 2 px, 2/250 = 0.008 px/mm, 0.4%.
func TestScaleFromPoints(t *testing.T) {
	s, err := ScaleFromPoints(100, 200, 400, 600, 250, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(s.PXPerMM-2) > 1e-12 || math.Abs(s.DistancePX-500) > 1e-12 ||
		math.Abs(s.UncertaintyPXPerMM-0.008) > 1e-12 || math.Abs(s.RelativeUncertainty()-0.004) > 1e-12 {
		t.Errorf("got %+v", s)
	}
	// The uncertainty bounds the scale from any clicks within 1 px of
	// the true ends (worst case: both moved outwards along the line).
	d := 500.0 + 2
	if got := d/250 - s.PXPerMM; math.Abs(got-s.UncertaintyPXPerMM) > 1e-12 {
		t.Errorf("outward clicks change the scale by %g, uncertainty says %g", got, s.UncertaintyPXPerMM)
	}
	for _, c := range []struct {
		name           string
		x1, y1, x2, y2 float64
		l              float64
		wantIn         string
	}{
		{"zero length", 0, 0, 100, 0, 0, "reference length 0 mm"},
		{"negative length", 0, 0, 100, 0, -5, "reference length -5 mm"},
		{"NaN length", 0, 0, 100, 0, math.NaN(), "reference length NaN mm"},
		{"same point", 10, 10, 10, 10, 50, "only 0.0 px apart"},
		{"NaN point", math.NaN(), 10, 10, 10, 50, "must be finite pixel positions"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := ScaleFromPoints(c.x1, c.y1, c.x2, c.y2, c.l, nil)
			if err == nil || !strings.Contains(err.Error(), c.wantIn) {
				t.Errorf("error %v, want it to contain %q", err, c.wantIn)
			}
		})
	}
}
