package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"time"

	"gocv.io/x/gocv"

	"flitlog/kinematics"
	"flitlog/track"
	"flitlog/visits"
)

// Output file names in a clip's folder. summary.json is written last: its
// presence with a matching resume key marks the clip as complete.
const (
	fileTracks      = "tracks.csv"
	fileVisits      = "visits.csv"
	fileInspections = "inspections.csv"
	fileFlights     = "flights.csv"
	fileSummary     = "summary.json"
	filePathPlot    = "path.png"
	fileSpeedPlot   = "speed.png"
	fileTimeline    = "timeline.png"
	fileOverlay     = "overlay.mp4"
)

// resumeKey identifies what a clip's outputs were computed from.
type resumeKey struct {
	InputSizeBytes int64  `json:"input_size_bytes"`
	InputModTime   string `json:"input_mod_time"`
	SettingsHash   string `json:"settings_hash"`
	ToolVersion    string `json:"tool_version"`
	Plots          bool   `json:"plots"`
	Overlay        bool   `json:"overlay"`
}

func keyFor(path string, s Settings) (resumeKey, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return resumeKey{}, err
	}
	cal := s.Calibration.File
	return resumeKey{
		InputSizeBytes: fi.Size(),
		InputModTime:   fi.ModTime().UTC().Format(time.RFC3339Nano),
		SettingsHash:   s.Hash(cal, flowerFileFor(path, s), s.Track.ROIMaskPath),
		ToolVersion:    toolVersion(),
		Plots:          s.Output.Plots,
		Overlay:        s.Output.Overlay,
	}, nil
}

// previousResult returns the clip's earlier result when its outputs are
// complete and were computed from the same input and settings.
func previousResult(dir string, key resumeKey) (clipResult, bool) {
	b, err := os.ReadFile(filepath.Join(dir, fileSummary))
	if err != nil {
		return clipResult{}, false
	}
	var sum summaryJSON
	if json.Unmarshal(b, &sum) != nil || sum.Resume != key {
		return clipResult{}, false
	}
	for _, f := range sum.Files {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			return clipResult{}, false
		}
	}
	return clipResult{Status: sum.Status, Reason: sum.Reason, Frames: sum.Clip.FramesRead,
		DurationS: sum.Clip.DurationS, Tracks: len(sum.Tracks), Landings: sum.Counts.Landings,
		MeanHandlingS: nanIfNil(sum.Counts.MeanHandlingS), Warnings: sum.Warnings}, true
}

func nanIfNil(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// processClip is one clip of a batch: skip it when unchanged, else analyse
// it and write its outputs through a temporary folder that replaces the
// clip's folder only when every file is written.
func processClip(ctx context.Context, j clipJob, s Settings, opts runOptions, prog progressSink) clipResult {
	dir := filepath.Join(opts.OutDir, j.OutName)
	r := clipResult{Path: j.Path, OutDir: dir, MeanHandlingS: math.NaN()}
	key, err := keyFor(j.Path, s)
	if err != nil {
		r.Status, r.Reason = statusFailed, errText(err)
		return r
	}
	if !opts.Force {
		if prev, ok := previousResult(dir, key); ok {
			prev.Path, prev.OutDir, prev.Skipped = j.Path, dir, true
			return prev
		}
	}
	a, err := analyzeClip(ctx, j.Path, s, prog)
	if err != nil {
		r.Status, r.Reason = statusFailed, oneLine(err.Error())
		return r
	}
	r.Frames, r.DurationS, r.Tracks = a.FramesRead, a.DurationS, len(a.Tracks)
	r.Landings, r.MeanHandlingS, r.Warnings = len(a.Visits.Landings), meanHandlingS(a.Visits.Landings), a.Warnings
	r.Status = statusOK
	if a.Partial {
		r.Status, r.Reason = statusPartial, a.Warnings[len(a.Warnings)-1]
	}
	if err := writeClipOutputs(ctx, dir, a, s, key, r); err != nil {
		r.Status, r.Reason = statusFailed, "writing outputs: "+oneLine(err.Error())
	}
	return r
}

// writeClipOutputs writes every output of a clip into a temporary folder
// beside dir and then puts it in dir's place.
func writeClipOutputs(ctx context.Context, dir string, a *clipAnalysis, s Settings, key resumeKey, r clipResult) error {
	parent := filepath.Dir(dir)
	// Temporary folders left by a run that was killed outright.
	if stale, _ := filepath.Glob(filepath.Join(parent, "."+filepath.Base(dir)+".tmp-*")); len(stale) > 0 {
		for _, d := range stale {
			os.RemoveAll(d)
		}
	}
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+".tmp-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	if err := os.Chmod(tmp, 0o755); err != nil {
		return err
	}
	files := []string{fileTracks, fileVisits, fileInspections, fileFlights}
	write := func(name string, f func(io.Writer) error) error {
		fh, err := os.Create(filepath.Join(tmp, name))
		if err != nil {
			return err
		}
		if err := f(fh); err != nil {
			fh.Close()
			return fmt.Errorf("%s: %v", name, err)
		}
		return fh.Close()
	}
	if err := write(fileTracks, func(w io.Writer) error { return writeTracksCSV(w, a) }); err != nil {
		return err
	}
	if err := write(fileVisits, func(w io.Writer) error { return visits.WriteLandingsCSV(w, a.Visits.Landings) }); err != nil {
		return err
	}
	if err := write(fileInspections, func(w io.Writer) error { return visits.WriteInspectionsCSV(w, a.Visits.Inspections) }); err != nil {
		return err
	}
	if err := write(fileFlights, func(w io.Writer) error { return visits.WriteFlightsCSV(w, a.Visits.Flights) }); err != nil {
		return err
	}
	if s.Output.Plots {
		names, err := writePlots(tmp, a)
		if err != nil {
			a.Warnings = append(a.Warnings, "plots: "+oneLine(err.Error()))
		}
		files = append(files, names...)
	}
	if s.Output.Overlay {
		name, warn, err := writeOverlay(ctx, filepath.Join(tmp, fileOverlay), a, s)
		switch {
		case ctx.Err() != nil:
			return errInterrupted
		case err != nil:
			a.Warnings = append(a.Warnings, "overlay: "+oneLine(err.Error()))
		default:
			files = append(files, name)
			if warn != "" {
				a.Warnings = append(a.Warnings, warn)
			}
		}
	}
	sum := buildSummary(a, s, key, r, files)
	if err := write(fileSummary, func(w io.Writer) error {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(jsonSafe(sum))
	}); err != nil {
		return err
	}
	if ctx.Err() != nil {
		return errInterrupted
	}
	// Swap the folders: the old outputs stay until the new ones are whole.
	old := ""
	if _, err := os.Stat(dir); err == nil {
		old = tmp + ".old"
		if err := os.Rename(dir, old); err != nil {
			return err
		}
	}
	if err := os.Rename(tmp, dir); err != nil {
		if old != "" {
			os.Rename(old, dir)
		}
		return err
	}
	if old != "" {
		os.RemoveAll(old)
	}
	return nil
}

