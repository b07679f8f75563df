package track

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"math/rand"
	"testing"

	"gocv.io/x/gocv"
)

func TestScratchShift(t *testing.T) {
	src, _ := Open("/tmp/clips/t_single.mp4", SourceOptions{})
	base := gocv.NewMat()
	src.Next(&base)
	src.Close()
	s := Settings{PXPerMM: 1280.0 / 600, BodyLengthMM: 14, Stabilize: true}
	info := VideoInfo{WidthPX: 1280, HeightPX: 720, FPS: 30}
	tr, _ := NewTracker(s, info)
	m := gocv.NewMat()
	M := gocv.NewMatWithSize(2, 3, gocv.MatTypeCV64F)
	var dx0, dy0 float64
	var first gocv.Mat

	rng := rand.New(rand.NewSource(1))
	var se, n float64
	for i := 0; i < 300; i++ {
		dx := 3*math.Sin(float64(i)*0.7) + rng.NormFloat64()
		dy := 3*math.Cos(float64(i)*0.5) + rng.NormFloat64()
		M.SetDoubleAt(0, 0, 1)
		M.SetDoubleAt(1, 1, 1)
		M.SetDoubleAt(0, 2, dx)
		M.SetDoubleAt(1, 2, dy)
		gocv.WarpAffineWithParams(base, &m, M, image.Pt(1280, 720), gocv.InterpolationLinear, gocv.BorderReflect101, color.RGBA{})
		tr.Step(FrameInfo{Index: i, TimeS: float64(i) / 30}, m)
		if i == 0 {
			dx0, dy0 = dx, dy
			first = tr.seg.ref.Clone()
		}
		df := gocv.NewMat()
		gocv.AbsDiff(first, tr.seg.ref, &df)
		_ = fmt.Sprint("ref change", df.Mean().Val1, "M", M.GetDoubleAt(0, 1), M.GetDoubleAt(1, 0))
		ex, ey := tr.seg.shiftX*4+dx0, tr.seg.shiftY*4+dy0
		if i > 60 {
			se += (ex-dx)*(ex-dx) + (ey-dy)*(ey-dy)
			n++
		}
		if i%50 == 0 {
			t.Logf("%d true %.2f %.2f est %.2f %.2f", i, dx, dy, ex, ey)
		}
	}
	t.Logf("rmse %.3f px; dets total %d", math.Sqrt(se/n), tr.Stats().Detections)
}
