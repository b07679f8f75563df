package track

import (
	"fmt"
	"image"
	"math/rand/v2"
	"testing"

	"gocv.io/x/gocv"
)

// randomGrey returns a w x h 8-bit image of seeded random grey levels,
// smoothed a little so that it has structure at several scales.
func randomGrey(w, h int, seed uint64) gocv.Mat {
	r := rand.New(rand.NewPCG(seed, 1))
	buf := make([]byte, w*h)
	for i := range buf {
		buf[i] = byte(r.IntN(256))
	}
	m, err := gocv.NewMatFromBytes(h, w, gocv.MatTypeCV8U, buf)
	if err != nil {
		panic(err)
	}
	gocv.GaussianBlur(m, &m, image.Pt(5, 5), 1.2, 1.2, gocv.BorderReflect101)
	return m
}

// TestAreaDownscale: the two-step reduction equals OpenCV's one-step area
// reduction (gocv.Resize, InterpolationArea; the reference) to within one
// grey level at every pixel, for the working scales of 720p and 1080p
// (k = 4, 6) and odd factors that take the one-step path.
func TestAreaDownscale(t *testing.T) {
	for _, tc := range []struct{ w, h, k int }{
		{1280, 720, 4}, {1920, 1080, 6}, {1920, 1080, 3}, {640, 480, 2}, {1280, 720, 5},
	} {
		t.Run(fmt.Sprintf("%dx%d_k%d", tc.w, tc.h, tc.k), func(t *testing.T) {
			src := randomGrey(tc.w, tc.h, uint64(tc.k))
			defer src.Close()
			want, got, half := gocv.NewMat(), gocv.NewMat(), gocv.NewMat()
			defer want.Close()
			defer got.Close()
			defer half.Close()
			size := image.Pt(tc.w/tc.k, tc.h/tc.k)
			gocv.Resize(src, &want, size, 0, 0, gocv.InterpolationArea)
			areaDownscale(src, &got, &half, size)
			if got.Cols() != size.X || got.Rows() != size.Y || got.Type() != gocv.MatTypeCV8U {
				t.Fatalf("got %dx%d %v, want %dx%d 8U", got.Cols(), got.Rows(), got.Type(), size.X, size.Y)
			}
			diff := gocv.NewMat()
			defer diff.Close()
			gocv.AbsDiff(want, got, &diff)
			_, maxDiff, _, _ := gocv.MinMaxLoc(diff)
			if maxDiff > 1 {
				t.Errorf("largest difference %g grey levels, want <= 1", maxDiff)
			}
		})
	}
}

// BenchmarkAreaDownscale compares one-step and two-step area reduction of
// a 1080p grey frame to the 1080p working scale (k = 6).
func BenchmarkAreaDownscale(b *testing.B) {
	src := randomGrey(1920, 1080, 1)
	defer src.Close()
	dst, half := gocv.NewMat(), gocv.NewMat()
	defer dst.Close()
	defer half.Close()
	size := image.Pt(320, 180)
	b.Run("one_step", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			gocv.Resize(src, &dst, size, 0, 0, gocv.InterpolationArea)
		}
	})
	b.Run("two_step", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			areaDownscale(src, &dst, &half, size)
		}
	})
}
