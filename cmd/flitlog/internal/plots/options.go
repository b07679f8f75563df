package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"
	"strconv"

	"flitlog/kinematics"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Options sets the look of one picture. The zero value gives the defaults.
type Options struct {
	// Title is printed above the plot. Empty: a default title per plot.
	Title string
	// WidthPX and HeightPX are the size of the PNG, px. Range 200..10000;
	// 0: the plot's default (PathPlot 1600x900, SpeedPlot 1600 wide and
	// 260 px per track panel, at least 900; TimelinePlot 1600 wide and
	// 70 px per flower row, at least 600).
	WidthPX, HeightPX int
	// DPI fixes how many pixels a typographic point covers, so it scales
	// all text and lines. Range 36..600; default 0 means 144 (a 12 pt
	// label is 24 px high).
	DPI int
	// FontSizePT is the size of tick labels and legend text, points; axis
	// labels are 1.1x and the title 1.3x this. Range 4..48; default 0
	// means 12.
	FontSizePT float64
	// MaxTracks caps the number of tracks drawn (the longest ones are
	// kept and the title says how many were left out). Range >= 1;
	// default 0 means 12.
	MaxTracks int
	// BackgroundFade lightens the background frame of PathPlot towards
	// white after turning it grey, so coloured tracks stand out:
	// v' = v (1 - fade) + 255 fade. Range 0..1 (1 is white); default 0
	// means 0.5; negative keeps the grey frame as it is.
	BackgroundFade float64
}

const (
	defaultDPI        = 144
	defaultFontSizePT = 12
	defaultMaxTracks  = 12
	defaultFade       = 0.5
)

// resolved returns o with zero fields replaced by defaults, or an error
// naming the first field out of range.
func (o Options) resolved(defW, defH int) (Options, error) {
	if o.WidthPX == 0 {
		o.WidthPX = defW
	}
	if o.HeightPX == 0 {
		o.HeightPX = defH
	}
	if o.DPI == 0 {
		o.DPI = defaultDPI
	}
	if o.FontSizePT == 0 {
		o.FontSizePT = defaultFontSizePT
	}
	if o.MaxTracks == 0 {
		o.MaxTracks = defaultMaxTracks
	}
	if o.BackgroundFade == 0 {
		o.BackgroundFade = defaultFade
	}
	switch {
	case o.WidthPX < 200 || o.WidthPX > 10000:
		return o, fmt.Errorf("plots: Options.WidthPX %d out of range 200..10000", o.WidthPX)
	case o.HeightPX < 200 || o.HeightPX > 10000:
		return o, fmt.Errorf("plots: Options.HeightPX %d out of range 200..10000", o.HeightPX)
	case o.DPI < 36 || o.DPI > 600:
		return o, fmt.Errorf("plots: Options.DPI %d out of range 36..600", o.DPI)
	case !(o.FontSizePT >= 4 && o.FontSizePT <= 48):
		return o, fmt.Errorf("plots: Options.FontSizePT %g out of range 4..48", o.FontSizePT)
	case o.MaxTracks < 1:
		return o, fmt.Errorf("plots: Options.MaxTracks %d must be >= 1", o.MaxTracks)
	case o.BackgroundFade > 1:
		return o, fmt.Errorf("plots: Options.BackgroundFade %g out of range 0..1", o.BackgroundFade)
	}
	return o, nil
}

// Okabe & Ito (2008) colour-blind-safe palette.
var (
	okabeBlack         = color.RGBA{0x00, 0x00, 0x00, 0xff}
	okabeOrange        = color.RGBA{0xE6, 0x9F, 0x00, 0xff}
	okabeSkyBlue       = color.RGBA{0x56, 0xB4, 0xE9, 0xff}
	okabeBluishGreen   = color.RGBA{0x00, 0x9E, 0x73, 0xff}
	okabeYellow        = color.RGBA{0xF0, 0xE4, 0x42, 0xff}
	okabeBlue          = color.RGBA{0x00, 0x72, 0xB2, 0xff}
	okabeVermillion    = color.RGBA{0xD5, 0x5E, 0x00, 0xff}
	okabeReddishPurple = color.RGBA{0xCC, 0x79, 0xA7, 0xff}
)

