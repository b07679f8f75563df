package track

import (
	"fmt"
	"image"
	"image/color"
	"os"
	"strconv"
	"strings"
	"testing"

	"gocv.io/x/gocv"
)

// SCENE=single FRAMES=44,100 go test -run ScratchDump
func TestScratchDump(t *testing.T) {
	name := os.Getenv("SCENE")
	path := "/tmp/clips/" + name + ".mp4"
	want := map[int]bool{}
	last := 0
	for _, f := range strings.Split(os.Getenv("FRAMES"), ",") {
		n, _ := strconv.Atoi(f)
		want[n] = true
		last = max(last, n)
	}
	src, err := Open(path, SourceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	s := Settings{PXPerMM: 1280.0 / 600, BodyLengthMM: 14}
	if name == "three" {
		s.PXPerMM = 1920.0 / 600
	}
	if os.Getenv("STAB") != "" {
		s.Stabilize = true
	}
	tr, _ := NewTracker(s, src.Info())
	m := gocv.NewMat()
	for {
		fi, err := src.Next(&m)
		if err != nil || fi.Index > last {
			break
		}
		tr.Step(fi, m)
		if want[fi.Index] {
			out := m.Clone()
			for _, d := range tr.Detections() {
				gocv.Rectangle(&out, d.Box, color.RGBA{255, 0, 255, 0}, 1)
				gocv.Circle(&out, image.Pt(int(d.XPX), int(d.YPX)), 2, color.RGBA{255, 0, 0, 0}, -1)
			}
			gocv.IMWrite(fmt.Sprintf("/tmp/clips/dump_%s_%d.png", name, fi.Index), out)
			fg := gocv.NewMat()
			gocv.Resize(tr.seg.darkFg, &fg, image.Pt(m.Cols(), m.Rows()), 0, 0, gocv.InterpolationNearestNeighbor)
			gocv.IMWrite(fmt.Sprintf("/tmp/clips/fg_%s_%d.png", name, fi.Index), fg)
			sd := gocv.NewMat()
			tr.seg.vr.ConvertTo(&sd, gocv.MatTypeCV8U)
			gocv.IMWrite(fmt.Sprintf("/tmp/clips/var_%s_%d.png", name, fi.Index), sd)
			t.Logf("frame %d dets %d gain %.3f", fi.Index, len(tr.Detections()), tr.seg.gain)
			for _, d := range tr.Detections() {
				t.Logf("   %+v", d)
			}
			out.Close()
			fg.Close()
			sd.Close()
		}
	}
}
