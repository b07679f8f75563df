package track

import (
	"encoding/binary"
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gocv.io/x/gocv"
)

// sampleDir holds the sample clips of Debian's opencv-doc package.
const sampleDir = "/usr/share/doc/opencv-doc/examples/data"

// samplePath returns the path of an opencv-doc sample clip. Without the
// package the test is skipped, except in CI (CI=true), where it fails.
func samplePath(t testing.TB, name string) string {
	t.Helper()
	p := filepath.Join(sampleDir, name)
	if _, err := os.Stat(p); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("sample clip %s missing: install Debian package opencv-doc (make samples)", p)
		}
		t.Skipf("sample clip %s missing: install Debian package opencv-doc", p)
	}
	return p
}

// aviIndex reads the legacy index (idx1) of an AVI file as the Microsoft
// "AVI RIFF File Reference" (AVIOLDINDEX) defines it: 16-byte entries of
// chunk id, flags, offset and size. It returns the sizes of the chunks of
// video stream 0 ("00dc" compressed, "00db" uncompressed) in file order.
// A chunk of size 0 is a "drop frame": the previous picture is shown
// again for that frame interval and nothing is decoded.
func aviIndex(t testing.TB, path string) []uint32 {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(b) < 12 || string(b[:4]) != "RIFF" || string(b[8:12]) != "AVI " {
		t.Fatalf("%s: not a RIFF AVI file", path)
	}
	// Walk the top-level chunks of the RIFF list to idx1.
	for off := 12; off+8 <= len(b); {
		id := string(b[off : off+4])
		n := int(binary.LittleEndian.Uint32(b[off+4 : off+8]))
		if id == "idx1" {
			var sizes []uint32
			for e := off + 8; e+16 <= off+8+n && e+16 <= len(b); e += 16 {
				if cid := string(b[e : e+4]); cid == "00dc" || cid == "00db" {
					sizes = append(sizes, binary.LittleEndian.Uint32(b[e+12:e+16]))
				}
			}
			return sizes
		}
		off += 8 + n + n%2
	}
	t.Fatalf("%s: no idx1 index", path)
	return nil
}

// readAll reads a clip to its end and returns every FrameInfo and the
// final error (io.EOF or *TruncatedError).
func readAll(t testing.TB, src Source) ([]FrameInfo, error) {
	t.Helper()
	m := gocv.NewMat()
	defer m.Close()
	var out []FrameInfo
	for {
		fi, err := src.Next(&m)
		if err != nil {
			return out, err
		}
		if m.Cols() != src.Info().WidthPX || m.Rows() != src.Info().HeightPX || m.Type() != gocv.MatTypeCV8UC3 {
			t.Fatalf("frame %d: %dx%d %v, want %dx%d CV8UC3", fi.Index, m.Cols(), m.Rows(), m.Type(), src.Info().WidthPX, src.Info().HeightPX)
		}
		out = append(out, fi)
	}
}

