package overlay

import (
	"bytes"
	"flag"
	"image/color"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"flitlog/cmd/flitlog/internal/plots"
	"flitlog/kinematics"
	"flitlog/visits"

	"gocv.io/x/gocv"
)

var (
	update   = flag.Bool("update", false, "rewrite the golden PNG in testdata/")
	snapshot = flag.String("snapshot", "", "also write the decoded overlay frame as PNG into this directory")
)

// A small invented scene (synthetic ground truth): 640x360 px at 30 fps,
// 60 frames, two flowers. Track 1 flies in from the left (frames 0..19)
// and lands on F1 (20..59, censored by the clip end). Track 2 appears at
// frame 10, hovers by F2 (10..39, an inspection) and flies off to the
// upper right (40..49, track ends).
const (
	sW, sH = 640, 360
	sFPS   = 30.0
	sN     = 60
)

type scene struct {
	fm          visits.FlowerMap
	tracks      []kinematics.Result
	landings    []visits.Landing
	inspections []visits.Inspection
}

func newScene() scene {
	fm := visits.FlowerMap{FrameWidthPX: sW, FrameHeightPX: sH, Flowers: []visits.Flower{
		{ID: "F1", XPX: 200, YPX: 200, RPX: 30},
		{ID: "F2", XPX: 470, YPX: 150, RPX: 26},
	}}
	ts := func(f int) float64 { return float64(f) / sFPS }
	t1 := kinematics.Result{ID: 1}
	for f := 0; f < sN; f++ {
		x, y, st := 200.0, 200.0, kinematics.Landed
		if f < 20 {
			u := float64(f) / 20
			x, y, st = 20+180*u, 320-120*u, kinematics.Flying
		}
		t1.Samples = append(t1.Samples, kinematics.Sample{Point: kinematics.Point{
			Frame: f, TimeS: ts(f), XPX: x, YPX: y, Observed: true}, State: st})
	}
	t2 := kinematics.Result{ID: 2}
	for f := 10; f < 50; f++ {
		a := float64(f) * 0.3
		x, y, st := 470+45*math.Cos(a), 150+45*math.Sin(a), kinematics.Hovering
		if f >= 40 {
			u := float64(f-40) / 10
			x, y, st = 515+100*u, 150-120*u, kinematics.Flying
		}
		t2.Samples = append(t2.Samples, kinematics.Sample{Point: kinematics.Point{
			Frame: f, TimeS: ts(f), XPX: x, YPX: y, Observed: f < 44 || f > 46}, State: st})
	}
	return scene{
		fm:     fm,
		tracks: []kinematics.Result{t1, t2},
		landings: []visits.Landing{{TrackID: 1, FlowerID: "F1", StartFrame: 20, EndFrame: 59,
			StartS: ts(20), EndS: ts(60), DurationS: ts(60) - ts(20), CensoredEnd: true}},
		inspections: []visits.Inspection{{TrackID: 2, FlowerID: "F2", StartFrame: 10, EndFrame: 39,
			StartS: ts(10), EndS: ts(40), DurationS: 1}},
	}
}

