package calibration

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
)

// FormatName and FormatVersion identify a calibration file.
const (
	FormatName    = "flitlog-calibration"
	FormatVersion = 1
)

// Calibration maps image pixels of one camera setting to millimetres on
// the flower plane. It is stored as a JSON file (see doc.go for the
// format). Exactly one of PXPerMM and HomographyPXToMM is set; Camera is
// optional and applies before either.
type Calibration struct {
	Format        string `json:"format"`  // FormatName
	Version       int    `json:"version"` // FormatVersion
	FrameWidthPX  int    `json:"frame_width_px"`
	FrameHeightPX int    `json:"frame_height_px"`

	// PXPerMM is a plain scale: plane mm = undistorted px / PXPerMM, with
	// the plane axes along the image axes (x right, y down).
	PXPerMM float64 `json:"px_per_mm,omitempty"`
	// PXPerMMUncertainty is the scale's uncertainty from a 1 px click
	// error at each end of the reference (see Scale), px/mm.
	PXPerMMUncertainty float64 `json:"px_per_mm_uncertainty,omitempty"`
	// ReferenceLengthMM and ReferencePX record how PXPerMM was measured:
	// the reference's length and its two end points [x1, y1, x2, y2], px.
	ReferenceLengthMM float64     `json:"reference_length_mm,omitempty"`
	ReferencePX       *[4]float64 `json:"reference_px,omitempty"`

	// HomographyPXToMM maps undistorted pixels to plane mm, row-major
	// 3x3: (X, Y, W) = H (u, v, 1), plane point (X/W, Y/W).
	HomographyPXToMM *[9]float64 `json:"homography_px_to_mm,omitempty"`
	// PlanePoints are the correspondences the homography was fitted to,
	// PlaneRMSPX its RMS reprojection error over the inliers, px.
	PlanePoints []Correspondence `json:"plane_points,omitempty"`
	PlaneRMSPX  float64          `json:"plane_rms_px,omitempty"`

	// Camera is the lens model from chessboard images; nil for none.
	Camera *Camera `json:"camera,omitempty"`

	// Note is free text (what was calibrated, when, by whom).
	Note string `json:"note,omitempty"`

	path string // file it was loaded from, for messages
}

// FromScale returns a calibration that is a plain scale of pxPerMM pixels
// per millimetre, with no frame size (CheckFrameSize accepts any frame).
func FromScale(pxPerMM float64) (*Calibration, error) {
	if !(pxPerMM > 0) || math.IsInf(pxPerMM, 0) {
		return nil, fmt.Errorf("scale %g px/mm is not usable: give the pixels per millimetre on the flower plane, > 0 (measure a ruler in the frame, or use 'flitlog calibrate scale')", pxPerMM)
	}
	return &Calibration{Format: FormatName, Version: FormatVersion, PXPerMM: pxPerMM}, nil
}

// name is how messages call the calibration.
func (c *Calibration) name() string {
	if c.path == "" {
		return "calibration"
	}
	return "calibration " + c.path
}

// Path is the file the calibration was loaded from or saved to ("" for
// one made in memory).
func (c *Calibration) Path() string { return c.path }

// Validate checks that the calibration can map pixels to mm: format and
// version, frame size, exactly one of scale and homography, a usable
// homography and camera. Errors are one line naming the file.
func (c *Calibration) Validate() error {
	err := c.validate()
	if err != nil {
		return fmt.Errorf("%s: %v", c.name(), err)
	}
	return nil
}