// TestSourceSampleClips reads the opencv-doc sample clips to the end and
// checks frame counts and timestamps against each file's own AVI index.
// Source of the files: Debian 12 package opencv-doc 4.6.0+dfsg-12; sizes,
// rates and header frame counts below are those files' AVI headers.
//
// tree.avi declares 444 frames at 15 frames/s but 376 of its index
// entries are drop frames (size 0): 68 pictures decode, each at the time
// of its index entry, so the clip has a variable frame rate and a header
// frame count that is not the number of decodable frames.
// Megamind_bugy.avi is a damaged copy of Megamind.avi made for image
// quality tests: its header gives 30 frames/s instead of 23.976, and some
// frames carry painted boxes, lines and a mirrored picture (measured here
// against Megamind.avi, frame by frame). Both read to the end cleanly.
func TestSourceSampleClips(t *testing.T) {
	for _, tc := range []struct {
		name         string
		w, h         int
		fps          float64 // from the AVI stream header (dwRate/dwScale)
		headerFrames int
	}{
		{"vtest.avi", 768, 576, 10, 795},
		{"tree.avi", 320, 240, 15, 444},
		{"Megamind.avi", 720, 528, 23.976, 270},
		{"Megamind_bugy.avi", 720, 528, 30, 270},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := samplePath(t, tc.name)
			src, err := Open(path, SourceOptions{})
			if err != nil {
				t.Fatal(err)
			}
			defer src.Close()
			info := src.Info()
			if info.WidthPX != tc.w || info.HeightPX != tc.h || info.HeaderFrames != tc.headerFrames || math.Abs(info.FPS-tc.fps) > 1e-3 || info.Backend != "FFMPEG" {
				t.Errorf("info %+v, want %dx%d, %d frames at %g frames/s, backend FFMPEG", info, tc.w, tc.h, tc.headerFrames, tc.fps)
			}
			fis, err := readAll(t, src)
			if !errors.Is(err, io.EOF) {
				t.Fatalf("end: %v, want io.EOF", err)
			}
			if _, err2 := src.Next(&gocv.Mat{}); !errors.Is(err2, io.EOF) {
				t.Errorf("Next after the end: %v, want io.EOF again", err2)
			}
			// The AVI index: one decoded frame per chunk of non-zero size,
			// shown at (position in the index) / fps.
			sizes := aviIndex(t, path)
			if len(sizes) != tc.headerFrames {
				t.Errorf("idx1 has %d video chunks, header says %d", len(sizes), tc.headerFrames)
			}
			var wantT []float64
			for i, n := range sizes {
				if n > 0 {
					wantT = append(wantT, float64(i)/info.FPS)
				}
			}
			if len(fis) != len(wantT) {
				t.Fatalf("decoded %d frames, idx1 has %d non-empty video chunks", len(fis), len(wantT))
			}
			const tolS = 1e-3 // POS_MSEC is rounded to whole milliseconds for some containers
			for i, fi := range fis {
				if fi.Index != i {
					t.Fatalf("frame %d has Index %d", i, fi.Index)
				}
				if i > 0 && !(fi.TimeS > fis[i-1].TimeS) {
					t.Fatalf("frame %d: time %g not after %g", i, fi.TimeS, fis[i-1].TimeS)
				}
				if math.Abs(fi.TimeS-(wantT[i]-wantT[0])) > tolS {
					t.Fatalf("frame %d: time %.6f s, idx1 position gives %.6f s", i, fi.TimeS, wantT[i]-wantT[0])
				}
			}
		})
	}
}

