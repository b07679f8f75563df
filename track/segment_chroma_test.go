package track

import (
	"image"
	"image/color"
	"math"
	"math/rand/v2"
	"testing"

	"gocv.io/x/gocv"
)

// TestChromaDist2 checks the chromaticity distortion against values
// worked by hand from its definition (Horprasert et al. 1999, eq. 4-5):
// a colour that is a multiple of the background (a shadow, a change of
// light) has none; the part of I orthogonal to E is the distortion.
func TestChromaDist2(t *testing.T) {
	for _, c := range []struct {
		name string
		I, E [3]float64
		want float64
	}{
		{"same colour", [3]float64{72, 104, 96}, [3]float64{72, 104, 96}, 0},
		{"shadow 0.4", [3]float64{28.8, 41.6, 38.4}, [3]float64{72, 104, 96}, 0},
		{"brighter 1.5", [3]float64{108, 156, 144}, [3]float64{72, 104, 96}, 0},
		// E along blue: the green and red parts of I are the distortion,
		// 30^2 + 40^2 (worked by hand).
		{"orthogonal part", [3]float64{50, 30, 40}, [3]float64{100, 0, 0}, 2500},
		// Worked by hand: I.I = 1400, I.E = 2400, E.E = 7200, so
		// CD^2 = 1400 - 2400^2 / 7200 = 600 (a = 1/3, I - a E = (-10, 10, 20)).
		{"oblique", [3]float64{10, 30, 20}, [3]float64{60, 60, 0}, 600},
		{"black background", [3]float64{3, 4, 0}, [3]float64{0, 0, 0}, 25},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := chromaDist2(c.I, c.E); math.Abs(got-c.want) > 1e-9*math.Max(1, c.want) {
				t.Errorf("chromaDist2(%v, %v) = %g, want %g", c.I, c.E, got, c.want)
			}
		})
	}
}

// darkCentreClip draws a synthetic clip (invented for this test): a bee
// (dark body, two yellow bands, 30 x 13 px) flies in from the left over
// plain ground, sits for sitS seconds on a flower whose centre is about as
// dark as its body, and flies out to the right. It returns the frames and
// the bee's true centre per frame (NaN when out of the picture).
func darkCentreClip(sitS float64) ([]gocv.Mat, [][2]float64) {
	const (
		w, h   = 480, 320
		fps    = 30.0
		cx, cy = 300, 160 // flower centre
		speed  = 5        // px per frame
	)
	ground := gocv.NewMatWithSizeFromScalar(gocv.NewScalar(72, 104, 96, 0), h, w, gocv.MatTypeCV8UC3)
	defer ground.Close()
	gocv.Circle(&ground, image.Pt(cx, cy), 40, color.RGBA{B: 212, G: 110, R: 82}, -1)
	gocv.Circle(&ground, image.Pt(cx, cy), 14, color.RGBA{B: 48, G: 30, R: 34}, -1)
	rng := rand.New(rand.NewPCG(3, 1))
	const margin = 32
	noise := make([]int8, (w+margin)*(h+margin)*3)
	for i := range noise {
		noise[i] = int8(math.Round(math.Max(-100, math.Min(100, 2.5*rng.NormFloat64()))))
	}
	var frames []gocv.Mat
	var truth [][2]float64
	sit := int(sitS * fps)
	arrive := (cx + 20) / speed
	for i := 0; ; i++ {
		var x int
		switch {
		case i < arrive:
			x = -20 + speed*i
		case i < arrive+sit:
			x = cx
		default:
			x = cx + speed*(i-arrive-sit)
		}
		if x > w+20 {
			break
		}
		f := ground.Clone()
		drawBandedBee(&f, x, cy)
		addFrameNoise(f, noise, margin, rng)
		frames = append(frames, f)
		if x < -15 || x > w+15 {
			truth = append(truth, [2]float64{math.NaN(), math.NaN()})
		} else {
			truth = append(truth, [2]float64{float64(x), cy})
		}
	}
	return frames, truth
}

