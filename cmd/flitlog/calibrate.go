package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"flitlog/calibration"
)

const calibrateUsage = `
usage: flitlog calibrate scale|plane|chessboard [flags]

Makes a calibration file for 'flitlog run --calibration FILE': how image
pixels of one camera setting map to millimetres on the flower plane. A
calibration holds for one frame size, zoom and camera position.

  scale       px/mm from the two ends of a reference of known length (a
              ruler lying on the patch); camera looking straight down
  plane       a homography from 4 or more points of known plane position
              (pegs measured with a tape); camera looking at an angle
  chessboard  the lens distortion from photos of a printed chessboard;
              combine it with scale or plane (--lens), or give --point here

Pixel positions are those of the full-size video frame (x right, y down,
from the top-left corner), e.g. read off a still in an image viewer.

Run 'flitlog calibrate SUBCOMMAND --help' for its flags.

Examples:
  flitlog calibrate scale --p1 212,540 --p2 1706,548 --length-mm 500 --frame 1920x1080 --out cam1.json
  flitlog calibrate chessboard --dir board-photos/ --inner 9x6 --square-mm 25 --out lens.json
  flitlog calibrate plane --lens lens.json --out cam2.json \
      --point 102,88=0,0 --point 1801,140=600,0 --point 1750,990=600,400 --point 160,1002=0,400
`

const calibrateScaleUsage = `
usage: flitlog calibrate scale --p1 X,Y --p2 X,Y --length-mm L --frame WxH --out FILE

Measures the scale, px/mm, from the two ends (--p1, --p2, pixels) of a
reference of known length (--length-mm) lying on the flower plane, and
prints it with the uncertainty that a 1 px click error at each end
implies (2 px / length). Use a reference that spans a good part of the
frame: 200 px give 1%. The plane axes are the image axes.

With --lens FILE (from 'flitlog calibrate chessboard') the points are
undistorted first and the lens model is kept in the output; --frame may
then be left out.

Exit status: 0 written, 1 bad input (one line saying what to do), 2 usage
error.

Example:
  flitlog calibrate scale --p1 212,540 --p2 1706,548 --length-mm 500 --frame 1920x1080 --out cam1.json
`

const calibratePlaneUsage = `
usage: flitlog calibrate plane --point X,Y=XMM,YMM ... --frame WxH --out FILE

Fits a homography from image pixels to plane millimetres, for a camera
that looks at the flower patch at an angle. Give each point's pixel
position and its position on the plane in mm (--point, 4 or more, no
three of four in a line): pegs or tile corners measured with a tape from
one corner of the patch, which becomes the origin. The fit uses RANSAC
with a 3 px threshold; points that do not agree with the others are left
out and named, so that their clicks or measurements can be checked. With
4 points the fit is exact; 6 or more show the size of the click error
(RMS reprojection error, px).

With --lens FILE (from 'flitlog calibrate chessboard') the pixels are
undistorted first and the lens model is kept; --frame may then be left
out.

Exit status: 0 written, 1 bad input (one line saying what to do), 2 usage
error.

Example:
  flitlog calibrate plane --frame 1920x1080 --out cam2.json \
      --point 102,88=0,0 --point 1801,140=600,0 --point 1750,990=600,400 --point 160,1002=0,400
`

const calibrateChessboardUsage = `
usage: flitlog calibrate chessboard --dir DIR --inner CxR --square-mm S [--out FILE]

Fits the lens model (focal length, principal point, radial and tangential
distortion) from photos of a flat printed chessboard in DIR (.jpg .jpeg
.png .bmp .tif), taken with the same camera setting as the clips: 10-20
photos with the board at different angles and places, together covering
the frame. --inner counts the inner corners, where four squares meet
(9x6 for a board of 10x7 squares). Prints the RMS reprojection error
(below 0.5 px is good) and the error of each photo.

The result is a lens file for 'flitlog calibrate scale|plane --lens FILE'.
With --point (as for 'flitlog calibrate plane') the plane is fitted here
too and the file is ready for 'flitlog run'. Without --out nothing is
written.

Exit status: 0 done, 1 bad input (one line saying what to do), 2 usage
error.

Example:
  flitlog calibrate chessboard --dir board-photos/ --inner 9x6 --square-mm 25 --out lens.json
`

