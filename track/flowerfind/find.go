package flowerfind

import (
	"errors"
	"fmt"
	"image"
	"math"
	"sort"

	"gocv.io/x/gocv"

	"flitlog/visits"
)

// Options tune Find.
type Options struct {
	// Colors are the blossom colours to look for; each found flower's kind
	// is its range's name. Default (nil): all presets (white, yellow,
	// purple, pink).
	Colors []ColorRange
	// PXPerMM is the image scale on the flower plane, px/mm. > 0; required.
	PXPerMM float64
	// RadiusMinMM, RadiusMaxMM: flowers (petal tips) have radii in this
	// range, mm. Blobs outside it are left out: specks of colour, and
	// patches of flowers grown together. Defaults 4 and 40 mm (a clover
	// head to a large composite); 0 means the default.
	RadiusMinMM, RadiusMaxMM float64
	// MinFill: a blob must cover at least this fraction of its enclosing
	// circle (holes filled), which rejects blades of grass and streaks.
	// Range (0, 1]; default 0.3 (a five-petalled flower covers about half).
	MinFill float64
}

func (o Options) withDefaults() (Options, error) {
	if o.Colors == nil {
		o.Colors = Presets()
	}
	if o.RadiusMinMM == 0 {
		o.RadiusMinMM = 4
	}
	if o.RadiusMaxMM == 0 {
		o.RadiusMaxMM = math.Max(40, o.RadiusMinMM)
	}
	if o.MinFill == 0 {
		o.MinFill = 0.3
	}
	switch {
	case !(o.PXPerMM > 0) || math.IsInf(o.PXPerMM, 0):
		return o, fmt.Errorf("flowerfind: scale %g px/mm: give the image scale (> 0 px/mm)", o.PXPerMM)
	case !(o.RadiusMinMM > 0) || !(o.RadiusMaxMM >= o.RadiusMinMM) || math.IsInf(o.RadiusMaxMM, 0):
		return o, fmt.Errorf("flowerfind: flower radius %g-%g mm: want 0 < min <= max", o.RadiusMinMM, o.RadiusMaxMM)
	case !(o.MinFill > 0 && o.MinFill <= 1):
		return o, fmt.Errorf("flowerfind: MinFill %g: want (0, 1]", o.MinFill)
	case len(o.Colors) == 0:
		return o, errors.New("flowerfind: no colours to look for")
	}
	for _, c := range o.Colors {
		if err := c.Validate(); err != nil {
			return o, err
		}
	}
	return o, nil
}

// candidate is one blob that passed the gates.
type candidate struct {
	x, y, r float64 // centre and radius, px
	area    float64 // filled area, px^2
	kind    string
}

