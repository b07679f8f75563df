package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"flitlog/kinematics"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Band tints of the flight states: StateColor at this opacity over white.
const bandAlpha = 0.32

// SpeedPlot writes a PNG of speed (mm/s) over time (s from the clip's
// first frame), one panel per track stacked over a common time axis and a
// common speed axis starting at 0, so panels compare directly. The
// background of each panel is shaded by flight state (flying, hovering,
// landed, in StateColor tints); each sample's state covers the time from
// halfway to the previous sample to halfway to the next. White means no
// sample (before, after or between track pieces). The line breaks at frame
// gaps and where the speed is NaN. Default size 1600 px wide, 260 px per
// panel, at least 900 px high.
func SpeedPlot(w io.Writer, tracks []kinematics.Result, opt Options) error {
	f, _, err := renderSpeed(tracks, opt)
	if err != nil {
		return err
	}
	return f.write(w)
}

// speedPanel is one rendered panel and its data canvas (for tests).
type speedPanel struct {
	id int
	p  *plot.Plot
	da draw.Canvas
}

func renderSpeed(tracks []kinematics.Result, opt Options) (*figure, []speedPanel, error) {
	maxTracks := opt.MaxTracks
	if maxTracks <= 0 {
		maxTracks = defaultMaxTracks
	}
	n := min(len(tracks), maxTracks)
	opt, err := opt.resolved(1600, int(math.Max(900, float64(160+260*n))))
	if err != nil {
		return nil, nil, err
	}
	f := newFigure(opt)
	shown := selectTracks(tracks, opt.MaxTracks)

	// Common axes.
	t0, t1 := 0.0, math.Inf(-1)
	vmax := 0.0
	for _, i := range shown {
		ss := tracks[i].Samples
		for j, s := range ss {
			if !math.IsNaN(s.TimeS) {
				t0 = math.Min(t0, s.TimeS)
				t1 = math.Max(t1, s.TimeS+halfStep(ss, j, +1))
			}
			if !math.IsNaN(s.SpeedMMPerS) && !math.IsInf(s.SpeedMMPerS, 0) {
				vmax = math.Max(vmax, s.SpeedMMPerS)
			}
		}
	}
	if math.IsInf(t1, -1) || t1 <= t0 {
		t1 = t0 + 1
	}
	if vmax <= 0 {
		vmax = 1
	}
	vmax *= 1.05

	title := opt.Title
	if title == "" {
		title = "Speed over time, shaded by flight state"
	}
	title += omittedNote(len(shown), len(tracks))

	l := f.newLegend()
	for _, s := range []kinematics.State{kinematics.Flying, kinematics.Hovering, kinematics.Landed} {
		l.Add(s.String(), boxThumb{fill: tint(StateColor(s)), outline: draw.LineStyle{Color: color.Gray{0x99}, Width: f.pt(0.8)}})
	}
	l.Add("no sample", boxThumb{fill: color.White, outline: draw.LineStyle{Color: color.Gray{0x99}, Width: f.pt(0.8)}})
	l.Add("speed", lineThumb{[]draw.LineStyle{speedLine(f)}})

	main, strip := splitRight(f.dc, f.legendWidth(l))
	main = draw.Crop(main, f.pt(6), 0, f.pt(4), -f.pt(6))
	// Title over the whole figure.
	ts := f.style(1.3)
	ts.XAlign, ts.YAlign = draw.XCenter, draw.YTop
	main.FillText(ts, vg.Point{X: (main.Min.X + main.Max.X) / 2, Y: main.Max.Y}, title)
	main.Max.Y -= ts.Height(title) + f.pt(10)

	var panels []speedPanel
	var plots [][]*plot.Plot
	for k, i := range shown {
		last := k == len(shown)-1
		xl := ""
		if last {
			xl = "time (s)"
		}
		p := f.newPlot("", xl, "speed (mm/s)")
		p.X.Min, p.X.Max = t0, t1
		p.Y.Min, p.Y.Max = 0, vmax
		p.X.Padding, p.Y.Padding = 0, 0
		if !last {
			p.X.Tick.Marker = niceTicks{N: 12, Blank: true}
		}
		p.Add(&bandPlotter{ss: tracks[i].Samples})
		grid := &gridPlotter{sty: draw.LineStyle{Color: color.RGBA{0, 0, 0, 40}, Width: f.pt(0.7)}}
		p.Add(grid)
		p.Add(&speedPlotter{ss: tracks[i].Samples, sty: speedLine(f)})
		p.Add(&panelLabel{f: f, id: tracks[i].ID, n: len(tracks[i].Samples)})
		plots = append(plots, []*plot.Plot{p})
		panels = append(panels, speedPanel{id: tracks[i].ID, p: p})
	}
	if len(plots) == 0 {
		p := f.newPlot("", "time (s)", "speed (mm/s)")
		p.X.Min, p.X.Max = t0, t1
		p.Y.Min, p.Y.Max = 0, vmax
		p.Add(&noteText{f: f, txt: "no tracks"})
		plots = append(plots, []*plot.Plot{p})
	}
	tiles := draw.Tiles{Rows: len(plots), Cols: 1, PadY: f.pt(10)}
	cs := plot.Align(plots, tiles, main)
	for k := range plots {
		plots[k][0].Draw(cs[k][0])
		if k < len(panels) {
			panels[k].da = plots[k][0].DataCanvas(cs[k][0])
		}
	}
	top := plots[0][0].DataCanvas(cs[0][0]).Max.Y
	f.drawLegend(l, strip, top)
	return f, panels, nil
}

