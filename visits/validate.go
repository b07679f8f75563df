package visits

import (
	"fmt"
	"math"
)

// Validate checks the flower map for a clip whose frames are widthPX by
// heightPX pixels. It reports, as one line that says what to fix: a map
// made for another frame size (when FrameWidthPX/FrameHeightPX are set), a
// missing or duplicate id, a position or radius that is not a finite number,
// a radius <= 0, a negative or non-finite reward, a polygon with fewer than
// three points, zero area or crossing edges, and a flower entirely outside
// the frame. A flower partly outside the frame is fine (flowers at the edge
// of the view). With widthPX or heightPX <= 0 the frame checks are skipped.
// The error is a *MapError; when a map has several problems the first is
// reported and the count of the others is appended.
func (fm FlowerMap) Validate(widthPX, heightPX int) error {
	return fm.validate(widthPX, heightPX, nil)
}

// validate is Validate with the source line of each flower, when known.
func (fm FlowerMap) validate(widthPX, heightPX int, lines []flowerPos) error {
	var errs []*MapError
	add := func(i int, id, field, format string, args ...any) {
		e := &MapError{Index: i, FlowerID: id, Field: field, Msg: fmt.Sprintf(format, args...)}
		if i >= 0 && i < len(lines) {
			e.Line = lines[i].line
			if l, ok := lines[i].fields[field]; ok {
				e.Line = l
			}
		}
		errs = append(errs, e)
	}
	frame := widthPX > 0 && heightPX > 0
	if fm.FrameWidthPX < 0 || fm.FrameHeightPX < 0 || (fm.FrameWidthPX == 0) != (fm.FrameHeightPX == 0) {
		add(-1, "", "frame_width_px", "frame size %dx%d is incomplete or negative: give both frame_width_px and frame_height_px, or neither",
			fm.FrameWidthPX, fm.FrameHeightPX)
	} else if frame && fm.FrameWidthPX > 0 && (fm.FrameWidthPX != widthPX || fm.FrameHeightPX != heightPX) {
		add(-1, "", "frame_width_px", "map was made for %dx%d frames but the clip is %dx%d: make a map for this clip (flitlog flowers CLIP) or rescale the coordinates",
			fm.FrameWidthPX, fm.FrameHeightPX, widthPX, heightPX)
	}
	seen := make(map[string]int, len(fm.Flowers))
	for i, f := range fm.Flowers {
		if f.ID == "" {
			add(i, "", "id", "missing id: give every flower a unique id such as \"F%02d\"", i+1)
		} else if j, dup := seen[f.ID]; dup {
			add(i, f.ID, "id", "duplicate id (also flower #%d): give each flower its own id", j+1)
		} else {
			seen[f.ID] = i
		}
		if !finite(f.XPX) || !finite(f.YPX) {
			add(i, f.ID, "x_px", "position (%v, %v) is not a number", f.XPX, f.YPX)
			continue
		}
		if !finite(f.RPX) || f.RPX <= 0 {
			add(i, f.ID, "r_px", "radius %v px: the radius must be > 0 px", f.RPX)
			continue
		}
		if f.RewardUL != nil && (!finite(*f.RewardUL) || *f.RewardUL < 0) {
			add(i, f.ID, "reward_ul", "reward %v uL: nectar volume must be >= 0 (or leave reward_ul out)", *f.RewardUL)
		}
		if f.PolygonPX != nil {
			if msg := polygonProblem(f.PolygonPX); msg != "" {
				add(i, f.ID, "polygon_px", "%s", msg)
				continue
			}
		}
		if frame {
			x0, y0, x1, y1 := f.boundsPX()
			if x1 < 0 || y1 < 0 || x0 > float64(widthPX) || y0 > float64(heightPX) ||
				(f.PolygonPX == nil && !circleMeetsRect(f.XPX, f.YPX, f.RPX, float64(widthPX), float64(heightPX))) {
				add(i, f.ID, "x_px", "flower at (%.1f, %.1f) r %.1f px lies entirely outside the %dx%d frame: fix its position or remove it",
					f.XPX, f.YPX, f.RPX, widthPX, heightPX)
			}
		}
	}
	if len(errs) == 0 {
		return nil
	}
	e := errs[0]
	if len(errs) > 1 {
		e.Msg += fmt.Sprintf(" (and %d more problems)", len(errs)-1)
	}
	return e
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// circleMeetsRect reports whether the circle of radius r around (cx, cy)
// overlaps the rectangle [0, w] x [0, h].
func circleMeetsRect(cx, cy, r, w, h float64) bool {
	dx := cx - math.Max(0, math.Min(w, cx))
	dy := cy - math.Max(0, math.Min(h, cy))
	return dx*dx+dy*dy < r*r
}

// polygonProblem returns what is wrong with a flower outline, or "".
func polygonProblem(p [][2]float64) string {
	if len(p) < 3 {
		return fmt.Sprintf("polygon has %d points: an outline needs at least 3 [x, y] points", len(p))
	}
	for k, v := range p {
		if !finite(v[0]) || !finite(v[1]) {
			return fmt.Sprintf("polygon point %d is not a number", k+1)
		}
	}
	n := len(p)
	for a := 0; a < n; a++ {
		for b := a + 1; b < n; b++ {
			if b == a+1 || (a == 0 && b == n-1) {
				continue // neighbouring edges share a point
			}
			if segmentsCross(p[a], p[(a+1)%n], p[b], p[(b+1)%n]) {
				return fmt.Sprintf("polygon edges %d and %d cross: list the points in order around the outline", a+1, b+1)
			}
		}
	}
	if math.Abs(polygonArea(p)) < 1e-9 {
		return "polygon has zero area: its points lie on one line"
	}
	return ""
}

// polygonArea is the signed shoelace area, px^2.
func polygonArea(p [][2]float64) float64 {
	var s float64
	for i := range p {
		j := (i + 1) % len(p)
		s += p[i][0]*p[j][1] - p[j][0]*p[i][1]
	}
	return s / 2
}

func cross(o, a, b [2]float64) float64 {
	return (a[0]-o[0])*(b[1]-o[1]) - (a[1]-o[1])*(b[0]-o[0])
}

// segmentsCross reports a proper crossing of segments pq and rs.
func segmentsCross(p, q, r, s [2]float64) bool {
	d1, d2 := cross(r, s, p), cross(r, s, q)
	d3, d4 := cross(p, q, r), cross(p, q, s)
	return ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))
}
