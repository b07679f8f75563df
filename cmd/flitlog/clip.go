package main

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"image"
	"io"
	"math"
	"os"
	"path/filepath"
	"time"

	"gocv.io/x/gocv"

	"flitlog/calibration"
	"flitlog/kinematics"
	"flitlog/track"
	"flitlog/visits"
)

// clipAnalysis is everything computed for one clip, before it is written.
type clipAnalysis struct {
	Path       string
	SizeBytes  int64
	ModTime    time.Time
	SHA256     string
	Info       track.VideoInfo
	FramesRead int
	DurationS  float64
	Partial    bool // the clip ended early (truncated or corrupt tail)
	Warnings   []string

	Calibration *calibration.Calibration
	CalibSource string // how the scale was set, in words
	PXPerMM     float64
	TimeBase    *calibration.TimeBase

	FlowerFile string
	Flowers    *visits.FlowerMap // nil without a flower map
	Tracks     []track.Track
	Kinematics []kinematics.Result
	Visits     visits.Result
	Background image.Image // background model at the end, for plots
	TrackStats track.Stats // what segmentation did (disturbed frames, shake, ...)

	ElapsedS float64
}

// progressSink receives a clip's frame progress.
type progressSink interface {
	Start(frames int)
	Frames(n int)
}

type noProgress struct{}

func (noProgress) Start(int)  {}
func (noProgress) Frames(int) {}

// errInterrupted is returned when the run is cancelled mid-clip.
var errInterrupted = errors.New("interrupted before this clip finished; run the same command again to continue")

// flowerFileFor returns the flower map a clip uses: the settings' file, or
// CLIP.flowers.json beside the clip when it exists, or "".
func flowerFileFor(clip string, s Settings) string {
	if s.Flowers.File != "" {
		return s.Flowers.File
	}
	side := filepath.Join(filepath.Dir(clip), clipBase(clip)+".flowers.json")
	if _, err := os.Stat(side); err == nil {
		return side
	}
	return ""
}

// loadCalibration returns the calibration the settings ask for, checked
// against the frame size.
func loadCalibration(s Settings, w, h int) (*calibration.Calibration, string, []string, error) {
	var warn []string
	switch {
	case s.Calibration.File != "":
		c, err := calibration.Load(s.Calibration.File)
		if err != nil {
			return nil, "", nil, err
		}
		if err := c.CheckFrameSize(w, h); err != nil {
			return nil, "", nil, err
		}
		return c, "calibration file " + s.Calibration.File, nil, nil
	case s.Calibration.PXPerMM > 0:
		c, err := calibration.FromScale(s.Calibration.PXPerMM)
		return c, fmt.Sprintf("--px-per-mm %g", s.Calibration.PXPerMM), nil, err
	default:
		c, err := calibration.FromScale(DefaultPXPerMM)
		warn = append(warn, fmt.Sprintf("no scale given: assumed %g px/mm, so distances and speeds are nominal; give --px-per-mm or --calibration", DefaultPXPerMM))
		return c, fmt.Sprintf("assumed %g px/mm (no calibration given)", DefaultPXPerMM), warn, err
	}
}

