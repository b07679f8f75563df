package plots

import (
	"bytes"
	"errors"
	"go/parser"
	"go/token"
	"image"
	"image/color"
	"image/png"
	"io/fs"
	"math"
	"slices"
	"strings"
	"testing"

	"flitlog/kinematics"
	"flitlog/visits"

	"gonum.org/v1/plot/vg"
)

// pixelAt returns the colour of the figure's pixel nearest (x, y).
func pixelAt(f *figure, x, y float64) color.RGBA {
	img := f.img.Image()
	c := color.RGBAModel.Convert(img.At(int(math.Floor(x)), int(math.Floor(y)))).(color.RGBA)
	return c
}

// near reports whether a and b differ by at most tol in every channel.
func near(a, b color.RGBA, tol int) bool {
	d := func(x, y uint8) int {
		if x > y {
			return int(x - y)
		}
		return int(y - x)
	}
	return d(a.R, b.R) <= tol && d(a.G, b.G) <= tol && d(a.B, b.B) <= tol
}

func TestPathPlotGeometry(t *testing.T) {
	// Invented 200x100 frame: mid grey with a white 11x11 square centred
	// at (40, 20), i.e. in the top-left quarter of the image.
	bg := image.NewRGBA(image.Rect(0, 0, 200, 100))
	for y := 0; y < 100; y++ {
		for x := 0; x < 200; x++ {
			v := uint8(128)
			if x >= 35 && x <= 45 && y >= 15 && y <= 25 {
				v = 255
			}
			bg.Set(x, y, color.RGBA{v, v, v, 255})
		}
	}
	fm := visits.FlowerMap{Flowers: []visits.Flower{{ID: "F", XPX: 150, YPX: 30, RPX: 15}}}
	line := kinematics.Result{ID: 3}
	for k := 0; k <= 80; k++ {
		line.Samples = append(line.Samples, kinematics.Sample{Point: kinematics.Point{
			Frame: k, TimeS: float64(k) / 30, XPX: 100 + float64(k), YPX: 70, Observed: true}})
	}
	lone := kinematics.Result{ID: 1, Samples: []kinematics.Sample{{Point: kinematics.Point{
		Frame: 5, TimeS: 5.0 / 30, XPX: 60, YPX: 60, Observed: true}, State: kinematics.Landed}}}
	landings := []visits.Landing{{TrackID: 1, FlowerID: "F", StartFrame: 5, EndFrame: 5}}
	f, toPNG, err := renderPath(bg, fm, []kinematics.Result{line, lone}, landings,
		Options{WidthPX: 800, HeightPX: 450, BackgroundFade: -1})
	if err != nil {
		t.Fatal(err)
	}
	white := color.RGBA{255, 255, 255, 255}
	grey := color.RGBA{128, 128, 128, 255}
	cases := []struct {
		name string
		x, y float64 // frame px
		want color.RGBA
		tol  int
	}{
		{"white square, top-left (y down)", 40, 20, white, 3},
		{"mirror position is plain grey", 40, 79, grey, 3},
		{"track 3 line", 140, 70, TrackColor(3), 30},
		{"landing marker of track 1", 60, 60, TrackColor(1), 30},
		{"flower outline", 165, 30, color.RGBA{0x22, 0x22, 0x22, 0xff}, 40},
		{"flower inside not filled", 150, 30, grey, 3},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			px, py := toPNG(tc.x, tc.y)
			if got := pixelAt(f, px, py); !near(got, tc.want, tc.tol) {
				t.Errorf("pixel at frame (%g, %g) -> png (%.0f, %.0f) = %v, want %v ± %d", tc.x, tc.y, px, py, got, tc.want, tc.tol)
			}
		})
	}
	// Equal scale: the 200x100 frame spans a 2:1 box on the PNG.
	x0, y0 := toPNG(-0.5, -0.5)
	x1, y1 := toPNG(199.5, 99.5)
	if r := (x1 - x0) / (y1 - y0); math.Abs(r-2) > 0.01 {
		t.Errorf("frame aspect on the PNG = %.4f, want 2 ± 0.01", r)
	}
	if y1 <= y0 {
		t.Errorf("image row 99 at png y %.1f is not below row 0 at %.1f", y1, y0)
	}
}