// TestSegmentBeeOnDarkCentre: a bee that sits on a flower centre as dark
// as its body is not darker than what it covers; the colour test on blind
// ground (chroma) must keep finding it, at its centre, while darkness
// alone (the colour test switched off with MinChromaGrey = 200) loses it.
// Targets as in issue 3: seen in >= 99 % of the sitting frames, RMSE <=
// 1.5 px.
func TestSegmentBeeOnDarkCentre(t *testing.T) {
	frames, truth := darkCentreClip(4)
	defer func() {
		for _, f := range frames {
			f.Close()
		}
	}()
	sitFrom, sitTo := 64+9, 64+120 // arrival (frame 64) plus 0.3 s, to departure
	run := func(minChroma float64) (seen, n int, rmse float64) {
		s := Settings{PXPerMM: 30.0 / 14, BodyLengthMM: 14, MinChromaGrey: minChroma}
		tr, err := NewTracker(s, VideoInfo{Path: "synthetic", WidthPX: 480, HeightPX: 320, FPS: 30})
		if err != nil {
			t.Fatal(err)
		}
		defer tr.Close()
		var se float64
		for i, f := range frames {
			if err := tr.Step(FrameInfo{Index: i, TimeS: float64(i) / 30}, f); err != nil {
				t.Fatal(err)
			}
			if i < sitFrom || i >= sitTo {
				continue
			}
			n++
			best := math.Inf(1)
			for _, d := range tr.Detections() {
				best = math.Min(best, math.Hypot(d.XPX-truth[i][0], d.YPX-truth[i][1]))
			}
			if best <= 0.5*30 { // on the bee's body (as the accuracy tests)
				seen++
				se += best * best
			}
		}
		if seen > 0 {
			rmse = math.Sqrt(se / float64(seen))
		}
		return
	}
	seen, n, rmse := run(0)
	t.Logf("with colour: seen in %d of %d sitting frames, RMSE %.2f px", seen, n, rmse)
	if float64(seen) < 0.99*float64(n) || rmse > 1.5 {
		t.Errorf("with colour: seen in %d of %d sitting frames (want >= 99 %%), RMSE %.2f px (want <= 1.5)", seen, n, rmse)
	}
	seen0, _, rmse0 := run(200)
	t.Logf("darkness only: seen in %d of %d sitting frames, RMSE %.2f px", seen0, n, rmse0)
	if float64(seen0) > 0.5*float64(n) && rmse0 <= 1.5 {
		t.Errorf("darkness only already finds the bee (%d of %d frames, RMSE %.2f px): the scene does not test the colour cue", seen0, n, rmse0)
	}
}

// settlingShadowClip draws a synthetic clip (invented for this test): a
// banded bee (30 x 13 px) flies in from the left and settles astride the
// rim of a dark flower centre (radius 14 px, about as dark as the bee,
// against bright blue petals), its rear over the petals. Its shadow (a
// soft ellipse 31 x 17 px that dims the ground by 30 % at the most) lies
// down and to the right, offset by (0.12 + 0.55 h) bee lengths, where the
// height h, 1 body length in flight, falls to 0 with a time constant of
// 0.15 s after the bee touches down: the shadow slides under the bee,
// across the rim, as it settles, while the bee does not move. It returns
// the frames, the bee's true centre per frame (NaN when out of the
// picture) and the frame at which the bee touches down.
func settlingShadowClip() ([]gocv.Mat, [][2]float64, int) {
	const (
		w, h   = 480, 320
		fps    = 30.0
		fx, fy = 300, 160 // flower centre
		bx     = 290      // where the bee settles: its front half on the centre
		speed  = 5        // px per frame
		L      = 30.0     // bee length, px
		sitN   = 60       // frames sitting
	)
	ground := gocv.NewMatWithSizeFromScalar(gocv.NewScalar(72, 104, 96, 0), h, w, gocv.MatTypeCV8UC3)
	defer ground.Close()
	gocv.Circle(&ground, image.Pt(fx, fy), 40, color.RGBA{B: 212, G: 110, R: 82}, -1)
	gocv.Circle(&ground, image.Pt(fx, fy), 14, color.RGBA{B: 48, G: 30, R: 34}, -1)
	groundF := gocv.NewMat()
	defer groundF.Close()
	ground.ConvertTo(&groundF, gocv.MatTypeCV32FC3)
	mask := gocv.NewMatWithSize(h, w, gocv.MatTypeCV32F)
	defer mask.Close()
	mask3 := gocv.NewMat()
	defer mask3.Close()
	lit := gocv.NewMat()
	defer lit.Close()
	rng := rand.New(rand.NewPCG(5, 2))
	const margin = 32
	noise := make([]int8, (w+margin)*(h+margin)*3)
	for i := range noise {
		noise[i] = int8(math.Round(math.Max(-100, math.Min(100, 2.5*rng.NormFloat64()))))
	}
	arrive := (bx + 20) / speed
	alpha := 1 - math.Exp(-1/(fps*0.15))
	hgt := 1.0
	var frames []gocv.Mat
	var truth [][2]float64
	for i := 0; i < arrive+sitN; i++ {
		x := bx
		if i < arrive {
			x = -20 + speed*i
		} else {
			hgt -= alpha * hgt
		}
		// Shadow: ground times 1 - depth * (soft ellipse mask).
		off := (0.12 + 0.55*hgt) * L
		depth := 0.3 / (1 + 0.6*hgt)
		mask.SetTo(gocv.NewScalar(0, 0, 0, 0))
		gocv.EllipseWithParams(&mask, image.Pt(int(math.Round(16*(float64(x)+0.5*off))), int(math.Round(16*(fy+0.85*off)))),
			image.Pt(16*15, 16*8), 0, 0, 360, color.RGBA{B: 1}, -1, gocv.LineAA, 4)
		gocv.GaussianBlur(mask, &mask, image.Pt(0, 0), 2, 2, gocv.BorderReplicate)
		mask.MultiplyFloat(-float32(depth))
		mask.AddFloat(1)
		gocv.Merge([]gocv.Mat{mask, mask, mask}, &mask3)
		gocv.Multiply(groundF, mask3, &lit)
		f := gocv.NewMat()
		lit.ConvertTo(&f, gocv.MatTypeCV8UC3)
		drawBandedBee(&f, x, fy)
		addFrameNoise(f, noise, margin, rng)
		frames = append(frames, f)
		if x < -15 {
			truth = append(truth, [2]float64{math.NaN(), math.NaN()})
		} else {
			truth = append(truth, [2]float64{float64(x), fy})
		}
	}
	return frames, truth, arrive
}

