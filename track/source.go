package track

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"

	"gocv.io/x/gocv"
)

// SourceOptions control how a clip is opened.
type SourceOptions struct {
	// FPSOverride, when > 0, is the true capture rate in frames/s. It wins
	// over the container: FrameInfo.TimeS becomes Index/FPSOverride and
	// the container's timestamps are ignored. Use it for high-speed
	// cameras that store a playback rate instead of the capture rate.
	// 0 (default) = use the container's timestamps.
	FPSOverride float64
}

// VideoInfo describes an opened clip.
type VideoInfo struct {
	Path              string
	WidthPX, HeightPX int     // size of the decoded frames, px
	FPS               float64 // frames/s used for timing: FPSOverride if given, else the container's rate
	HeaderFrames      int     // frame count the container declares (0 = unknown); may disagree with the decodable frames
	FourCC            string  // codec tag as reported by the container, e.g. "h264", "XVID"
	Backend           string  // OpenCV video I/O backend, always "FFMPEG"

	// ContainerFPS is the rate the container declares (frames/s), also
	// when FPSOverride replaced it.
	ContainerFPS float64
}

// HeaderS is the clip duration the container declares, HeaderFrames /
// ContainerFPS in seconds, or 0 when either is unknown.
func (v VideoInfo) HeaderS() float64 {
	if v.HeaderFrames <= 0 || v.ContainerFPS <= 0 {
		return 0
	}
	return float64(v.HeaderFrames) / v.ContainerFPS
}

// Source delivers the frames of one clip in decoding order.
type Source interface {
	// Info describes the clip; it is valid from Open on.
	Info() VideoInfo
	// Next decodes the next frame into dst (8-bit BGR, reused between
	// calls) and says which frame it is. At the end of the clip it
	// returns io.EOF; when decoding stops before the end the container
	// declares, it returns a *TruncatedError. Both are final: later calls
	// return the same error.
	Next(dst *gocv.Mat) (FrameInfo, error)
	// Close releases the decoder. It is safe to call more than once.
	Close() error
}

var _ Source = (*fileSource)(nil)

// OpenError is a clip that cannot be read at all. Error() gives one line:
// the file, the problem and what to do.
type OpenError struct {
	Path    string
	Problem string // what is wrong, e.g. "file is empty (0 bytes)"
	Hint    string // what to do about it
	Err     error  // underlying error, if any (fs.ErrNotExist, ...)
}

func (e *OpenError) Error() string {
	s := "video " + e.Path + ": " + e.Problem
	if e.Hint != "" {
		s += ": " + e.Hint
	}
	return s
}

func (e *OpenError) Unwrap() error { return e.Err }

// TruncatedError reports a clip whose decoding stopped before the end its
// container declares: a recording cut off (full card, flat battery, copy
// interrupted) or a corrupt tail. The frames delivered before it are good;
// the CLI keeps them and marks the clip "partial".
type TruncatedError struct {
	Path         string
	FramesRead   int     // frames decoded and delivered
	HeaderFrames int     // frames the container declares
	ReadS        float64 // duration decoded, s (last timestamp + one frame interval)
	HeaderS      float64 // duration the container declares, s
}

func (e *TruncatedError) Error() string {
	return fmt.Sprintf("video %s: decoding stopped after %d of %d declared frames (%.2f of %.2f s): the file is truncated or its tail is corrupt; the frames before it are kept",
		e.Path, e.FramesRead, e.HeaderFrames, e.ReadS, e.HeaderS)
}

// fileSource reads a clip through OpenCV's FFmpeg backend.
type fileSource struct {
	info VideoInfo
	vc   *gocv.VideoCapture

	first    gocv.Mat // first frame, decoded by Open to prove the clip is readable
	hasFirst bool

	override float64 // SourceOptions.FPSOverride
	next     int     // index of the next frame
	firstRaw float64 // container timestamp of frame 0, s
	lastT    float64 // TimeS of the last delivered frame
	lastIdx  int     // index of the last frame with a usable container timestamp
	lastRawT float64 // TimeS of that frame
	endErr   error   // sticky io.EOF or *TruncatedError
	closed   bool
}