func cmdCalibrate(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, strings.TrimLeft(calibrateUsage, "\n"))
		return exitUsage
	}
	switch args[0] {
	case "-h", "-help", "--help", "help":
		fmt.Fprint(stdout, strings.TrimLeft(calibrateUsage, "\n"))
		return exitOK
	case "scale":
		return calibrateScale(args[1:], stdout, stderr)
	case "plane":
		return calibratePlane(args[1:], stdout, stderr)
	case "chessboard":
		return calibrateChessboard(args[1:], stdout, stderr)
	}
	fmt.Fprintf(stderr, "flitlog calibrate: unknown subcommand %q: want scale, plane or chessboard; run 'flitlog calibrate --help'\n", args[0])
	return exitUsage
}

// calibrateCmd holds what the three subcommands share.
type calibrateCmd struct {
	name           string // "calibrate scale"
	stdout, stderr io.Writer
}

func (c calibrateCmd) usageErr(format string, a ...any) int {
	fmt.Fprintf(c.stderr, "flitlog %s: %s; run 'flitlog %s --help'\n", c.name, fmt.Sprintf(format, a...), c.name)
	return exitUsage
}

func (c calibrateCmd) fail(err error) int {
	fmt.Fprintf(c.stderr, "flitlog %s: %s\n", c.name, oneLine(err.Error()))
	return exitSome
}

func (c calibrateCmd) warn(format string, a ...any) {
	fmt.Fprintf(c.stderr, "flitlog %s: warning: %s\n", c.name, fmt.Sprintf(format, a...))
}

// lensAndFrame loads --lens (if given) and settles the frame size from
// --frame and the lens file; exactly one source, or both agreeing.
func (c calibrateCmd) lensAndFrame(lensPath string, frame calibFrameFlag) (*calibration.Camera, int, int, int) {
	var cam *calibration.Camera
	w, h := frame.w, frame.h
	if lensPath != "" {
		lc, lw, lh, err := calibration.LoadLens(lensPath)
		if err != nil {
			return nil, 0, 0, c.fail(err)
		}
		cam = lc
		switch {
		case w == 0:
			w, h = lw, lh
		case lw != 0 && (lw != w || lh != h):
			return nil, 0, 0, c.fail(fmt.Errorf("--frame %dx%d but lens file %s was made for %dx%d frames: calibrate at the clips' frame size", w, h, lensPath, lw, lh))
		}
	}
	if w == 0 {
		return nil, 0, 0, c.usageErr("--frame WxH is required (the clips' frame size, e.g. 1920x1080)")
	}
	return cam, w, h, -1
}

func calibrateScale(args []string, stdout, stderr io.Writer) int {
	c := calibrateCmd{"calibrate scale", stdout, stderr}
	fs := newFlagSet(c.name)
	var p1, p2 calibPointFlag
	var frame calibFrameFlag
	fs.Var(&p1, "p1", "one end of the reference, pixel `X,Y`")
	fs.Var(&p2, "p2", "the other end of the reference, pixel `X,Y`")
	length := fs.Float64("length-mm", 0, "real length `L` of the reference between the two points, mm")
	fs.Var(&frame, "frame", "frame size of the clips, `WxH` pixels (e.g. 1920x1080)")
	out := fs.String("out", "", "calibration `FILE` to write (JSON)")
	lens := fs.String("lens", "", "lens model `FILE` from 'flitlog calibrate chessboard' (optional)")
	note := fs.String("note", "", "free `TEXT` stored in the file (what, where, when)")
	pos, code, done := parseArgs(fs, args, calibrateScaleUsage, stdout, stderr)
	if done {
		return code
	}
	if len(pos) > 0 {
		return c.usageErr("unexpected argument %q", pos[0])
	}
	set := calibSetFlags(fs)
	for _, f := range []string{"p1", "p2", "length-mm", "out"} {
		if !set[f] {
			return c.usageErr("--%s is required", f)
		}
	}
	cam, w, h, code := c.lensAndFrame(*lens, frame)
	if code >= 0 {
		return code
	}
	s, err := calibration.ScaleFromPoints(p1.x, p1.y, p2.x, p2.y, *length, cam)
	if err != nil {
		return c.fail(err)
	}
	ref := [4]float64{p1.x, p1.y, p2.x, p2.y}
	cal := &calibration.Calibration{
		FrameWidthPX: w, FrameHeightPX: h,
		PXPerMM: s.PXPerMM, PXPerMMUncertainty: s.UncertaintyPXPerMM,
		ReferenceLengthMM: *length, ReferencePX: &ref,
		Camera: cam, Note: *note,
	}
	fmt.Fprintf(stdout, "scale %.4f px/mm +- %.4f (%.2f%%, from a 1 px click error at each end; reference %.1f px = %g mm)\n",
		s.PXPerMM, s.UncertaintyPXPerMM, 100*s.RelativeUncertainty(), s.DistancePX, *length)
	if s.RelativeUncertainty() > 0.02 {
		c.warn("the scale is uncertain by %.1f%%: click the ends of a longer reference (%.0f px or more keeps it within 2%%)",
			100*s.RelativeUncertainty(), 2*calibration.ClickErrorPX/0.02)
	}
	return c.save(cal, *out)
}

