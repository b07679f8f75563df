package meadow

import (
	"fmt"
	"image"
	"testing"

	"gocv.io/x/gocv"
)

func TestScratchCrop(t *testing.T) {
	cfg, _ := Preset("demo")
	s, _ := New(cfg)
	m := gocv.NewMat()
	for _, i := range []int{99, 100, 101} {
		b := s.bees[0]
		for _, hide := range []bool{false, true} {
			s.hideBees = hide
			s.Render(i, &m)
			r := m.Region(image.Rect(int(b.x[i])-30, int(b.y[i])-30, int(b.x[i])+30, int(b.y[i])+30))
			big := gocv.NewMat()
			gocv.Resize(r, &big, image.Pt(360, 360), 0, 0, gocv.InterpolationNearestNeighbor)
			gocv.IMWrite(fmt.Sprintf("/tmp/mdrv/dbg_%d_%v.png", i, hide), big)
		}
		fmt.Println(i, b.x[i], b.y[i], b.vx[i], b.vy[i], b.head[i], b.state[i])
	}
}