// analyzeClip runs the whole pipeline on one clip. A clip that ends early
// returns its decodable part with Partial set and a warning; errors are
// one line naming the clip.
func analyzeClip(ctx context.Context, path string, s Settings, prog progressSink) (*clipAnalysis, error) {
	t0 := time.Now()
	a := &clipAnalysis{Path: path}
	fi, err := os.Stat(path)
	if err != nil {
		return nil, fmt.Errorf("%s", errText(err))
	}
	if fi.IsDir() {
		return nil, fmt.Errorf("is a folder, not a clip")
	}
	a.SizeBytes, a.ModTime = fi.Size(), fi.ModTime()
	if a.SizeBytes == 0 {
		return nil, fmt.Errorf("empty file (0 bytes): copy the clip again from the camera card")
	}
	hashDone := make(chan struct{})
	go func() {
		defer close(hashDone)
		a.SHA256, _ = fileSHA256(path)
	}()
	defer func() { <-hashDone }()

	src, err := track.Open(path, track.SourceOptions{FPSOverride: s.Video.FPS})
	if err != nil {
		return nil, err
	}
	defer src.Close()
	a.Info = src.Info()
	w, h := a.Info.WidthPX, a.Info.HeightPX

	cal, calSrc, warn, err := loadCalibration(s, w, h)
	if err != nil {
		return nil, err
	}
	a.Calibration, a.CalibSource, a.PXPerMM = cal, calSrc, cal.NominalPXPerMM()
	a.Warnings = append(a.Warnings, warn...)

	a.FlowerFile = flowerFileFor(path, s)
	if a.FlowerFile != "" {
		fm, err := visits.LoadFlowerMap(a.FlowerFile)
		if err != nil {
			return nil, err
		}
		if err := fm.Validate(w, h); err != nil {
			return nil, fmt.Errorf("flower map %s: %v", a.FlowerFile, err)
		}
		a.Flowers = &fm
	} else {
		a.Warnings = append(a.Warnings, "no flower map: landings were not scored; make one with 'flitlog flowers CLIP' or give --flowers FILE")
	}

	ts := s.Track
	ts.PXPerMM = a.PXPerMM
	tr, err := track.NewTracker(ts, a.Info)
	if err != nil {
		return nil, err
	}
	defer tr.Close()

	prog.Start(a.Info.HeaderFrames)
	frame := gocv.NewMat()
	defer frame.Close()
	var times []float64
	for {
		if ctx.Err() != nil {
			return nil, errInterrupted
		}
		fi, err := src.Next(&frame)
		if err == io.EOF {
			break
		}
		if err != nil {
			if len(times) == 0 {
				return nil, err
			}
			a.Partial = true
			a.Warnings = append(a.Warnings, fmt.Sprintf("clip ended early after %d frames (%v): the decodable part was scored", len(times), oneLine(err.Error())))
			break
		}
		if err := tr.Step(fi, frame); err != nil {
			return nil, err
		}
		times = append(times, fi.TimeS)
		if len(times)%10 == 0 {
			prog.Frames(len(times))
		}
	}
	prog.Frames(len(times))
	a.FramesRead = len(times)
	if a.FramesRead == 0 {
		return nil, fmt.Errorf("no frame could be decoded: is this a video file? try playing it, or re-export it as H.264 MP4")
	}
	if hf := a.Info.HeaderFrames; hf > 0 && !a.Partial && absInt(hf-a.FramesRead) > max(2, hf/100) {
		a.Warnings = append(a.Warnings, fmt.Sprintf("the file header says %d frames but %d were decoded (empty repeat frames of some AVI files do not count; times follow the file's own timestamps)", hf, a.FramesRead))
	}
	a.Tracks = tr.Finish()
	a.TrackStats = tr.Stats()
	if st := a.TrackStats; st.Frames > 0 && st.DisturbedFrames > st.Frames/20 {
		a.Warnings = append(a.Warnings, fmt.Sprintf("%d of %d frames were too disturbed to analyse (sudden light change or camera movement); try --stabilize", st.DisturbedFrames, st.Frames))
	}
	bg := gocv.NewMat()
	tr.Background(&bg)
	if !bg.Empty() {
		if img, err := bg.ToImage(); err == nil {
			a.Background = img
		}
	}
	bg.Close()

	tb, err := calibration.NewTimeBase(times, a.Info.FPS, s.Video.FPS)
	if err != nil {
		return nil, err
	}
	a.TimeBase = tb
	a.DurationS = tb.Seconds(a.FramesRead)
	a.Warnings = append(a.Warnings, tb.Warnings...)

	for _, t := range a.Tracks {
		kt := kinematics.Track{ID: t.ID, Points: make([]kinematics.Point, 0, len(t.Points))}
		dropped := 0
		for _, p := range t.Points {
			xmm, ymm := cal.ToPlaneMM(p.XPX, p.YPX)
			if math.IsNaN(xmm) || math.IsNaN(ymm) {
				dropped++ // beyond the horizon of an oblique-view calibration
				continue
			}
			kt.Points = append(kt.Points, kinematics.Point{Frame: p.Frame, TimeS: tb.Seconds(p.Frame),
				XPX: p.XPX, YPX: p.YPX, XMM: xmm, YMM: ymm, Observed: p.Observed})
		}
		if dropped > 0 {
			a.Warnings = append(a.Warnings, fmt.Sprintf("track %d: %d points lie outside the calibrated plane and were left out", t.ID, dropped))
		}
		if len(kt.Points) == 0 {
			continue
		}
		kr, err := kinematics.Analyze(kt, s.Kinematics)
		if err != nil {
			// One bad track must not cost the clip its other tracks.
			a.Warnings = append(a.Warnings, fmt.Sprintf("track %d left out of kinematics and visits: %v", t.ID, oneLine(err.Error())))
			continue
		}
		a.Kinematics = append(a.Kinematics, kr)
	}

	if a.Flowers != nil {
		clip := visits.Clip{Frames: a.FramesRead, FPS: tb.FPS(), DurationS: a.DurationS, PXPerMM: a.PXPerMM, TimeS: tb.Seconds}
		vr, err := visits.Analyze(a.Kinematics, *a.Flowers, clip, s.Visits)
		if err != nil {
			return nil, err
		}
		a.Visits = vr
	}
	a.ElapsedS = time.Since(t0).Seconds()
	return a, nil
}

func fileSHA256(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

func absInt(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// meanHandlingS is the mean duration of the landings, NaN without any.
func meanHandlingS(ls []visits.Landing) float64 {
	if len(ls) == 0 {
		return math.NaN()
	}
	var sum float64
	for _, l := range ls {
		sum += l.DurationS
	}
	return sum / float64(len(ls))
}
