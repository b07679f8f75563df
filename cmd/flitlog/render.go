package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"gocv.io/x/gocv"

	"flitlog/cmd/flitlog/internal/overlay"
	"flitlog/cmd/flitlog/internal/plots"
	"flitlog/track"
	"flitlog/visits"
)

// writePlots writes the PNG plots of a clip into dir and returns the names
// written. A plot that fails is skipped with its error; the others are
// still written.
func writePlots(dir string, a *clipAnalysis) ([]string, error) {
	fm := visits.FlowerMap{}
	if a.Flowers != nil {
		fm = *a.Flowers
	}
	title := filepath.Base(a.Path)
	jobs := []struct {
		name string
		draw func(w io.Writer) error
	}{
		{filePathPlot, func(w io.Writer) error {
			return plots.PathPlot(w, a.Background, fm, a.Kinematics, a.Visits.Landings, plots.Options{Title: title + ": flight paths"})
		}},
		{fileSpeedPlot, func(w io.Writer) error {
			return plots.SpeedPlot(w, a.Kinematics, plots.Options{Title: title + ": speed and flight state"})
		}},
	}
	if a.Flowers != nil {
		jobs = append(jobs, struct {
			name string
			draw func(w io.Writer) error
		}{fileTimeline, func(w io.Writer) error {
			return plots.TimelinePlot(w, fm, a.Visits.Landings, a.Visits.Inspections, a.DurationS, plots.Options{Title: title + ": flower visits"})
		}})
	}
	var names []string
	var first error
	for _, j := range jobs {
		f, err := os.Create(filepath.Join(dir, j.name))
		if err == nil {
			err = j.draw(f)
			if cerr := f.Close(); err == nil {
				err = cerr
			}
		}
		if err != nil {
			os.Remove(filepath.Join(dir, j.name))
			if first == nil {
				first = fmt.Errorf("%s: %v", j.name, err)
			}
			continue
		}
		names = append(names, j.name)
	}
	return names, first
}

// writeOverlay decodes the clip a second time and writes it with tracks,
// ids and visit state drawn on every frame. It returns the name of the
// file written (overlay.avi when H.264 could not be opened, with a warning).
func writeOverlay(ctx context.Context, path string, a *clipAnalysis, s Settings) (name, warning string, err error) {
	src, err := track.Open(a.Path, track.SourceOptions{FPSOverride: s.Video.FPS})
	if err != nil {
		return "", "", err
	}
	defer src.Close()
	fm := visits.FlowerMap{}
	if a.Flowers != nil {
		fm = *a.Flowers
	}
	fps := a.TimeBase.FPS()
	ow, err := overlay.Create(path, a.Info.WidthPX, a.Info.HeightPX, fps)
	if err != nil {
		return "", "", err
	}
	tl := overlay.NewTimeline(fm, a.Kinematics, a.Visits.Landings, a.Visits.Inspections)
	frame := gocv.NewMat()
	defer frame.Close()
	for i := 0; i < a.FramesRead; i++ {
		if ctx.Err() != nil {
			ow.Close()
			return "", "", ctx.Err()
		}
		fi, err := src.Next(&frame)
		if err != nil {
			break
		}
		if err := ow.Draw(&frame, fi.Index, tl.At(fi.Index, a.TimeBase.Seconds(fi.Index))); err != nil {
			ow.Close()
			return "", "", err
		}
	}
	if err := ow.Close(); err != nil {
		return "", "", err
	}
	name = filepath.Base(ow.Path())
	if ow.FellBack() {
		warning = fmt.Sprintf("overlay: this OpenCV/FFmpeg cannot write H.264; wrote %s (Motion JPEG) instead", name)
	}
	return name, warning, nil
}