// trackPalette is indexed by track ID modulo its length. Yellow is left
// out: it is too faint on white and on a lightened frame. Index 1 and 2
// (the first two IDs when IDs count from 1) are the most distinct pair.
var trackPalette = [...]color.RGBA{
	okabeBlack, okabeOrange, okabeSkyBlue, okabeBluishGreen,
	okabeVermillion, okabeBlue, okabeReddishPurple,
}

// TrackColor returns the colour of track id in every picture and in the
// overlay video: the Okabe-Ito palette without yellow, by id modulo 7, so
// a track has the same colour whichever subset of tracks is drawn.
func TrackColor(id int) color.RGBA {
	n := len(trackPalette)
	return trackPalette[((id%n)+n)%n]
}

// StateColor returns the colour that shows flight state s: flying sky
// blue, hovering orange, landed bluish green (Okabe-Ito). Unknown states
// are mid grey.
func StateColor(s kinematics.State) color.RGBA {
	switch s {
	case kinematics.Flying:
		return okabeSkyBlue
	case kinematics.Hovering:
		return okabeOrange
	case kinematics.Landed:
		return okabeBluishGreen
	}
	return color.RGBA{0x99, 0x99, 0x99, 0xff}
}

// HighlightColor is the colour of a flower with a bee on it in the overlay
// video (Okabe-Ito yellow).
func HighlightColor() color.RGBA { return okabeYellow }

// figure is one PNG canvas with the text styles derived from Options.
type figure struct {
	opt Options
	img *vgimg.Canvas
	dc  draw.Canvas
}

func newFigure(opt Options) *figure {
	w := vg.Length(opt.WidthPX) * vg.Inch / vg.Length(opt.DPI)
	h := vg.Length(opt.HeightPX) * vg.Inch / vg.Length(opt.DPI)
	c := vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(opt.DPI))
	return &figure{opt: opt, img: c, dc: draw.New(c)}
}

// face returns the plot font (Liberation Sans) scaled by k times the base
// size.
func (f *figure) face(k float64) font.Font {
	return font.Font{Typeface: "Liberation", Variant: "Sans", Size: vg.Length(f.opt.FontSizePT * k)}
}

func (f *figure) style(k float64) text.Style {
	return text.Style{
		Color:   color.Black,
		Font:    f.face(k),
		XAlign:  draw.XLeft,
		YAlign:  draw.YBottom,
		Handler: plot.DefaultTextHandler,
	}
}

// pt converts n base font sizes to a length: lines and glyphs scale with
// the text.
func (f *figure) pt(n float64) vg.Length { return vg.Length(n * f.opt.FontSizePT / defaultFontSizePT) }

// newPlot returns a plot with flitlog's fonts and sizes.
func (f *figure) newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = f.face(1.3)
	p.Title.Padding = f.pt(8)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = f.face(1.1)
		a.Tick.Label.Font = f.face(1)
		a.Label.Padding = f.pt(4)
		a.Tick.Length = f.pt(6)
		a.Width = f.pt(1)
		a.Tick.Width = f.pt(1)
	}
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.X.Tick.Marker = niceTicks{N: 12}
	p.Y.Tick.Marker = niceTicks{N: 5}
	return p
}

// newLegend returns an empty legend in the figure's text style, laid out
// top-left in whatever canvas it is drawn into.
func (f *figure) newLegend() *plot.Legend {
	l := plot.NewLegend()
	l.TextStyle.Font = f.face(1)
	l.Top, l.Left = true, true
	l.ThumbnailWidth = f.pt(26)
	l.Padding = f.pt(5)
	return &l
}