// tint is c at bandAlpha over white, opaque.
func tint(c color.RGBA) color.RGBA {
	mix := func(v uint8) uint8 { return uint8(float64(v)*bandAlpha + 255*(1-bandAlpha) + 0.5) }
	return color.RGBA{mix(c.R), mix(c.G), mix(c.B), 0xff}
}

func speedLine(f *figure) draw.LineStyle {
	return draw.LineStyle{Color: color.Black, Width: f.pt(1.6)}
}

// halfStep is half the time to the neighbour of sample j in direction dir
// (+1 next, -1 previous); at a track end or frame gap it is half the step
// on the other side, or 0 for a lone sample.
func halfStep(ss []kinematics.Sample, j, dir int) float64 {
	k := j + dir
	if k >= 0 && k < len(ss) && abs(ss[k].Frame-ss[j].Frame) == 1 {
		return math.Abs(ss[k].TimeS-ss[j].TimeS) / 2
	}
	k = j - dir
	if k >= 0 && k < len(ss) && abs(ss[k].Frame-ss[j].Frame) == 1 {
		return math.Abs(ss[k].TimeS-ss[j].TimeS) / 2
	}
	return 0
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// stateBand is a run of equal state on the time axis.
type stateBand struct {
	t0, t1 float64
	state  kinematics.State
}

// bands merges the samples' state intervals into runs.
func bands(ss []kinematics.Sample) []stateBand {
	var out []stateBand
	for j, s := range ss {
		if math.IsNaN(s.TimeS) {
			continue
		}
		a, b := s.TimeS-halfStep(ss, j, -1), s.TimeS+halfStep(ss, j, +1)
		if n := len(out); n > 0 && out[n-1].state == s.State && math.Abs(out[n-1].t1-a) < 1e-9 {
			out[n-1].t1 = b
			continue
		}
		out = append(out, stateBand{a, b, s.State})
	}
	return out
}

// bandPlotter shades the data area by flight state.
type bandPlotter struct{ ss []kinematics.Sample }

func (b *bandPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	for _, bd := range bands(b.ss) {
		x0 := max(trX(bd.t0), c.Min.X)
		x1 := min(trX(bd.t1), c.Max.X)
		if x1 <= x0 {
			continue
		}
		c.FillPolygon(tint(StateColor(bd.state)), []vg.Point{
			{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: c.Max.Y}, {X: x0, Y: c.Max.Y},
		})
	}
}

// gridPlotter draws grid lines at the major ticks of both axes.
type gridPlotter struct{ sty draw.LineStyle }

func (g *gridPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		if t.IsMinor() || t.Value < p.X.Min || t.Value > p.X.Max {
			continue
		}
		x := trX(t.Value)
		c.StrokeLine2(g.sty, x, c.Min.Y, x, c.Max.Y)
	}
	for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
		if t.IsMinor() || t.Value < p.Y.Min || t.Value > p.Y.Max {
			continue
		}
		y := trY(t.Value)
		c.StrokeLine2(g.sty, c.Min.X, y, c.Max.X, y)
	}
}

// speedPlotter draws speed over time, broken at frame gaps and NaN.
type speedPlotter struct {
	ss  []kinematics.Sample
	sty draw.LineStyle
}

func (sp *speedPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var line []vg.Point
	flush := func() {
		if len(line) > 1 {
			c.StrokeLines(sp.sty, c.ClipLinesXY(line)...)
		}
		line = line[:0]
	}
	for j, s := range sp.ss {
		v := s.SpeedMMPerS
		if math.IsNaN(v) || math.IsInf(v, 0) || math.IsNaN(s.TimeS) {
			flush()
			continue
		}
		if j > 0 && s.Frame-sp.ss[j-1].Frame != 1 {
			flush()
		}
		line = append(line, vg.Point{X: trX(s.TimeS), Y: trY(v)})
	}
	flush()
}

// panelLabel writes "track N" with a swatch of the track colour in the
// top-left corner of a panel.
type panelLabel struct {
	f  *figure
	id int
	n  int
}

func (pl *panelLabel) Plot(c draw.Canvas, _ *plot.Plot) {
	sty := pl.f.style(1.05)
	sty.Font.Weight = xfont.WeightBold
	sty.YAlign = draw.YTop
	txt := fmt.Sprintf("track %d", pl.id)
	pad := pl.f.pt(4)
	sw := pl.f.pt(22)
	x := c.Min.X + pl.f.pt(8)
	y := c.Max.Y - pl.f.pt(6)
	h := sty.Height(txt)
	wd := sty.Width(txt)
	c.FillPolygon(color.NRGBA{255, 255, 255, 225}, []vg.Point{
		{X: x - pad, Y: y + pad}, {X: x + sw + pad + wd + pad, Y: y + pad},
		{X: x + sw + pad + wd + pad, Y: y - h - pad}, {X: x - pad, Y: y - h - pad},
	})
	c.StrokeLine2(draw.LineStyle{Color: TrackColor(pl.id), Width: pl.f.pt(5)}, x, y-h/2, x+sw, y-h/2)
	c.FillText(sty, vg.Point{X: x + sw + pad, Y: y}, txt)
}

// noteText writes a message in the middle of an empty plot.
type noteText struct {
	f   *figure
	txt string
}

func (nt *noteText) Plot(c draw.Canvas, _ *plot.Plot) {
	sty := nt.f.style(1.2)
	sty.XAlign, sty.YAlign = draw.XCenter, draw.YCenter
	c.FillText(sty, c.Center(), nt.txt)
}
