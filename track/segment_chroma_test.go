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
		gocv.Ellipse(&f, image.Pt(x, cy), image.Pt(15, 6), 0, 0, 360, color.RGBA{B: 24, G: 24, R: 30}, -1)
		for _, bx := range []int{x - 6, x + 6} {
			gocv.Line(&f, image.Pt(bx, cy-5), image.Pt(bx, cy+5), color.RGBA{B: 40, G: 172, R: 214}, 3)
		}
		d, _ := f.DataPtrUint8()
		ox, oy := rng.IntN(margin), rng.IntN(margin)
		for y := 0; y < h; y++ {
			row := d[y*w*3 : (y+1)*w*3]
			nr := noise[((y+oy)*(w+margin)+ox)*3:]
			for j := range row {
				row[j] = uint8(min(255, max(0, int(row[j])+int(nr[j]))))
			}
		}
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