// writeTracksCSV writes tracks.csv: one row per track point.
func writeTracksCSV(w io.Writer, a *clipAnalysis) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"frame", "time_s", "track_id", "x_px", "y_px", "observed", "x_mm", "y_mm",
		"vx_mm_s", "vy_mm_s", "speed_mm_s", "accel_mm_s2", "heading_deg", "turn_rate_deg_s",
		"curvature_per_mm", "state", "flower_id"})
	// The flower a bee is landed on, by track and frame, from the landings.
	on := map[int][]visits.Landing{}
	for _, l := range a.Visits.Landings {
		on[l.TrackID] = append(on[l.TrackID], l)
	}
	for _, kr := range a.Kinematics {
		ls := on[kr.ID]
		li := 0
		for _, p := range kr.Samples {
			for li < len(ls) && ls[li].EndFrame < p.Frame {
				li++
			}
			flower := ""
			if li < len(ls) && ls[li].StartFrame <= p.Frame {
				flower = ls[li].FlowerID
			}
			cw.Write([]string{strconv.Itoa(p.Frame), fmtFloat(p.TimeS, 4), strconv.Itoa(kr.ID),
				fmtFloat(p.XPX, 2), fmtFloat(p.YPX, 2), strconv.FormatBool(p.Observed),
				fmtFloat(p.XMM, 2), fmtFloat(p.YMM, 2), fmtFloat(p.VXMMPerS, 1), fmtFloat(p.VYMMPerS, 1),
				fmtFloat(p.SpeedMMPerS, 1), fmtFloat(p.AccelMMPerS2, 0), fmtFloat(p.HeadingDeg, 1),
				fmtFloat(p.TurnRateDegPerS, 1), fmtFloat(p.CurvaturePerMM, 5), p.State.String(), flower})
		}
	}
	cw.Flush()
	return cw.Error()
}

