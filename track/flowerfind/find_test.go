package flowerfind

import (
	"image"
	"image/color"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"gocv.io/x/gocv"

	"flitlog/visits"
)

// disc is a drawn test flower: petals around a centre, px.
type disc struct {
	x, y, r float64
	petal   color.RGBA
	kind    string
}

// bgr gives a colour by its blue, green and red levels, the order of
// OpenCV images.
func bgr(b, g, r uint8) color.RGBA { return color.RGBA{R: r, G: g, B: b, A: 255} }

// drawMeadow draws green, textured ground with grass blades and specks and
// the given flowers (invented test image).
func drawMeadow(w, h int, flowers []disc, seed uint64) gocv.Mat {
	rng := rand.New(rand.NewPCG(seed, 1))
	img := gocv.NewMatWithSizeFromScalar(gocv.NewScalar(45, 115, 60, 0), h, w, gocv.MatTypeCV8UC3)
	// Blotches of darker and lighter green and brown soil.
	for i := 0; i < 300; i++ {
		c := bgr(uint8(30+rng.IntN(30)), uint8(80+rng.IntN(70)), uint8(40+rng.IntN(50)))
		gocv.Circle(&img, image.Pt(rng.IntN(w), rng.IntN(h)), 5+rng.IntN(25), c, -1)
	}
	// Grass blades: long thin yellow-green lines.
	for i := 0; i < 150; i++ {
		x, y := rng.IntN(w), rng.IntN(h)
		a := rng.Float64() * math.Pi
		l := 30 + rng.Float64()*60
		c := bgr(uint8(40+rng.IntN(30)), uint8(150+rng.IntN(60)), uint8(100+rng.IntN(60)))
		gocv.Line(&img, image.Pt(x, y), image.Pt(x+int(l*math.Cos(a)), y+int(l*math.Sin(a))), c, 2)
	}
	// Specks of white and yellow, far smaller than a flower.
	for i := 0; i < 40; i++ {
		c := bgr(235, 240, 240)
		if i%2 == 1 {
			c = bgr(30, 200, 250)
		}
		gocv.Circle(&img, image.Pt(rng.IntN(w), rng.IntN(h)), 1+rng.IntN(2), c, -1)
	}
	for _, f := range flowers {
		n := 5 + rng.IntN(4)
		rot := rng.Float64() * 2 * math.Pi
		for k := 0; k < n; k++ {
			a := rot + 2*math.Pi*float64(k)/float64(n)
			cx, cy := f.x+0.6*f.r*math.Cos(a), f.y+0.6*f.r*math.Sin(a)
			gocv.CircleWithParams(&img, image.Pt(int(math.Round(cx*16)), int(math.Round(cy*16))), int(math.Round(0.4*f.r*16)), f.petal, -1, gocv.LineAA, 4)
		}
		gocv.CircleWithParams(&img, image.Pt(int(math.Round(f.x*16)), int(math.Round(f.y*16))), int(math.Round(0.3*f.r*16)), bgr(20, 150, 230), -1, gocv.LineAA, 4)
	}
	// Sensor noise.
	noise := gocv.NewMatWithSize(h, w, gocv.MatTypeCV8UC3)
	defer noise.Close()
	gocv.RandN(&noise, gocv.NewScalar(0, 0, 0, 0), gocv.NewScalar(4, 4, 4, 0))
	gocv.Add(img, noise, &img)
	return img
}

func testFlowers(rng *rand.Rand, w, h int, pxPerMM float64) []disc {
	kinds := []struct {
		name string
		c    color.RGBA
	}{{"white", bgr(235, 240, 240)}, {"yellow", bgr(30, 205, 250)}, {"purple", bgr(212, 110, 82)}, {"pink", bgr(160, 100, 228)}}
	var fs []disc
	for len(fs) < 16 {
		r := (6 + 20*rng.Float64()) * pxPerMM
		x, y := r/2+rng.Float64()*(float64(w)-r), r/2+rng.Float64()*(float64(h)-r) // may cross the edge
		ok := true
		for _, o := range fs {
			if math.Hypot(x-o.x, y-o.y) < r+o.r+10 {
				ok = false
			}
		}
		if ok {
			k := kinds[len(fs)%4]
			fs = append(fs, disc{x, y, r, k.c, k.name})
		}
	}
	return fs
}

