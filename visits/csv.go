package visits

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// CSV files (RFC 4180 via encoding/csv) have a header row; units are in the
// column names (start_s, approach_speed_mm_s). Numbers are written with
// strconv 'g' and the shortest exact precision, never with a locale; NaN is
// an empty field; booleans are true/false. Readers find columns by name, so
// extra or reordered columns are fine; missing optional columns read as
// NaN, false or "".

// column describes one CSV column of a row type T.
type column[T any] struct {
	name     string
	required bool // the reader fails without it
	get      func(*T) string
	set      func(*T, string) error
}

func fmtFloat(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

func parseFloat(s string) (float64, error) {
	if s == "" {
		return math.NaN(), nil
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}

func parseInt(s string) (int, error) {
	v, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil {
		return 0, fmt.Errorf("%q is not a whole number", s)
	}
	return v, nil
}

func parseBool(s string) (bool, error) {
	switch strings.TrimSpace(s) {
	case "true":
		return true, nil
	case "false", "":
		return false, nil
	}
	return false, fmt.Errorf("%q is not true or false", s)
}

func intCol[T any](name string, required bool, p func(*T) *int) column[T] {
	return column[T]{name, required,
		func(t *T) string { return strconv.Itoa(*p(t)) },
		func(t *T, s string) (err error) { *p(t), err = parseInt(s); return }}
}

func floatCol[T any](name string, required bool, p func(*T) *float64) column[T] {
	return column[T]{name, required,
		func(t *T) string { return fmtFloat(*p(t)) },
		func(t *T, s string) (err error) { *p(t), err = parseFloat(s); return }}
}

func boolCol[T any](name string, p func(*T) *bool) column[T] {
	return column[T]{name, false,
		func(t *T) string { return strconv.FormatBool(*p(t)) },
		func(t *T, s string) (err error) { *p(t), err = parseBool(s); return }}
}

func stringCol[T any](name string, required bool, p func(*T) *string) column[T] {
	return column[T]{name, required,
		func(t *T) string { return *p(t) },
		func(t *T, s string) error { *p(t) = s; return nil }}
}

// landingColumns are the columns of visits.csv, in order.
var landingColumns = []column[Landing]{
	intCol("track_id", true, func(l *Landing) *int { return &l.TrackID }),
	stringCol("flower_id", true, func(l *Landing) *string { return &l.FlowerID }),
	floatCol("start_s", true, func(l *Landing) *float64 { return &l.StartS }),
	floatCol("end_s", true, func(l *Landing) *float64 { return &l.EndS }),
	floatCol("duration_s", false, func(l *Landing) *float64 { return &l.DurationS }),
	intCol("start_frame", false, func(l *Landing) *int { return &l.StartFrame }),
	intCol("end_frame", false, func(l *Landing) *int { return &l.EndFrame }),
	stringCol("flower_kind", false, func(l *Landing) *string { return &l.FlowerKind }),
	intCol("index", false, func(l *Landing) *int { return &l.Index }),
	boolCol("revisit", func(l *Landing) *bool { return &l.Revisit }),
	floatCol("since_prev_visit_s", false, func(l *Landing) *float64 { return &l.SincePrevVisitS }),
	floatCol("approach_speed_mm_s", false, func(l *Landing) *float64 { return &l.ApproachSpeedMMPerS }),
	floatCol("departure_speed_mm_s", false, func(l *Landing) *float64 { return &l.DepartureSpeedMMPerS }),
	boolCol("censored_start", func(l *Landing) *bool { return &l.CensoredStart }),
	boolCol("censored_end", func(l *Landing) *bool { return &l.CensoredEnd }),
	floatCol("reward_ul", false, func(l *Landing) *float64 { return &l.RewardUL }),
}

// inspectionColumns are the columns of inspections.csv, in order.
var inspectionColumns = []column[Inspection]{
	intCol("track_id", true, func(i *Inspection) *int { return &i.TrackID }),
	stringCol("flower_id", true, func(i *Inspection) *string { return &i.FlowerID }),
	floatCol("start_s", true, func(i *Inspection) *float64 { return &i.StartS }),
	floatCol("end_s", true, func(i *Inspection) *float64 { return &i.EndS }),
	floatCol("duration_s", false, func(i *Inspection) *float64 { return &i.DurationS }),
	intCol("start_frame", false, func(i *Inspection) *int { return &i.StartFrame }),
	intCol("end_frame", false, func(i *Inspection) *int { return &i.EndFrame }),
	stringCol("flower_kind", false, func(i *Inspection) *string { return &i.FlowerKind }),
	floatCol("min_dist_mm", false, func(i *Inspection) *float64 { return &i.MinDistMM }),
	boolCol("censored_start", func(i *Inspection) *bool { return &i.CensoredStart }),
	boolCol("censored_end", func(i *Inspection) *bool { return &i.CensoredEnd }),
}

// flightColumns are the columns of flights.csv, in order.
var flightColumns = []column[Flight]{
	intCol("track_id", true, func(f *Flight) *int { return &f.TrackID }),
	stringCol("from_flower_id", true, func(f *Flight) *string { return &f.FromFlowerID }),
	stringCol("to_flower_id", true, func(f *Flight) *string { return &f.ToFlowerID }),
	floatCol("start_s", true, func(f *Flight) *float64 { return &f.StartS }),
	floatCol("end_s", true, func(f *Flight) *float64 { return &f.EndS }),
	floatCol("duration_s", false, func(f *Flight) *float64 { return &f.DurationS }),
	intCol("start_frame", false, func(f *Flight) *int { return &f.StartFrame }),
	intCol("end_frame", false, func(f *Flight) *int { return &f.EndFrame }),
	stringCol("from_kind", false, func(f *Flight) *string { return &f.FromKind }),
	stringCol("to_kind", false, func(f *Flight) *string { return &f.ToKind }),
	intCol("from_index", false, func(f *Flight) *int { return &f.FromIndex }),
	floatCol("distance_mm", false, func(f *Flight) *float64 { return &f.DistanceMM }),
	floatCol("flower_distance_mm", false, func(f *Flight) *float64 { return &f.FlowerDistanceMM }),
	floatCol("path_length_mm", false, func(f *Flight) *float64 { return &f.PathLengthMM }),
	floatCol("mean_speed_mm_s", false, func(f *Flight) *float64 { return &f.MeanSpeedMMPerS }),
	intCol("inspections", false, func(f *Flight) *int { return &f.Inspections }),
	floatCol("unseen_s", false, func(f *Flight) *float64 { return &f.UnseenS }),
}

func writeCSV[T any](w io.Writer, cols []column[T], rows []T) error {
	cw := csv.NewWriter(w)
	rec := make([]string, len(cols))
	for i, c := range cols {
		rec[i] = c.name
	}
	if err := cw.Write(rec); err != nil {
		return err
	}
	for r := range rows {
		for i, c := range cols {
			rec[i] = c.get(&rows[r])
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// CSVError is a bad row or field in a CSV file read by this package.
type CSVError struct {
	Line   int    // 1-based line of the file (the header is line 1)
	Column string // column name; empty when about the whole row
	Err    error
}

func (e *CSVError) Error() string {
	if e.Column == "" {
		return fmt.Sprintf("line %d: %v", e.Line, e.Err)
	}
	return fmt.Sprintf("line %d, column %s: %v", e.Line, e.Column, e.Err)
}

func (e *CSVError) Unwrap() error { return e.Err }

func readCSV[T any](r io.Reader, cols []column[T], zero func() T) ([]T, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &CSVError{Line: 1, Err: fmt.Errorf("empty file: want a header row")}
	}
	if err != nil {
		return nil, err
	}
	pos := make(map[string]int, len(header))
	for i, h := range header {
		pos[strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))] = i
	}
	idx := make([]int, len(cols))
	for i, c := range cols {
		j, ok := pos[c.name]
		if !ok {
			if c.required {
				return nil, &CSVError{Line: 1, Column: c.name, Err: fmt.Errorf("missing column %s in the header", c.name)}
			}
			j = -1
		}
		idx[i] = j
	}
	var out []T
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return nil, err
		}
		line, _ := cr.FieldPos(0)
		if len(rec) != len(header) {
			return nil, &CSVError{Line: line, Err: fmt.Errorf("%d fields, header has %d", len(rec), len(header))}
		}
		t := zero()
		for i, c := range cols {
			if idx[i] < 0 {
				continue
			}
			if err := c.set(&t, rec[idx[i]]); err != nil {
				return nil, &CSVError{Line: line, Column: c.name, Err: err}
			}
		}
		out = append(out, t)
	}
}