func TestSpeedPlotBands(t *testing.T) {
	sc := newScene()
	f, panels, err := renderSpeed(sc.tracks, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(panels) != 2 || panels[0].id != 1 || panels[1].id != 2 {
		t.Fatalf("panels %+v, want tracks 1 and 2", panels)
	}
	cases := []struct {
		name  string
		panel int
		tS, v float64
		want  color.RGBA
	}{
		// Times inside the scripted states of newScene, away from grid
		// lines, the speed line and the panel label.
		{"track 1 flying", 0, 1.1, 30, tint(StateColor(kinematics.Flying))},
		{"track 1 landed on A1", 0, 2.3, 120, tint(StateColor(kinematics.Landed))},
		{"track 1 hovering by C3", 0, 9.6, 120, tint(StateColor(kinematics.Hovering))},
		{"track 1 after its end", 0, 11.3, 120, color.RGBA{255, 255, 255, 255}},
		{"track 2 before its start", 1, 2.3, 120, color.RGBA{255, 255, 255, 255}},
		{"track 2 tracking gap", 1, 6.75, 120, color.RGBA{255, 255, 255, 255}},
		{"track 2 hovering by C3", 1, 5.6, 120, tint(StateColor(kinematics.Hovering))},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			pn := panels[tc.panel]
			trX, trY := pn.p.Transforms(&pn.da)
			px, py := f.toPX(vg.Point{X: trX(tc.tS), Y: trY(tc.v)})
			if got := pixelAt(f, px, py); !near(got, tc.want, 6) {
				t.Errorf("pixel at %g s, %g mm/s = %v, want %v ± 6", tc.tS, tc.v, got, tc.want)
			}
		})
	}
}

func TestTimelinePlotMarks(t *testing.T) {
	sc := newScene()
	f, toPNG, err := renderTimeline(sc.fm, sc.landings, sc.inspections, sc.durationS, Options{})
	if err != nil {
		t.Fatal(err)
	}
	mid := (barLo + barHi) / 2
	cases := []struct {
		name string
		tS   float64
		row  int
		dy   float64
		want color.RGBA
	}{
		{"track 1 on A1", 2.0, 0, mid, TrackColor(1)},
		{"track 2 on A1", 8.0, 0, mid, TrackColor(2)},
		{"track 1 on B2", 6.0, 1, mid, TrackColor(1)},
		{"track 2 on B2 (censored)", 10.9, 1, mid, TrackColor(2)},
		{"track 2 inspects C3", 5.7, 2, inspLineY, TrackColor(2)},
		{"track 1 inspects C3", 9.7, 2, inspLineY, TrackColor(1)},
		{"A1 empty at 4.5 s", 4.5, 0, mid, color.RGBA{255, 255, 255, 255}},
		{"B2 empty at 4.5 s (shaded row)", 4.5, 1, mid, color.RGBA{0xf2, 0xf2, 0xf2, 255}},
		{"no inspection lane mark on A1", 5.7, 0, inspLineY, color.RGBA{255, 255, 255, 255}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			px, py := toPNG(tc.tS, tc.row, tc.dy)
			if got := pixelAt(f, px, py); !near(got, tc.want, 4) {
				t.Errorf("pixel at %g s, row %d = %v, want %v ± 4", tc.tS, tc.row, got, tc.want)
			}
		})
	}
	_, yA := toPNG(1, 0, 0)
	_, yC := toPNG(1, 2, 0)
	if !(yA < yC) {
		t.Errorf("first flower's row (png y %.0f) is not above the last's (%.0f)", yA, yC)
	}
}

