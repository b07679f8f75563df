package overlay

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"gocv.io/x/gocv"
)

// Codecs tried by Create, in order.
const (
	CodecH264  = "avc1" // H.264 in an .mp4 container
	CodecMJPEG = "MJPG" // Motion JPEG in an .avi container (fallback)
)

// Writer draws FrameStates onto frames and writes them to a video file.
// It is not safe for concurrent use.
type Writer struct {
	vw     *gocv.VideoWriter
	path   string
	codec  string
	w, h   int
	fps    float64
	frames int
	an     *annotator
}

// Create opens a video of w x h px at fps frames per second. It tries
// H.264 ("avc1") at path, which should end in .mp4; if OpenCV's FFmpeg
// backend cannot open that (no H.264 encoder), it removes any partial
// file and falls back to Motion JPEG ("MJPG") at path with its extension
// replaced by .avi. Path and Codec report what was opened; FellBack
// reports whether the fallback was used, for a warning. An error is
// returned when neither opens or the arguments are invalid.
func Create(path string, w, h int, fps float64) (*Writer, error) {
	if w <= 0 || h <= 0 {
		return nil, fmt.Errorf("overlay: %s: frame size %dx%d px must be positive", path, w, h)
	}
	if !(fps > 0) || math.IsInf(fps, 0) {
		return nil, fmt.Errorf("overlay: %s: fps %g must be positive and finite", path, fps)
	}
	vw, err := open(path, CodecH264, w, h, fps)
	if err == nil {
		return newWriter(vw, path, CodecH264, w, h, fps), nil
	}
	_ = os.Remove(path) // a failed open may leave an empty file
	alt := strings.TrimSuffix(path, filepath.Ext(path)) + ".avi"
	vw, err2 := open(alt, CodecMJPEG, w, h, fps)
	if err2 != nil {
		_ = os.Remove(alt)
		return nil, fmt.Errorf("overlay: cannot open a video writer: %v; %v", err, err2)
	}
	return newWriter(vw, alt, CodecMJPEG, w, h, fps), nil
}

func open(path, codec string, w, h int, fps float64) (*gocv.VideoWriter, error) {
	vw, err := gocv.VideoWriterFile(path, codec, fps, w, h, true)
	if err != nil {
		return nil, fmt.Errorf("%s (%s): %v", path, codec, err)
	}
	if !vw.IsOpened() {
		vw.Close()
		return nil, fmt.Errorf("%s (%s): OpenCV could not open the file for writing", path, codec)
	}
	return vw, nil
}

func newWriter(vw *gocv.VideoWriter, path, codec string, w, h int, fps float64) *Writer {
	return &Writer{vw: vw, path: path, codec: codec, w: w, h: h, fps: fps, an: newAnnotator(w, h)}
}

// Path is the file being written (path given to Create, or the .avi
// fallback).
func (w *Writer) Path() string { return w.path }

// Codec is the four-character code in use: CodecH264 or CodecMJPEG.
func (w *Writer) Codec() string { return w.codec }

// FellBack reports whether H.264 could not be opened and Motion JPEG is
// used instead.
func (w *Writer) FellBack() bool { return w.codec != CodecH264 }

// Frames is the number of frames written so far.
func (w *Writer) Frames() int { return w.frames }

// Draw draws st onto frame (in place) and writes the frame. The frame must
// be 8-bit BGR of the size given to Create; frameIdx is used only in
// error messages and the corner text.
func (w *Writer) Draw(frame *gocv.Mat, frameIdx int, st FrameState) error {
	if w.vw == nil {
		return errors.New("overlay: Draw after Close")
	}
	if frame.Cols() != w.w || frame.Rows() != w.h {
		return fmt.Errorf("overlay: %s: frame %d is %dx%d px, the video is %dx%d px",
			w.path, frameIdx, frame.Cols(), frame.Rows(), w.w, w.h)
	}
	if frame.Type() != gocv.MatTypeCV8UC3 {
		return fmt.Errorf("overlay: %s: frame %d is not 8-bit BGR (Mat type %v)", w.path, frameIdx, frame.Type())
	}
	w.an.annotate(frame, frameIdx, st)
	if err := w.vw.Write(*frame); err != nil {
		return fmt.Errorf("overlay: %s: writing frame %d: %v", w.path, frameIdx, err)
	}
	w.frames++
	return nil
}

// Close finishes the file. Calling Close again does nothing.
func (w *Writer) Close() error {
	if w.vw == nil {
		return nil
	}
	err := w.vw.Close()
	w.vw = nil
	w.an.close()
	if err != nil {
		return fmt.Errorf("overlay: %s: closing: %v", w.path, err)
	}
	return nil
}

// Annotate draws st onto frame without writing it anywhere, e.g. to save a
// single checked frame as an image. It allocates scratch memory on every
// call; use a Writer for a whole clip.
func Annotate(frame *gocv.Mat, frameIdx int, st FrameState) {
	an := newAnnotator(frame.Cols(), frame.Rows())
	defer an.close()
	an.annotate(frame, frameIdx, st)
}
