package track

import (
	"fmt"
	"image"
	"math"
	"slices"

	"gocv.io/x/gocv"

	"flitlog/track/link"
)

// Tracker turns the frames of one clip into bee tracks: segmentation
// (segment.go) and online linking (link.Linker), with the linker's
// confirmed tracks fed back to keep bees out of the background model.
// Call Step for every frame in order, then Finish once, then Close.
type Tracker struct {
	s      Settings // with defaults
	info   VideoInfo
	p      segParams
	seg    *segmenter
	lk     *link.Linker
	last   int
	begun  bool
	done   bool
	dets   []Detection
	zones  []protectZone
	seeds  []protectZone
	travel map[int]*travelled // by provisional track ID
	edges  []edgeSeen         // detections at the frame border in the last second
	stats  Stats
	closed bool

	shiftSum float64 // sum of the estimated shake magnitudes, px
	shiftN   int
}

// edgeSeen is a detection that touched the frame border.
type edgeSeen struct {
	xPX, yPX float64
	frame    int
}

// travelled records where a confirmed track started, where it was last,
// and whether it has been seen ProtectAfterBL away from its start.
type travelled struct {
	x0, y0 float64 // first position, px
	x, y   float64 // latest position (detection or prediction), px
	far    bool
	frame  int     // frame of x, y
	dx, dy float64 // latest detection, px
	dframe int     // frame of dx, dy
}

// DefaultLinkAccelBLPerS2 is the acceleration standard deviation of the
// linker's Kalman filter used when Settings.Link leaves it zero, body
// lengths/s^2.
const DefaultLinkAccelBLPerS2 = 200

// Stats count what the Tracker saw, for the run summary.
type Stats struct {
	Frames           int     `json:"frames"`                    // frames stepped
	Detections       int     `json:"detections"`                // detections passed to the linker
	DisturbedFrames  int     `json:"disturbed_frames"`          // frames skipped as disturbed (see Settings.DisturbedFrac)
	BackgroundResets int     `json:"background_resets"`         // restarts of the background after a long disturbance
	StationaryTracks int     `json:"stationary_tracks_dropped"` // tracks dropped by Finish for never moving MinTravelBL
	WorkFactor       int     `json:"work_factor"`               // the frame is reduced by this factor for detection
	BodyLengthPX     float64 `json:"body_length_px"`            // expected bee length, px
	MeanShiftPX      float64 `json:"mean_shake_px"`             // mean magnitude of the estimated camera shake, px (0 without Stabilize)
}

// NewTracker prepares a Tracker for a clip described by info. It returns
// an error naming the setting or file at fault when the settings are out
// of range, the ROI mask cannot be read, or the frame is too small.
func NewTracker(s Settings, info VideoInfo) (t *Tracker, err error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	s = s.withDefaults()
	if info.WidthPX < 16 || info.HeightPX < 16 {
		return nil, fmt.Errorf("video %s: frame %dx%d px is too small to track in", info.Path, info.WidthPX, info.HeightPX)
	}
	if !(info.FPS > 0) || math.IsInf(info.FPS, 0) {
		return nil, fmt.Errorf("video %s: frame rate %g: give the capture rate with --fps", info.Path, info.FPS)
	}
	p := s.segParams(info.WidthPX, info.HeightPX, info.FPS)
	roi := gocv.NewMat()
	defer roi.Close()
	if s.ROIMaskPath != "" {
		if err := loadROI(s.ROIMaskPath, p, info, &roi); err != nil {
			return nil, err
		}
	}
	ls := s.Link
	ls.FPS = info.FPS
	ls.BodyLengthPX = p.beeLenPX
	if ls.AccelSigmaPXPerS2 == 0 {
		// Bees brake from cruising to hovering in a few frames; with
		// link's default (100 BL/s^2) a braking bee falls out of its gate
		// beside a landed one and the two swap identities (measured on
		// the three-bee scene of the accuracy tests).
		ls.AccelSigmaPXPerS2 = DefaultLinkAccelBLPerS2 * p.beeLenPX
	}
	ls.BoundsPX = image.Rect(0, 0, info.WidthPX, info.HeightPX)
	var lk *link.Linker
	func() {
		defer func() {
			if r := recover(); r != nil {
				err = fmt.Errorf("track link settings: %v", r)
			}
		}()
		lk = link.NewLinker(ls)
	}()
	if err != nil {
		return nil, err
	}
	t = &Tracker{s: s, info: info, p: p, lk: lk, travel: map[int]*travelled{}}
	t.seg = newSegmenter(p, info.WidthPX, info.HeightPX, roi)
	t.stats.WorkFactor = p.factor
	t.stats.BodyLengthPX = p.beeLenPX
	return t, nil
}