func TestTimelineAt(t *testing.T) {
	sc := newScene()
	tl := NewTimeline(sc.fm, sc.tracks, sc.landings, sc.inspections)
	cases := []struct {
		name      string
		frame     int
		ids       []int
		trailLen  []int // per track in ids
		flower    []string
		onFlowerS []float64
		inspect   []string
	}{
		{"first frame", 0, []int{1}, []int{1}, []string{""}, []float64{0}, []string{""}},
		// 1 s trail at 30 fps: frames 5..35 = 31 samples; track 2 from 10.
		{"both, mid", 35, []int{1, 2}, []int{31, 26}, []string{"F1", ""}, []float64{0.5, 0}, []string{"", "F2"}},
		{"landing start", 20, []int{1, 2}, []int{21, 11}, []string{"F1", ""}, []float64{0, 0}, []string{"", "F2"}},
		{"inspection over", 40, []int{1, 2}, []int{31, 31}, []string{"F1", ""}, []float64{20.0 / 30, 0}, []string{"", ""}},
		{"track 2 ended", 50, []int{1}, []int{31}, []string{"F1"}, []float64{1}, []string{""}},
		{"past the clip", 70, nil, nil, nil, nil, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			st := tl.At(tc.frame, float64(tc.frame)/sFPS)
			if st.Frame != tc.frame || len(st.Flowers) != 2 {
				t.Fatalf("frame %d, %d flowers", st.Frame, len(st.Flowers))
			}
			if len(st.Tracks) != len(tc.ids) {
				t.Fatalf("%d tracks, want %d", len(st.Tracks), len(tc.ids))
			}
			for i, m := range st.Tracks {
				if m.ID != tc.ids[i] || len(m.Trail) != tc.trailLen[i] || m.FlowerID != tc.flower[i] ||
					math.Abs(m.OnFlowerS-tc.onFlowerS[i]) > 1e-9 || m.InspectingID != tc.inspect[i] {
					t.Errorf("track %d: id %d trail %d flower %q on %.4f s inspecting %q; want %d %d %q %.4f %q",
						i, m.ID, len(m.Trail), m.FlowerID, m.OnFlowerS, m.InspectingID,
						tc.ids[i], tc.trailLen[i], tc.flower[i], tc.onFlowerS[i], tc.inspect[i])
				}
				if last := m.Trail[len(m.Trail)-1]; last.Frame != tc.frame || last.XPX != m.XPX {
					t.Errorf("track %d: trail ends at frame %d, want the current frame %d", m.ID, last.Frame, tc.frame)
				}
			}
		})
	}
}

// Asking frames backwards gives the same states as the sequential pass.
func TestTimelineOrderFree(t *testing.T) {
	sc := newScene()
	fwd := NewTimeline(sc.fm, sc.tracks, sc.landings, sc.inspections)
	bwd := NewTimeline(sc.fm, sc.tracks, sc.landings, sc.inspections)
	want := make([][]TrackMark, sN)
	for f := 0; f < sN; f++ {
		want[f] = append([]TrackMark(nil), fwd.At(f, float64(f)/sFPS).Tracks...)
	}
	for f := sN - 1; f >= 0; f-- {
		got := bwd.At(f, float64(f)/sFPS).Tracks
		if len(got) != len(want[f]) {
			t.Fatalf("frame %d: %d tracks, sequential pass %d", f, len(got), len(want[f]))
		}
		for i := range got {
			g, w := got[i], want[f][i]
			if g.ID != w.ID || g.XPX != w.XPX || len(g.Trail) != len(w.Trail) || g.FlowerID != w.FlowerID || g.InspectingID != w.InspectingID {
				t.Errorf("frame %d track %d differs: %+v vs %+v", f, i, g.ID, w.ID)
			}
		}
	}
}

// plainFrame is an 8-bit BGR frame of one grey level.
func plainFrame(v uint8) gocv.Mat {
	return gocv.NewMatWithSizeFromScalar(gocv.NewScalar(float64(v), float64(v), float64(v), 0), sH, sW, gocv.MatTypeCV8UC3)
}

// bgrAt reads a pixel of an 8-bit BGR Mat as RGBA.
func bgrAt(m gocv.Mat, x, y int) color.RGBA {
	v := m.GetVecbAt(y, x)
	return color.RGBA{v[2], v[1], v[0], 255}
}

func near(a, b color.RGBA, tol int) bool {
	d := func(x, y uint8) int { return int(math.Abs(float64(x) - float64(y))) }
	return d(a.R, b.R) <= tol && d(a.G, b.G) <= tol && d(a.B, b.B) <= tol
}