func TestTimelineRows(t *testing.T) {
	fm := visits.FlowerMap{Flowers: []visits.Flower{{ID: "B"}, {ID: "A"}}}
	ls := []visits.Landing{{FlowerID: "Z"}, {FlowerID: "A"}, {FlowerID: "Y"}}
	ins := []visits.Inspection{{FlowerID: "X"}, {FlowerID: "Z"}}
	got := strings.Join(timelineRows(fm, ls, ins), ",")
	if want := "B,A,X,Y,Z"; got != want {
		t.Errorf("rows %s, want %s (map order, then unknown ids sorted)", got, want)
	}
}

func TestNiceTicks(t *testing.T) {
	cases := []struct {
		name     string
		min, max float64
		n        int
		want     string // labelled ticks
	}{
		{"12 s clip", 0, 12, 12, "0 1 2 3 4 5 6 7 8 9 10 11 12"},
		{"720 px", -0.5, 719.5, 5, "0 200 400 600"},
		{"speed to 185", 0, 185, 5, "0 50 100 150"},
		{"short clip", 0, 0.9, 12, "0.0 0.1 0.2 0.3 0.4 0.5 0.6 0.7 0.8 0.9"},
		{"negative start", -3, 3, 6, "-3 -2 -1 0 1 2 3"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var got []string
			for _, tk := range (niceTicks{N: tc.n}).Ticks(tc.min, tc.max) {
				if tk.Label != "" {
					got = append(got, tk.Label)
				}
			}
			if g := strings.Join(got, " "); g != tc.want {
				t.Errorf("labels %q, want %q", g, tc.want)
			}
		})
	}
}

func TestBands(t *testing.T) {
	s := func(frame int, st kinematics.State) kinematics.Sample {
		return kinematics.Sample{Point: kinematics.Point{Frame: frame, TimeS: float64(frame) * 0.1}, State: st}
	}
	F, H, L := kinematics.Flying, kinematics.Hovering, kinematics.Landed
	// Frames 0..3 then a gap, then 6..7. Each sample covers half a step
	// to each side; ends and gap edges mirror the inner half step.
	ss := []kinematics.Sample{s(0, F), s(1, F), s(2, L), s(3, L), s(6, H), s(7, F)}
	want := []stateBand{{-0.05, 0.15, F}, {0.15, 0.35, L}, {0.55, 0.65, H}, {0.65, 0.75, F}}
	got := bands(ss)
	if len(got) != len(want) {
		t.Fatalf("bands %+v, want %+v", got, want)
	}
	for i := range want {
		if math.Abs(got[i].t0-want[i].t0) > 1e-9 || math.Abs(got[i].t1-want[i].t1) > 1e-9 || got[i].state != want[i].state {
			t.Errorf("band %d = %+v, want %+v", i, got[i], want[i])
		}
	}
}

func TestRuns(t *testing.T) {
	p := func(frame int, obs bool) kinematics.Sample {
		return kinematics.Sample{Point: kinematics.Point{Frame: frame, XPX: float64(frame), YPX: 1, Observed: obs}}
	}
	nan := p(4, true)
	nan.XPX = math.NaN()
	// 0-1-2 observed, 2-3 coasted (3 not observed), NaN at 4, 5-6, gap, 9-10.
	ss := []kinematics.Sample{p(0, true), p(1, true), p(2, true), p(3, false), nan, p(5, true), p(6, true), p(9, true), p(10, true)}
	lines, obs := runs(ss)
	var got []string
	for i, ln := range lines {
		var fr []string
		for _, s := range ln {
			fr = append(fr, string(rune('0'+s.Frame%10)))
		}
		tag := "o"
		if !obs[i] {
			tag = "c"
		}
		got = append(got, tag+strings.Join(fr, ""))
	}
	if g, w := strings.Join(got, " "), "o012 c23 o56 o90"; g != w {
		t.Errorf("runs %q, want %q", g, w)
	}
}