// legendWidth is the width the legend needs, including a margin on both
// sides.
func (f *figure) legendWidth(l *plot.Legend) vg.Length {
	r := l.Rectangle(f.dc)
	return r.Max.X - r.Min.X + 2*f.pt(14)
}

// splitRight cuts a strip of width w off the right of c.
func splitRight(c draw.Canvas, w vg.Length) (main, strip draw.Canvas) {
	main = draw.Crop(c, 0, -w, 0, 0)
	strip = draw.Crop(c, c.Max.X-c.Min.X-w, 0, 0, 0)
	return main, strip
}

// drawLegend draws l into strip, starting level with the top of the data
// area top.
func (f *figure) drawLegend(l *plot.Legend, strip draw.Canvas, top vg.Length) {
	strip.Max.Y = top
	strip = draw.Crop(strip, f.pt(14), -f.pt(6), 0, 0)
	l.Draw(strip)
}

// fitAspect shrinks c (centred) so that the data area of p has the same
// scale on both axes: data width over height equals aspect.
func fitAspect(p *plot.Plot, c draw.Canvas, aspect float64) draw.Canvas {
	for range 3 {
		da := p.DataCanvas(c)
		w := float64(da.Max.X - da.Min.X)
		h := float64(da.Max.Y - da.Min.Y)
		if w <= 0 || h <= 0 {
			return c
		}
		if w/h > aspect {
			d := vg.Length(w-h*aspect) / 2
			c.Min.X += d
			c.Max.X -= d
		} else {
			d := vg.Length(h-w/aspect) / 2
			c.Min.Y += d
			c.Max.Y -= d
		}
	}
	return c
}

// write encodes the figure as PNG.
func (f *figure) write(w io.Writer) error {
	_, err := vgimg.PngCanvas{Canvas: f.img}.WriteTo(w)
	if err != nil {
		return fmt.Errorf("plots: writing PNG: %w", err)
	}
	return nil
}

// toPX maps a point of the canvas (points, origin bottom-left) to a pixel
// of the PNG (origin top-left).
func (f *figure) toPX(p vg.Point) (x, y float64) {
	k := float64(f.opt.DPI) / 72
	return float64(p.X) * k, float64(f.opt.HeightPX) - float64(p.Y)*k
}

// thumbnails for legends.

// lineThumb is a legend entry drawn as a line.
type lineThumb struct{ sty []draw.LineStyle }

func (t lineThumb) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	for _, s := range t.sty {
		c.StrokeLine2(s, c.Min.X, y, c.Max.X, y)
	}
}

// glyphThumb is a legend entry drawn as a glyph.
type glyphThumb struct{ sty []draw.GlyphStyle }

func (t glyphThumb) Thumbnail(c *draw.Canvas) {
	for _, s := range t.sty {
		c.DrawGlyph(s, c.Center())
	}
}

// boxThumb is a legend entry drawn as a filled box with an outline.
type boxThumb struct {
	fill    color.Color
	outline draw.LineStyle
	// heightFrac is the box height as a fraction of the entry height
	// (0 means 1).
	heightFrac float64
}

func (t boxThumb) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	if t.heightFrac > 0 {
		cy := (r.Min.Y + r.Max.Y) / 2
		h := (r.Max.Y - r.Min.Y) * vg.Length(t.heightFrac) / 2
		r.Min.Y, r.Max.Y = cy-h, cy+h
	}
	pts := []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
	if t.fill != nil {
		c.FillPolygon(t.fill, pts)
	}
	if t.outline.Width > 0 {
		c.StrokeLines(t.outline, append(pts, pts[0]))
	}
}

// labelBox draws txt with its reference point at pt (alignment from sty)
// on a white, slightly transparent box so that it reads on any
// background.
func labelBox(c draw.Canvas, sty text.Style, pt vg.Point, txt string, pad vg.Length) {
	r := sty.Rectangle(txt)
	r.Min = r.Min.Add(pt).Sub(vg.Point{X: pad, Y: pad})
	r.Max = r.Max.Add(pt).Add(vg.Point{X: pad, Y: pad})
	c.FillPolygon(color.NRGBA{255, 255, 255, 220}, []vg.Point{
		r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y},
	})
	c.FillText(sty, pt, txt)
}