func TestWriterRoundTrip(t *testing.T) {
	sc := newScene()
	tl := NewTimeline(sc.fm, sc.tracks, sc.landings, sc.inspections)
	path := filepath.Join(t.TempDir(), "overlay.mp4")
	w, err := Create(path, sW, sH, sFPS)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("writer: %s codec %s (fell back: %v)", filepath.Base(w.Path()), w.Codec(), w.FellBack())
	if w.FellBack() != (w.Codec() == CodecMJPEG) || (w.Codec() == CodecMJPEG) != strings.HasSuffix(w.Path(), ".avi") {
		t.Errorf("inconsistent report: path %s codec %s fell back %v", w.Path(), w.Codec(), w.FellBack())
	}
	frame := plainFrame(90)
	defer frame.Close()
	for f := 0; f < sN; f++ {
		frame.SetTo(gocv.NewScalar(90, 90, 90, 0))
		if err := w.Draw(&frame, f, tl.At(f, float64(f)/sFPS)); err != nil {
			t.Fatal(err)
		}
	}
	if w.Frames() != sN {
		t.Errorf("Frames() = %d, want %d", w.Frames(), sN)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Errorf("second Close: %v", err)
	}

	vc, err := gocv.VideoCaptureFile(w.Path())
	if err != nil {
		t.Fatal(err)
	}
	defer vc.Close()
	img := gocv.NewMat()
	defer img.Close()
	n := 0
	var at30 gocv.Mat
	for vc.Read(&img) {
		if img.Empty() {
			break
		}
		if img.Cols() != sW || img.Rows() != sH {
			t.Fatalf("decoded frame %d is %dx%d, want %dx%d", n, img.Cols(), img.Rows(), sW, sH)
		}
		if n == 30 {
			at30 = img.Clone()
		}
		n++
	}
	if n != sN {
		t.Fatalf("decoded %d frames, want %d", n, sN)
	}
	defer at30.Close()
	// Frame 30: track 1 landed on F1 (square in the landed colour at
	// (200, 200)), F1 ringed in the highlight colour (radius 30), track 2
	// hovering (diamond in the hovering colour). Tolerance for lossy
	// compression of flat colour areas: 40 per channel.
	m2 := tl.At(30, 1).Tracks[1]
	checks := []struct {
		name string
		x, y int
		want color.RGBA
	}{
		{"landed marker of track 1", 200, 200, plots.StateColor(kinematics.Landed)},
		{"F1 highlighted", 230, 200, plots.HighlightColor()},
		{"hovering marker of track 2", int(math.Round(m2.XPX)), int(math.Round(m2.YPX)), plots.StateColor(kinematics.Hovering)},
		{"plain background", 600, 300, color.RGBA{90, 90, 90, 255}},
	}
	for _, c := range checks {
		if got := bgrAt(at30, c.x, c.y); !near(got, c.want, 40) {
			t.Errorf("%s: decoded pixel (%d, %d) = %v, want %v ± 40", c.name, c.x, c.y, got, c.want)
		}
	}
	if *snapshot != "" {
		out := filepath.Join(*snapshot, "overlay_decoded_frame30.png")
		if !gocv.IMWrite(out, at30) {
			t.Errorf("writing %s failed", out)
		}
	}
}

