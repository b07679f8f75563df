package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"

	"flitlog/visits"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Row layout of the timeline, in row units (a row is 1 high, centred on
// its flower's y): landing bars in the upper lane, inspections in the
// lower lane.
const (
	barLo, barHi       = -0.08, 0.36
	inspLo, inspHi     = -0.38, -0.16
	inspLineY          = -0.27
	censorArrowLenRows = 0.13
)

// TimelinePlot writes a PNG of the flower visits of one clip: one row per
// flower (flower map order from the top; flowers named by a landing or
// inspection but missing from the map follow, sorted by id), time in s on
// the x axis from 0 to durationS. Each landing is a bar from StartS to
// EndS in its track's TrackColor, labelled with the track id when the bar
// is wide enough; an end cut by the clip or track edge (CensoredStart,
// CensoredEnd) carries an arrow pointing out of the bar. Each inspection
// is a tick at its start with a thin line to its end, in the lower half of
// the row. durationS <= 0 means the latest end time of the data. Default
// size 1600 px wide, 70 px per row, at least 600 px high.
func TimelinePlot(w io.Writer, fm visits.FlowerMap, landings []visits.Landing, inspections []visits.Inspection, durationS float64, opt Options) error {
	f, _, err := renderTimeline(fm, landings, inspections, durationS, opt)
	if err != nil {
		return err
	}
	return f.write(w)
}

// timelineRows lists the row ids: map order, then unknown ids sorted.
func timelineRows(fm visits.FlowerMap, landings []visits.Landing, inspections []visits.Inspection) []string {
	var rows []string
	seen := map[string]bool{}
	for _, fl := range fm.Flowers {
		if !seen[fl.ID] {
			seen[fl.ID] = true
			rows = append(rows, fl.ID)
		}
	}
	var extra []string
	add := func(id string) {
		if !seen[id] {
			seen[id] = true
			extra = append(extra, id)
		}
	}
	for _, l := range landings {
		add(l.FlowerID)
	}
	for _, in := range inspections {
		add(in.FlowerID)
	}
	sort.Strings(extra)
	return append(rows, extra...)
}

// renderTimeline draws the timeline and returns the figure and the
// mapping from (time s, row index) to pixels of the PNG.
func renderTimeline(fm visits.FlowerMap, landings []visits.Landing, inspections []visits.Inspection, durationS float64, opt Options) (*figure, func(t float64, row int, dy float64) (float64, float64), error) {
	rows := timelineRows(fm, landings, inspections)
	n := len(rows)
	opt, err := opt.resolved(1600, int(math.Max(600, float64(220+70*n))))
	if err != nil {
		return nil, nil, err
	}
	if math.IsNaN(durationS) || math.IsInf(durationS, 0) {
		return nil, nil, fmt.Errorf("plots: timeline duration %g s is not finite", durationS)
	}
	if durationS <= 0 {
		for _, l := range landings {
			durationS = math.Max(durationS, l.EndS)
		}
		for _, in := range inspections {
			durationS = math.Max(durationS, in.EndS)
		}
		if durationS <= 0 {
			durationS = 1
		}
	}
	f := newFigure(opt)
	rowOf := make(map[string]int, n)
	for k, id := range rows {
		rowOf[id] = k
	}
	yOf := func(row int) float64 { return float64(n - 1 - row) }

	title := opt.Title
	if title == "" {
		title = fmt.Sprintf("Flower visits: %d landings, %d inspections", len(landings), len(inspections))
	}
	p := f.newPlot(title, "time (s)", "flower")
	p.X.Min, p.X.Max = 0, durationS
	p.X.Padding = 0
	p.Y.Min, p.Y.Max = -0.5, float64(n)-0.5
	if n == 0 {
		p.Y.Min, p.Y.Max = -0.5, 0.5
	}
	p.Y.Padding = 0
	ticks := make(plot.ConstantTicks, n)
	for k, id := range rows {
		ticks[k] = plot.Tick{Value: yOf(k), Label: id}
	}
	p.Y.Tick.Marker = ticks
	p.Y.Tick.Label.Font.Weight = xfont.WeightBold

	tl := &timelinePlotter{f: f, n: n, rowOf: rowOf, yOf: yOf, landings: landings, inspections: inspections}
	p.Add(tl)
	if n == 0 {
		p.Add(&noteText{f: f, txt: "no flowers and no visits"})
	}

	// Legend: tracks present, then the marks.
	l := f.newLegend()
	for _, id := range timelineTracks(landings, inspections) {
		l.Add(fmt.Sprintf("track %d", id), boxThumb{fill: TrackColor(id), outline: tl.barOutline(), heightFrac: 0.8})
	}
	if len(landings) > 0 {
		l.Add("landing (bar)", boxThumb{fill: color.Gray{0xbb}, outline: tl.barOutline(), heightFrac: 0.8})
	}
	if len(inspections) > 0 {
		l.Add("inspection", inspThumb{tl})
	}
	if anyCensored(landings) {
		l.Add("cut by clip edge", censorThumb{tl})
	}

	main, strip := splitRight(f.dc, f.legendWidth(l))
	main = draw.Crop(main, f.pt(6), 0, f.pt(4), -f.pt(6))
	p.Draw(main)
	da := p.DataCanvas(main)
	f.drawLegend(l, strip, da.Max.Y)

	trX, trY := p.Transforms(&da)
	toPNG := func(t float64, row int, dy float64) (float64, float64) {
		return f.toPX(vg.Point{X: trX(t), Y: trY(yOf(row) + dy)})
	}
	return f, toPNG, nil
}

// timelineTracks returns the sorted distinct track ids.
func timelineTracks(landings []visits.Landing, inspections []visits.Inspection) []int {
	seen := map[int]bool{}
	var ids []int
	for _, l := range landings {
		if !seen[l.TrackID] {
			seen[l.TrackID] = true
			ids = append(ids, l.TrackID)
		}
	}
	for _, in := range inspections {
		if !seen[in.TrackID] {
			seen[in.TrackID] = true
			ids = append(ids, in.TrackID)
		}
	}
	sort.Ints(ids)
	return ids
}

func anyCensored(ls []visits.Landing) bool {
	for _, l := range ls {
		if l.CensoredStart || l.CensoredEnd {
			return true
		}
	}
	return false
}

// timelinePlotter draws row separators, grid, bars and inspections.
type timelinePlotter struct {
	f           *figure
	n           int
	rowOf       map[string]int
	yOf         func(int) float64
	landings    []visits.Landing
	inspections []visits.Inspection
}

func (tl *timelinePlotter) barOutline() draw.LineStyle {
	return draw.LineStyle{Color: color.Black, Width: tl.f.pt(1)}
}

func (tl *timelinePlotter) inspStyle(col color.Color) draw.LineStyle {
	return draw.LineStyle{Color: col, Width: tl.f.pt(2.2)}
}

func (tl *timelinePlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	rowH := trY(1) - trY(0)

	// Alternate row shading and vertical grid lines.
	for k := 0; k < tl.n; k++ {
		if k%2 == 1 {
			y := tl.yOf(k)
			c.FillPolygon(color.Gray{0xf2}, []vg.Point{
				{X: c.Min.X, Y: trY(y - 0.5)}, {X: c.Max.X, Y: trY(y - 0.5)},
				{X: c.Max.X, Y: trY(y + 0.5)}, {X: c.Min.X, Y: trY(y + 0.5)},
			})
		}
	}
	grid := draw.LineStyle{Color: color.RGBA{0, 0, 0, 45}, Width: tl.f.pt(0.7)}
	for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		if t.IsMinor() || t.Value < p.X.Min || t.Value > p.X.Max {
			continue
		}
		x := trX(t.Value)
		c.StrokeLine2(grid, x, c.Min.Y, x, c.Max.Y)
	}

	// Inspections: tick at the start, thin line to the end.
	for _, in := range tl.inspections {
		row, ok := tl.rowOf[in.FlowerID]
		if !ok {
			continue
		}
		y := tl.yOf(row)
		col := TrackColor(in.TrackID)
		sty := tl.inspStyle(col)
		x0, x1 := trX(in.StartS), trX(math.Max(in.EndS, in.StartS))
		c.StrokeLines(sty, c.ClipLinesXY([]vg.Point{{X: x0, Y: trY(y + inspLineY)}, {X: x1, Y: trY(y + inspLineY)}})...)
		c.StrokeLines(sty, c.ClipLinesXY([]vg.Point{{X: x0, Y: trY(y + inspLo)}, {X: x0, Y: trY(y + inspHi)}})...)
	}

	// Landing bars.
	lab := tl.f.style(0.9)
	lab.Font.Weight = xfont.WeightBold
	lab.XAlign, lab.YAlign = draw.XCenter, draw.YCenter
	for _, l := range tl.landings {
		row, ok := tl.rowOf[l.FlowerID]
		if !ok {
			continue
		}
		y := tl.yOf(row)
		col := TrackColor(l.TrackID)
		x0, x1 := trX(l.StartS), trX(math.Max(l.EndS, l.StartS))
		if x1-x0 < tl.f.pt(1.5) { // keep very short landings visible
			m := (x0 + x1) / 2
			x0, x1 = m-tl.f.pt(0.75), m+tl.f.pt(0.75)
		}
		y0, y1 := trY(y+barLo), trY(y+barHi)
		box := []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}
		c.FillPolygon(col, c.ClipPolygonXY(box))
		c.StrokeLines(tl.barOutline(), c.ClipLinesXY(append(box, box[0]))...)
		if l.CensoredStart {
			tl.censorArrow(c, x0, (y0+y1)/2, -1, rowH)
		}
		if l.CensoredEnd {
			tl.censorArrow(c, x1, (y0+y1)/2, +1, rowH)
		}
		txt := fmt.Sprint(l.TrackID)
		room := x1 - x0 - tl.f.pt(6)
		if l.CensoredStart {
			room -= 2 * rowH * censorArrowLenRows
		}
		if l.CensoredEnd {
			room -= 2 * rowH * censorArrowLenRows
		}
		if room > lab.Width(txt) && c.ContainsX((x0+x1)/2) {
			lab.Color = textOn(col)
			c.FillText(lab, vg.Point{X: (x0 + x1) / 2, Y: (y0 + y1) / 2}, txt)
		}
	}
}

