package track

import (
	"testing"

	"gocv.io/x/gocv"
)

func TestScratchAsg(t *testing.T) {
	src, _ := Open("/tmp/clips/t_windy.mp4", SourceOptions{})
	defer src.Close()
	s := Settings{PXPerMM: 1280.0 / 600, BodyLengthMM: 14, Stabilize: true}
	tr, _ := NewTracker(s, src.Info())
	m := gocv.NewMat()
	for {
		fi, err := src.Next(&m)
		if err != nil || fi.Index > 300 {
			break
		}
		preds := tr.lk.Predicted()
		dets := tr.seg.detect(m, fi.Index, fi.TimeS, nil)
		asg := tr.lk.Step(fi.Index, dets)
		tr.seg.learn(nil)
		if fi.Index >= 283 {
			t.Logf("frame %d dets %d asg %+v", fi.Index, len(dets), asg)
			for _, p := range preds {
				t.Logf("   pred %+v", p)
			}
		}
	}
}
