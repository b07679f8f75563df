package plots

import (
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"sort"

	"flitlog/kinematics"
	"flitlog/visits"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// PathPlot writes a PNG of the flight paths in image coordinates: the
// background frame bg (greyed and lightened; may be nil), the flowers of
// fm as circles (or polygons) with their ids, every track as a line in its
// TrackColor (dashed where the tracker had no detection, broken at frame
// gaps) with its start and end marked, and every landing as a square at
// the bee's position in the landing's first frame. Axes are image pixels
// with y growing downwards, as in the video; both axes have the same
// scale, so the frame keeps its aspect ratio.
//
// The frame size is taken from bg, else from fm.FrameWidthPX/HeightPX,
// else from the extent of the data. Pixel (i, j) covers [i-0.5, i+0.5] x
// [j-0.5, j+0.5] (pixel centres at integer coordinates, as OpenCV reports
// centroids). A bg whose size differs from a size recorded in fm is an
// error. Default size 1600x900 px.
func PathPlot(w io.Writer, bg image.Image, fm visits.FlowerMap, tracks []kinematics.Result, landings []visits.Landing, opt Options) error {
	f, _, err := renderPath(bg, fm, tracks, landings, opt)
	if err != nil {
		return err
	}
	return f.write(w)
}

// renderPath draws the path plot and returns the figure and the mapping
// from image coordinates (px of the video frame) to pixels of the PNG.
func renderPath(bg image.Image, fm visits.FlowerMap, tracks []kinematics.Result, landings []visits.Landing, opt Options) (*figure, func(x, y float64) (float64, float64), error) {
	opt, err := opt.resolved(1600, 900)
	if err != nil {
		return nil, nil, err
	}
	fw, fh, err := frameSize(bg, fm, tracks)
	if err != nil {
		return nil, nil, err
	}
	f := newFigure(opt)
	shown := selectTracks(tracks, opt.MaxTracks)

	title := opt.Title
	if title == "" {
		title = fmt.Sprintf("Flight paths: %d tracks, %d landings", len(tracks), len(landings))
	}
	title += omittedNote(len(shown), len(tracks))
	p := f.newPlot(title, "x (px)", "y (px, downwards)")
	p.X.Min, p.X.Max = -0.5, float64(fw)-0.5
	p.Y.Min, p.Y.Max = -0.5, float64(fh)-0.5
	p.Y.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	p.X.Padding, p.Y.Padding = 0, 0
	p.BackgroundColor = color.White

	if bg != nil {
		p.Add(&framePlotter{img: fadeGrey(bg, opt.BackgroundFade), w: float64(fw), h: float64(fh)})
	}
	p.Add(&flowerPlotter{f: f, fm: fm})
	tp := &trackPlotter{f: f, tracks: tracks, shown: shown, landings: landings, fm: fm}
	p.Add(tp)
	// Flower ids over the tracks, so that no line crosses them.
	p.Add(&flowerPlotter{f: f, fm: fm, labels: true})
	if len(tracks) == 0 && len(fm.Flowers) == 0 {
		p.Add(&noteText{f: f, txt: "no tracks and no flowers"})
	}

	// Legend, in a strip right of the plot.
	l := f.newLegend()
	for _, i := range shown {
		l.Add(fmt.Sprintf("track %d", tracks[i].ID), lineThumb{tp.lineStyles(TrackColor(tracks[i].ID), true)})
	}
	if tp.anyUnobserved() {
		l.Add("no detection", lineThumb{tp.lineStyles(color.RGBA{0x55, 0x55, 0x55, 0xff}, false)})
	}
	if len(shown) > 0 {
		l.Add("track start", glyphThumb{tp.startGlyphs(okabeBlack)})
		l.Add("track end", glyphThumb{tp.endGlyphs(okabeBlack)})
	}
	if len(landings) > 0 {
		l.Add("landing", glyphThumb{tp.landingGlyphs(color.RGBA{0x99, 0x99, 0x99, 0xff})})
	}
	if len(fm.Flowers) > 0 {
		l.Add("flower", glyphThumb{[]draw.GlyphStyle{
			{Shape: ringShape{f.pt(4)}, Radius: f.pt(7), Color: color.White},
			{Shape: ringShape{f.pt(1.6)}, Radius: f.pt(7), Color: color.RGBA{0x22, 0x22, 0x22, 0xff}},
		}})
	}

	main, strip := splitRight(f.dc, f.legendWidth(l))
	main = draw.Crop(main, f.pt(6), 0, f.pt(4), -f.pt(6))
	main = fitAspect(p, main, float64(fw)/float64(fh))
	p.Draw(main)
	da := p.DataCanvas(main)
	f.drawLegend(l, strip, da.Max.Y)

	trX, trY := p.Transforms(&da)
	toPNG := func(x, y float64) (float64, float64) {
		return f.toPX(vg.Point{X: trX(x), Y: trY(y)})
	}
	return f, toPNG, nil
}

// frameSize returns the frame size in px from bg, fm or the data.
func frameSize(bg image.Image, fm visits.FlowerMap, tracks []kinematics.Result) (w, h int, err error) {
	if bg != nil {
		b := bg.Bounds()
		w, h = b.Dx(), b.Dy()
		if w < 1 || h < 1 {
			return 0, 0, fmt.Errorf("plots: background frame is empty (%dx%d px)", w, h)
		}
		if fm.FrameWidthPX != 0 && fm.FrameHeightPX != 0 && (fm.FrameWidthPX != w || fm.FrameHeightPX != h) {
			return 0, 0, fmt.Errorf("plots: background frame is %dx%d px but the flower map was made for %dx%d px",
				w, h, fm.FrameWidthPX, fm.FrameHeightPX)
		}
		return w, h, nil
	}
	if fm.FrameWidthPX > 0 && fm.FrameHeightPX > 0 {
		return fm.FrameWidthPX, fm.FrameHeightPX, nil
	}
	var maxX, maxY float64 = 1, 1
	for _, fl := range fm.Flowers {
		maxX = math.Max(maxX, fl.XPX+fl.RPX)
		maxY = math.Max(maxY, fl.YPX+fl.RPX)
	}
	for _, t := range tracks {
		for _, s := range t.Samples {
			if !math.IsNaN(s.XPX) && !math.IsNaN(s.YPX) {
				maxX = math.Max(maxX, s.XPX)
				maxY = math.Max(maxY, s.YPX)
			}
		}
	}
	return int(math.Ceil(maxX + 0.5)), int(math.Ceil(maxY + 0.5)), nil
}

// fadeGrey returns img in grey, lightened towards white by fade in [0, 1]
// (negative: not lightened): v' = v (1 - fade) + 255 fade, with v the
// luma of image/color.GrayModel.
func fadeGrey(img image.Image, fade float64) *image.Gray {
	if fade < 0 {
		fade = 0
	}
	var lut [256]uint8
	for v := range lut {
		lut[v] = uint8(float64(v)*(1-fade) + 255*fade + 0.5)
	}
	b := img.Bounds()
	out := image.NewGray(image.Rect(0, 0, b.Dx(), b.Dy()))
	switch src := img.(type) {
	case *image.RGBA: // fast path, same luma formula as color.GrayModel
		for y := 0; y < b.Dy(); y++ {
			row := src.Pix[src.PixOffset(b.Min.X, b.Min.Y+y):]
			for x := 0; x < b.Dx(); x++ {
				r, g, bl := uint32(row[4*x])*0x101, uint32(row[4*x+1])*0x101, uint32(row[4*x+2])*0x101
				out.Pix[y*out.Stride+x] = lut[(19595*r+38470*g+7471*bl+1<<15)>>24]
			}
		}
	default:
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				v := color.GrayModel.Convert(img.At(x, y)).(color.Gray).Y
				out.Pix[(y-b.Min.Y)*out.Stride+(x-b.Min.X)] = lut[v]
			}
		}
	}
	return out
}