// TestSourceBugyFrames finds the damaged frames of Megamind_bugy.avi by
// comparing it with Megamind.avi and checks that the Source delivers all
// frames of both. Megamind_bugy.avi is a lower-quality re-encoding: the
// mean absolute difference of an undamaged frame pair stays at or below
// about 6 grey levels, while the damaged frames (a white line, a white
// box, a green bar, a mirrored picture, ...) exceed 8.
func TestSourceBugyFrames(t *testing.T) {
	a, err := Open(samplePath(t, "Megamind.avi"), SourceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	b, err := Open(samplePath(t, "Megamind_bugy.avi"), SourceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	ma, mb, df := gocv.NewMat(), gocv.NewMat(), gocv.NewMat()
	defer ma.Close()
	defer mb.Close()
	defer df.Close()
	var damaged []int
	n := 0
	for {
		_, ea := a.Next(&ma)
		_, eb := b.Next(&mb)
		if ea != nil || eb != nil {
			if !errors.Is(ea, io.EOF) || !errors.Is(eb, io.EOF) {
				t.Fatalf("after %d frames: %v / %v, want io.EOF for both", n, ea, eb)
			}
			break
		}
		gocv.AbsDiff(ma, mb, &df)
		s := df.Mean()
		if (s.Val1+s.Val2+s.Val3)/3 > 7.5 {
			damaged = append(damaged, n)
		}
		n++
	}
	if n != 270 {
		t.Errorf("read %d frame pairs, want 270", n)
	}
	// Measured with this test (gocv 0.31, OpenCV 4.6, Debian 12) and
	// checked by eye on the frames.
	if want := []int{10, 40, 75, 95, 100, 115}; fmt.Sprint(damaged) != fmt.Sprint(want) {
		t.Errorf("damaged frames %v, want %v", damaged, want)
	}
}

// TestSourceFPSOverride: with an override, times are Index/fps.
func TestSourceFPSOverride(t *testing.T) {
	src, err := Open(samplePath(t, "tree.avi"), SourceOptions{FPSOverride: 120})
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	if src.Info().FPS != 120 || math.Abs(src.Info().ContainerFPS-15) > 1e-3 {
		t.Errorf("FPS %g container %g, want 120 and 15", src.Info().FPS, src.Info().ContainerFPS)
	}
	fis, err := readAll(t, src)
	if !errors.Is(err, io.EOF) {
		t.Fatal(err)
	}
	for _, fi := range fis {
		if math.Abs(fi.TimeS-float64(fi.Index)/120) > 1e-12 {
			t.Fatalf("frame %d: time %g, want %g", fi.Index, fi.TimeS, float64(fi.Index)/120)
		}
	}
	if _, err := Open(samplePath(t, "tree.avi"), SourceOptions{FPSOverride: -1}); err == nil {
		t.Error("negative override accepted")
	}
}

// writeClip writes n frames of a dark disc moving over a grey ramp.
func writeClip(t testing.TB, path, codec string, n, w, h int, fps float64) {
	t.Helper()
	vw, err := gocv.VideoWriterFile(path, codec, fps, w, h, true)
	if err != nil || !vw.IsOpened() {
		t.Fatalf("video writer %s %s: %v", path, codec, err)
	}
	m := gocv.NewMatWithSize(h, w, gocv.MatTypeCV8UC3)
	defer m.Close()
	for i := 0; i < n; i++ {
		for x := 0; x < w; x += 16 {
			v := uint8(80 + 100*x/w)
			gocv.Rectangle(&m, image.Rect(x, 0, x+16, h), color.RGBA{v, v, v, 0}, -1)
		}
		gocv.PutText(&m, fmt.Sprint(i), image.Pt(10, h-10), gocv.FontHersheyPlain, 2, color.RGBA{255, 255, 255, 0}, 2)
		gocv.Circle(&m, image.Pt(20+i*(w-40)/n, h/2), 8, color.RGBA{20, 20, 20, 0}, -1)
		if err := vw.Write(m); err != nil {
			t.Fatal(err)
		}
	}
	vw.Close()
}

// mp4Boxes lists the top-level boxes of an ISO base media file
// (ISO/IEC 14496-12, 4.2) as [type, offset, size].
func mp4Boxes(t testing.TB, b []byte) [][3]any {
	t.Helper()
	var out [][3]any
	for off := 0; off+8 <= len(b); {
		n := int(binary.BigEndian.Uint32(b[off:]))
		if n == 1 {
			n = int(binary.BigEndian.Uint64(b[off+8:]))
		}
		if n < 8 || off+n > len(b) {
			t.Fatalf("bad box at %d", off)
		}
		out = append(out, [3]any{string(b[off+4 : off+8]), off, n})
		off += n
	}
	return out
}

// fastStart moves the moov box of an MP4 file before its mdat box, as
// encoders do for streaming ("fast start"), adding the moov size to every
// chunk offset of the stco and co64 boxes (ISO/IEC 14496-12, 8.7.5). Cut
// short, such a file keeps its index and the frames whose data remain.
func fastStart(t testing.TB, b []byte) []byte {
	t.Helper()
	var moov, rest []byte
	for _, bx := range mp4Boxes(t, b) {
		typ, off, n := bx[0].(string), bx[1].(int), bx[2].(int)
		if typ == "moov" {
			moov = append([]byte(nil), b[off:off+n]...)
		} else if typ != "ftyp" {
			rest = append(rest, b[off:off+n]...)
		}
	}
	if moov == nil {
		t.Fatal("no moov box")
	}
	shift := uint64(len(moov))
	var walk func(p []byte)
	walk = func(p []byte) {
		for off := 0; off+8 <= len(p); {
			n := int(binary.BigEndian.Uint32(p[off:]))
			typ := string(p[off+4 : off+8])
			if n < 8 || off+n > len(p) {
				t.Fatalf("bad box %q in moov", typ)
			}
			body := p[off+8 : off+n]
			switch typ {
			case "trak", "mdia", "minf", "stbl":
				walk(body)
			case "stco":
				cnt := int(binary.BigEndian.Uint32(body[4:]))
				for i := 0; i < cnt; i++ {
					e := body[8+4*i:]
					binary.BigEndian.PutUint32(e, binary.BigEndian.Uint32(e)+uint32(shift))
				}
			case "co64":
				cnt := int(binary.BigEndian.Uint32(body[4:]))
				for i := 0; i < cnt; i++ {
					e := body[8+8*i:]
					binary.BigEndian.PutUint64(e, binary.BigEndian.Uint64(e)+shift)
				}
			}
			off += n
		}
	}
	walk(moov[8:])
	bx := mp4Boxes(t, b)
	if bx[0][0] != "ftyp" {
		t.Fatal("no leading ftyp box")
	}
	ftyp := b[:bx[0][2].(int)]
	out := append(append(append([]byte(nil), ftyp...), moov...), rest...)
	return out
}

// TestSourceTruncated cuts the tail off clips written by OpenCV's FFmpeg
// backend and checks that the decodable part is read, with a
// *TruncatedError at the end that names the counts.
func TestSourceTruncated(t *testing.T) {
	dir := t.TempDir()
	const n, fps = 60, 30.0
	mp4 := filepath.Join(dir, "whole.mp4")
	writeClip(t, mp4, "avc1", n, 320, 240, fps)
	whole, err := os.ReadFile(mp4)
	if err != nil {
		t.Fatal(err)
	}
	mkv := filepath.Join(dir, "whole.mkv")
	writeClip(t, mkv, "avc1", n, 320, 240, fps)
	avi := filepath.Join(dir, "whole.avi")
	writeClip(t, avi, "MJPG", n, 320, 240, fps)

	// The whole files read to the end.
	for _, p := range []string{mp4, mkv, avi} {
		src, err := Open(p, SourceOptions{})
		if err != nil {
			t.Fatal(err)
		}
		fis, err := readAll(t, src)
		src.Close()
		if !errors.Is(err, io.EOF) || len(fis) != n {
			t.Fatalf("%s: %d frames, %v; want %d and io.EOF", p, len(fis), err, n)
		}
		// Frame i at i/fps: container timestamps, or extrapolated for the
		// frames the decoder drains at the end (container time 0 there).
		for _, fi := range fis {
			if math.Abs(fi.TimeS-float64(fi.Index)/fps) > 1.5e-3 {
				t.Fatalf("%s frame %d: time %g, want %g", p, fi.Index, fi.TimeS, float64(fi.Index)/fps)
			}
		}
	}

	cut := func(name string, b []byte, frac float64) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b[:int(float64(len(b))*frac)], 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	fileBytes := func(p string) []byte {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	for _, tc := range []struct {
		name string
		path string
	}{
		{"mp4 with index first", cut("cut_fast.mp4", fastStart(t, whole), 0.6)},
		{"mkv", cut("cut.mkv", fileBytes(mkv), 0.6)},
		{"avi mjpeg", cut("cut.avi", fileBytes(avi), 0.6)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			src, err := Open(tc.path, SourceOptions{})
			if err != nil {
				t.Fatal(err)
			}
			defer src.Close()
			fis, err := readAll(t, src)
			var te *TruncatedError
			if !errors.As(err, &te) {
				t.Fatalf("end after %d frames: %v, want *TruncatedError", len(fis), err)
			}
			if te.FramesRead != len(fis) || te.HeaderFrames != n || te.Path != tc.path {
				t.Errorf("%+v: want FramesRead %d, HeaderFrames %d, Path %s", te, len(fis), n, tc.path)
			}
			// About 60 % of the bytes hold about 60 % of the frames.
			if len(fis) < n/4 || len(fis) >= n {
				t.Errorf("read %d of %d frames", len(fis), n)
			}
			msg := te.Error()
			if strings.Contains(msg, "\n") || !strings.Contains(msg, tc.path) || !strings.Contains(msg, fmt.Sprintf("%d of %d", len(fis), n)) {
				t.Errorf("message %q: want one line with the path and the counts", msg)
			}
			if _, err2 := src.Next(&gocv.Mat{}); err2 != err {
				t.Errorf("Next after the end: %v, want the same error", err2)
			}
		})
	}

	// Cut short with its index at the end (how OpenCV and most cameras
	// write MP4), nothing can be read: a one-line error that says why.
	p := cut("cut_moov_last.mp4", whole, 0.6)
	_, err = Open(p, SourceOptions{})
	var oe *OpenError
	if !errors.As(err, &oe) || !strings.Contains(err.Error(), "moov") || !strings.Contains(err.Error(), p) {
		t.Errorf("cut MP4 without moov: %v, want *OpenError naming the file and the missing moov box", err)
	}
}

// TestSourceBadFiles checks the one-line errors for files that are not
// readable clips.
func TestSourceBadFiles(t *testing.T) {
	dir := t.TempDir()
	mk := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	folder := filepath.Join(dir, "folder.mp4")
	if err := os.Mkdir(folder, 0o755); err != nil {
		t.Fatal(err)
	}
	dangling := filepath.Join(dir, "link.mp4")
	if err := os.Symlink(filepath.Join(dir, "gone.mp4"), dangling); err != nil {
		t.Fatal(err)
	}
	noise := make([]byte, 4096)
	for i := range noise {
		noise[i] = byte(i*7919%251) | 1 // no zero bytes, not text either
	}
	for _, tc := range []struct {
		name, path string
		want       string // in the message
		errIs      error  // or nil
	}{
		{"missing", filepath.Join(dir, "nope.mp4"), "no such file", fs.ErrNotExist},
		{"dangling link", dangling, "symbolic link", fs.ErrNotExist},
		{"folder", folder, "is a folder", nil},
		{"empty", mk("empty.mp4", nil), "empty", nil},
		{"text named mp4", mk("notes.mp4", []byte("bee 1 landed on A3 at 10:42\nbee 2 ...\n")), "not a video file", nil},
		{"binary noise", mk("noise.avi", noise), "not a video file", nil},
		{"avi header only", mk("hdr.avi", []byte("RIFF\x00\x10\x00\x00AVI LIST\x04\x00\x00\x00hdrl")), "cannot open", nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			src, err := Open(tc.path, SourceOptions{})
			if err == nil {
				src.Close()
				t.Fatal("opened")
			}
			var oe *OpenError
			if !errors.As(err, &oe) {
				t.Fatalf("%T %v, want *OpenError", err, err)
			}
			msg := err.Error()
			if strings.Contains(msg, "\n") || !strings.Contains(msg, tc.path) || !strings.Contains(msg, tc.want) || oe.Hint == "" {
				t.Errorf("message %q: want one line naming %s, saying %q, with a hint", msg, tc.path, tc.want)
			}
			if tc.errIs != nil && !errors.Is(err, tc.errIs) {
				t.Errorf("%v is not %v", err, tc.errIs)
			}
		})
	}
}

// rssBytes is the resident set size of this process (Linux /proc).
func rssBytes(t testing.TB) int64 {
	b, err := os.ReadFile("/proc/self/statm")
	if err != nil {
		t.Skip("no /proc/self/statm")
	}
	var size, res int64
	fmt.Sscan(string(b), &size, &res)
	return res * int64(os.Getpagesize())
}

// TestSourceMemory: reading allocates nothing per frame on the Go side and
// the resident memory does not grow with the number of frames read.
func TestSourceMemory(t *testing.T) {
	path := samplePath(t, "vtest.avi")
	src, err := Open(path, SourceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	defer src.Close()
	m := gocv.NewMat()
	defer m.Close()
	for i := 0; i < 100; i++ {
		if _, err := src.Next(&m); err != nil {
			t.Fatal(err)
		}
	}
	before := rssBytes(t)
	allocs := testing.AllocsPerRun(600, func() {
		if _, err := src.Next(&m); err != nil {
			t.Fatal(err)
		}
	})
	growth := rssBytes(t) - before
	if allocs > 0 {
		t.Errorf("%.1f Go allocations per frame, want 0", allocs)
	}
	// One 768x576 BGR frame is 1.3 MB; 600 frames held would be 800 MB.
	if growth > 16<<20 {
		t.Errorf("resident memory grew by %d MB over 600 frames", growth>>20)
	}
	t.Logf("RSS growth over 600 frames: %.1f MB", float64(growth)/(1<<20))
}
