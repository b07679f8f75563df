package overlay

import (
	"fmt"
	"image"
	"image/color"
	"math"

	"flitlog/cmd/flitlog/internal/plots"
	"flitlog/kinematics"
	"flitlog/visits"

	"gocv.io/x/gocv"
)

var (
	black = color.RGBA{0, 0, 0, 255}
	white = color.RGBA{255, 255, 255, 255}
)

const font = gocv.FontHersheySimplex

// annotator draws FrameStates on frames of one size. Sizes scale with the
// frame: s = min(width, height) / 720, clamped to [0.75, 4] (text stays
// readable on small frames), so a 720p frame gets 3 px trails and
// 0.6-scale text.
type annotator struct {
	s    float64
	w, h int
	tmp  gocv.Mat // scratch for blending trail segments
}

func newAnnotator(w, h int) *annotator {
	s := math.Min(float64(w), float64(h)) / 720
	s = math.Max(0.75, math.Min(4, s))
	return &annotator{s: s, w: w, h: h, tmp: gocv.NewMat()}
}

func (a *annotator) close() { a.tmp.Close() }

// px scales a length given for a 720-px frame.
func (a *annotator) px(v float64) int { return max(1, int(math.Round(v*a.s))) }

func (a *annotator) annotate(frame *gocv.Mat, frameIdx int, st FrameState) {
	occupied := map[string]bool{}
	inspected := map[string]bool{}
	for _, m := range st.Tracks {
		if m.FlowerID != "" {
			occupied[m.FlowerID] = true
		}
		if m.InspectingID != "" {
			inspected[m.InspectingID] = true
		}
	}
	for _, fl := range st.Flowers {
		a.flower(frame, fl, occupied[fl.ID], inspected[fl.ID])
	}
	trailS := st.TrailS
	if !(trailS > 0) {
		trailS = DefaultTrailS
	}
	for _, m := range st.Tracks {
		a.trail(frame, m, st.TimeS, trailS)
	}
	for _, m := range st.Tracks {
		a.marker(frame, m)
	}
	a.clock(frame, frameIdx, st.TimeS)
	a.legend(frame)
}

func pt(x, y float64) image.Point {
	return image.Point{int(math.Round(x)), int(math.Round(y))}
}

// text draws s with its baseline-left at org, in col with a black outline.
func (a *annotator) text(frame *gocv.Mat, s string, org image.Point, scale float64, col color.RGBA) {
	th := a.px(1.5)
	gocv.PutTextWithParams(frame, s, org, font, scale, black, th+a.px(2), gocv.LineAA, false)
	gocv.PutTextWithParams(frame, s, org, font, scale, col, th, gocv.LineAA, false)
}

func (a *annotator) textSize(s string, scale float64) image.Point {
	return gocv.GetTextSize(s, font, scale, a.px(1.5)+a.px(2))
}

// flower draws a flower outline and id; yellow and thicker while a bee is
// landed on it, orange while one inspects it.
func (a *annotator) flower(frame *gocv.Mat, fl visits.Flower, occupied, inspected bool) {
	col, th := white, a.px(2)
	switch {
	case occupied:
		col, th = plots.HighlightColor(), a.px(4)
	case inspected:
		col, th = plots.StateColor(kinematics.Hovering), a.px(3)
	}
	halo := th + a.px(2)
	if len(fl.PolygonPX) >= 3 {
		pts := make([]image.Point, len(fl.PolygonPX))
		for i, q := range fl.PolygonPX {
			pts[i] = pt(q[0], q[1])
		}
		pv := gocv.NewPointsVectorFromPoints([][]image.Point{pts})
		gocv.Polylines(frame, pv, true, black, halo)
		gocv.Polylines(frame, pv, true, col, th)
		pv.Close()
	} else {
		c, r := pt(fl.XPX, fl.YPX), int(math.Round(fl.RPX))
		gocv.CircleWithParams(frame, c, r, black, halo, gocv.LineAA, 0)
		gocv.CircleWithParams(frame, c, r, col, th, gocv.LineAA, 0)
	}
	scale := 0.6 * a.s
	sz := a.textSize(fl.ID, scale)
	top := fl.YPX - fl.RPX
	for _, q := range fl.PolygonPX {
		top = math.Min(top, q[1])
	}
	y := int(math.Round(top)) - a.px(8)
	if y-sz.Y < 0 { // no room above: below the flower
		y = int(math.Round(fl.YPX+fl.RPX)) + a.px(8) + sz.Y
	}
	tc := white
	if occupied {
		tc = plots.HighlightColor()
	}
	a.text(frame, fl.ID, image.Point{int(math.Round(fl.XPX)) - sz.X/2, y}, scale, tc)
}