// loadROI reads the region-of-interest image, scales it to the working
// image and thresholds it at mid grey.
func loadROI(path string, p segParams, info VideoInfo, dst *gocv.Mat) error {
	img := gocv.IMRead(path, gocv.IMReadGrayScale)
	defer img.Close()
	if img.Empty() {
		return fmt.Errorf("roi mask %s: cannot read it as an image: give a PNG or JPEG, white = analyse", path)
	}
	ar := float64(img.Cols()) / float64(img.Rows())
	fr := float64(info.WidthPX) / float64(info.HeightPX)
	if math.Abs(ar/fr-1) > 0.02 {
		return fmt.Errorf("roi mask %s: %dx%d px does not have the shape of the %dx%d video: draw it on a frame of the clip", path, img.Cols(), img.Rows(), info.WidthPX, info.HeightPX)
	}
	k := p.factor
	full := gocv.NewMat()
	defer full.Close()
	gocv.Resize(img, &full, image.Pt(info.WidthPX, info.HeightPX), 0, 0, gocv.InterpolationLinear)
	crop := full.Region(image.Rect(0, 0, p.workW*k, p.workH*k))
	defer crop.Close()
	gocv.Resize(crop, dst, image.Pt(p.workW, p.workH), 0, 0, gocv.InterpolationArea)
	gocv.Threshold(*dst, dst, 127, 255, gocv.ThresholdBinary)
	if gocv.CountNonZero(*dst) == 0 {
		return fmt.Errorf("roi mask %s: no white area: white marks the part of the frame to analyse", path)
	}
	return nil
}

// Step processes one frame (8-bit BGR of the clip's size). Frames must
// come in increasing Index order; a skipped index counts as a frame
// without detections.
func (t *Tracker) Step(fi FrameInfo, frame gocv.Mat) error {
	if t.done || t.closed {
		panic("track: Step after Finish or Close")
	}
	if frame.Cols() != t.info.WidthPX || frame.Rows() != t.info.HeightPX || frame.Type() != gocv.MatTypeCV8UC3 {
		return fmt.Errorf("video %s: frame %d is %dx%d %v, the clip is %dx%d 8-bit BGR", t.info.Path, fi.Index, frame.Cols(), frame.Rows(), frame.Type(), t.info.WidthPX, t.info.HeightPX)
	}
	if fi.Index < 0 || (t.begun && fi.Index <= t.last) {
		return fmt.Errorf("video %s: frame %d comes after frame %d", t.info.Path, fi.Index, t.last)
	}
	t.begun = true
	t.last = fi.Index
	bl := t.p.beeLenPX
	r0 := t.s.ProtectBL * bl
	far2 := (t.s.ProtectAfterBL * bl) * (t.s.ProtectAfterBL * bl)
	preds := t.lk.Predicted()
	t.zones = t.zones[:0]
	t.seeds = t.seeds[:0]
	for _, p := range preds {
		if p.Frame != fi.Index {
			continue
		}
		t.seeds = append(t.seeds, protectZone{p.XPX, p.YPX, 0})
		if tv := t.travel[p.TrackID]; tv != nil && tv.far {
			t.zones = append(t.zones, protectZone{p.XPX, p.YPX, r0})
		}
	}
	t.dets = t.seg.detect(frame, fi.Index, fi.TimeS, t.zones, t.seeds)
	asg := t.lk.Step(fi.Index, t.dets)
	t.noteEdges(fi.Index, asg)

	t.zones = t.zones[:0]
	for _, a := range asg {
		d := t.dets[a.DetIndex]
		tv := t.travel[a.TrackID]
		if tv == nil {
			tv = &travelled{x0: d.XPX, y0: d.YPX, dframe: fi.Index, far: t.inherits(d, fi.Index) || t.fromEdge(d, fi.Index)}
			t.travel[a.TrackID] = tv
		}
		if !tv.far && t.inherits(d, fi.Index) {
			// The detection continues a protected track's path: the
			// linker gave the bee to another track.
			tv.far = true
		}
		tv.x, tv.y, tv.frame = d.XPX, d.YPX, fi.Index
		tv.dx, tv.dy, tv.dframe = d.XPX, d.YPX, fi.Index
		if dx, dy := d.XPX-tv.x0, d.YPX-tv.y0; dx*dx+dy*dy >= far2 {
			tv.far = true
		}
		if tv.far {
			t.zones = append(t.zones, protectZone{d.XPX, d.YPX, math.Max(r0, 0.75*d.MajorPX)})
		}
	}
	for _, p := range preds {
		if tv := t.travel[p.TrackID]; p.Frame == fi.Index && tv != nil && tv.frame != fi.Index {
			tv.x, tv.y, tv.frame = p.XPX, p.YPX, fi.Index
		}
	}
	t.seg.learn(t.zones, t.dets)
	if fi.Index%256 == 0 {
		// Forget tracks that ended long ago.
		for id, tv := range t.travel {
			if fi.Index-tv.frame > 256 {
				delete(t.travel, id)
			}
		}
	}

	t.stats.Frames++
	t.stats.Detections += len(t.dets)
	if t.p.stabilize {
		t.shiftSum += math.Hypot(t.seg.shiftX, t.seg.shiftY) * float64(t.p.factor)
		t.shiftN++
	}
	return nil
}

