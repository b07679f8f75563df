package visits

import "math"

// EdgeDistPX returns the signed distance in px from (x, y) to the flower's
// outline: negative inside, zero on the edge, positive outside. For a
// circle it is hypot(x-XPX, y-YPX) - RPX; for a polygon it is the distance
// to the nearest edge, negated inside (even-odd rule).
func (f Flower) EdgeDistPX(x, y float64) float64 {
	if f.PolygonPX == nil {
		return math.Hypot(x-f.XPX, y-f.YPX) - f.RPX
	}
	p := f.PolygonPX
	d := math.Inf(1)
	inside := false
	for i := range p {
		a, b := p[i], p[(i+1)%len(p)]
		d = math.Min(d, segmentDist(x, y, a, b))
		if (a[1] > y) != (b[1] > y) && x < a[0]+(y-a[1])*(b[0]-a[0])/(b[1]-a[1]) {
			inside = !inside
		}
	}
	if inside {
		return -d
	}
	return d
}

// CentreDistPX is the distance in px from (x, y) to the flower's centre
// (XPX, YPX); it decides between overlapping flowers.
func (f Flower) CentreDistPX(x, y float64) float64 {
	return math.Hypot(x-f.XPX, y-f.YPX)
}

// boundsPX returns the flower's bounding box, px.
func (f Flower) boundsPX() (x0, y0, x1, y1 float64) {
	if f.PolygonPX == nil {
		return f.XPX - f.RPX, f.YPX - f.RPX, f.XPX + f.RPX, f.YPX + f.RPX
	}
	x0, y0 = math.Inf(1), math.Inf(1)
	x1, y1 = math.Inf(-1), math.Inf(-1)
	for _, v := range f.PolygonPX {
		x0, x1 = math.Min(x0, v[0]), math.Max(x1, v[0])
		y0, y1 = math.Min(y0, v[1]), math.Max(y1, v[1])
	}
	return x0, y0, x1, y1
}

// segmentDist is the distance from (x, y) to the segment ab.
func segmentDist(x, y float64, a, b [2]float64) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	l2 := dx*dx + dy*dy
	t := 0.0
	if l2 > 0 {
		t = math.Max(0, math.Min(1, ((x-a[0])*dx+(y-a[1])*dy)/l2))
	}
	return math.Hypot(x-a[0]-t*dx, y-a[1]-t*dy)
}

// nearestFlower returns the index of the flower whose outline, grown by
// marginPX, contains (x, y); where several do (overlapping flowers) the one
// with the nearest centre wins. It returns -1 when the point is on no
// flower.
func (fm FlowerMap) nearestFlower(x, y, marginPX float64) int {
	best, bestD := -1, math.Inf(1)
	for i, f := range fm.Flowers {
		if f.EdgeDistPX(x, y) > marginPX {
			continue
		}
		if d := f.CentreDistPX(x, y); d < bestD {
			best, bestD = i, d
		}
	}
	return best
}
