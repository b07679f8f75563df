package calibration

import (
	"fmt"
	"math"
)

// Camera is a pinhole camera with radial and tangential lens distortion,
// the model of OpenCV's calibrateCamera with five coefficients
// (Brown 1966; Zhang 2000). A point with normalised undistorted image
// coordinates (x, y) (x = X/Z, y = Y/Z in the camera frame) and
// r^2 = x^2 + y^2 appears at the distorted normalised position
//
//	xd = x (1 + k1 r^2 + k2 r^4 + k3 r^6) + 2 p1 x y + p2 (r^2 + 2 x^2)
//	yd = y (1 + k1 r^2 + k2 r^4 + k3 r^6) + p1 (r^2 + 2 y^2) + 2 p2 x y
//
// and at the pixel (fx xd + cx, fy yd + cy). Undistorted pixels use the
// same camera matrix: (fx x + cx, fy y + cy).
type Camera struct {
	FXPX float64 `json:"fx_px"` // focal length in pixel widths
	FYPX float64 `json:"fy_px"` // focal length in pixel heights
	CXPX float64 `json:"cx_px"` // principal point, px
	CYPX float64 `json:"cy_px"`
	K1   float64 `json:"k1"` // radial distortion coefficients (unitless)
	K2   float64 `json:"k2"`
	K3   float64 `json:"k3"`
	P1   float64 `json:"p1"` // tangential distortion coefficients
	P2   float64 `json:"p2"`
	// RMSPX is the RMS reprojection error of the chessboard corners, px,
	// and Views the number of chessboard images used (0 when the model
	// was not made by CalibrateChessboard).
	RMSPX float64 `json:"rms_reprojection_px"`
	Views int     `json:"views"`
}

// validate checks that the model can be used.
func (c *Camera) validate() error {
	for _, v := range []struct {
		name string
		x    float64
	}{{"fx_px", c.FXPX}, {"fy_px", c.FYPX}, {"cx_px", c.CXPX}, {"cy_px", c.CYPX},
		{"k1", c.K1}, {"k2", c.K2}, {"k3", c.K3}, {"p1", c.P1}, {"p2", c.P2}} {
		if math.IsNaN(v.x) || math.IsInf(v.x, 0) {
			return fmt.Errorf("camera %s is %g: want a finite number", v.name, v.x)
		}
	}
	if !(c.FXPX > 0) || !(c.FYPX > 0) {
		return fmt.Errorf("camera focal lengths fx_px=%g, fy_px=%g: want > 0", c.FXPX, c.FYPX)
	}
	return nil
}

// distortNormalized applies the distortion model to normalised
// undistorted coordinates.
func (c *Camera) distortNormalized(x, y float64) (xd, yd float64) {
	r2 := x*x + y*y
	radial := 1 + r2*(c.K1+r2*(c.K2+r2*c.K3))
	xd = x*radial + 2*c.P1*x*y + c.P2*(r2+2*x*x)
	yd = y*radial + c.P1*(r2+2*y*y) + 2*c.P2*x*y
	return xd, yd
}

// Distort maps an undistorted pixel to the pixel where the lens shows it.
func (c *Camera) Distort(xuPX, yuPX float64) (xdPX, ydPX float64) {
	x, y := (xuPX-c.CXPX)/c.FXPX, (yuPX-c.CYPX)/c.FYPX
	xd, yd := c.distortNormalized(x, y)
	return c.FXPX*xd + c.CXPX, c.FYPX*yd + c.CYPX
}

// undistortIters bounds the fixed-point iteration of Undistort; it
// converges to 1e-12 in well under 20 steps inside the calibrated field of
// view (see TestUndistortRoundTrip).
const undistortIters = 50

// Undistort maps a pixel as recorded to the pixel an ideal pinhole camera
// with the same camera matrix would record: the inverse of Distort.
//
// It solves the distortion equations by the fixed-point iteration that
// OpenCV's undistortPoints uses (x <- (xd - tangential(x, y)) / radial(x,
// y)), but iterates to convergence (change below 1e-12 in normalised
// units, at most 50 steps) instead of OpenCV's fixed 5 steps (those leave
// 0.007 px in the corners of OpenCV's 640x480 sample lens, more for
// stronger distortion; see TestUndistortAgainstOpenCV). Where the radial factor is not positive (far outside the
// calibrated field of view) the model cannot be inverted and, as in
// OpenCV, the pixel is returned unchanged.
func (c *Camera) Undistort(xdPX, ydPX float64) (xuPX, yuPX float64) {
	x, y := c.undistortNormalized((xdPX-c.CXPX)/c.FXPX, (ydPX-c.CYPX)/c.FYPX, undistortIters, 1e-12)
	return c.FXPX*x + c.CXPX, c.FYPX*y + c.CYPX
}

// undistortNormalized inverts distortNormalized from the distorted
// normalised point (x0, y0) with at most iters fixed-point steps, stopping
// early when a step moves the estimate by less than tol.
func (c *Camera) undistortNormalized(x0, y0 float64, iters int, tol float64) (x, y float64) {
	x, y = x0, y0
	for j := 0; j < iters; j++ {
		r2 := x*x + y*y
		radial := 1 + r2*(c.K1+r2*(c.K2+r2*c.K3))
		if radial <= 0 {
			return x0, y0
		}
		dx := 2*c.P1*x*y + c.P2*(r2+2*x*x)
		dy := c.P1*(r2+2*y*y) + 2*c.P2*x*y
		nx, ny := (x0-dx)/radial, (y0-dy)/radial
		step := math.Abs(nx-x) + math.Abs(ny-y)
		x, y = nx, ny
		if step < tol {
			break
		}
	}
	return x, y
}

// hasDistortion reports whether any distortion coefficient is non-zero.
func (c *Camera) hasDistortion() bool {
	return c.K1 != 0 || c.K2 != 0 || c.K3 != 0 || c.P1 != 0 || c.P2 != 0
}
