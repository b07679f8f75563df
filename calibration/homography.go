package calibration

import (
	"fmt"
	"math"

	"gocv.io/x/gocv"
)

// Correspondence is one point of the flower plane seen in the image: its
// pixel position as recorded (before undistortion) and its position on
// the plane in mm, in any plane coordinate system the user chooses (for
// example measured with a tape from one corner of the patch).
type Correspondence struct {
	XPX float64 `json:"x_px"`
	YPX float64 `json:"y_px"`
	XMM float64 `json:"x_mm"`
	YMM float64 `json:"y_mm"`
}

// PlaneFit is a homography from (undistorted) image pixels to plane mm,
// fitted by FitPlane.
type PlaneFit struct {
	// PXToMM is the 3x3 homography, row-major, scaled so that element 8
	// is 1 where possible: (X, Y, W) = H (u, v, 1), plane point (X/W, Y/W).
	PXToMM [9]float64
	// ErrorPX is each point's reprojection error: the distance in image
	// pixels between where the homography puts its plane position and
	// where it was clicked (after undistortion).
	ErrorPX []float64
	// Inlier marks the points RANSAC kept; outliers are listed so that
	// the user can check them.
	Inlier []bool
	// RMSPX and MaxPX summarise ErrorPX over the inliers. With exactly
	// four points the fit is exact and both are 0 up to rounding: use six
	// or more points to see the size of click errors.
	RMSPX, MaxPX float64
}

// RANSACThresholdPX is the reprojection distance beyond which FitPlane
// treats a point as a mistake (RANSAC inlier threshold), px.
const RANSACThresholdPX = 3.0

// FitPlane fits the homography that maps image pixels to plane mm from
// four or more correspondences with gocv.FindHomography (RANSAC, threshold
// RANSACThresholdPX; Hartley & Zisserman 2004, ch. 4), fitted in the
// direction plane -> image so that the threshold and the reported errors
// are in pixels, then inverted. With cam != nil the pixel positions are
// undistorted first and the homography applies to undistorted pixels.
//
// Errors, each one line saying what to do: fewer than 4 points, repeated
// points, all points on one line (or, with exactly 4, three of them on a
// line) in the image or on the plane, and a fit that fails.
func FitPlane(pts []Correspondence, cam *Camera) (*PlaneFit, error) {
	n := len(pts)
	if n < 4 {
		return nil, fmt.Errorf("plane calibration needs at least 4 points with known plane positions, got %d: add points (6 or more also show the click error)", n)
	}
	img := make([][2]float64, n)
	pln := make([][2]float64, n)
	for i, p := range pts {
		for _, v := range []float64{p.XPX, p.YPX, p.XMM, p.YMM} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("point %d (%g,%g=%g,%g) is not a finite number: give pixel and mm positions as numbers", i+1, p.XPX, p.YPX, p.XMM, p.YMM)
			}
		}
		u, v := p.XPX, p.YPX
		if cam != nil {
			u, v = cam.Undistort(u, v)
		}
		img[i] = [2]float64{u, v}
		pln[i] = [2]float64{p.XMM, p.YMM}
	}
	for _, set := range []struct {
		name string
		p    [][2]float64
		unit string
	}{{"image", img, "px"}, {"plane", pln, "mm"}} {
		if err := checkGeneralPosition(set.p, set.name, set.unit); err != nil {
			return nil, err
		}
	}

	src := gocv.NewMatWithSize(n, 2, gocv.MatTypeCV64F)
	defer src.Close()
	dst := gocv.NewMatWithSize(n, 2, gocv.MatTypeCV64F)
	defer dst.Close()
	for i := range pts {
		src.SetDoubleAt(i, 0, pln[i][0])
		src.SetDoubleAt(i, 1, pln[i][1])
		dst.SetDoubleAt(i, 0, img[i][0])
		dst.SetDoubleAt(i, 1, img[i][1])
	}
	mask := gocv.NewMat()
	defer mask.Close()
	hm := gocv.FindHomography(src, &dst, gocv.HomograpyMethodRANSAC, RANSACThresholdPX, &mask, 2000, 0.995)
	defer hm.Close()
	if hm.Empty() || hm.Rows() != 3 || hm.Cols() != 3 {
		return nil, fmt.Errorf("no homography fits these %d points: check that each pixel position is paired with the right plane position", n)
	}
	var mmToPX [9]float64
	for r := 0; r < 3; r++ {
		for c := 0; c < 3; c++ {
			mmToPX[3*r+c] = hm.GetDoubleAt(r, c)
		}
	}
	var pu, pv float64 // centroid of the plane points
	for _, q := range pln {
		pu += q[0] / float64(n)
		pv += q[1] / float64(n)
	}
	if mmToPX[6]*pu+mmToPX[7]*pv+mmToPX[8] < 0 {
		for i := range mmToPX {
			mmToPX[i] = -mmToPX[i]
		}
	}
	pxToMM, ok := invert3(mmToPX)
	if !ok {
		return nil, fmt.Errorf("the fitted homography is singular: the points are (nearly) on one line; spread them over the flower patch")
	}
	// Scale so that W > 0 at the centroid of the image points and, where
	// possible, H[8] = 1.
	var cu, cv float64
	for _, q := range img {
		cu += q[0] / float64(n)
		cv += q[1] / float64(n)
	}
	s := 1.0
	if math.Abs(pxToMM[8]) > 1e-12 {
		s = 1 / pxToMM[8]
	}
	if w := s * (pxToMM[6]*cu + pxToMM[7]*cv + pxToMM[8]); w < 0 {
		s = -s
	}
	for i := range pxToMM {
		pxToMM[i] *= s
	}

	fit := &PlaneFit{PXToMM: pxToMM, ErrorPX: make([]float64, n), Inlier: make([]bool, n)}
	var sum2 float64
	var k int
	for i := range pts {
		u, v, ok := applyH(mmToPX, pln[i][0], pln[i][1])
		e := math.Inf(1)
		if ok {
			e = math.Hypot(u-img[i][0], v-img[i][1])
		}
		fit.ErrorPX[i] = e
		fit.Inlier[i] = mask.Rows() == n && mask.GetUCharAt(i, 0) != 0
		if fit.Inlier[i] {
			sum2 += e * e
			k++
			fit.MaxPX = math.Max(fit.MaxPX, e)
		}
	}
	if k < 4 {
		return nil, fmt.Errorf("only %d of %d points agree on one plane: check the pixel and mm positions", k, n)
	}
	fit.RMSPX = math.Sqrt(sum2 / float64(k))
	return fit, nil
}