// framePlotter draws the background frame so that pixel (i, j) covers
// [i-0.5, i+0.5] x [j-0.5, j+0.5] of the data space, row 0 at the top.
type framePlotter struct {
	img  image.Image
	w, h float64
}

func (b *framePlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	x0, x1 := trX(-0.5), trX(b.w-0.5)
	yTop, yBottom := trY(-0.5), trY(b.h-0.5)
	// vg's y axis points up, so with the inverted data axis yTop > yBottom;
	// DrawImage puts the image's first row at Max.Y.
	c.DrawImage(vg.Rectangle{
		Min: vg.Point{X: x0, Y: min(yTop, yBottom)},
		Max: vg.Point{X: x1, Y: max(yTop, yBottom)},
	}, b.img)
}

// flowerPlotter draws flower outlines, or with labels set their ids.
type flowerPlotter struct {
	f      *figure
	fm     visits.FlowerMap
	labels bool
}

func (fp *flowerPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	halo := draw.LineStyle{Color: color.NRGBA{255, 255, 255, 230}, Width: fp.f.pt(4)}
	line := draw.LineStyle{Color: color.RGBA{0x22, 0x22, 0x22, 0xff}, Width: fp.f.pt(1.6)}
	sty := fp.f.style(1)
	sty.Font.Weight = xfont.WeightBold
	sty.XAlign = draw.XCenter
	for _, fl := range fp.fm.Flowers {
		if fp.labels {
			break
		}
		var outline []vg.Point
		if len(fl.PolygonPX) >= 3 {
			for _, q := range fl.PolygonPX {
				outline = append(outline, vg.Point{X: trX(q[0]), Y: trY(q[1])})
			}
			outline = append(outline, outline[0])
		} else {
			const n = 72
			for k := 0; k <= n; k++ {
				a := 2 * math.Pi * float64(k) / n
				outline = append(outline, vg.Point{
					X: trX(fl.XPX + fl.RPX*math.Cos(a)),
					Y: trY(fl.YPX + fl.RPX*math.Sin(a)),
				})
			}
		}
		c.StrokeLines(halo, c.ClipLinesXY(outline)...)
		c.StrokeLines(line, c.ClipLinesXY(outline)...)
	}
	for _, fl := range fp.fm.Flowers {
		if !fp.labels {
			break
		}
		top := math.Inf(1) // topmost image y of the outline
		if len(fl.PolygonPX) >= 3 {
			for _, q := range fl.PolygonPX {
				top = math.Min(top, q[1])
			}
		} else {
			top = fl.YPX - fl.RPX
		}
		pt := vg.Point{X: trX(fl.XPX), Y: trY(top) + fp.f.pt(6)}
		sty.YAlign = draw.YBottom
		if pt.Y+sty.Height(fl.ID)+fp.f.pt(3) > c.Max.Y {
			// No room above: label below the flower.
			bottom := fl.YPX + fl.RPX
			if len(fl.PolygonPX) >= 3 {
				bottom = math.Inf(-1)
				for _, q := range fl.PolygonPX {
					bottom = math.Max(bottom, q[1])
				}
			}
			pt.Y = trY(bottom) - fp.f.pt(6)
			sty.YAlign = draw.YTop
		}
		labelBox(c, sty, pt, fl.ID, fp.f.pt(2))
	}
}