// summaryJSON is summary.json.
type summaryJSON struct {
	Tool struct {
		Version       string `json:"version"`
		GocvVersion   string `json:"gocv_version"`
		OpenCVVersion string `json:"opencv_version"`
	} `json:"tool"`
	Status   string   `json:"status"`
	Reason   string   `json:"reason,omitempty"`
	Warnings []string `json:"warnings"`
	Clip     struct {
		Path         string  `json:"path"`
		SizeBytes    int64   `json:"size_bytes"`
		SHA256       string  `json:"sha256"`
		WidthPX      int     `json:"width_px"`
		HeightPX     int     `json:"height_px"`
		FPS          float64 `json:"fps"`
		FourCC       string  `json:"fourcc"`
		HeaderFrames int     `json:"header_frames"`
		FramesRead   int     `json:"frames_read"`
		DurationS    float64 `json:"duration_s"`
	} `json:"clip"`
	Scale struct {
		Source  string  `json:"source"`
		PXPerMM float64 `json:"px_per_mm_nominal"`
	} `json:"scale"`
	FlowerMap struct {
		File    string `json:"file,omitempty"`
		Flowers int    `json:"flowers"`
	} `json:"flower_map"`
	Counts struct {
		Tracks        int      `json:"tracks"`
		Landings      int      `json:"landings"`
		Inspections   int      `json:"inspections"`
		Flights       int      `json:"flights"`
		MeanHandlingS *float64 `json:"mean_handling_s"`
	} `json:"counts"`
	Tracks       []trackSummary  `json:"tracks"`
	Visits       *visits.Summary `json:"visits,omitempty"`
	Settings     Settings        `json:"settings"`
	Resume       resumeKey       `json:"resume"`
	Files        []string        `json:"files"`
	Segmentation track.Stats     `json:"segmentation"`
	Processing   struct {
		ElapsedS      float64 `json:"elapsed_s"`
		FramesPerS    float64 `json:"frames_per_s"`
		FinishedAtUTC string  `json:"finished_at_utc"`
	} `json:"processing"`
}

type trackSummary struct {
	TrackID          int               `json:"track_id"`
	FirstFrame       int               `json:"first_frame"`
	LastFrame        int               `json:"last_frame"`
	StartS           float64           `json:"start_s"`
	EndS             float64           `json:"end_s"`
	ObservedFraction float64           `json:"observed_fraction"`
	Bouts            []kinematics.Bout `json:"flight_bouts"`
}

func buildSummary(a *clipAnalysis, s Settings, key resumeKey, r clipResult, files []string) summaryJSON {
	var sum summaryJSON
	sum.Tool.Version = toolVersion()
	sum.Tool.GocvVersion = gocv.Version()
	sum.Tool.OpenCVVersion = gocv.OpenCVVersion()
	sum.Status, sum.Reason = r.Status, r.Reason
	sum.Warnings = append([]string{}, a.Warnings...)
	c := &sum.Clip
	c.Path, c.SizeBytes, c.SHA256 = a.Path, a.SizeBytes, a.SHA256
	c.WidthPX, c.HeightPX, c.FPS, c.FourCC = a.Info.WidthPX, a.Info.HeightPX, a.TimeBase.FPS(), a.Info.FourCC
	c.HeaderFrames, c.FramesRead, c.DurationS = a.Info.HeaderFrames, a.FramesRead, a.DurationS
	sum.Scale.Source, sum.Scale.PXPerMM = a.CalibSource, a.PXPerMM
	if a.Flowers != nil {
		sum.FlowerMap.File, sum.FlowerMap.Flowers = a.FlowerFile, len(a.Flowers.Flowers)
		v := a.Visits.Summary
		sum.Visits = &v
	}
	sum.Counts.Tracks = len(a.Tracks)
	sum.Counts.Landings = len(a.Visits.Landings)
	sum.Counts.Inspections = len(a.Visits.Inspections)
	sum.Counts.Flights = len(a.Visits.Flights)
	if m := meanHandlingS(a.Visits.Landings); !math.IsNaN(m) {
		sum.Counts.MeanHandlingS = &m
	}
	sum.Tracks = []trackSummary{}
	bouts := map[int][]kinematics.Bout{}
	for _, k := range a.Kinematics {
		bouts[k.ID] = k.Bouts
	}
	for _, t := range a.Tracks {
		if len(t.Points) == 0 {
			continue
		}
		ts := trackSummary{TrackID: t.ID, FirstFrame: t.Points[0].Frame, LastFrame: t.Points[len(t.Points)-1].Frame}
		ts.StartS, ts.EndS = a.TimeBase.Seconds(ts.FirstFrame), a.TimeBase.Seconds(ts.LastFrame)
		n := 0
		for _, p := range t.Points {
			if p.Observed {
				n++
			}
		}
		ts.ObservedFraction = float64(n) / float64(len(t.Points))
		ts.Bouts = bouts[t.ID]
		sum.Tracks = append(sum.Tracks, ts)
	}
	sum.Settings = s
	sum.Segmentation = a.TrackStats
	sum.Resume = key
	sum.Files = append(files, fileSummary)
	sum.Processing.ElapsedS = a.ElapsedS
	if a.ElapsedS > 0 {
		sum.Processing.FramesPerS = float64(a.FramesRead) / a.ElapsedS
	}
	sum.Processing.FinishedAtUTC = time.Now().UTC().Format(time.RFC3339)
	return sum
}
