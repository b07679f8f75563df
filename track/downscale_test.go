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
// (k = 4, 6), also on a cropped region of a larger frame (as segment.go
// passes when it stabilises), and uses the halving step (half is filled)
// only where k is even and at least 4.
func TestAreaDownscale(t *testing.T) {
	for _, tc := range []struct {
		w, h, k  int
		crop     int // border cut off all round before reducing, px
		twoSteps bool
	}{
		{1280, 720, 4, 0, true}, {1920, 1080, 6, 0, true},
		{1280, 720, 4, 8, true}, {1920, 1080, 6, 12, true},
		{1920, 1080, 3, 0, false}, {640, 480, 2, 0, false}, {1280, 720, 5, 0, false},
	} {
		t.Run(fmt.Sprintf("%dx%d_k%d_crop%d", tc.w, tc.h, tc.k, tc.crop), func(t *testing.T) {
			full := randomGrey(tc.w, tc.h, uint64(tc.k))
			defer full.Close()
			src := full.Region(image.Rect(tc.crop, tc.crop, tc.w-tc.crop, tc.h-tc.crop))
			defer src.Close()
			want, got, half := gocv.NewMat(), gocv.NewMat(), gocv.NewMat()
			defer want.Close()
			defer got.Close()
			defer half.Close()
			size := image.Pt(src.Cols()/tc.k, src.Rows()/tc.k)
			gocv.Resize(src, &want, size, 0, 0, gocv.InterpolationArea)
			areaDownscale(src, &got, &half, size)
			if used := !half.Empty(); used != tc.twoSteps {
				t.Errorf("halving step used: %v, want %v", used, tc.twoSteps)
			}
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
