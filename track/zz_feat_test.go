package track

import (
	"fmt"
	"math"
	"os"
	"sort"
	"testing"

	"gocv.io/x/gocv"
)

func TestScratchFeat(t *testing.T) {
	name := os.Getenv("SCENE")
	path, truth := renderScene(t, name, testScenes[name])
	s := sceneSettings(truth)
	s.Stabilize = os.Getenv("STAB") != ""
	src, _ := Open(path, SourceOptions{})
	defer src.Close()
	tr, _ := NewTracker(s, src.Info())
	bl := s.BodyLengthPX()
	byFrame := map[int][][2]float64{}
	for _, p := range truth.Points {
		byFrame[p.Frame] = append(byFrame[p.Frame], [2]float64{p.XPX, p.YPX})
	}
	m := gocv.NewMat()
	type f struct{ minor, elong, area float64 }
	var bee, fals []f
	for {
		fi, err := src.Next(&m)
		if err != nil {
			break
		}
		tr.Step(fi, m)
		for _, d := range tr.Detections() {
			isBee := false
			for _, p := range byFrame[fi.Index] {
				if math.Hypot(p[0]-d.XPX, p[1]-d.YPX) < 0.5*bl {
					isBee = true
				}
			}
			v := f{d.MinorPX / bl, d.MajorPX / d.MinorPX, d.AreaPX / (math.Pi / 4 * 0.45 * bl * bl)}
			if isBee {
				bee = append(bee, v)
			} else {
				fals = append(fals, v)
			}
		}
	}
	q := func(v []f, g func(f) float64) string {
		x := make([]float64, len(v))
		for i := range v {
			x[i] = g(v[i])
		}
		sort.Float64s(x)
		if len(x) == 0 {
			return "-"
		}
		return fmt.Sprintf("p1 %.2f p5 %.2f p50 %.2f p95 %.2f p99 %.2f", x[len(x)/100], x[len(x)*5/100], x[len(x)/2], x[len(x)*95/100], x[len(x)*99/100])
	}
	t.Logf("bee n=%d false n=%d", len(bee), len(fals))
	t.Logf("minor/BL  bee %s | false %s", q(bee, func(v f) float64 { return v.minor }), q(fals, func(v f) float64 { return v.minor }))
	t.Logf("elong     bee %s | false %s", q(bee, func(v f) float64 { return v.elong }), q(fals, func(v f) float64 { return v.elong }))
	t.Logf("area/exp  bee %s | false %s", q(bee, func(v f) float64 { return v.area }), q(fals, func(v f) float64 { return v.area }))
}