// checkGeneralPosition rejects repeated points, point sets on one line,
// and, for exactly four points, any three on a line: a homography is then
// not determined. "On a line" means a spread across the best line below 1%
// of the spread along it (or, for three points, a triangle whose height is
// below 1% of its longest side).
func checkGeneralPosition(p [][2]float64, name, unit string) error {
	n := len(p)
	var span float64
	for i := range p {
		for j := i + 1; j < n; j++ {
			span = math.Max(span, math.Hypot(p[i][0]-p[j][0], p[i][1]-p[j][1]))
		}
	}
	for i := range p {
		for j := i + 1; j < n; j++ {
			if math.Hypot(p[i][0]-p[j][0], p[i][1]-p[j][1]) <= 1e-6*span || span == 0 {
				return fmt.Errorf("points %d and %d are at the same %s position (%g, %g) %s: each point must be a different spot", i+1, j+1, name, p[i][0], p[i][1], unit)
			}
		}
	}
	// Principal axes of the point cloud.
	var mx, my float64
	for _, q := range p {
		mx += q[0] / float64(n)
		my += q[1] / float64(n)
	}
	var sxx, syy, sxy float64
	for _, q := range p {
		dx, dy := q[0]-mx, q[1]-my
		sxx += dx * dx
		syy += dy * dy
		sxy += dx * dy
	}
	tr, det := sxx+syy, sxx*syy-sxy*sxy
	disc := math.Sqrt(math.Max(0, tr*tr/4-det))
	lmax, lmin := tr/2+disc, tr/2-disc
	if lmin <= 1e-4*lmax {
		return fmt.Errorf("all %d %s points lie on one line: a plane needs points spread in both directions; add points off that line", n, name)
	}
	if n == 4 {
		for a := 0; a < 4; a++ {
			var t [][2]float64
			var idx []int
			for b := 0; b < 4; b++ {
				if b != a {
					t = append(t, p[b])
					idx = append(idx, b+1)
				}
			}
			if nearlyCollinear(t[0], t[1], t[2]) {
				return fmt.Errorf("%s points %d, %d and %d lie on one line: with 4 points no 3 may be in line; move one or add more points", name, idx[0], idx[1], idx[2])
			}
		}
	}
	return nil
}

// nearlyCollinear reports whether the triangle abc has a height below 1%
// of its longest side.
func nearlyCollinear(a, b, c [2]float64) bool {
	cross := (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
	long := math.Max(math.Hypot(b[0]-a[0], b[1]-a[1]), math.Max(math.Hypot(c[0]-a[0], c[1]-a[1]), math.Hypot(c[0]-b[0], c[1]-b[1])))
	// height = 2 area / base = |cross| / long
	return math.Abs(cross)/long < 0.01*long
}

// applyH maps (x, y) by the row-major homography h; ok is false when the
// point maps to infinity or beyond it (W <= 0).
func applyH(h [9]float64, x, y float64) (X, Y float64, ok bool) {
	w := h[6]*x + h[7]*y + h[8]
	if !(w > 0) {
		return math.NaN(), math.NaN(), false
	}
	return (h[0]*x + h[1]*y + h[2]) / w, (h[3]*x + h[4]*y + h[5]) / w, true
}

// invert3 inverts a row-major 3x3 matrix by the adjugate; ok is false if
// it is singular relative to the size of its entries.
func invert3(m [9]float64) (inv [9]float64, ok bool) {
	a, b, c := m[0], m[1], m[2]
	d, e, f := m[3], m[4], m[5]
	g, h, i := m[6], m[7], m[8]
	A, B, C := e*i-f*h, -(d*i - f*g), d*h-e*g
	det := a*A + b*B + c*C
	var norm float64
	for _, v := range m {
		norm = math.Max(norm, math.Abs(v))
	}
	if norm == 0 || math.Abs(det) <= 1e-14*norm*norm*norm || math.IsNaN(det) {
		return inv, false
	}
	inv = [9]float64{
		A / det, -(b*i - c*h) / det, (b*f - c*e) / det,
		B / det, (a*i - c*g) / det, -(a*f - c*d) / det,
		C / det, -(a*h - b*g) / det, (a*e - b*d) / det,
	}
	return inv, true
}
