package meadow

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"

	"flitlog/kinematics"
	"flitlog/visits"
)

// Files written by Truth.WriteDir.
const (
	FlowersFile     = "flowers.json"
	TracksFile      = "truth_tracks.csv"
	VisitsFile      = "truth_visits.csv"
	InspectionsFile = "truth_inspections.csv"
	MetaFile        = "truth.json"
)

// truthFormat is the version of the truth directory layout.
const truthFormat = 1

// tracksHeader are the columns of truth_tracks.csv.
var tracksHeader = []string{"frame", "time_s", "track_id", "x_px", "y_px", "state", "heading_deg", "visible"}

// meta is the content of truth.json.
type meta struct {
	Generator   string     `json:"generator"`
	Format      int        `json:"format"`
	Config      Config     `json:"config"`
	FPS         float64    `json:"fps"`
	Frames      int        `json:"frames"`
	WidthPX     int        `json:"width_px"`
	HeightPX    int        `json:"height_px"`
	PXPerMM     float64    `json:"px_per_mm"`
	Points      int        `json:"points"`
	Landings    int        `json:"landings"`
	Inspections int        `json:"inspections"`
	Crossings   []Crossing `json:"crossings"`
	Occluder    *Occluder  `json:"occluder,omitempty"`
}

// WriteDir writes the truth into dir (created if missing): flowers.json
// (visits flower map), truth_tracks.csv (frame, time_s, track_id, x_px,
// y_px, state, heading_deg, visible), truth_visits.csv and
// truth_inspections.csv (the columns of flitlog's visits.csv and
// inspections.csv) and truth.json (configuration and metadata).
func (t *Truth) WriteDir(dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	write := func(name string, f func(w io.Writer) error) error {
		path := filepath.Join(dir, name)
		fh, err := os.Create(path)
		if err != nil {
			return err
		}
		bw := bufio.NewWriter(fh)
		if err := f(bw); err != nil {
			fh.Close()
			return fmt.Errorf("meadow: writing %s: %w", path, err)
		}
		if err := bw.Flush(); err != nil {
			fh.Close()
			return fmt.Errorf("meadow: writing %s: %w", path, err)
		}
		return fh.Close()
	}
	if err := write(FlowersFile, func(w io.Writer) error { return visits.WriteFlowerMap(w, t.Flowers) }); err != nil {
		return err
	}
	if err := write(TracksFile, func(w io.Writer) error { return WriteTracksCSV(w, t.Points) }); err != nil {
		return err
	}
	if err := write(VisitsFile, func(w io.Writer) error { return visits.WriteLandingsCSV(w, t.Landings) }); err != nil {
		return err
	}
	if err := write(InspectionsFile, func(w io.Writer) error { return visits.WriteInspectionsCSV(w, t.Inspections) }); err != nil {
		return err
	}
	return write(MetaFile, func(w io.Writer) error {
		m := meta{
			Generator: "flitlog/track/meadow", Format: truthFormat, Config: t.Config,
			FPS: t.FPS, Frames: t.Frames, WidthPX: t.WidthPX, HeightPX: t.HeightPX, PXPerMM: t.PXPerMM,
			Points: len(t.Points), Landings: len(t.Landings), Inspections: len(t.Inspections),
			Crossings: t.Crossings, Occluder: t.Occluder,
		}
		if m.Crossings == nil {
			m.Crossings = []Crossing{}
		}
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(m)
	})
}

// ReadTruthDir reads a directory written by Truth.WriteDir.
func ReadTruthDir(dir string) (*Truth, error) {
	read := func(name string, f func(r io.Reader) error) error {
		path := filepath.Join(dir, name)
		fh, err := os.Open(path)
		if err != nil {
			return err
		}
		defer fh.Close()
		if err := f(bufio.NewReader(fh)); err != nil {
			return fmt.Errorf("meadow: %s: %w", path, err)
		}
		return nil
	}
	t := &Truth{}
	var m meta
	if err := read(MetaFile, func(r io.Reader) error {
		dec := json.NewDecoder(r)
		dec.DisallowUnknownFields()
		if err := dec.Decode(&m); err != nil {
			return err
		}
		if m.Format != truthFormat {
			return fmt.Errorf("field format = %d, want %d", m.Format, truthFormat)
		}
		return nil
	}); err != nil {
		return nil, err
	}
	t.Config, t.FPS, t.Frames, t.WidthPX, t.HeightPX, t.PXPerMM = m.Config, m.FPS, m.Frames, m.WidthPX, m.HeightPX, m.PXPerMM
	t.Crossings, t.Occluder = m.Crossings, m.Occluder
	if len(t.Crossings) == 0 {
		t.Crossings = nil
	}
	if err := read(FlowersFile, func(r io.Reader) (err error) { t.Flowers, err = visits.ReadFlowerMap(r); return }); err != nil {
		return nil, err
	}
	if err := read(TracksFile, func(r io.Reader) (err error) { t.Points, err = ReadTracksCSV(r); return }); err != nil {
		return nil, err
	}
	if err := read(VisitsFile, func(r io.Reader) (err error) { t.Landings, err = visits.ReadLandingsCSV(r); return }); err != nil {
		return nil, err
	}
	if err := read(InspectionsFile, func(r io.Reader) (err error) { t.Inspections, err = visits.ReadInspectionsCSV(r); return }); err != nil {
		return nil, err
	}
	if len(t.Points) != m.Points || len(t.Landings) != m.Landings || len(t.Inspections) != m.Inspections {
		return nil, fmt.Errorf("meadow: %s: counts in %s (%d points, %d landings, %d inspections) disagree with the CSV files (%d, %d, %d)",
			dir, MetaFile, m.Points, m.Landings, m.Inspections, len(t.Points), len(t.Landings), len(t.Inspections))
	}
	return t, nil
}