// trackPlotter draws tracks, their start and end, and landings.
type trackPlotter struct {
	f        *figure
	tracks   []kinematics.Result
	shown    []int
	landings []visits.Landing
	fm       visits.FlowerMap
}

// lineStyles returns the halo and line styles of a track drawn in col.
func (tp *trackPlotter) lineStyles(col color.RGBA, observed bool) []draw.LineStyle {
	w := tp.f.pt(2.2)
	ls := draw.LineStyle{Color: col, Width: w}
	halo := draw.LineStyle{Color: color.NRGBA{255, 255, 255, 200}, Width: w + tp.f.pt(2.4)}
	if !observed {
		ls.Width = tp.f.pt(1.6)
		ls.Dashes = []vg.Length{tp.f.pt(5), tp.f.pt(4)}
		halo.Width = ls.Width + tp.f.pt(2)
		halo.Dashes = ls.Dashes
	}
	return []draw.LineStyle{halo, ls}
}

// startGlyphs mark a track's first point: a white disc ringed in col.
func (tp *trackPlotter) startGlyphs(col color.RGBA) []draw.GlyphStyle {
	return []draw.GlyphStyle{
		{Shape: draw.CircleGlyph{}, Radius: tp.f.pt(6.5), Color: color.White},
		{Shape: ringShape{tp.f.pt(2.4)}, Radius: tp.f.pt(5.5), Color: col},
	}
}