// WriteLandingsCSV writes landings as visits.csv: one row per landing with
// the columns track_id, flower_id, start_s, end_s, duration_s, start_frame,
// end_frame, flower_kind, index, revisit, since_prev_visit_s,
// approach_speed_mm_s, departure_speed_mm_s, censored_start, censored_end,
// reward_ul.
func WriteLandingsCSV(w io.Writer, ls []Landing) error {
	return writeCSV(w, landingColumns, ls)
}

// ReadLandingsCSV reads visits.csv as written by WriteLandingsCSV. Columns
// track_id, flower_id, start_s and end_s are required; others missing read
// as NaN, 0, false or "". Errors are *CSVError naming line and column.
func ReadLandingsCSV(r io.Reader) ([]Landing, error) {
	return readCSV(r, landingColumns, func() Landing {
		return Landing{DurationS: math.NaN(), ApproachSpeedMMPerS: math.NaN(), DepartureSpeedMMPerS: math.NaN(),
			SincePrevVisitS: math.NaN(), RewardUL: math.NaN(), StartFrame: -1, EndFrame: -1}
	})
}

// WriteInspectionsCSV writes inspections as inspections.csv with the
// columns track_id, flower_id, start_s, end_s, duration_s, start_frame,
// end_frame, flower_kind, min_dist_mm, censored_start, censored_end.
func WriteInspectionsCSV(w io.Writer, is []Inspection) error {
	return writeCSV(w, inspectionColumns, is)
}