// trailBins is the number of opacity steps of a trail.
const trailBins = 4

// trail draws the segments of m.Trail in the track's colour, fading with
// age: segments are put in trailBins bins by age (0..trailS), and bin k
// (0 = newest) is blended into the frame with opacity 1 - k/trailBins.
// A bin is drawn (dark edge, then colour) onto a copy of its bounding
// region and mixed back in once, so joints between segments are not
// blended twice.
func (a *annotator) trail(frame *gocv.Mat, m TrackMark, nowS, trailS float64) {
	col := plots.TrackColor(m.ID)
	th := a.px(2.5)
	halo := a.px(2) // dark edge so light colours read on light ground
	bounds := image.Rect(0, 0, a.w, a.h)
	type seg struct{ p, q image.Point }
	var bins [trailBins][]seg
	var boxes [trailBins]image.Rectangle
	for i := 1; i < len(m.Trail); i++ {
		p, q := m.Trail[i-1], m.Trail[i]
		if q.Frame-p.Frame != 1 || math.IsNaN(p.XPX+p.YPX+q.XPX+q.YPX) {
			continue
		}
		age := nowS - (p.TimeS+q.TimeS)/2
		k := int(math.Floor(age / trailS * trailBins))
		k = max(0, min(trailBins-1, k))
		sg := seg{pt(p.XPX, p.YPX), pt(q.XPX, q.YPX)}
		r := image.Rect(sg.p.X, sg.p.Y, sg.q.X, sg.q.Y) // canonicalised
		e := th + halo
		r = image.Rect(r.Min.X-e, r.Min.Y-e, r.Max.X+e+1, r.Max.Y+e+1)
		if len(bins[k]) == 0 {
			boxes[k] = r
		} else {
			boxes[k] = boxes[k].Union(r)
		}
		bins[k] = append(bins[k], sg)
	}
	for k := trailBins - 1; k >= 0; k-- { // oldest first
		if len(bins[k]) == 0 {
			continue
		}
		if k == 0 {
			for _, sg := range bins[k] {
				gocv.Line(frame, sg.p, sg.q, black, th+halo)
			}
			for _, sg := range bins[k] {
				gocv.Line(frame, sg.p, sg.q, col, th)
			}
			continue
		}
		r := boxes[k].Intersect(bounds)
		if r.Empty() {
			continue
		}
		alpha := 1 - float64(k)/trailBins
		roi := frame.Region(r)
		roi.CopyTo(&a.tmp)
		for _, sg := range bins[k] {
			gocv.Line(&a.tmp, sg.p.Sub(r.Min), sg.q.Sub(r.Min), black, th+halo)
		}
		for _, sg := range bins[k] {
			gocv.Line(&a.tmp, sg.p.Sub(r.Min), sg.q.Sub(r.Min), col, th)
		}
		gocv.AddWeighted(a.tmp, alpha, roi, 1-alpha, 0, &roi)
		roi.Close()
	}
}