// matchFlowers pairs each true flower with the found flower whose centre
// is nearest, within half the true radius.
func matchFlowers(truth []disc, got []visits.Flower) (matched int, centreErr, radiusRelErr []float64, kindsOK int) {
	used := make([]bool, len(got))
	for _, t := range truth {
		best, bd := -1, 0.5*t.r
		for j, g := range got {
			if d := math.Hypot(g.XPX-t.x, g.YPX-t.y); !used[j] && d < bd {
				best, bd = j, d
			}
		}
		if best < 0 {
			continue
		}
		used[best] = true
		matched++
		centreErr = append(centreErr, bd)
		radiusRelErr = append(radiusRelErr, math.Abs(got[best].RPX-t.r)/t.r)
		if got[best].Kind == t.kind {
			kindsOK++
		}
	}
	return
}

func maxOf(xs []float64) float64 {
	m := 0.0
	for _, x := range xs {
		m = math.Max(m, x)
	}
	return m
}

func TestFindSynthetic(t *testing.T) {
	const w, h, pxPerMM = 960, 540, 2.0
	for seed := uint64(1); seed <= 3; seed++ {
		rng := rand.New(rand.NewPCG(seed, 2))
		truth := testFlowers(rng, w, h, pxPerMM)
		img := drawMeadow(w, h, truth, seed)
		fm, err := Find(img, Options{PXPerMM: pxPerMM})
		img.Close()
		if err != nil {
			t.Fatal(err)
		}
		if err := fm.Validate(w, h); err != nil {
			t.Fatalf("found map does not validate: %v", err)
		}
		m, _, _, kinds := matchFlowers(truth, fm.Flowers)
		recall := float64(m) / float64(len(truth))
		// Position and size are checked on the flowers wholly inside the
		// image; a flower cut by the edge is found from its visible part.
		var inside []disc
		for _, f := range truth {
			if f.x > f.r && f.y > f.r && f.x < w-f.r && f.y < h-f.r {
				inside = append(inside, f)
			}
		}
		_, ce, re, _ := matchFlowers(inside, fm.Flowers)
		t.Logf("seed %d: %d flowers drawn (%d inside), %d found, %d matched (recall %.3f), inside: centre error max %.2f px, radius error max %.1f%%; kinds right %d",
			seed, len(truth), len(inside), len(fm.Flowers), m, recall, maxOf(ce), 100*maxOf(re), kinds)
		// Targets set for this test: every drawn flower found with its
		// colour, no false flowers; inside the image centres within 1 px
		// and radii within 8 % (1 px on the smallest flowers).
		if recall < 1 || len(ce) != len(inside) || maxOf(ce) > 1 || maxOf(re) > 0.08 || kinds != m || len(fm.Flowers) != len(truth) {
			t.Errorf("seed %d: recall %.3f, centre error %.2f px, radius error %.3f, kinds %d/%d, %d found for %d drawn",
				seed, recall, maxOf(ce), maxOf(re), kinds, m, len(fm.Flowers), len(truth))
		}
	}
}

func TestFindOptions(t *testing.T) {
	const w, h, pxPerMM = 480, 320, 2.0
	truth := []disc{{120, 160, 30, bgr(235, 240, 240), "white"}, {340, 160, 30, bgr(212, 110, 82), "purple"}}
	img := drawMeadow(w, h, truth, 9)
	defer img.Close()
	cases := []struct {
		name  string
		opts  Options
		kinds []string
	}{
		{"all presets", Options{PXPerMM: pxPerMM}, []string{"white", "purple"}},
		{"purple only", Options{PXPerMM: pxPerMM, Colors: []ColorRange{presets[2]}}, []string{"purple"}},
		{"user range named lilac", Options{PXPerMM: pxPerMM, Colors: []ColorRange{{Name: "lilac", HLo: 100, HHi: 140, SLo: 60, SHi: 255, VLo: 60, VHi: 255}}}, []string{"lilac"}},
		{"radius gate excludes 15 mm flowers", Options{PXPerMM: pxPerMM, RadiusMinMM: 20, RadiusMaxMM: 40}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			fm, err := Find(img, c.opts)
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			for _, f := range fm.Flowers {
				got = append(got, f.Kind)
			}
			if len(got) != len(c.kinds) {
				t.Fatalf("kinds %v, want %v", got, c.kinds)
			}
			for i := range got {
				if got[i] != c.kinds[i] {
					t.Errorf("kinds %v, want %v", got, c.kinds)
				}
			}
		})
	}
	if _, err := Find(img, Options{}); err == nil {
		t.Error("no scale: no error")
	}
	if _, err := Find(img, Options{PXPerMM: 2, Colors: []ColorRange{{Name: "x", HLo: 0, HHi: 200, SLo: 0, SHi: 255, VLo: 0, VHi: 255}}}); err == nil {
		t.Error("hue 200: no error")
	}
}