func (c *Calibration) validate() error {
	switch {
	case c.Format == "" && c.Version == 0 && c.path == "":
		// Made in memory: Save fills in the format.
	case c.Format != FormatName:
		return fmt.Errorf("not a flitlog calibration file (want \"format\": %q): make one with 'flitlog calibrate'", FormatName)
	case c.Version != FormatVersion:
		return fmt.Errorf("format version %d, this flitlog reads version %d: make the calibration again with this flitlog", c.Version, FormatVersion)
	}
	if c.FrameWidthPX < 0 || c.FrameHeightPX < 0 || (c.FrameWidthPX == 0) != (c.FrameHeightPX == 0) {
		return fmt.Errorf("frame size %dx%d: give both frame_width_px and frame_height_px (> 0)", c.FrameWidthPX, c.FrameHeightPX)
	}
	if c.Camera != nil {
		if err := c.Camera.validate(); err != nil {
			return err
		}
	}
	hasScale := c.PXPerMM != 0
	switch {
	case hasScale && c.HomographyPXToMM != nil:
		return errors.New("has both px_per_mm and homography_px_to_mm: keep one (the homography if the camera looks at the patch at an angle)")
	case !hasScale && c.HomographyPXToMM == nil && c.Camera != nil:
		return errors.New("has a lens model but no scale: add one with 'flitlog calibrate scale --lens FILE ...' or 'flitlog calibrate plane --lens FILE ...'")
	case !hasScale && c.HomographyPXToMM == nil:
		return errors.New("has neither px_per_mm nor homography_px_to_mm: make one with 'flitlog calibrate scale' or 'flitlog calibrate plane'")
	case hasScale && (!(c.PXPerMM > 0) || math.IsInf(c.PXPerMM, 0)):
		return fmt.Errorf("px_per_mm is %g: want > 0", c.PXPerMM)
	}
	if h := c.HomographyPXToMM; h != nil {
		for _, v := range h {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return errors.New("homography_px_to_mm has a value that is not a finite number: make the calibration again with 'flitlog calibrate plane'")
			}
		}
		if _, ok := invert3(*h); !ok {
			return errors.New("homography_px_to_mm is singular: make the calibration again with 'flitlog calibrate plane'")
		}
		if c.FrameWidthPX == 0 {
			return errors.New("a homography needs the frame size: add frame_width_px and frame_height_px")
		}
		cx, cy := float64(c.FrameWidthPX)/2, float64(c.FrameHeightPX)/2
		if x, y := c.ToPlaneMM(cx, cy); math.IsNaN(x) || math.IsNaN(y) {
			return errors.New("the centre of the frame is beyond the horizon of the plane homography: make the calibration again with 'flitlog calibrate plane'")
		}
	}
	return nil
}

// Load reads and checks a calibration file. Errors are one line naming
// the file and what to do.
func Load(path string) (*Calibration, error) {
	c, err := read(path)
	if err != nil {
		return nil, err
	}
	if err := c.Validate(); err != nil {
		return nil, err
	}
	return c, nil
}

// LoadLens reads the lens model of a calibration file, such as one made by
// 'flitlog calibrate chessboard' (which may have no scale yet), with the
// frame size it was made for.
func LoadLens(path string) (cam *Camera, frameWidthPX, frameHeightPX int, err error) {
	c, err := read(path)
	if err != nil {
		return nil, 0, 0, err
	}
	if c.Format != FormatName {
		return nil, 0, 0, fmt.Errorf("lens file %s: not a flitlog calibration file: make one with 'flitlog calibrate chessboard'", path)
	}
	if c.Camera == nil {
		return nil, 0, 0, fmt.Errorf("lens file %s has no lens model (\"camera\"): make one with 'flitlog calibrate chessboard'", path)
	}
	if err := c.Camera.validate(); err != nil {
		return nil, 0, 0, fmt.Errorf("lens file %s: %v", path, err)
	}
	return c.Camera, c.FrameWidthPX, c.FrameHeightPX, nil
}

func read(path string) (*Calibration, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return nil, fmt.Errorf("calibration %s: %v", path, err)
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	c := &Calibration{}
	if err := dec.Decode(c); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			line := 1 + bytes.Count(b[:se.Offset], []byte("\n"))
			return nil, fmt.Errorf("calibration %s: line %d: %v: fix the JSON or make the file again with 'flitlog calibrate'", path, line, se)
		}
		return nil, fmt.Errorf("calibration %s: %v: fix the JSON or make the file again with 'flitlog calibrate'", path, err)
	}
	c.path = path
	return c, nil
}

// Save checks c and writes it to path as indented JSON, through a
// temporary file in the same folder that is renamed over path, so that a
// crash never leaves half a file.
func (c *Calibration) Save(path string) error {
	if c.Format == "" {
		c.Format, c.Version = FormatName, FormatVersion
	}
	old := c.path
	c.path = path
	if err := c.Validate(); err != nil {
		c.path = old
		return err
	}
	return writeJSON(path, c)
}

