package track

import (
	"os"
	"strconv"
	"testing"

	"gocv.io/x/gocv"
)

func TestScratchAsg(t *testing.T) {
	from, _ := strconv.Atoi(os.Getenv("FROM"))
	to, _ := strconv.Atoi(os.Getenv("TO"))
	src, _ := Open("/tmp/clips/"+os.Getenv("SCENE")+".mp4", SourceOptions{})
	defer src.Close()
	s := Settings{PXPerMM: 1280.0 / 600, BodyLengthMM: 14, Stabilize: os.Getenv("STAB") != ""}
	tr, _ := NewTracker(s, src.Info())
	m := gocv.NewMat()
	for {
		fi, err := src.Next(&m)
		if err != nil || fi.Index > to {
			break
		}
		if fi.Index >= from {
			for _, p := range tr.lk.Predicted() {
				t.Logf("   pred %d (%.1f,%.1f) coast %d still %v gate %.1f", p.TrackID, p.XPX, p.YPX, p.CoastFrames, p.Still, p.GateRadiusPX)
			}
		}
		tr.Step(fi, m)
		if fi.Index >= from {
			t.Logf("frame %d", fi.Index)
			for i, d := range tr.Detections() {
				t.Logf("   det %d (%.1f,%.1f) area %.0f maj %.1f min %.1f", i, d.XPX, d.YPX, d.AreaPX, d.MajorPX, d.MinorPX)
			}
			t.Logf("   asg %+v", tr.lastAsg)
		}
	}
}