func fmtF(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// WriteTracksCSV writes truth points as CSV with the header frame, time_s,
// track_id, x_px, y_px, state, heading_deg, visible (state as
// kinematics.State.String, visible true/false). Numbers use the shortest
// representation that reads back exactly.
func WriteTracksCSV(w io.Writer, ps []TruthPoint) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(tracksHeader); err != nil {
		return err
	}
	rec := make([]string, len(tracksHeader))
	for _, p := range ps {
		rec[0] = strconv.Itoa(p.Frame)
		rec[1] = fmtF(p.TimeS)
		rec[2] = strconv.Itoa(p.BeeID)
		rec[3] = fmtF(p.XPX)
		rec[4] = fmtF(p.YPX)
		rec[5] = p.State.String()
		rec[6] = fmtF(p.HeadingDeg)
		rec[7] = strconv.FormatBool(p.Visible)
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// TracksError is a bad field of truth_tracks.csv.
type TracksError struct {
	Line  int    // 1-based line in the file
	Field string // column name
	Err   error
}

func (e *TracksError) Error() string {
	return fmt.Sprintf("line %d, field %s: %v", e.Line, e.Field, e.Err)
}

func (e *TracksError) Unwrap() error { return e.Err }

// ReadTracksCSV reads truth points written by WriteTracksCSV. Columns are
// found by name; all eight are required. Errors are *TracksError.
func ReadTracksCSV(r io.Reader) ([]TruthPoint, error) {
	cr := csv.NewReader(r)
	cr.ReuseRecord = true
	head, err := cr.Read()
	if err != nil {
		return nil, &TracksError{Line: 1, Field: "header", Err: err}
	}
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	for _, h := range tracksHeader {
		if _, ok := col[h]; !ok {
			return nil, &TracksError{Line: 1, Field: h, Err: errors.New("missing column")}
		}
	}
	var ps []TruthPoint
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, &TracksError{Line: line, Field: "record", Err: err}
		}
		var p TruthPoint
		fail := func(f string, e error) error { return &TracksError{Line: line, Field: f, Err: e} }
		if p.Frame, err = strconv.Atoi(rec[col["frame"]]); err != nil {
			return nil, fail("frame", err)
		}
		if p.TimeS, err = strconv.ParseFloat(rec[col["time_s"]], 64); err != nil {
			return nil, fail("time_s", err)
		}
		if p.BeeID, err = strconv.Atoi(rec[col["track_id"]]); err != nil {
			return nil, fail("track_id", err)
		}
		if p.XPX, err = strconv.ParseFloat(rec[col["x_px"]], 64); err != nil {
			return nil, fail("x_px", err)
		}
		if p.YPX, err = strconv.ParseFloat(rec[col["y_px"]], 64); err != nil {
			return nil, fail("y_px", err)
		}
		st, ok := kinematics.ParseState(rec[col["state"]])
		if !ok {
			return nil, fail("state", fmt.Errorf("%q is not a state", rec[col["state"]]))
		}
		p.State = st
		if p.HeadingDeg, err = strconv.ParseFloat(rec[col["heading_deg"]], 64); err != nil {
			return nil, fail("heading_deg", err)
		}
		if p.Visible, err = strconv.ParseBool(rec[col["visible"]]); err != nil {
			return nil, fail("visible", err)
		}
		ps = append(ps, p)
	}
	return ps, nil
}

// sortLandings orders landings by start frame, then track.
func sortLandings(ls []visits.Landing) {
	sort.SliceStable(ls, func(i, j int) bool {
		if ls[i].StartFrame != ls[j].StartFrame {
			return ls[i].StartFrame < ls[j].StartFrame
		}
		return ls[i].TrackID < ls[j].TrackID
	})
}

// sortInspections orders inspections by start frame, then track.
func sortInspections(is []visits.Inspection) {
	sort.SliceStable(is, func(i, j int) bool {
		if is[i].StartFrame != is[j].StartFrame {
			return is[i].StartFrame < is[j].StartFrame
		}
		return is[i].TrackID < is[j].TrackID
	})
}