// inherits reports whether detection d continues the path of a protected
// track seen within the last second: within 2 body lengths of where it
// was last (detected or predicted), plus 1 body length per frame since.
// Then the track that got d is protected too: the linker lost the bee as
// it braked to land and started a new track on it, or gave it to a stale
// still track. The latest detection counts as well as the latest
// prediction: a coasting track's prediction can lag far behind a bee that
// sped up while unseen.
func (t *Tracker) inherits(d Detection, frame int) bool {
	bl := t.p.beeLenPX
	maxAge := int(math.Ceil(t.info.FPS))
	near := func(x, y float64, at int) bool {
		age := frame - at
		if age < 0 || age > maxAge {
			return false
		}
		r := 2*bl + float64(age)*bl
		dx, dy := d.XPX-x, d.YPX-y
		return dx*dx+dy*dy <= r*r
	}
	for _, tv := range t.travel {
		if tv.far && (near(tv.x, tv.y, tv.frame) || near(tv.dx, tv.dy, tv.dframe)) {
			return true
		}
	}
	return false
}

// edgeMemoryS is how long noteEdges keeps a detection at the border: a
// few frames more than a track takes to be confirmed.
const edgeMemoryS = 0.25

// noteEdges remembers the detections of frame that touch the border and
// that no confirmed track took (asg), candidates for the first detection
// of a track not yet confirmed, and forgets those older than edgeMemoryS.
func (t *Tracker) noteEdges(frame int, asg []link.Assignment) {
	maxAge := max(3, int(math.Ceil(edgeMemoryS*t.info.FPS)))
	keep := t.edges[:0]
	for _, e := range t.edges {
		if frame-e.frame <= maxAge {
			keep = append(keep, e)
		}
	}
	t.edges = keep
	for i, d := range t.dets {
		if t.atEdge(d) && !slices.ContainsFunc(asg, func(a link.Assignment) bool { return a.DetIndex == i }) {
			t.edges = append(t.edges, edgeSeen{d.XPX, d.YPX, frame})
		}
	}
}

// fromEdge reports whether detection d, the first of a newly confirmed
// track, is a bee that flew into the picture: it touches the border, or
// lies within reach of an unclaimed detection at the border in the last
// edgeMemoryS (2 body lengths plus 1 per frame since; a track is
// confirmed a few frames after its first detection, by which time the
// bee has left the border).
func (t *Tracker) fromEdge(d Detection, frame int) bool {
	if t.atEdge(d) {
		return true
	}
	bl := t.p.beeLenPX
	for _, e := range t.edges {
		age := frame - e.frame
		if age < 0 {
			continue
		}
		r := 2*bl + float64(age)*bl
		if dx, dy := d.XPX-e.xPX, d.YPX-e.yPX; dx*dx+dy*dy <= r*r {
			return true
		}
	}
	return false
}

// atEdge reports whether detection d touches the frame border within a
// body length: a track that starts there is a bee flying into the picture.
func (t *Tracker) atEdge(d Detection) bool {
	m := int(math.Ceil(t.p.beeLenPX))
	return d.Box.Min.X <= m || d.Box.Min.Y <= m || d.Box.Max.X >= t.info.WidthPX-m || d.Box.Max.Y >= t.info.HeightPX-m
}

// Detections returns the detections of the latest Step (valid until the
// next Step).
func (t *Tracker) Detections() []Detection { return t.dets }

// Finish ends linking (gap closing, removal of short fragments) and
// returns the tracks, IDs 1..n in order of their first frame.
func (t *Tracker) Finish() []Track {
	if t.done || t.closed {
		panic("track: Finish called twice or after Close")
	}
	t.done = true
	all := t.lk.Finish()
	min2 := (t.s.MinTravelBL * t.p.beeLenPX) * (t.s.MinTravelBL * t.p.beeLenPX)
	out := all[:0]
	for _, tr := range all {
		if travelled2(tr) >= min2 {
			tr.ID = len(out) + 1
			out = append(out, tr)
		} else {
			t.stats.StationaryTracks++
		}
	}
	return out
}

// travelled2 is the largest squared distance of an observed point of tr
// from its first observed point, px^2.
func travelled2(tr Track) float64 {
	var x0, y0, best float64
	first := true
	for _, p := range tr.Points {
		if !p.Observed {
			continue
		}
		if first {
			x0, y0, first = p.XPX, p.YPX, false
			continue
		}
		if d := (p.XPX-x0)*(p.XPX-x0) + (p.YPX-y0)*(p.YPX-y0); d > best {
			best = d
		}
	}
	return best
}

// Stats returns the counters so far.
func (t *Tracker) Stats() Stats {
	st := t.stats
	st.DisturbedFrames = t.seg.disturbed
	st.BackgroundResets = t.seg.resets
	if t.shiftN > 0 {
		st.MeanShiftPX = t.shiftSum / float64(t.shiftN)
	}
	return st
}

// Background writes the current colour background model, scaled to the
// frame size, to dst as 8-bit BGR (for plots). Before the first frame it
// is black.
func (t *Tracker) Background(dst *gocv.Mat) {
	if t.closed {
		panic("track: Background after Close")
	}
	t.seg.background(dst)
}

// Close releases the OpenCV images. It is safe to call more than once.
func (t *Tracker) Close() {
	if t.closed {
		return
	}
	t.closed = true
	t.seg.close()
}