// censorArrow draws a filled triangle inside a bar whose edge at x is cut
// by the clip or track edge, its tip on the edge pointing out of the bar
// in direction dir (-1 left, +1 right); rowH is the height of one row.
// Inside the bar, so that it is not clipped at the ends of the time axis.
func (tl *timelinePlotter) censorArrow(c draw.Canvas, x, y vg.Length, dir float64, rowH vg.Length) {
	h := rowH * (barHi - barLo) / 2 * 0.55
	ln := rowH * censorArrowLenRows
	base := x - vg.Length(dir)*ln
	pts := []vg.Point{{X: base, Y: y - h}, {X: x, Y: y}, {X: base, Y: y + h}}
	c.FillPolygon(color.Black, c.ClipPolygonXY(pts))
	c.StrokeLines(draw.LineStyle{Color: color.White, Width: tl.f.pt(1)}, c.ClipLinesXY(append(pts, pts[0]))...)
}

// textOn returns black or white, whichever reads better on bg (relative
// luminance threshold, common practice).
func textOn(bg color.RGBA) color.Color {
	lum := 0.2126*float64(bg.R) + 0.7152*float64(bg.G) + 0.0722*float64(bg.B)
	if lum > 110 {
		return color.Black
	}
	return color.White
}

type inspThumb struct{ tl *timelinePlotter }