func TestSelectTracks(t *testing.T) {
	mk := func(id, n int) kinematics.Result {
		return kinematics.Result{ID: id, Samples: make([]kinematics.Sample, n)}
	}
	tracks := []kinematics.Result{mk(5, 10), mk(1, 50), mk(9, 30), mk(3, 30), mk(7, 5)}
	got := selectTracks(tracks, 3)
	var ids []int
	for _, i := range got {
		ids = append(ids, tracks[i].ID)
	}
	// Longest three are 1 (50), then 3 and 9 (30 each); shown in ID order.
	if want := []int{1, 3, 9}; !slices.Equal(ids, want) {
		t.Errorf("selected %v, want %v", ids, want)
	}
	if n := len(selectTracks(tracks, 12)); n != 5 {
		t.Errorf("all tracks kept under the cap: got %d, want 5", n)
	}
}

func TestOptionsErrors(t *testing.T) {
	cases := []struct {
		name  string
		opt   Options
		field string
	}{
		{"narrow", Options{WidthPX: 50}, "WidthPX"},
		{"tall", Options{HeightPX: 20000}, "HeightPX"},
		{"dpi", Options{DPI: 5}, "DPI"},
		{"font", Options{FontSizePT: 100}, "FontSizePT"},
		{"font NaN", Options{FontSizePT: math.NaN()}, "FontSizePT"},
		{"max tracks", Options{MaxTracks: -1}, "MaxTracks"},
		{"fade", Options{BackgroundFade: 2}, "BackgroundFade"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			for name, err := range map[string]error{
				"PathPlot":     PathPlot(&bytes.Buffer{}, nil, visits.FlowerMap{}, nil, nil, tc.opt),
				"SpeedPlot":    SpeedPlot(&bytes.Buffer{}, nil, tc.opt),
				"TimelinePlot": TimelinePlot(&bytes.Buffer{}, visits.FlowerMap{}, nil, nil, 1, tc.opt),
			} {
				if err == nil || !strings.Contains(err.Error(), tc.field) {
					t.Errorf("%s: error %v, want one naming %s", name, err, tc.field)
				}
			}
		})
	}
}

func TestPathPlotFrameSizeMismatch(t *testing.T) {
	bg := image.NewGray(image.Rect(0, 0, 100, 100))
	fm := visits.FlowerMap{FrameWidthPX: 200, FrameHeightPX: 100}
	err := PathPlot(&bytes.Buffer{}, bg, fm, nil, nil, Options{})
	if err == nil || !strings.Contains(err.Error(), "100x100") || !strings.Contains(err.Error(), "200x100") {
		t.Errorf("error %v, want one naming both sizes", err)
	}
}

func TestTimelineBadDuration(t *testing.T) {
	if err := TimelinePlot(&bytes.Buffer{}, visits.FlowerMap{}, nil, nil, math.Inf(1), Options{}); err == nil {
		t.Error("infinite duration accepted")
	}
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestWriteError(t *testing.T) {
	sc := newScene()
	for name, err := range map[string]error{
		"PathPlot":     PathPlot(failWriter{}, nil, sc.fm, sc.tracks, sc.landings, Options{}),
		"SpeedPlot":    SpeedPlot(failWriter{}, sc.tracks, Options{}),
		"TimelinePlot": TimelinePlot(failWriter{}, sc.fm, sc.landings, sc.inspections, sc.durationS, Options{}),
	} {
		if err == nil || !strings.Contains(err.Error(), "disk full") {
			t.Errorf("%s: error %v, want the writer's error", name, err)
		}
	}
}

// Empty inputs (a clip where nothing was tracked) still give a picture of
// the default size.
func TestEmptyInputs(t *testing.T) {
	cases := []struct {
		name   string
		render func(*bytes.Buffer) error
		w, h   int
	}{
		{"path", func(b *bytes.Buffer) error { return PathPlot(b, nil, visits.FlowerMap{}, nil, nil, Options{}) }, 1600, 900},
		{"speed", func(b *bytes.Buffer) error { return SpeedPlot(b, nil, Options{}) }, 1600, 900},
		{"timeline", func(b *bytes.Buffer) error {
			return TimelinePlot(b, visits.FlowerMap{}, nil, nil, 0, Options{})
		}, 1600, 600},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := tc.render(&b); err != nil {
				t.Fatal(err)
			}
			img, err := png.Decode(&b)
			if err != nil {
				t.Fatal(err)
			}
			if got := img.Bounds().Size(); got != (image.Point{tc.w, tc.h}) {
				t.Errorf("size %v, want %dx%d", got, tc.w, tc.h)
			}
		})
	}
}

