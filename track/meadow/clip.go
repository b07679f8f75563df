package meadow

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"gocv.io/x/gocv"
)

// Codec returns the FourCC WriteClip uses for a file name's extension:
// "avc1" (H.264) for .mp4 and .mkv, "MJPG" (motion JPEG) for .avi.
func Codec(path string) (string, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".mp4", ".mkv":
		return "avc1", nil
	case ".avi":
		return "MJPG", nil
	}
	return "", fmt.Errorf("meadow: %s: unknown video extension (want .mp4, .mkv or .avi)", path)
}

// WriteClip plans the scene of cfg, renders every frame and encodes the
// clip to path (.mp4 and .mkv: H.264; .avi: motion JPEG) through OpenCV's
// FFmpeg backend. progress, if not nil, is called after each frame. It
// returns the scene's ground truth.
func WriteClip(cfg Config, path string, progress func(done, total int)) (*Truth, error) {
	codec, err := Codec(path)
	if err != nil {
		return nil, err
	}
	s, err := New(cfg)
	if err != nil {
		return nil, err
	}
	defer s.Close()
	w, h := s.Size()
	vw, err := gocv.VideoWriterFile(path, codec, s.FPS(), w, h, true)
	if err != nil {
		return nil, fmt.Errorf("meadow: %s: opening video writer (%s): %w", path, codec, err)
	}
	if !vw.IsOpened() {
		vw.Close()
		return nil, fmt.Errorf("meadow: %s: video writer for %s did not open", path, codec)
	}
	frame := gocv.NewMat()
	defer frame.Close()
	n := s.Frames()
	for i := 0; i < n; i++ {
		s.Render(i, &frame)
		if err := vw.Write(frame); err != nil {
			vw.Close()
			return nil, fmt.Errorf("meadow: %s: writing frame %d: %w", path, i, err)
		}
		if progress != nil {
			progress(i+1, n)
		}
	}
	if err := vw.Close(); err != nil {
		return nil, fmt.Errorf("meadow: %s: closing video writer: %w", path, err)
	}
	if fi, err := os.Stat(path); err != nil || fi.Size() == 0 {
		return nil, fmt.Errorf("meadow: %s: encoder wrote no data", path)
	}
	return s.Truth(), nil
}
