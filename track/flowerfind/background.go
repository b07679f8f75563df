package flowerfind

import (
	"errors"
	"fmt"
	"os"

	"gocv.io/x/gocv"
)

// BackgroundFromClip returns the background of a clip: the per-pixel,
// per-channel median of up to maxFrames frames spread evenly over the
// clip (every k-th frame, k = frame count / maxFrames, rounded down and at
// least 1). A bee that sits in one place for less than half of the
// sampled frames does not show in the median. maxFrames >= 1; 25 is
// plenty for a clip of a few minutes. The result is 8-bit BGR; the caller
// closes it.
func BackgroundFromClip(path string, maxFrames int) (gocv.Mat, error) {
	if maxFrames < 1 {
		panic("flowerfind: maxFrames < 1")
	}
	if _, err := os.Stat(path); err != nil {
		return gocv.NewMat(), fmt.Errorf("%s: %w", path, err)
	}
	vc, err := gocv.VideoCaptureFile(path)
	if err != nil {
		return gocv.NewMat(), fmt.Errorf("%s: cannot open as video: %v", path, err)
	}
	defer vc.Close()
	n := int(vc.Get(gocv.VideoCaptureFrameCount))
	step := 1
	if n > maxFrames {
		step = n / maxFrames
	}
	var frames []gocv.Mat
	defer func() {
		for _, f := range frames {
			f.Close()
		}
	}()
	for len(frames) < maxFrames {
		m := gocv.NewMat()
		if !vc.Read(&m) || m.Empty() {
			m.Close()
			break
		}
		frames = append(frames, m)
		if step > 1 {
			vc.Grab(step - 1)
		}
	}
	if len(frames) == 0 {
		return gocv.NewMat(), fmt.Errorf("%s: no frame could be decoded: is this a video file?", path)
	}
	bg, err := MedianBackground(frames)
	if err != nil {
		return gocv.NewMat(), fmt.Errorf("%s: %w", path, err)
	}
	return bg, nil
}

// MedianBackground returns the per-pixel, per-channel median of frames,
// which must all be 8-bit BGR images of one size (for an even number of
// frames, the lower of the two middle values).
func MedianBackground(frames []gocv.Mat) (gocv.Mat, error) {
	if len(frames) == 0 {
		return gocv.NewMat(), errors.New("no frames")
	}
	rows, cols, typ := frames[0].Rows(), frames[0].Cols(), frames[0].Type()
	if typ != gocv.MatTypeCV8UC3 {
		return gocv.NewMat(), errors.New("frames must be 8-bit colour (BGR)")
	}
	data := make([][]byte, len(frames))
	for i, f := range frames {
		if f.Rows() != rows || f.Cols() != cols || f.Type() != typ {
			return gocv.NewMat(), fmt.Errorf("frame %d is %dx%d, the first is %dx%d", i, f.Cols(), f.Rows(), cols, rows)
		}
		data[i] = f.ToBytes()
	}
	out := make([]byte, len(data[0]))
	buf := make([]byte, len(data))
	mid := (len(data) - 1) / 2
	for k := range out {
		for i, d := range data {
			// Insertion sort: n is small (tens of frames).
			v := d[k]
			j := i
			for j > 0 && buf[j-1] > v {
				buf[j] = buf[j-1]
				j--
			}
			buf[j] = v
		}
		out[k] = buf[mid]
	}
	return gocv.NewMatFromBytes(rows, cols, typ, out)
}