// Open opens a clip with OpenCV's FFmpeg backend and decodes its first
// frame. Problems with the file (missing, a folder, empty, unreadable,
// not a video, an MP4 whose recording was cut off before its index was
// written) are returned as *OpenError with a one-line message.
//
// Timestamps: FrameInfo.TimeS is the container's presentation time of the
// frame minus that of frame 0 (CAP_PROP_POS_MSEC, read after each frame),
// so variable-frame-rate phone video keeps its true timing. Where the
// container has no usable time for a frame (not strictly increasing, as
// for the frames OpenCV drains from the decoder at the end of a stream) the
// time is extrapolated from the last good one: t_last + (i - i_last)/FPS.
// With o.FPSOverride > 0, TimeS = Index/FPSOverride.
func Open(path string, o SourceOptions) (Source, error) {
	if o.FPSOverride < 0 || math.IsNaN(o.FPSOverride) || math.IsInf(o.FPSOverride, 0) {
		return nil, &OpenError{Path: path, Problem: fmt.Sprintf("frame rate override %g is not a positive number", o.FPSOverride), Hint: "give --fps > 0, or leave it out to use the clip's timestamps"}
	}
	if err := checkFile(path); err != nil {
		return nil, err
	}
	vc, err := gocv.VideoCaptureFileWithAPI(path, gocv.VideoCaptureFFmpeg)
	if err != nil || !vc.IsOpened() {
		if vc != nil {
			vc.Close()
		}
		return nil, diagnose(path)
	}
	s := &fileSource{vc: vc, first: gocv.NewMat(), override: o.FPSOverride}
	fail := func(e error) (Source, error) {
		s.Close()
		return nil, e
	}
	if !vc.Read(&s.first) || s.first.Empty() {
		return fail(&OpenError{Path: path, Problem: "the FFmpeg backend opened the file but decoded no frame", Hint: "the video stream is missing or damaged; check that it plays, or re-encode it (H.264 in .mp4 or .mkv)"})
	}
	if s.first.Type() != gocv.MatTypeCV8UC3 {
		return fail(&OpenError{Path: path, Problem: fmt.Sprintf("decoded frames are of type %v, not 8-bit colour", s.first.Type()), Hint: "re-encode the clip to 8-bit H.264"})
	}
	s.hasFirst = true
	s.firstRaw = vc.Get(gocv.VideoCapturePosMsec) / 1000
	if !finite(s.firstRaw) || s.firstRaw < 0 {
		s.firstRaw = 0
	}
	cfps := vc.Get(gocv.VideoCaptureFPS)
	if !finite(cfps) || cfps <= 0 || cfps > 10000 {
		cfps = 0
	}
	hdr := vc.Get(gocv.VideoCaptureFrameCount)
	if !finite(hdr) || hdr < 0 || hdr > math.MaxInt32 {
		hdr = 0
	}
	s.info = VideoInfo{
		Path:         path,
		WidthPX:      s.first.Cols(),
		HeightPX:     s.first.Rows(),
		FPS:          cfps,
		HeaderFrames: int(hdr),
		FourCC:       fourCC(vc.Get(gocv.VideoCaptureFOURCC)),
		Backend:      backendName(vc.Get(gocv.VideoCaptureBackend)),
		ContainerFPS: cfps,
	}
	if o.FPSOverride > 0 {
		s.info.FPS = o.FPSOverride
	}
	if s.info.FPS <= 0 {
		return fail(&OpenError{Path: path, Problem: "the container gives no frame rate", Hint: "give the capture rate with --fps"})
	}
	return s, nil
}

func (s *fileSource) Info() VideoInfo { return s.info }