func calibratePlane(args []string, stdout, stderr io.Writer) int {
	c := calibrateCmd{"calibrate plane", stdout, stderr}
	fs := newFlagSet(c.name)
	var pts calibPointsFlag
	var frame calibFrameFlag
	fs.Var(&pts, "point", "a point of the plane: pixel and plane position, `X,Y=XMM,YMM` (repeat, 4 or more)")
	fs.Var(&frame, "frame", "frame size of the clips, `WxH` pixels (e.g. 1920x1080)")
	out := fs.String("out", "", "calibration `FILE` to write (JSON)")
	lens := fs.String("lens", "", "lens model `FILE` from 'flitlog calibrate chessboard' (optional)")
	note := fs.String("note", "", "free `TEXT` stored in the file (what, where, when)")
	pos, code, done := parseArgs(fs, args, calibratePlaneUsage, stdout, stderr)
	if done {
		return code
	}
	if len(pos) > 0 {
		return c.usageErr("unexpected argument %q", pos[0])
	}
	if !calibSetFlags(fs)["out"] {
		return c.usageErr("--out is required")
	}
	cam, w, h, code := c.lensAndFrame(*lens, frame)
	if code >= 0 {
		return code
	}
	cal, err := c.fitPlane(pts, cam, w, h)
	if err != nil {
		return c.fail(err)
	}
	cal.Note = *note
	return c.save(cal, *out)
}

// fitPlane fits and reports a plane; the result has the frame size and
// camera set.
func (c calibrateCmd) fitPlane(pts []calibration.Correspondence, cam *calibration.Camera, w, h int) (*calibration.Calibration, error) {
	fit, err := calibration.FitPlane(pts, cam)
	if err != nil {
		return nil, err
	}
	fmt.Fprintf(c.stdout, "plane from %d points:\n", len(pts))
	fmt.Fprintf(c.stdout, "  point  x_px     y_px     x_mm     y_mm     error_px\n")
	for i, p := range pts {
		mark := ""
		if !fit.Inlier[i] {
			mark = "  left out"
		}
		fmt.Fprintf(c.stdout, "  %-5d  %-7.1f  %-7.1f  %-7.1f  %-7.1f  %.2f%s\n", i+1, p.XPX, p.YPX, p.XMM, p.YMM, fit.ErrorPX[i], mark)
	}
	for i, p := range pts {
		if !fit.Inlier[i] {
			c.warn("point %d (%g,%g=%g,%g) is %.1f px off the plane of the others and was left out: check its pixel and mm position",
				i+1, p.XPX, p.YPX, p.XMM, p.YMM, fit.ErrorPX[i])
		}
	}
	h9 := fit.PXToMM
	cal := &calibration.Calibration{
		FrameWidthPX: w, FrameHeightPX: h,
		HomographyPXToMM: &h9, PlanePoints: pts, PlaneRMSPX: fit.RMSPX, Camera: cam,
	}
	if err := cal.Validate(); err != nil {
		return nil, err
	}
	if len(pts) == 4 {
		fmt.Fprintf(c.stdout, "RMS reprojection error 0 px: 4 points fit exactly; add 2 or more to see the click error\n")
	} else {
		kept := 0
		for _, in := range fit.Inlier {
			if in {
				kept++
			}
		}
		fmt.Fprintf(c.stdout, "RMS reprojection error %.2f px, largest %.2f px (over the %d points kept)\n", fit.RMSPX, fit.MaxPX, kept)
	}
	fmt.Fprintf(c.stdout, "scale at the frame centre %.4f px/mm\n", cal.NominalPXPerMM())
	return cal, nil
}