// Many tracks: the cap keeps the picture readable and the title says so.
func TestManyTracksCapped(t *testing.T) {
	var tracks []kinematics.Result
	for id := 1; id <= 20; id++ {
		r := kinematics.Result{ID: id}
		for k := 0; k < 10+id; k++ {
			r.Samples = append(r.Samples, kinematics.Sample{Point: kinematics.Point{
				Frame: k, TimeS: float64(k) / 30, XPX: float64(10 * id), YPX: float64(5 * k), Observed: true},
				SpeedMMPerS: float64(id)})
		}
		tracks = append(tracks, r)
	}
	_, panels, err := renderSpeed(tracks, Options{MaxTracks: 4})
	if err != nil {
		t.Fatal(err)
	}
	var ids []int
	for _, p := range panels {
		ids = append(ids, p.id)
	}
	if want := []int{17, 18, 19, 20}; !slices.Equal(ids, want) {
		t.Errorf("panels for tracks %v, want the 4 longest %v", ids, want)
	}
	if got := omittedNote(4, 20); !strings.Contains(got, "4 of 20") {
		t.Errorf("title note %q does not say 4 of 20", got)
	}
}

// The CLI draws pictures of several clips at once.
func TestConcurrentUse(t *testing.T) {
	sc := newScene()
	var want bytes.Buffer
	if err := TimelinePlot(&want, sc.fm, sc.landings, sc.inspections, sc.durationS, Options{}); err != nil {
		t.Fatal(err)
	}
	errs := make(chan error, 4)
	outs := make(chan []byte, 4)
	for range 4 {
		go func() {
			var b bytes.Buffer
			err := TimelinePlot(&b, sc.fm, sc.landings, sc.inspections, sc.durationS, Options{})
			errs <- err
			outs <- b.Bytes()
		}()
	}
	for range 4 {
		if err := <-errs; err != nil {
			t.Fatal(err)
		}
		if got := <-outs; !bytes.Equal(got, want.Bytes()) {
			t.Error("concurrent run gave different bytes")
		}
	}
}

// plots stays free of OpenCV (pure Go, gonum/plot only): no file of the
// package imports gocv.
func TestNoGocvImport(t *testing.T) {
	fset := token.NewFileSet()
	pkgs, err := parser.ParseDir(fset, ".", func(fi fs.FileInfo) bool {
		return !strings.HasSuffix(fi.Name(), "_test.go")
	}, parser.ImportsOnly)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, p := range pkgs {
		for name, f := range p.Files {
			for _, im := range f.Imports {
				n++
				if strings.Contains(im.Path.Value, "gocv") {
					t.Errorf("%s imports %s", name, im.Path.Value)
				}
			}
		}
	}
	if n == 0 {
		t.Error("no imports found: the check did not look at the package")
	}
}

// The *image.RGBA fast path of fadeGrey agrees with the generic path
// (color.GrayModel) on every pixel.
func TestFadeGreyFastPath(t *testing.T) {
	rgba := image.NewRGBA(image.Rect(3, 5, 67, 41)) // offset bounds on purpose
	for i := range rgba.Pix {
		rgba.Pix[i] = uint8(i*37 + i/5)
	}
	for i := 3; i < len(rgba.Pix); i += 4 {
		rgba.Pix[i] = 255 // opaque, as video frames are
	}
	nrgba := image.NewNRGBA(rgba.Bounds()) // takes the generic path
	copy(nrgba.Pix, rgba.Pix)
	for _, fade := range []float64{-1, 0, 0.5, 1} {
		a, b := fadeGrey(rgba, fade), fadeGrey(nrgba, fade)
		if !bytes.Equal(a.Pix, b.Pix) || a.Bounds() != b.Bounds() {
			t.Errorf("fade %g: fast and generic paths differ", fade)
		}
	}
}
