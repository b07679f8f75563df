package overlay

import (
	"math"
	"sort"

	"flitlog/kinematics"
	"flitlog/visits"
)

// DefaultTrailS is the default length of the fading trail, s.
const DefaultTrailS = 1.0

// FrameState is what the overlay shows on one frame.
type FrameState struct {
	Frame   int     // frame index, from 0
	TimeS   float64 // seconds from the clip's first frame
	Flowers []visits.Flower
	Tracks  []TrackMark // tracks with a point on this frame, in track order
	TrailS  float64     // trail length, s, for the fading (0: DefaultTrailS)
}

// TrackMark is one track on one frame.
type TrackMark struct {
	ID       int
	XPX, YPX float64 // current position, px
	State    kinematics.State
	Observed bool // false: coasted or gap-filled position (drawn hollow)
	// Trail is the track's samples of the last TrailS seconds up to and
	// including this frame, oldest first. It shares memory with the
	// whole-clip result: read only.
	Trail []kinematics.Sample
	// FlowerID is the flower the bee is landed on (a landing covers this
	// frame), "" if none; OnFlowerS is the time since that landing began
	// (handling time so far), s.
	FlowerID  string
	OnFlowerS float64
	// InspectingID is the flower of an inspection covering this frame, ""
	// if none.
	InspectingID string
}

// Timeline turns whole-clip results into per-frame FrameStates for the
// overlay pass.
type Timeline struct {
	// TrailS is the trail length, s. Range > 0; default DefaultTrailS.
	TrailS float64

	flowers     []visits.Flower
	tracks      []kinematics.Result
	landings    map[int][]visits.Landing    // by track id, sorted by StartFrame
	inspections map[int][]visits.Inspection // by track id, sorted by StartFrame
	buf         []TrackMark
}

// NewTimeline indexes the results of one clip. Tracks' samples must be in
// frame order (as kinematics returns them); landings and inspections may
// come in any order. The inputs are not copied and must not change while
// the Timeline is in use.
func NewTimeline(fm visits.FlowerMap, tracks []kinematics.Result, landings []visits.Landing, inspections []visits.Inspection) *Timeline {
	t := &Timeline{
		TrailS:      DefaultTrailS,
		flowers:     fm.Flowers,
		tracks:      tracks,
		landings:    map[int][]visits.Landing{},
		inspections: map[int][]visits.Inspection{},
	}
	for _, l := range landings {
		t.landings[l.TrackID] = append(t.landings[l.TrackID], l)
	}
	for id, ls := range t.landings {
		sort.SliceStable(ls, func(i, j int) bool { return ls[i].StartFrame < ls[j].StartFrame })
		t.landings[id] = ls
	}
	for _, in := range inspections {
		t.inspections[in.TrackID] = append(t.inspections[in.TrackID], in)
	}
	for id, is := range t.inspections {
		sort.SliceStable(is, func(i, j int) bool { return is[i].StartFrame < is[j].StartFrame })
		t.inspections[id] = is
	}
	return t
}

// At returns the state of frame (its time timeS, s). Each track is found
// by binary search, so a sequential pass costs O(tracks log samples) per
// frame, and frames may also be asked for in any order. The returned
// Tracks slice is reused by the next call of At.
func (t *Timeline) At(frame int, timeS float64) FrameState {
	trail := t.TrailS
	if !(trail > 0) {
		trail = DefaultTrailS
	}
	t.buf = t.buf[:0]
	for _, tr := range t.tracks {
		ss := tr.Samples
		j := sort.Search(len(ss), func(j int) bool { return ss[j].Frame >= frame })
		if j == len(ss) || ss[j].Frame != frame {
			continue
		}
		s := ss[j]
		if math.IsNaN(s.XPX) || math.IsNaN(s.YPX) {
			continue
		}
		// Trail: samples with TimeS >= timeS - trail (1 µs slack for
		// rounding of frame times), up to j.
		k := sort.Search(j+1, func(k int) bool { return ss[k].TimeS >= timeS-trail-1e-6 })
		m := TrackMark{
			ID: tr.ID, XPX: s.XPX, YPX: s.YPX, State: s.State, Observed: s.Observed,
			Trail: ss[k : j+1],
		}
		if l, ok := coveringLanding(t.landings[tr.ID], frame); ok {
			m.FlowerID = l.FlowerID
			m.OnFlowerS = math.Max(0, timeS-l.StartS)
		}
		if in, ok := coveringInspection(t.inspections[tr.ID], frame); ok {
			m.InspectingID = in.FlowerID
		}
		t.buf = append(t.buf, m)
	}
	return FrameState{Frame: frame, TimeS: timeS, Flowers: t.flowers, Tracks: t.buf, TrailS: trail}
}

// coveringLanding returns the landing that started last at or before
// frame if it still covers frame (StartFrame <= frame <= EndFrame). A
// bee's landings do not overlap, so no earlier one can cover frame.
func coveringLanding(ls []visits.Landing, frame int) (visits.Landing, bool) {
	i := sort.Search(len(ls), func(i int) bool { return ls[i].StartFrame > frame }) - 1
	if i >= 0 && ls[i].EndFrame >= frame {
		return ls[i], true
	}
	return visits.Landing{}, false
}

// coveringInspection is coveringLanding for inspections.
func coveringInspection(is []visits.Inspection, frame int) (visits.Inspection, bool) {
	i := sort.Search(len(is), func(i int) bool { return is[i].StartFrame > frame }) - 1
	if i >= 0 && is[i].EndFrame >= frame {
		return is[i], true
	}
	return visits.Inspection{}, false
}