func calibrateChessboard(args []string, stdout, stderr io.Writer) int {
	c := calibrateCmd{"calibrate chessboard", stdout, stderr}
	fs := newFlagSet(c.name)
	var inner calibFrameFlag
	var pts calibPointsFlag
	dir := fs.String("dir", "", "folder `DIR` of chessboard photos")
	fs.Var(&inner, "inner", "inner corners of the board, `CxR` (9x6 for 10x7 squares)")
	square := fs.Float64("square-mm", 0, "side `S` of one printed square, mm")
	fixAspect := fs.Bool("fix-aspect", false, "keep fx = fy (square pixels); needs fewer photos")
	fs.Var(&pts, "point", "also fit a plane: pixel and plane position `X,Y=XMM,YMM` (repeat, 4 or more)")
	out := fs.String("out", "", "lens (or, with --point, calibration) `FILE` to write (JSON); default: print only")
	note := fs.String("note", "", "free `TEXT` stored in the file (what, where, when)")
	posArgs, code, done := parseArgs(fs, args, calibrateChessboardUsage, stdout, stderr)
	if done {
		return code
	}
	if len(posArgs) > 0 {
		return c.usageErr("unexpected argument %q", posArgs[0])
	}
	set := calibSetFlags(fs)
	for _, f := range []string{"dir", "inner", "square-mm"} {
		if !set[f] {
			return c.usageErr("--%s is required", f)
		}
	}
	res, err := calibration.CalibrateChessboardDir(*dir, calibration.ChessboardOptions{
		InnerCols: inner.w, InnerRows: inner.h, SquareMM: *square, FixAspectRatio: *fixAspect,
	})
	if err != nil {
		return c.fail(err)
	}
	cam := res.Camera
	fmt.Fprintf(stdout, "board found in %d of %d photos (%dx%d px)\n", len(res.Used), len(res.Used)+len(res.NoBoard), res.FrameWidthPX, res.FrameHeightPX)
	for _, p := range res.NoBoard {
		fmt.Fprintf(stdout, "  no board: %s\n", filepath.Base(p))
	}
	fmt.Fprintf(stdout, "RMS reprojection error %.3f px\n", cam.RMSPX)
	fmt.Fprintf(stdout, "fx %.2f px, fy %.2f px, cx %.2f px, cy %.2f px\n", cam.FXPX, cam.FYPX, cam.CXPX, cam.CYPX)
	fmt.Fprintf(stdout, "k1 %.5f, k2 %.5f, k3 %.5f, p1 %.6f, p2 %.6f\n", cam.K1, cam.K2, cam.K3, cam.P1, cam.P2)
	if len(res.ViewRMSPX) == len(res.Used) {
		med := calibMedian(res.ViewRMSPX)
		fmt.Fprintf(stdout, "error per photo, px:\n")
		for i, p := range res.Used {
			mark := ""
			if res.ViewRMSPX[i] > 2*med && res.ViewRMSPX[i] > 0.5 {
				mark = "  (high: blurred, or the board not flat? try without it)"
			}
			fmt.Fprintf(stdout, "  %-24s %.3f%s\n", filepath.Base(p), res.ViewRMSPX[i], mark)
		}
	}
	if cam.RMSPX > 1 {
		c.warn("RMS reprojection error %.2f px is high: use sharp photos of a flat board, and leave out the worst ones", cam.RMSPX)
	}
	cal := &calibration.Calibration{FrameWidthPX: res.FrameWidthPX, FrameHeightPX: res.FrameHeightPX, Camera: &cam, Note: *note}
	if len(pts) > 0 {
		if cal, err = c.fitPlane(pts, &cam, res.FrameWidthPX, res.FrameHeightPX); err != nil {
			return c.fail(err)
		}
		cal.Note = *note
	}
	if *out == "" {
		fmt.Fprintf(stdout, "not saved: give --out FILE to save\n")
		return exitOK
	}
	if len(pts) == 0 {
		// A lens file: no scale yet, so it is written without Validate
		// (which requires one); LoadLens reads it.
		return c.saveLens(cal, *out)
	}
	return c.save(cal, *out)
}