// An extension FFmpeg does not know makes the H.264 open fail, so Create
// falls back to Motion JPEG in .avi.
func TestWriterFallback(t *testing.T) {
	path := filepath.Join(t.TempDir(), "overlay.nosuchcontainer")
	w, err := Create(path, sW, sH, sFPS)
	if err != nil {
		t.Fatal(err)
	}
	defer w.Close()
	if !w.FellBack() || w.Codec() != CodecMJPEG || filepath.Ext(w.Path()) != ".avi" {
		t.Fatalf("path %s codec %s fell back %v; want the MJPG .avi fallback", w.Path(), w.Codec(), w.FellBack())
	}
	frame := plainFrame(120)
	defer frame.Close()
	for f := 0; f < 5; f++ {
		if err := w.Draw(&frame, f, FrameState{Frame: f, TimeS: float64(f) / sFPS}); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(path); err == nil {
		t.Errorf("failed H.264 attempt left %s behind", path)
	}
	vc, err := gocv.VideoCaptureFile(w.Path())
	if err != nil {
		t.Fatal(err)
	}
	defer vc.Close()
	img := gocv.NewMat()
	defer img.Close()
	n := 0
	for vc.Read(&img) && !img.Empty() {
		n++
	}
	if n != 5 {
		t.Errorf("decoded %d frames from the fallback, want 5", n)
	}
}

func TestWriterErrors(t *testing.T) {
	dir := t.TempDir()
	for _, tc := range []struct {
		name string
		w, h int
		fps  float64
		want string
	}{
		{"zero width", 0, 10, 30, "frame size"},
		{"negative fps", 10, 10, -1, "fps"},
		{"NaN fps", 10, 10, math.NaN(), "fps"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Create(filepath.Join(dir, "x.mp4"), tc.w, tc.h, tc.fps)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one about %s", err, tc.want)
			}
		})
	}

	w, err := Create(filepath.Join(dir, "e.mp4"), sW, sH, sFPS)
	if err != nil {
		t.Fatal(err)
	}
	small := gocv.NewMatWithSize(100, 100, gocv.MatTypeCV8UC3)
	defer small.Close()
	if err := w.Draw(&small, 7, FrameState{}); err == nil || !strings.Contains(err.Error(), "frame 7") {
		t.Errorf("wrong-size frame: error %v, want one naming frame 7", err)
	}
	grey := gocv.NewMatWithSize(sH, sW, gocv.MatTypeCV8UC1)
	defer grey.Close()
	if err := w.Draw(&grey, 8, FrameState{}); err == nil || !strings.Contains(err.Error(), "BGR") {
		t.Errorf("grey frame: error %v, want one about BGR", err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	ok := plainFrame(0)
	defer ok.Close()
	if err := w.Draw(&ok, 9, FrameState{}); err == nil {
		t.Error("Draw after Close accepted")
	}
}

// TestAnnotateGolden draws frame 30 of the scene on a plain frame (no
// video compression) and compares it with testdata/frame30.png.
func TestAnnotateGolden(t *testing.T) {
	sc := newScene()
	tl := NewTimeline(sc.fm, sc.tracks, sc.landings, sc.inspections)
	frame := plainFrame(90)
	defer frame.Close()
	Annotate(&frame, 30, tl.At(30, 1))
	img, err := frame.ToImage()
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join("testdata", "frame30.png")
	if *update {
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	wimg, err := png.Decode(bytes.NewReader(want))
	if err != nil {
		t.Fatal(err)
	}
	if wimg.Bounds() != img.Bounds() {
		t.Fatalf("size %v, golden %v", img.Bounds(), wimg.Bounds())
	}
	// A pixel differs when a channel differs by more than 24; at most
	// 0.2 % may differ (anti-aliasing may vary between OpenCV builds).
	n := 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			g := color.RGBAModel.Convert(img.At(x, y)).(color.RGBA)
			w := color.RGBAModel.Convert(wimg.At(x, y)).(color.RGBA)
			if !near(g, w, 24) {
				n++
			}
		}
	}
	if frac := float64(n) / float64(b.Dx()*b.Dy()); frac > 0.002 {
		bad := filepath.Join(t.TempDir(), "frame30.png")
		_ = os.WriteFile(bad, buf.Bytes(), 0o644)
		t.Errorf("%d pixels (%.3f%%) differ from the golden frame (got written to %s)", n, 100*frac, bad)
	}
	// Drawing the same state twice gives the same pixels.
	again := plainFrame(90)
	defer again.Close()
	Annotate(&again, 30, tl.At(30, 1))
	img2, err := again.ToImage()
	if err != nil {
		t.Fatal(err)
	}
	var buf2 bytes.Buffer
	if err := png.Encode(&buf2, img2); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), buf2.Bytes()) {
		t.Error("second drawing differs from the first")
	}
}