// TestSegmentSettlingShadowNoDrift: a bee that has stopped must not seem
// to move while its shadow slides under it. The detected position of a
// still bee astride the rim of a dark flower centre is compared between
// the first frames after touch-down (the shadow still off to the side,
// over the rim) and 1 to 2 s later (the shadow under the bee). A landing's
// start is found from when the position stops moving, so an apparent
// drift delays it. Target: at most 1 px, two thirds of the 1.5 px
// position target of issue 3. Measured when written: 0.7 px (from rim
// pixels just outside blind ground, where b stays interpolated); 2.7 px
// before blind ground took the darkest background of a pixel's cells
// (see weigh), when the shadow on the rim counted as body.
func TestSegmentSettlingShadowNoDrift(t *testing.T) {
	frames, truth, arrive := settlingShadowClip()
	defer func() {
		for _, f := range frames {
			f.Close()
		}
	}()
	s := Settings{PXPerMM: 30.0 / 14, BodyLengthMM: 14}
	tr, err := NewTracker(s, VideoInfo{Path: "synthetic", WidthPX: 480, HeightPX: 320, FPS: 30})
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	var ex0, ey0, ex1, ey1 float64
	var n0, n1 int
	for i, f := range frames {
		if err := tr.Step(FrameInfo{Index: i, TimeS: float64(i) / 30}, f); err != nil {
			t.Fatal(err)
		}
		early := i >= arrive+1 && i < arrive+6
		late := i >= arrive+30 && i < arrive+60
		if !early && !late {
			continue
		}
		best, bx, by := math.Inf(1), 0.0, 0.0
		for _, d := range tr.Detections() {
			if e := math.Hypot(d.XPX-truth[i][0], d.YPX-truth[i][1]); e < best {
				best, bx, by = e, d.XPX-truth[i][0], d.YPX-truth[i][1]
			}
		}
		if best > 0.5*30 {
			t.Errorf("frame %d: no detection on the bee (nearest %.1f px)", i, best)
			continue
		}
		if early {
			ex0, ey0, n0 = ex0+bx, ey0+by, n0+1
		} else {
			ex1, ey1, n1 = ex1+bx, ey1+by, n1+1
		}
	}
	if n0 == 0 || n1 == 0 {
		t.Fatalf("bee not seen after touch-down (%d early, %d late frames)", n0, n1)
	}
	ex0, ey0, ex1, ey1 = ex0/float64(n0), ey0/float64(n0), ex1/float64(n1), ey1/float64(n1)
	drift := math.Hypot(ex1-ex0, ey1-ey0)
	t.Logf("error just after touch-down (%.2f, %.2f) px, 1-2 s later (%.2f, %.2f) px: apparent drift %.2f px", ex0, ey0, ex1, ey1, drift)
	if drift > 1 {
		t.Errorf("a still bee seems to move by %.2f px as its shadow slides under it, want <= 1 px", drift)
	}
}

// drawBandedBee draws the test bee centred at (x, y): a dark body 30 px
// long with two yellow bands.
func drawBandedBee(f *gocv.Mat, x, y int) {
	gocv.Ellipse(f, image.Pt(x, y), image.Pt(15, 6), 0, 0, 360, color.RGBA{B: 24, G: 24, R: 30}, -1)
	for _, bx := range []int{x - 6, x + 6} {
		gocv.Line(f, image.Pt(bx, y-5), image.Pt(bx, y+5), color.RGBA{B: 40, G: 172, R: 214}, 3)
	}
}

// addFrameNoise adds to the 8-bit BGR frame f a window of noise (a field
// margin px wider and taller than f, signed values per channel) at a
// random offset, clamping to 0..255.
func addFrameNoise(f gocv.Mat, noise []int8, margin int, rng *rand.Rand) {
	w, h := f.Cols(), f.Rows()
	d, _ := f.DataPtrUint8()
	ox, oy := rng.IntN(margin), rng.IntN(margin)
	for y := 0; y < h; y++ {
		row := d[y*w*3 : (y+1)*w*3]
		nr := noise[((y+oy)*(w+margin)+ox)*3:]
		for j := range row {
			row[j] = uint8(min(255, max(0, int(row[j])+int(nr[j]))))
		}
	}
}