// selectTracks returns the indices of the tracks to draw: all of them in
// input order when there are at most maxTracks, else the maxTracks with the
// most samples (ties: lower ID first), in ID order.
func selectTracks(tracks []kinematics.Result, maxTracks int) []int {
	idx := make([]int, len(tracks))
	for i := range idx {
		idx[i] = i
	}
	if len(tracks) <= maxTracks {
		return idx
	}
	sortStable(idx, func(a, b int) bool {
		na, nb := len(tracks[a].Samples), len(tracks[b].Samples)
		if na != nb {
			return na > nb
		}
		return tracks[a].ID < tracks[b].ID
	})
	idx = idx[:maxTracks]
	sortStable(idx, func(a, b int) bool {
		if tracks[a].ID != tracks[b].ID {
			return tracks[a].ID < tracks[b].ID
		}
		return a < b
	})
	return idx
}

// omittedNote is appended to a title when tracks were left out.
func omittedNote(shown, total int) string {
	if shown == total {
		return ""
	}
	return fmt.Sprintf(" (longest %d of %d tracks shown)", shown, total)
}

// sortStable sorts idx stably by less applied to the elements.
func sortStable(idx []int, less func(a, b int) bool) {
	sort.SliceStable(idx, func(i, j int) bool { return less(idx[i], idx[j]) })
}

// ringShape is a circle outline of a given line width (gonum's RingGlyph
// is fixed at 0.5 pt, too thin to read over a photograph).
type ringShape struct{ width vg.Length }

func (r ringShape) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: r.width})
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.Stroke(p)
}

// crossShape is an X of a given line width.
type crossShape struct{ width vg.Length }

func (x crossShape) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	ls := draw.LineStyle{Color: sty.Color, Width: x.width}
	r := sty.Radius * 0.7071
	c.StrokeLine2(ls, pt.X-r, pt.Y-r, pt.X+r, pt.Y+r)
	c.StrokeLine2(ls, pt.X-r, pt.Y+r, pt.X+r, pt.Y-r)
}

// niceTicks places about N labelled ticks at multiples of 1, 2 or 5 times
// a power of ten, with unlabelled minor ticks between them (gonum's
// DefaultTicks aims at 3 labels, too few for a 1600 px wide time axis).
type niceTicks struct {
	N     int  // wanted number of major ticks, >= 2
	Blank bool // major ticks without labels (panels sharing an axis)
}

// majorStep returns the step for about n ticks over [min, max].
func majorStep(min, max float64, n int) float64 {
	raw := (max - min) / float64(n)
	if !(raw > 0) || math.IsInf(raw, 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw {
			return m * p
		}
	}
	return 10 * p
}

func (t niceTicks) Ticks(min, max float64) []plot.Tick {
	step := majorStep(min, max, t.N)
	p10 := math.Pow(10, math.Floor(math.Log10(step)))
	minor := step / 5
	if m := step / p10; math.Abs(m-2) < 1e-9 {
		minor = step / 4
	}
	prec := 0
	if e := -math.Floor(math.Log10(step) + 1e-9); e > 0 {
		prec = int(e)
	}
	var ts []plot.Tick
	eps := step * 1e-9
	for k := math.Ceil((min - eps) / minor); ; k++ {
		v := k * minor
		if v > max+eps {
			break
		}
		if math.Abs(v) < eps {
			v = 0 // no "-0"
		}
		tk := plot.Tick{Value: v}
		if r := math.Mod(math.Abs(v)+eps, step); r < 2*eps {
			tk.Label = strconv.FormatFloat(v, 'f', prec, 64)
			if t.Blank {
				tk.Label = " "
			}
		}
		ts = append(ts, tk)
	}
	return ts
}