func (t inspThumb) Thumbnail(c *draw.Canvas) {
	sty := t.tl.inspStyle(color.Gray{0x55})
	h := c.Max.Y - c.Min.Y
	x := c.Min.X + t.tl.f.pt(3)
	y := c.Min.Y + h/2
	c.StrokeLine2(sty, x, y, c.Max.X, y)
	c.StrokeLine2(sty, x, y-h*0.4, x, y+h*0.4)
}

type censorThumb struct{ tl *timelinePlotter }

func (t censorThumb) Thumbnail(c *draw.Canvas) {
	h := c.Max.Y - c.Min.Y
	y := c.Min.Y + h/2
	box := []vg.Point{{X: c.Min.X, Y: y - h*0.4}, {X: c.Max.X, Y: y - h*0.4}, {X: c.Max.X, Y: y + h*0.4}, {X: c.Min.X, Y: y + h*0.4}}
	c.FillPolygon(color.Gray{0xbb}, box)
	c.StrokeLines(t.tl.barOutline(), append(box, box[0]))
	pts := []vg.Point{{X: c.Max.X - h*0.5, Y: y - h*0.3}, {X: c.Max.X, Y: y}, {X: c.Max.X - h*0.5, Y: y + h*0.3}}
	c.FillPolygon(color.Black, pts)
}