// Find proposes a flower map from a background image (8-bit BGR, as from
// BackgroundFromClip): for every colour range, the pixels in the range
// (after a 5x5 Gaussian blur, in HSV) are closed with a disc of a quarter
// of the smallest flower radius to join petals, opened with a 3x3 disc to
// drop specks, and split into connected blobs (outer contours, holes
// filled). A blob is a flower when the radius of the circle about its
// centroid that encloses it lies in [RadiusMinMM, RadiusMaxMM] and it
// fills at least MinFill of that circle. Where blobs of different colours
// overlap (a yellow disc in a white daisy), the larger is kept. Flowers
// are numbered F01, F02, ... from the top of the image down, left to right
// within rows one largest-flower diameter tall; the map records the image
// size. It returns an empty map, not an error, when nothing is found.
func Find(bg gocv.Mat, opts Options) (visits.FlowerMap, error) {
	opts, err := opts.withDefaults()
	if err != nil {
		return visits.FlowerMap{}, err
	}
	if bg.Empty() || bg.Type() != gocv.MatTypeCV8UC3 {
		return visits.FlowerMap{}, fmt.Errorf("flowerfind: background must be an 8-bit colour (BGR) image")
	}
	w, h := bg.Cols(), bg.Rows()
	rMin, rMax := opts.RadiusMinMM*opts.PXPerMM, opts.RadiusMaxMM*opts.PXPerMM

	blur := gocv.NewMat()
	defer blur.Close()
	gocv.GaussianBlur(bg, &blur, image.Pt(5, 5), 0, 0, gocv.BorderReflect101)
	hsv := gocv.NewMat()
	defer hsv.Close()
	gocv.CvtColor(blur, &hsv, gocv.ColorBGRToHSV)

	closeK := oddAtLeast3(int(math.Round(rMin / 4)))
	kClose := gocv.GetStructuringElement(gocv.MorphEllipse, image.Pt(closeK, closeK))
	defer kClose.Close()
	kOpen := gocv.GetStructuringElement(gocv.MorphEllipse, image.Pt(3, 3))
	defer kOpen.Close()
	mask, tmp := gocv.NewMat(), gocv.NewMat()
	defer mask.Close()
	defer tmp.Close()

	var cands []candidate
	for _, c := range opts.Colors {
		inRange(hsv, c, &mask, &tmp)
		gocv.MorphologyEx(mask, &tmp, gocv.MorphClose, kClose)
		gocv.MorphologyEx(tmp, &mask, gocv.MorphOpen, kOpen)
		contours := gocv.FindContours(mask, gocv.RetrievalExternal, gocv.ChainApproxNone)
		for i := 0; i < contours.Size(); i++ {
			pts := contours.At(i).ToPoints()
			if len(pts) < 5 {
				continue
			}
			cx, cy, area := polygonCentroid(pts)
			if !(area > 0) {
				continue
			}
			var r float64
			for _, p := range pts {
				r = math.Max(r, math.Hypot(float64(p.X)-cx, float64(p.Y)-cy))
			}
			if r < rMin || r > rMax || area/(math.Pi*r*r) < opts.MinFill {
				continue
			}
			cands = append(cands, candidate{cx, cy, r, area, c.Name})
		}
		contours.Close()
	}

	// Overlapping blobs (of different colours, or a second range over the
	// same flower): keep the larger.
	sort.SliceStable(cands, func(i, j int) bool { return cands[i].area > cands[j].area })
	var kept []candidate
	for _, c := range cands {
		dup := false
		for _, k := range kept {
			if math.Hypot(c.x-k.x, c.y-k.y) < math.Max(c.r, k.r) {
				dup = true
				break
			}
		}
		if !dup {
			kept = append(kept, c)
		}
	}
	row := 2 * rMax
	sort.SliceStable(kept, func(i, j int) bool {
		ri, rj := math.Floor(kept[i].y/row), math.Floor(kept[j].y/row)
		if ri != rj {
			return ri < rj
		}
		return kept[i].x < kept[j].x
	})
	fm := visits.FlowerMap{FrameWidthPX: w, FrameHeightPX: h, Flowers: []visits.Flower{}}
	digits := max(2, len(fmt.Sprint(len(kept))))
	for i, k := range kept {
		fm.Flowers = append(fm.Flowers, visits.Flower{
			ID:   fmt.Sprintf("F%0*d", digits, i+1),
			XPX:  round2(k.x),
			YPX:  round2(k.y),
			RPX:  round2(k.r),
			Kind: k.kind,
		})
	}
	return fm, nil
}

// inRange sets mask to 255 where hsv lies in c (wrapping the hue).
func inRange(hsv gocv.Mat, c ColorRange, mask, tmp *gocv.Mat) {
	lo := func(h int) gocv.Scalar { return gocv.NewScalar(float64(h), float64(c.SLo), float64(c.VLo), 0) }
	hi := func(h int) gocv.Scalar { return gocv.NewScalar(float64(h), float64(c.SHi), float64(c.VHi), 0) }
	if c.HLo <= c.HHi {
		gocv.InRangeWithScalar(hsv, lo(c.HLo), hi(c.HHi), mask)
		return
	}
	gocv.InRangeWithScalar(hsv, lo(c.HLo), hi(179), mask)
	gocv.InRangeWithScalar(hsv, lo(0), hi(c.HHi), tmp)
	gocv.BitwiseOr(*mask, *tmp, mask)
}

// polygonCentroid returns the centroid and area of the polygon through
// pts (shoelace formulas). For a degenerate polygon it returns the mean
// of the points and area 0.
func polygonCentroid(pts []image.Point) (cx, cy, area float64) {
	var a, sx, sy float64
	for i := range pts {
		p, q := pts[i], pts[(i+1)%len(pts)]
		c := float64(p.X*q.Y - q.X*p.Y)
		a += c
		sx += float64(p.X+q.X) * c
		sy += float64(p.Y+q.Y) * c
	}
	if a == 0 {
		for _, p := range pts {
			cx += float64(p.X)
			cy += float64(p.Y)
		}
		return cx / float64(len(pts)), cy / float64(len(pts)), 0
	}
	a /= 2
	return sx / (6 * a), sy / (6 * a), math.Abs(a)
}

func oddAtLeast3(k int) int {
	if k < 3 {
		return 3
	}
	if k%2 == 0 {
		return k + 1
	}
	return k
}

func round2(v float64) float64 { return math.Round(v*100) / 100 }
