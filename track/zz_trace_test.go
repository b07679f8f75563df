package track

import (
	"os"
	"strconv"
	"testing"

	"gocv.io/x/gocv"
)

func TestScratchTrace(t *testing.T) {
	name := os.Getenv("SCENE")
	every, _ := strconv.Atoi(os.Getenv("EVERY"))
	from, _ := strconv.Atoi(os.Getenv("FROM"))
	to, _ := strconv.Atoi(os.Getenv("TO"))
	src, _ := Open("/tmp/clips/"+name+".mp4", SourceOptions{})
	defer src.Close()
	s := Settings{PXPerMM: 1280.0 / 600, BodyLengthMM: 14}; _ = 0
	if os.Getenv("STAB") != "" {
		s.Stabilize = true
	}
	tr, _ := NewTracker(s, src.Info())
	m := gocv.NewMat()
	for {
		fi, err := src.Next(&m)
		if err != nil || fi.Index > to {
			break
		}
		tr.Step(fi, m)
		if fi.Index >= from && (fi.Index-from)%every == 0 {
			t.Logf("frame %d dets %d zones %v preds %d", fi.Index, len(tr.Detections()), tr.zones, len(tr.lk.Predicted()))
			for _, d := range tr.Detections() {
				t.Logf("    det (%.1f,%.1f) area %.0f maj %.1f min %.1f el %.1f", d.XPX, d.YPX, d.AreaPX, d.MajorPX, d.MinorPX, d.MajorPX/d.MinorPX)
			}
			for id, tv := range tr.travel {
				t.Logf("    travel %d %+v", id, *tv)
			}
		}
	}
}