func (s *fileSource) Next(dst *gocv.Mat) (FrameInfo, error) {
	if s.endErr != nil {
		return FrameInfo{}, s.endErr
	}
	if s.closed {
		panic("track: Next on a closed Source")
	}
	if s.hasFirst {
		s.first.CopyTo(dst)
		s.first.Close()
		s.first = gocv.NewMat()
		s.hasFirst = false
		s.next = 1
		s.lastT, s.lastIdx, s.lastRawT = 0, 0, 0
		return FrameInfo{Index: 0, TimeS: 0}, nil
	}
	if !s.vc.Read(dst) || dst.Empty() {
		s.endErr = s.endError()
		return FrameInfo{}, s.endErr
	}
	i := s.next
	s.next++
	fps := s.info.FPS
	var t float64
	if s.override > 0 {
		t = float64(i) / s.override
	} else {
		raw := s.vc.Get(gocv.VideoCapturePosMsec)/1000 - s.firstRaw
		if finite(raw) && raw > s.lastT+1e-6 && raw >= s.lastRawT+float64(i-s.lastIdx)*0.1/fps {
			// A usable container time: later than everything so far and not
			// absurdly close to the last good one (at most 10x the nominal rate).
			t = raw
			s.lastIdx, s.lastRawT = i, raw
		} else {
			t = s.lastRawT + float64(i-s.lastIdx)/fps
			if t <= s.lastT {
				t = s.lastT + 1/fps
			}
		}
	}
	s.lastT = t
	return FrameInfo{Index: i, TimeS: t}, nil
}

// endError decides, when the decoder delivers no more frames, whether the
// clip ended where its container says (io.EOF) or early (*TruncatedError).
// Frame counts alone cannot tell: an AVI may declare repeated ("dropped")
// frames that decode to nothing, as tree.avi of opencv-doc does (444
// declared, 68 decoded, yet complete). So the decoded duration is compared
// with the declared one: truncated when it falls short by more than two
// frame intervals and 2 %.
func (s *fileSource) endError() error {
	n := s.next
	hdrS := s.info.HeaderS()
	if s.override > 0 || hdrS <= 0 || n >= s.info.HeaderFrames {
		return io.EOF
	}
	cfps := s.info.ContainerFPS
	readS := s.lastT + 1/cfps
	if readS < hdrS-math.Max(2/cfps, 0.02*hdrS) {
		return &TruncatedError{Path: s.info.Path, FramesRead: n, HeaderFrames: s.info.HeaderFrames, ReadS: readS, HeaderS: hdrS}
	}
	return io.EOF
}