// SaveLens writes a lens file: a calibration with a camera model and frame
// size but no scale yet, as 'flitlog calibrate chessboard' makes. LoadLens
// reads it; Load refuses it until a scale or plane is added.
func SaveLens(path string, cam *Camera, frameWidthPX, frameHeightPX int, note string) error {
	if cam == nil {
		panic("calibration: SaveLens without a camera")
	}
	if err := cam.validate(); err != nil {
		return fmt.Errorf("lens file %s: %v", path, err)
	}
	if frameWidthPX <= 0 || frameHeightPX <= 0 {
		return fmt.Errorf("lens file %s: frame size %dx%d: want both > 0", path, frameWidthPX, frameHeightPX)
	}
	return writeJSON(path, &Calibration{Format: FormatName, Version: FormatVersion,
		FrameWidthPX: frameWidthPX, FrameHeightPX: frameHeightPX, Camera: cam, Note: note})
}

// writeJSON writes c to path through a temporary file and a rename.
func writeJSON(path string, c *Calibration) error {
	b, err := json.MarshalIndent(c, "", "  ")
	if err != nil {
		return fmt.Errorf("calibration %s: %v", path, err)
	}
	b = append(b, '\n')
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return fmt.Errorf("calibration %s: cannot write: %v", path, unwrapPath(err))
	}
	_, werr := tmp.Write(b)
	cerr := tmp.Close()
	if werr == nil {
		werr = cerr
	}
	if werr == nil {
		werr = os.Rename(tmp.Name(), path)
	}
	if werr != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("calibration %s: cannot write: %v", path, unwrapPath(werr))
	}
	return nil
}

// CheckFrameSize returns an error if the calibration was made for frames
// of another size than w x h pixels. A calibration without a frame size
// (FromScale) accepts any.
func (c *Calibration) CheckFrameSize(w, h int) error {
	if c.FrameWidthPX == 0 || (c.FrameWidthPX == w && c.FrameHeightPX == h) {
		return nil
	}
	return fmt.Errorf("%s was made for %dx%d frames, this clip is %dx%d: make a calibration for this camera setting",
		c.name(), c.FrameWidthPX, c.FrameHeightPX, w, h)
}

// ToPlaneMM maps an image pixel (as recorded) to plane mm: undistortion
// with the lens model if there is one, then the homography if there is
// one, else the scale. It is pure Go and costs well under a microsecond.
// Pixels beyond the horizon of a homography map to NaN.
func (c *Calibration) ToPlaneMM(xpx, ypx float64) (xmm, ymm float64) {
	if c.Camera != nil {
		xpx, ypx = c.Camera.Undistort(xpx, ypx)
	}
	if c.HomographyPXToMM != nil {
		x, y, _ := applyH(*c.HomographyPXToMM, xpx, ypx)
		return x, y
	}
	return xpx / c.PXPerMM, ypx / c.PXPerMM
}

// NominalPXPerMM is the scale near the image centre, px per mm: PXPerMM
// for a plain scale; for a homography (and lens model) the square root of
// the area ratio of a small square at the frame centre, 1/sqrt(|det J|)
// with J the Jacobian of ToPlaneMM there. Use it to turn mm settings into
// pixel gates; it is exact only at the centre of an oblique view.
func (c *Calibration) NominalPXPerMM() float64 {
	if c.HomographyPXToMM == nil && (c.Camera == nil || !c.Camera.hasDistortion()) {
		return c.PXPerMM
	}
	var cx, cy float64
	switch {
	case c.FrameWidthPX > 0:
		cx, cy = float64(c.FrameWidthPX)/2, float64(c.FrameHeightPX)/2
	case c.Camera != nil:
		cx, cy = c.Camera.CXPX, c.Camera.CYPX
	}
	const h = 1.0 // px
	x1, y1 := c.ToPlaneMM(cx+h, cy)
	x0, y0 := c.ToPlaneMM(cx-h, cy)
	x3, y3 := c.ToPlaneMM(cx, cy+h)
	x2, y2 := c.ToPlaneMM(cx, cy-h)
	j11, j21 := (x1-x0)/(2*h), (y1-y0)/(2*h)
	j12, j22 := (x3-x2)/(2*h), (y3-y2)/(2*h)
	return 1 / math.Sqrt(math.Abs(j11*j22-j12*j21))
}