// marker draws the current position: a disc when flying, a diamond when
// hovering, a square when landed, filled in plots.StateColor (hollow when
// the position was not observed), the track id in its colour and, while
// landed on a flower, the flower id and the handling time so far.
func (a *annotator) marker(frame *gocv.Mat, m TrackMark) {
	c := pt(m.XPX, m.YPX)
	r := a.px(7)
	fill := plots.StateColor(m.State)
	outline := a.px(1.5)
	poly := shape(c, r, m.State)
	if poly == nil {
		if m.Observed {
			gocv.CircleWithParams(frame, c, r, fill, -1, gocv.LineAA, 0)
			gocv.CircleWithParams(frame, c, r, black, outline, gocv.LineAA, 0)
		} else {
			gocv.CircleWithParams(frame, c, r, black, outline+a.px(2), gocv.LineAA, 0)
			gocv.CircleWithParams(frame, c, r, fill, a.px(2), gocv.LineAA, 0)
		}
	} else {
		pv := gocv.NewPointsVectorFromPoints([][]image.Point{poly})
		if m.Observed {
			gocv.FillPoly(frame, pv, fill)
			gocv.Polylines(frame, pv, true, black, outline)
		} else {
			gocv.Polylines(frame, pv, true, black, outline+a.px(2))
			gocv.Polylines(frame, pv, true, fill, a.px(2))
		}
		pv.Close()
	}

	scale := 0.6 * a.s
	id := fmt.Sprint(m.ID)
	org := image.Point{c.X + r + a.px(5), c.Y - r - a.px(2)}
	sz := a.textSize(id, scale)
	if org.Y-sz.Y < 0 {
		org.Y = c.Y + r + a.px(4) + sz.Y
	}
	tc := plots.TrackColor(m.ID)
	if lum(tc) < 60 { // black track: white text
		tc = white
	}
	a.text(frame, id, org, scale, tc)
	if m.FlowerID != "" {
		timer := fmt.Sprintf("%s %.1f s", m.FlowerID, m.OnFlowerS)
		a.text(frame, timer, image.Point{org.X + sz.X + a.px(6), org.Y}, 0.5*a.s, white)
	}
}

func lum(c color.RGBA) float64 {
	return 0.2126*float64(c.R) + 0.7152*float64(c.G) + 0.0722*float64(c.B)
}

// box fills r with a dark grey.
func (a *annotator) box(frame *gocv.Mat, r image.Rectangle) {
	gocv.Rectangle(frame, r, color.RGBA{25, 25, 25, 255}, -1)
}

// clock writes the clip time and frame index in the top-left corner.
func (a *annotator) clock(frame *gocv.Mat, frameIdx int, timeS float64) {
	s := fmt.Sprintf("t %.3f s  frame %d", timeS, frameIdx)
	scale := 0.6 * a.s
	sz := a.textSize(s, scale)
	pad := a.px(6)
	a.box(frame, image.Rect(0, 0, sz.X+2*pad, sz.Y+2*pad+a.px(4)))
	a.text(frame, s, image.Point{pad, pad + sz.Y}, scale, white)
}

// legend explains the marker shapes in the bottom-left corner.
func (a *annotator) legend(frame *gocv.Mat) {
	scale := 0.5 * a.s
	pad := a.px(6)
	r := a.px(6)
	items := []kinematics.State{kinematics.Flying, kinematics.Hovering, kinematics.Landed}
	h := a.textSize("Hg", scale).Y
	rowH := max(h, 2*r) + pad
	wmax := 0
	for _, st := range items {
		wmax = max(wmax, a.textSize(st.String(), scale).X)
	}
	bw := pad + 2*r + pad + wmax + pad
	bh := len(items)*rowH + pad
	y0 := a.h - bh
	a.box(frame, image.Rect(0, y0, bw, a.h))
	for i, st := range items {
		cy := y0 + pad + i*rowH + rowH/2 - pad/2
		a.marker0(frame, image.Point{pad + r, cy}, r, st)
		a.text(frame, st.String(), image.Point{pad + 2*r + pad, cy + h/2}, scale, white)
	}
}

// shape returns the outline of the state's marker around c (radius r):
// a diamond when hovering, a square when landed, nil for the flying disc.
func shape(c image.Point, r int, st kinematics.State) []image.Point {
	switch st {
	case kinematics.Hovering:
		d := int(math.Round(float64(r) * 1.3))
		return []image.Point{{c.X, c.Y - d}, {c.X + d, c.Y}, {c.X, c.Y + d}, {c.X - d, c.Y}}
	case kinematics.Landed:
		return []image.Point{{c.X - r, c.Y - r}, {c.X + r, c.Y - r}, {c.X + r, c.Y + r}, {c.X - r, c.Y + r}}
	}
	return nil
}

// marker0 draws the bare state shape (for the legend).
func (a *annotator) marker0(frame *gocv.Mat, c image.Point, r int, st kinematics.State) {
	fill := plots.StateColor(st)
	poly := shape(c, r, st)
	if poly == nil {
		gocv.CircleWithParams(frame, c, r, fill, -1, gocv.LineAA, 0)
		return
	}
	pv := gocv.NewPointsVectorFromPoints([][]image.Point{poly})
	gocv.FillPoly(frame, pv, fill)
	pv.Close()
}
