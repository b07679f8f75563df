package calibration

import (
	"fmt"
	"math"
	"sort"
)

// TimeBase turns frame indices (from 0) into seconds from the clip's
// first frame, in one place for the whole pipeline. The rule, in order:
//
//  1. An fps override > 0 wins: t = frame / override. Use it for
//     high-speed cameras whose files store a slower playback rate.
//  2. Otherwise the container's per-frame timestamps, if they are all
//     finite and strictly increasing: t = ts[frame] - ts[0]. Frames past
//     the last timestamp continue at FPS().
//  3. Otherwise the nominal frame rate of the container: t = frame / fps.
//
// Where a rule is passed over, Warnings says why.
type TimeBase struct {
	fps      float64   // frames per second used for rule 1 and 3 and past the timestamps
	timesS   []float64 // timestamps relative to the first frame (rule 2), else nil
	source   string
	Warnings []string
}

// NewTimeBase chooses the time rule (see TimeBase) from the container's
// per-frame timestamps in seconds (may be nil), its nominal frame rate and
// an override (0 = none), both in frames per second. It returns an error
// for an override that is negative or not a number, and when no rule
// gives usable times (no override, no usable timestamps and a nominal
// rate <= 0).
func NewTimeBase(containerTimesS []float64, nominalFPS, fpsOverride float64) (*TimeBase, error) {
	tb := &TimeBase{}
	if math.IsNaN(fpsOverride) || fpsOverride < 0 || math.IsInf(fpsOverride, 0) {
		return nil, fmt.Errorf("frame rate override %g: give --fps > 0 frames per second, or leave it out to use the clip's own timing", fpsOverride)
	}
	if fpsOverride > 0 {
		tb.fps, tb.source = fpsOverride, fmt.Sprintf("fps override %g", fpsOverride)
		return tb, nil
	}
	nominalOK := nominalFPS > 0 && !math.IsInf(nominalFPS, 0)
	if len(containerTimesS) > 0 {
		if bad := badTimestamps(containerTimesS); bad != "" {
			tb.Warnings = append(tb.Warnings, "container timestamps not used: "+bad)
		} else {
			tb.timesS = make([]float64, len(containerTimesS))
			for i, t := range containerTimesS {
				tb.timesS[i] = t - containerTimesS[0]
			}
			tb.source = "container timestamps"
			n := len(tb.timesS)
			switch {
			case n >= 2:
				tb.fps = float64(n-1) / tb.timesS[n-1]
			case nominalOK:
				tb.fps = nominalFPS
			default:
				return nil, fmt.Errorf("the clip states no usable frame rate (%g) and has only one frame: give --fps", nominalFPS)
			}
			if n >= 3 && nominalOK {
				med := medianInterval(tb.timesS)
				if r := med * nominalFPS; r < 0.95 || r > 1.05 {
					tb.Warnings = append(tb.Warnings, fmt.Sprintf("container timestamps give %.4g frames/s but the header says %.4g: using the timestamps (give --fps to override)", 1/med, nominalFPS))
				}
			}
			return tb, nil
		}
	}
	if !nominalOK {
		return nil, fmt.Errorf("the clip states no usable frame rate (%g frames/s) and no usable timestamps: give --fps", nominalFPS)
	}
	tb.fps, tb.source = nominalFPS, fmt.Sprintf("nominal frame rate %g", nominalFPS)
	return tb, nil
}

// badTimestamps says what is wrong with a timestamp series, "" if nothing.
func badTimestamps(ts []float64) string {
	for i, t := range ts {
		if math.IsNaN(t) || math.IsInf(t, 0) {
			return fmt.Sprintf("frame %d has time %g", i, t)
		}
		if i > 0 && t <= ts[i-1] {
			return fmt.Sprintf("frame %d at %g s does not come after frame %d at %g s", i, t, i-1, ts[i-1])
		}
	}
	return ""
}

func medianInterval(ts []float64) float64 {
	d := make([]float64, len(ts)-1)
	for i := range d {
		d[i] = ts[i+1] - ts[i]
	}
	sort.Float64s(d)
	m := len(d) / 2
	if len(d)%2 == 1 {
		return d[m]
	}
	return (d[m-1] + d[m]) / 2
}

// Seconds returns the time of frame (from 0) in seconds from the first
// frame. It panics for a negative frame (a programmer error).
func (tb *TimeBase) Seconds(frame int) float64 {
	if frame < 0 {
		panic(fmt.Sprintf("calibration: TimeBase.Seconds of negative frame %d", frame))
	}
	if n := len(tb.timesS); n > 0 {
		if frame < n {
			return tb.timesS[frame]
		}
		return tb.timesS[n-1] + float64(frame-(n-1))/tb.fps
	}
	return float64(frame) / tb.fps
}

// FPS is the frame rate in frames per second: the override, the mean
// rate of the timestamps ((n-1) / (t_last - t_first)), or the nominal
// rate, by the rule in use.
func (tb *TimeBase) FPS() float64 { return tb.fps }

// Source says in words which rule gives the times.
func (tb *TimeBase) Source() string { return tb.source }
