package plots

import (
	"bytes"
	"flag"
	"fmt"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden PNGs in testdata/")

// Golden comparison tolerance: a pixel differs when any channel differs by
// more than goldenChanTol (of 255); at most goldenFrac of the pixels may
// differ. Loose enough for font rasterisation that varies between
// platforms (FMA), tight enough to catch a moved line or a lost legend.
const (
	goldenChanTol = 24
	goldenFrac    = 0.002
)

func TestGolden(t *testing.T) {
	sc := newScene()
	cases := []struct {
		name   string
		render func() ([]byte, error)
	}{
		{"path.png", func() ([]byte, error) {
			var b bytes.Buffer
			err := PathPlot(&b, sc.bg, sc.fm, sc.tracks, sc.landings, Options{})
			return b.Bytes(), err
		}},
		{"speed.png", func() ([]byte, error) {
			var b bytes.Buffer
			err := SpeedPlot(&b, sc.tracks, Options{})
			return b.Bytes(), err
		}},
		{"timeline.png", func() ([]byte, error) {
			var b bytes.Buffer
			err := TimelinePlot(&b, sc.fm, sc.landings, sc.inspections, sc.durationS, Options{})
			return b.Bytes(), err
		}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := tc.render()
			if err != nil {
				t.Fatal(err)
			}
			// Idempotence: a second run gives the same bytes.
			again, err := tc.render()
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got, again) {
				t.Errorf("second run differs: %d vs %d bytes", len(got), len(again))
			}
			path := filepath.Join("testdata", tc.name)
			if *update {
				if err := os.WriteFile(path, got, 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -update to create it)", err)
			}
			if err := comparePNG(got, want); err != nil {
				bad := filepath.Join(t.TempDir(), tc.name)
				_ = os.WriteFile(bad, got, 0o644)
				t.Errorf("%s: %v (got written to %s)", tc.name, err, bad)
			}
		})
	}
}

// comparePNG decodes both images and compares their pixels.
func comparePNG(got, want []byte) error {
	g, err := png.Decode(bytes.NewReader(got))
	if err != nil {
		return fmt.Errorf("decoding result: %v", err)
	}
	w, err := png.Decode(bytes.NewReader(want))
	if err != nil {
		return fmt.Errorf("decoding golden: %v", err)
	}
	if g.Bounds() != w.Bounds() {
		return fmt.Errorf("size %v, golden %v", g.Bounds(), w.Bounds())
	}
	n, total := diffPixels(g, w, goldenChanTol)
	if frac := float64(n) / float64(total); frac > goldenFrac {
		return fmt.Errorf("%d of %d pixels differ (%.4f%% > %.4f%%)", n, total, 100*frac, 100*goldenFrac)
	}
	return nil
}

func diffPixels(a, b image.Image, tol uint32) (n, total int) {
	r := a.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			r1, g1, b1, a1 := a.At(x, y).RGBA()
			r2, g2, b2, a2 := b.At(x, y).RGBA()
			if absDiff(r1, r2)>>8 > tol || absDiff(g1, g2)>>8 > tol || absDiff(b1, b2)>>8 > tol || absDiff(a1, a2)>>8 > tol {
				n++
			}
			total++
		}
	}
	return n, total
}

func absDiff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}