func TestParseHSV(t *testing.T) {
	cases := []struct {
		in   string
		want ColorRange
		ok   bool
	}{
		{"lilac=120-150,40-255,80-255", ColorRange{"lilac", 120, 150, 40, 255, 80, 255}, true},
		{"red=170-8, 80-255, 60-255", ColorRange{"red", 170, 8, 80, 255, 60, 255}, true},
		{"=1-2,3-4,5-6", ColorRange{}, false},
		{"x=1-2,3-4", ColorRange{}, false},
		{"x=1-2,3-4,5", ColorRange{}, false},
		{"x=1-200,3-4,5-6", ColorRange{}, false},
		{"x=1-2,40-4,5-6", ColorRange{}, false},
	}
	for _, c := range cases {
		got, err := ParseHSV(c.in)
		if (err == nil) != c.ok || (c.ok && got != c.want) {
			t.Errorf("ParseHSV(%q) = %+v, %v", c.in, got, err)
		}
		if c.ok {
			if back, err := ParseHSV(got.String()); err != nil || back != got {
				t.Errorf("String round trip of %+v: %+v, %v", got, back, err)
			}
		}
	}
}

// TestBackgroundFromClip writes a short MJPEG clip of a still scene with a
// moving dark blob (a bee) and checks that the median removes it.
func TestBackgroundFromClip(t *testing.T) {
	const w, h = 320, 240
	dir := t.TempDir()
	path := filepath.Join(dir, "bee.avi")
	scene := drawMeadow(w, h, []disc{{160, 120, 40, bgr(235, 240, 240), "white"}}, 4)
	defer scene.Close()
	vw, err := gocv.VideoWriterFile(path, "MJPG", 10, w, h, true)
	if err != nil {
		t.Fatal(err)
	}
	frame := gocv.NewMat()
	defer frame.Close()
	for i := 0; i < 40; i++ {
		scene.CopyTo(&frame)
		// The bee crosses the flower.
		gocv.Circle(&frame, image.Pt(20+7*i, 120), 8, bgr(20, 20, 20), -1)
		if err := vw.Write(frame); err != nil {
			t.Fatal(err)
		}
	}
	vw.Close()
	bg, err := BackgroundFromClip(path, 15)
	if err != nil {
		t.Fatal(err)
	}
	defer bg.Close()
	if bg.Rows() != h || bg.Cols() != w {
		t.Fatalf("background %dx%d", bg.Cols(), bg.Rows())
	}
	// The bee is drawn (20, 20, 20); the ground and flower are far
	// brighter. Count bee-dark pixels along its path in the background and,
	// as a control, in one frame with the bee.
	dark := func(m gocv.Mat) int {
		roi := m.Region(image.Rect(10, 105, 310, 135))
		defer roi.Close()
		b, _ := roi.ToImage()
		n := 0
		for y := b.Bounds().Min.Y; y < b.Bounds().Max.Y; y++ {
			for x := b.Bounds().Min.X; x < b.Bounds().Max.X; x++ {
				r, g, bl, _ := b.At(x, y).RGBA()
				if r>>8 < 40 && g>>8 < 40 && bl>>8 < 40 {
					n++
				}
			}
		}
		return n
	}
	if n := dark(frame); n < 100 {
		t.Fatalf("control: only %d bee pixels in a frame with the bee", n)
	}
	if n := dark(bg); n > 0 {
		t.Errorf("%d bee pixels left in the background", n)
	}
	fm, err := Find(bg, Options{PXPerMM: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(fm.Flowers) != 1 || math.Hypot(fm.Flowers[0].XPX-160, fm.Flowers[0].YPX-120) > 2 {
		t.Errorf("flowers on the background: %+v", fm.Flowers)
	}
	if _, err := BackgroundFromClip(filepath.Join(dir, "none.avi"), 5); err == nil {
		t.Error("missing file: no error")
	}
	bad := filepath.Join(dir, "bad.avi")
	if err := os.WriteFile(bad, []byte("not a video"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := BackgroundFromClip(bad, 5); err == nil {
		t.Error("not a video: no error")
	}
}