// endGlyphs mark a track's last point: an X in col with a white halo.
func (tp *trackPlotter) endGlyphs(col color.RGBA) []draw.GlyphStyle {
	return []draw.GlyphStyle{
		{Shape: crossShape{tp.f.pt(5)}, Radius: tp.f.pt(7.5), Color: color.White},
		{Shape: crossShape{tp.f.pt(2.4)}, Radius: tp.f.pt(7), Color: col},
	}
}

func (tp *trackPlotter) landingGlyphs(col color.RGBA) []draw.GlyphStyle {
	return []draw.GlyphStyle{
		{Shape: draw.BoxGlyph{}, Radius: tp.f.pt(6), Color: okabeBlack},
		{Shape: draw.BoxGlyph{}, Radius: tp.f.pt(4.3), Color: col},
	}
}

func (tp *trackPlotter) anyUnobserved() bool {
	for _, i := range tp.shown {
		for _, s := range tp.tracks[i].Samples {
			if !s.Observed {
				return true
			}
		}
	}
	return false
}

// runs splits samples into polylines of consecutive frames with the same
// observed flag (a step is observed when both its ends are). NaN
// positions and frame gaps break the line.
func runs(ss []kinematics.Sample) (lines [][]kinematics.Sample, observed []bool) {
	ok := func(s kinematics.Sample) bool { return !math.IsNaN(s.XPX) && !math.IsNaN(s.YPX) }
	start := -1
	var cur bool
	flush := func(end int) { // steps start..end-1
		if start >= 0 && end > start {
			lines = append(lines, ss[start:end+1])
			observed = append(observed, cur)
		}
		start = -1
	}
	for i := 0; i+1 < len(ss); i++ {
		a, b := ss[i], ss[i+1]
		if !ok(a) || !ok(b) || b.Frame-a.Frame != 1 {
			flush(i)
			continue
		}
		obs := a.Observed && b.Observed
		if start >= 0 && obs != cur {
			flush(i)
		}
		if start < 0 {
			start, cur = i, obs
		}
	}
	flush(len(ss) - 1)
	return lines, observed
}