// ReadInspectionsCSV reads inspections.csv as written by
// WriteInspectionsCSV; required and missing columns as for ReadLandingsCSV.
func ReadInspectionsCSV(r io.Reader) ([]Inspection, error) {
	return readCSV(r, inspectionColumns, func() Inspection {
		return Inspection{DurationS: math.NaN(), MinDistMM: math.NaN(), StartFrame: -1, EndFrame: -1}
	})
}

// WriteFlightsCSV writes flights between consecutive landings of each bee
// as flights.csv with the columns track_id, from_flower_id, to_flower_id,
// start_s (take-off), end_s (next landing), duration_s (inter-visit
// interval), start_frame, end_frame, from_kind, to_kind, from_index,
// distance_mm (take-off point to landing point), flower_distance_mm
// (between flower centres), path_length_mm, mean_speed_mm_s, inspections,
// unseen_s (time out of the picture; path length and speed count a
// straight line for it).
func WriteFlightsCSV(w io.Writer, fs []Flight) error {
	return writeCSV(w, flightColumns, fs)
}

// ReadFlightsCSV reads flights.csv as written by WriteFlightsCSV; track_id,
// from_flower_id, to_flower_id, start_s and end_s are required.
func ReadFlightsCSV(r io.Reader) ([]Flight, error) {
	return readCSV(r, flightColumns, func() Flight {
		nan := math.NaN()
		return Flight{DurationS: nan, DistanceMM: nan, FlowerDistanceMM: nan, PathLengthMM: nan,
			MeanSpeedMMPerS: nan, StartFrame: -1, EndFrame: -1, FromIndex: 0}
	})
}
