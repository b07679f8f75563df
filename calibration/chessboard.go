package calibration

import (
	"fmt"
	"image"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"gocv.io/x/gocv"
)

// MinChessboardViews is the fewest images with a detected board that
// CalibrateChessboard accepts. Ten to twenty views at varied angles that
// together cover the whole frame are usual practice.
const MinChessboardViews = 3

// calibFixAspectRatio is OpenCV's cv::CALIB_FIX_ASPECT_RATIO. gocv v0.31
// names its CalibFlag constants after the fisheye model, whose values
// differ, so the value is given here.
const calibFixAspectRatio gocv.CalibFlag = 2

// ChessboardOptions describe the printed board and the fit.
type ChessboardOptions struct {
	// InnerCols x InnerRows are the inner corners (where four squares
	// meet) along a row and a column: 9x6 for a board of 10x7 squares.
	InnerCols, InnerRows int
	// SquareMM is the side of one square, mm. It fixes the units of the
	// board poses only; the lens model does not depend on it.
	SquareMM float64
	// FixAspectRatio keeps fx = fy (square pixels), as OpenCV's
	// CALIB_FIX_ASPECT_RATIO with a ratio of 1.
	FixAspectRatio bool
}

// ChessboardResult is a lens model fitted to chessboard images.
type ChessboardResult struct {
	Camera                      Camera // with RMSPX and Views set
	FrameWidthPX, FrameHeightPX int
	Used                        []string  // images with a detected board, in the order fitted
	NoBoard                     []string  // images where no board was found
	ViewRMSPX                   []float64 // RMS reprojection error per used image, px
}

// imageExts are the file types CalibrateChessboardDir reads.
var imageExts = map[string]bool{".jpg": true, ".jpeg": true, ".png": true, ".bmp": true, ".tif": true, ".tiff": true}

// CalibrateChessboardDir calibrates from every image file (.jpg, .jpeg,
// .png, .bmp, .tif, .tiff) in dir, in name order.
func CalibrateChessboardDir(dir string, opt ChessboardOptions) (*ChessboardResult, error) {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return nil, fmt.Errorf("chessboard folder %s: %v", dir, unwrapPath(err))
	}
	var paths []string
	for _, e := range ents {
		if !e.IsDir() && imageExts[strings.ToLower(filepath.Ext(e.Name()))] {
			paths = append(paths, filepath.Join(dir, e.Name()))
		}
	}
	sort.Strings(paths)
	if len(paths) == 0 {
		return nil, fmt.Errorf("chessboard folder %s has no images (.jpg, .png, .bmp, .tif): put the photos of the board there", dir)
	}
	res, err := CalibrateChessboard(paths, opt)
	if err != nil {
		return nil, fmt.Errorf("chessboard folder %s: %v", dir, err)
	}
	return res, nil
}