func (c calibrateCmd) save(cal *calibration.Calibration, path string) int {
	if err := cal.Save(path); err != nil {
		return c.fail(err)
	}
	fmt.Fprintf(c.stdout, "wrote %s\n", path)
	return exitOK
}

// saveLens writes a lens-only calibration (camera and frame size, no
// scale yet).
func (c calibrateCmd) saveLens(cal *calibration.Calibration, path string) int {
	if err := calibration.SaveLens(path, cal.Camera, cal.FrameWidthPX, cal.FrameHeightPX, cal.Note); err != nil {
		return c.fail(err)
	}
	fmt.Fprintf(c.stdout, "wrote %s (lens only: add a scale with 'flitlog calibrate scale --lens %s ...' or 'flitlog calibrate plane --lens %s ...')\n", path, path, path)
	return exitOK
}

func calibSetFlags(fs *flag.FlagSet) map[string]bool {
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	return set
}

func calibMedian(x []float64) float64 {
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	if len(s) == 0 {
		return math.NaN()
	}
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

// calibPointFlag is a pixel position "X,Y".
type calibPointFlag struct {
	x, y float64
}

func (p *calibPointFlag) String() string { return fmt.Sprintf("%g,%g", p.x, p.y) }

func (p *calibPointFlag) Set(s string) error {
	x, y, err := calibParsePair(s, ",")
	if err != nil {
		return fmt.Errorf("want pixel X,Y such as 212,540: %v", err)
	}
	p.x, p.y = x, y
	return nil
}

// calibFrameFlag is a size "WxH" of positive integers.
type calibFrameFlag struct {
	w, h int
}

func (f *calibFrameFlag) String() string {
	if f.w == 0 {
		return ""
	}
	return fmt.Sprintf("%dx%d", f.w, f.h)
}

func (f *calibFrameFlag) Set(s string) error {
	a, b, ok := strings.Cut(strings.ToLower(strings.TrimSpace(s)), "x")
	w, err1 := strconv.Atoi(strings.TrimSpace(a))
	h, err2 := strconv.Atoi(strings.TrimSpace(b))
	if !ok || err1 != nil || err2 != nil || w <= 0 || h <= 0 {
		return errors.New("want WxH with whole numbers > 0, such as 1920x1080")
	}
	f.w, f.h = w, h
	return nil
}

// calibPointsFlag collects repeated "X,Y=XMM,YMM" values.
type calibPointsFlag []calibration.Correspondence

func (c *calibPointsFlag) String() string { return fmt.Sprintf("%d points", len(*c)) }

func (c *calibPointsFlag) Set(s string) error {
	px, mm, ok := strings.Cut(s, "=")
	if !ok {
		return errors.New("want X,Y=XMM,YMM (pixel = plane mm) such as 102,88=0,0")
	}
	x, y, err := calibParsePair(px, ",")
	if err != nil {
		return fmt.Errorf("pixel part of %q: %v", s, err)
	}
	xm, ym, err := calibParsePair(mm, ",")
	if err != nil {
		return fmt.Errorf("mm part of %q: %v", s, err)
	}
	*c = append(*c, calibration.Correspondence{XPX: x, YPX: y, XMM: xm, YMM: ym})
	return nil
}

// parsePair parses two finite numbers separated by sep.
func calibParsePair(s, sep string) (float64, float64, error) {
	a, b, ok := strings.Cut(s, sep)
	if !ok {
		return 0, 0, fmt.Errorf("%q is not two numbers separated by %q", s, sep)
	}
	x, err1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
	y, err2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if err1 != nil || err2 != nil || math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) {
		return 0, 0, fmt.Errorf("%q is not two numbers separated by %q", s, sep)
	}
	return x, y, nil
}