func (tp *trackPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	toVG := func(s kinematics.Sample) vg.Point { return vg.Point{X: trX(s.XPX), Y: trY(s.YPX)} }
	// Halos first for all tracks, then lines, so that a later track's halo
	// does not cut an earlier track's line.
	for layer := range 2 {
		for _, i := range tp.shown {
			t := tp.tracks[i]
			lines, obs := runs(t.Samples)
			for k, ln := range lines {
				pts := make([]vg.Point, len(ln))
				for j, s := range ln {
					pts[j] = toVG(s)
				}
				c.StrokeLines(tp.lineStyles(TrackColor(t.ID), obs[k])[layer], c.ClipLinesXY(pts)...)
			}
		}
	}
	for _, i := range tp.shown {
		t := tp.tracks[i]
		first, last := -1, -1
		for j, s := range t.Samples {
			if !math.IsNaN(s.XPX) && !math.IsNaN(s.YPX) {
				if first < 0 {
					first = j
				}
				last = j
			}
		}
		if first < 0 {
			continue
		}
		col := TrackColor(t.ID)
		for _, g := range tp.startGlyphs(col) {
			c.DrawGlyph(g, toVG(t.Samples[first]))
		}
		// The id beside the start, so tracks sharing a colour (ids 7
		// apart) are told apart.
		lab := tp.f.style(0.9)
		lab.Font.Weight = xfont.WeightBold
		lab.Color = col
		// Put it on the side (right, left, above, below) most opposite
		// to where the bee flies off to, among those with room.
		txt := fmt.Sprint(t.ID)
		at := toVG(t.Samples[first])
		ahead := toVG(t.Samples[min(first+10, last)])
		dx, dy := float64(ahead.X-at.X), float64(ahead.Y-at.Y)
		off := tp.f.pt(10)
		tw, th := lab.Width(txt)+tp.f.pt(4), lab.Height(txt)+tp.f.pt(4)
		type side struct {
			ux, uy float64
			xa     draw.XAlignment
			ya     draw.YAlignment
		}
		best, bestScore := -1, math.Inf(-1)
		sides := []side{{1, 0, draw.XLeft, draw.YCenter}, {-1, 0, draw.XRight, draw.YCenter},
			{0, 1, draw.XCenter, draw.YBottom}, {0, -1, draw.XCenter, draw.YTop}}
		for k, sd := range sides {
			p := vg.Point{X: at.X + vg.Length(sd.ux)*off, Y: at.Y + vg.Length(sd.uy)*off}
			fits := p.X+vg.Length(sd.ux-1)/2*tw >= c.Min.X && p.X+vg.Length(sd.ux+1)/2*tw <= c.Max.X &&
				p.Y+vg.Length(sd.uy-1)/2*th >= c.Min.Y && p.Y+vg.Length(sd.uy+1)/2*th <= c.Max.Y
			score := -(sd.ux*dx + sd.uy*dy)
			if !fits {
				score -= 1e9
			}
			if score > bestScore {
				best, bestScore = k, score
			}
		}
		sd := sides[best]
		lab.XAlign, lab.YAlign = sd.xa, sd.ya
		pt := vg.Point{X: at.X + vg.Length(sd.ux)*off, Y: at.Y + vg.Length(sd.uy)*off}
		labelBox(c, lab, pt, txt, tp.f.pt(1.5))
		for _, g := range tp.endGlyphs(col) {
			c.DrawGlyph(g, toVG(t.Samples[last]))
		}
	}
	// Landings on top of everything.
	shownID := make(map[int]int, len(tp.shown)) // track id -> index in tp.tracks
	for _, i := range tp.shown {
		shownID[tp.tracks[i].ID] = i
	}
	for _, ld := range tp.landings {
		i, ok := shownID[ld.TrackID]
		if !ok {
			continue
		}
		x, y, found := positionAt(tp.tracks[i].Samples, ld.StartFrame)
		if !found {
			fl, ok := flowerByID(tp.fm, ld.FlowerID)
			if !ok {
				continue
			}
			x, y = fl.XPX, fl.YPX
		}
		pt := vg.Point{X: trX(x), Y: trY(y)}
		if !c.Contains(pt) {
			continue
		}
		for _, g := range tp.landingGlyphs(TrackColor(ld.TrackID)) {
			c.DrawGlyph(g, pt)
		}
	}
}

// positionAt returns the position of the sample at frame, if any.
func positionAt(ss []kinematics.Sample, frame int) (x, y float64, ok bool) {
	j := sort.Search(len(ss), func(j int) bool { return ss[j].Frame >= frame })
	if j == len(ss) || ss[j].Frame != frame || math.IsNaN(ss[j].XPX) || math.IsNaN(ss[j].YPX) {
		return 0, 0, false
	}
	return ss[j].XPX, ss[j].YPX, true
}

func flowerByID(fm visits.FlowerMap, id string) (visits.Flower, bool) {
	for _, fl := range fm.Flowers {
		if fl.ID == id {
			return fl, true
		}
	}
	return visits.Flower{}, false
}