// CalibrateChessboard fits the lens model (Camera) to photos of a flat
// chessboard taken with the same camera setting as the clips (Zhang 2000):
// corners are found with gocv.FindChessboardCorners (adaptive threshold,
// normalised image), refined with gocv.CornerSubPix (11x11 window, 30
// iterations or 0.0001 px, the settings of OpenCV's calibration sample),
// and the camera matrix and five distortion coefficients are fitted with
// gocv.CalibrateCamera. All images must have the same size; images
// without a board are listed in NoBoard. The per-image errors are
// recomputed in Go from the fitted poses with the model of Camera.
func CalibrateChessboard(paths []string, opt ChessboardOptions) (*ChessboardResult, error) {
	if opt.InnerCols < 2 || opt.InnerRows < 2 {
		return nil, fmt.Errorf("inner corners %dx%d: count the corners where four squares meet, e.g. 9x6 for a board of 10x7 squares", opt.InnerCols, opt.InnerRows)
	}
	if !(opt.SquareMM > 0) || math.IsInf(opt.SquareMM, 0) {
		return nil, fmt.Errorf("square size %g mm: measure one printed square, > 0 mm", opt.SquareMM)
	}
	pattern := image.Pt(opt.InnerCols, opt.InnerRows)
	res := &ChessboardResult{}

	objPts := gocv.NewPoints3fVector()
	defer objPts.Close()
	imgPts := gocv.NewPoints2fVector()
	defer imgPts.Close()
	var board []gocv.Point3f
	for r := 0; r < opt.InnerRows; r++ {
		for c := 0; c < opt.InnerCols; c++ {
			board = append(board, gocv.Point3f{X: float32(float64(c) * opt.SquareMM), Y: float32(float64(r) * opt.SquareMM)})
		}
	}
	var corners [][]gocv.Point2f

	img := gocv.NewMat()
	defer img.Close()
	found := gocv.NewMat()
	defer found.Close()
	crit := gocv.NewTermCriteria(gocv.Count+gocv.EPS, 30, 0.0001)
	for _, p := range paths {
		m := gocv.IMRead(p, gocv.IMReadGrayScale)
		if m.Empty() {
			m.Close()
			return nil, fmt.Errorf("cannot read image %s: is it a photo (JPEG, PNG, BMP, TIFF)?", p)
		}
		m.CopyTo(&img)
		m.Close()
		w, h := img.Cols(), img.Rows()
		if res.FrameWidthPX == 0 {
			res.FrameWidthPX, res.FrameHeightPX = w, h
		} else if w != res.FrameWidthPX || h != res.FrameHeightPX {
			return nil, fmt.Errorf("image %s is %dx%d but the first image is %dx%d: use photos from one camera setting only", p, w, h, res.FrameWidthPX, res.FrameHeightPX)
		}
		ok := gocv.FindChessboardCorners(img, pattern, &found, gocv.CalibCBAdaptiveThresh|gocv.CalibCBNormalizeImage)
		if !ok || found.Rows()*found.Cols() != opt.InnerCols*opt.InnerRows {
			res.NoBoard = append(res.NoBoard, p)
			continue
		}
		gocv.CornerSubPix(img, &found, image.Pt(11, 11), image.Pt(-1, -1), crit)
		pv := gocv.NewPoint2fVectorFromMat(found)
		corners = append(corners, pv.ToPoints())
		imgPts.Append(pv)
		pv.Close()
		ov := gocv.NewPoint3fVectorFromPoints(board)
		objPts.Append(ov)
		ov.Close()
		res.Used = append(res.Used, p)
	}
	if len(res.Used) == 0 {
		return nil, fmt.Errorf("no chessboard with %dx%d inner corners found in any of the %d images: check --inner (count inner corners, not squares) and that the whole board is sharp and in view", opt.InnerCols, opt.InnerRows, len(paths))
	}
	if len(res.Used) < MinChessboardViews {
		return nil, fmt.Errorf("the %dx%d board was found in only %d of %d images: take at least %d photos (10-20 is usual) with the board at different angles and places", opt.InnerCols, opt.InnerRows, len(res.Used), len(paths), MinChessboardViews)
	}

	k := gocv.Eye(3, 3, gocv.MatTypeCV64F) // fx/fy = 1 for FixAspectRatio
	defer k.Close()
	dist := gocv.NewMat()
	defer dist.Close()
	rvecs := gocv.NewMat()
	defer rvecs.Close()
	tvecs := gocv.NewMat()
	defer tvecs.Close()
	var flags gocv.CalibFlag
	if opt.FixAspectRatio {
		flags |= calibFixAspectRatio
	}
	rms := gocv.CalibrateCamera(objPts, imgPts, image.Pt(res.FrameWidthPX, res.FrameHeightPX), &k, &dist, &rvecs, &tvecs, flags)
	if k.Rows() != 3 || k.Cols() != 3 || dist.Total() < 5 {
		return nil, fmt.Errorf("the lens fit failed: take more photos with the board at different angles")
	}
	d := make([]float64, dist.Total())
	for i := range d {
		if dist.Rows() == 1 {
			d[i] = dist.GetDoubleAt(0, i)
		} else {
			d[i] = dist.GetDoubleAt(i, 0)
		}
	}
	res.Camera = Camera{
		FXPX: k.GetDoubleAt(0, 0), FYPX: k.GetDoubleAt(1, 1),
		CXPX: k.GetDoubleAt(0, 2), CYPX: k.GetDoubleAt(1, 2),
		K1: d[0], K2: d[1], P1: d[2], P2: d[3], K3: d[4],
		RMSPX: rms, Views: len(res.Used),
	}
	if err := res.Camera.validate(); err != nil || math.IsNaN(rms) {
		return nil, fmt.Errorf("the lens fit failed (%v): take more photos with the board at different angles", err)
	}
	if rvecs.Rows() == len(res.Used) && tvecs.Rows() == len(res.Used) {
		for v := range res.Used {
			rv, tv := rvecs.GetVecdAt(v, 0), tvecs.GetVecdAt(v, 0)
			res.ViewRMSPX = append(res.ViewRMSPX, res.Camera.viewRMS(board, corners[v],
				[3]float64{rv[0], rv[1], rv[2]}, [3]float64{tv[0], tv[1], tv[2]}))
		}
	}
	return res, nil
}

// viewRMS projects the board corners with pose (rotation vector rv,
// translation tv) and returns the RMS distance to the detected corners.
func (c *Camera) viewRMS(board []gocv.Point3f, got []gocv.Point2f, rv, tv [3]float64) float64 {
	r := rodrigues(rv)
	var s float64
	for i, b := range board {
		X, Y, Z := float64(b.X), float64(b.Y), float64(b.Z)
		xc := r[0]*X + r[1]*Y + r[2]*Z + tv[0]
		yc := r[3]*X + r[4]*Y + r[5]*Z + tv[1]
		zc := r[6]*X + r[7]*Y + r[8]*Z + tv[2]
		xd, yd := c.distortNormalized(xc/zc, yc/zc)
		u, v := c.FXPX*xd+c.CXPX, c.FYPX*yd+c.CYPX
		du, dv := u-float64(got[i].X), v-float64(got[i].Y)
		s += du*du + dv*dv
	}
	return math.Sqrt(s / float64(len(board)))
}

// rodrigues turns a rotation vector (axis times angle, rad) into a
// row-major rotation matrix: R = cos t I + (1 - cos t) k k' + sin t [k]x.
func rodrigues(rv [3]float64) [9]float64 {
	t := math.Sqrt(rv[0]*rv[0] + rv[1]*rv[1] + rv[2]*rv[2])
	if t < 1e-15 {
		return [9]float64{1, 0, 0, 0, 1, 0, 0, 0, 1}
	}
	kx, ky, kz := rv[0]/t, rv[1]/t, rv[2]/t
	c, s := math.Cos(t), math.Sin(t)
	v := 1 - c
	return [9]float64{
		c + v*kx*kx, v*kx*ky - s*kz, v*kx*kz + s*ky,
		v*ky*kx + s*kz, c + v*ky*ky, v*ky*kz - s*kx,
		v*kz*kx - s*ky, v*kz*ky + s*kx, c + v*kz*kz,
	}
}

func unwrapPath(err error) error {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err
	}
	return err
}