func (s *fileSource) Close() error {
	if s.closed {
		return nil
	}
	s.closed = true
	s.first.Close()
	if s.vc != nil {
		s.vc.Close()
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func fourCC(v float64) string {
	if !finite(v) || v <= 0 {
		return ""
	}
	u := uint32(int64(v))
	b := []byte{byte(u), byte(u >> 8), byte(u >> 16), byte(u >> 24)}
	return string(bytes.TrimRight(b, "\x00 "))
}

func backendName(v float64) string {
	if gocv.VideoCaptureAPI(int(v)) == gocv.VideoCaptureFFmpeg {
		return "FFMPEG"
	}
	return gocv.VideoCaptureAPI(int(v)).String()
}

// checkFile gives the one-line errors that need no decoder: a missing
// file, a dangling link, a folder, an unreadable or an empty file.
func checkFile(path string) error {
	lst, lerr := os.Lstat(path)
	st, err := os.Stat(path)
	switch {
	case err != nil && lerr == nil && lst.Mode()&fs.ModeSymlink != 0:
		target, _ := os.Readlink(path)
		return &OpenError{Path: path, Problem: "is a symbolic link to " + target + ", which does not exist", Hint: "fix or remove the link", Err: err}
	case errors.Is(err, fs.ErrNotExist):
		return &OpenError{Path: path, Problem: "no such file", Hint: "check the path", Err: err}
	case errors.Is(err, fs.ErrPermission):
		return &OpenError{Path: path, Problem: "permission denied", Hint: "check the permissions of the file and its folders", Err: err}
	case err != nil:
		return &OpenError{Path: path, Problem: "cannot read: " + errText(err), Hint: "check the path", Err: err}
	case st.IsDir():
		return &OpenError{Path: path, Problem: "is a folder, not a video file", Hint: "give a clip, or give the folder to 'flitlog run' to process the clips in it"}
	case !st.Mode().IsRegular():
		return &OpenError{Path: path, Problem: "is not a regular file", Hint: "copy the clip to a file first"}
	case st.Size() == 0:
		return &OpenError{Path: path, Problem: "file is empty (0 bytes)", Hint: "the recording was not saved or the copy failed; copy it again from the camera"}
	}
	f, err := os.Open(path)
	if err != nil {
		if errors.Is(err, fs.ErrPermission) {
			return &OpenError{Path: path, Problem: "permission denied", Hint: "check the permissions of the file", Err: err}
		}
		return &OpenError{Path: path, Problem: "cannot read: " + errText(err), Hint: "check the file", Err: err}
	}
	f.Close()
	return nil
}

func errText(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

// diagnose explains why the decoder could not open a file that exists and
// can be read, from its first bytes.
func diagnose(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return &OpenError{Path: path, Problem: "cannot read: " + errText(err), Err: err}
	}
	defer f.Close()
	head := make([]byte, 512)
	n, _ := io.ReadFull(f, head)
	head = head[:n]
	switch {
	case len(head) >= 8 && string(head[4:8]) == "ftyp":
		if ok, err := hasMoov(f); err == nil && !ok {
			return &OpenError{Path: path, Problem: "MP4/MOV file without its index (no moov box): the recording was cut off before the camera finished writing it", Hint: "no frame can be read without the index; copy the file again, or rebuild it with a recovery tool from a good clip of the same camera"}
		}
		return &OpenError{Path: path, Problem: "the FFmpeg backend cannot open this MP4/MOV file", Hint: "check that it plays; re-encode it to H.264 .mp4 or .mkv"}
	case looksLikeVideo(head):
		return &OpenError{Path: path, Problem: "the FFmpeg backend cannot open this video file (damaged header or unsupported codec)", Hint: "check that it plays; re-encode it to H.264 .mp4 or .mkv"}
	case looksLikeText(head):
		return &OpenError{Path: path, Problem: "not a video file (it contains text)", Hint: "give a video clip (.mp4, .mov, .avi, .mkv)"}
	}
	return &OpenError{Path: path, Problem: "not a video file the FFmpeg backend can read", Hint: "give a video clip (.mp4, .mov, .avi, .mkv)"}
}

// looksLikeVideo recognises the signatures of common video containers.
func looksLikeVideo(b []byte) bool {
	switch {
	case len(b) >= 12 && string(b[:4]) == "RIFF" && string(b[8:11]) == "AVI":
		return true
	case len(b) >= 4 && bytes.Equal(b[:4], []byte{0x1a, 0x45, 0xdf, 0xa3}): // Matroska / WebM
		return true
	case len(b) >= 4 && bytes.Equal(b[:4], []byte{0x30, 0x26, 0xb2, 0x75}): // ASF / WMV
		return true
	case len(b) >= 4 && bytes.Equal(b[:4], []byte{0, 0, 1, 0xba}): // MPEG program stream
		return true
	case len(b) >= 3 && string(b[:3]) == "FLV":
		return true
	case len(b) > 188 && b[0] == 0x47 && b[188] == 0x47: // MPEG transport stream
		return true
	}
	return false
}

func looksLikeText(b []byte) bool {
	if len(b) == 0 {
		return false
	}
	for _, c := range b {
		if c == 0 || (c < 0x20 && c != '\n' && c != '\r' && c != '\t') {
			return false
		}
	}
	return true
}

// hasMoov walks the top-level boxes of an ISO base media file (ISO/IEC
// 14496-12, 4.2: 32-bit size and 4-byte type; size 1 = 64-bit size
// follows; size 0 = box runs to the end of the file) and reports whether a
// moov box is among them.
func hasMoov(f *os.File) (bool, error) {
	st, err := f.Stat()
	if err != nil {
		return false, err
	}
	size := st.Size()
	var off int64
	hdr := make([]byte, 16)
	for off+8 <= size {
		if _, err := f.ReadAt(hdr[:8], off); err != nil {
			return false, err
		}
		n := int64(binary.BigEndian.Uint32(hdr[:4]))
		typ := string(hdr[4:8])
		if typ == "moov" {
			return true, nil
		}
		switch n {
		case 0:
			return false, nil
		case 1:
			if _, err := f.ReadAt(hdr[8:16], off+8); err != nil {
				return false, err
			}
			n = int64(binary.BigEndian.Uint64(hdr[8:16]))
		}
		if n < 8 {
			return false, fmt.Errorf("bad box size %d at %d", n, off)
		}
		off += n
	}
	return false, nil
}
