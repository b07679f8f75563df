package agree

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"unicode"
)

// Landing is one landing of a landing table: a bee on a flower from StartS
// to EndS, seconds from the clip's first frame.
type Landing struct {
	Row      int    // line number in the file, from 1, for messages
	Bee      string // track_id or bee label; "" when the table has none
	FlowerID string
	StartS   float64
	EndS     float64 // take-off; EndS >= StartS
}

// DurationS returns the handling time EndS - StartS in seconds.
func (l Landing) DurationS() float64 { return l.EndS - l.StartS }

// Table is a landing table read from one file.
type Table struct {
	Name string // file name used in messages
	// Kind is KindFlitlog for flitlog's visits.csv, KindManual for a
	// score sheet.
	Kind string
	// Clip is the clip named by the table's clip column, normalised by
	// ClipName; "" when the table has none.
	Clip     string
	ClipRow  int // row that first named Clip
	Landings []Landing
}

// Kinds of landing table.
const (
	KindFlitlog = "flitlog"
	KindManual  = "manual"
)

// ParseError is bad input in a landing table: the file, the row (the
// file's line number, from 1) and the field (the column as written
// in the header; "" when the whole row or file is meant).
type ParseError struct {
	File  string
	Row   int
	Field string
	Err   error
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Row > 0 {
		fmt.Fprintf(&b, ": row %d", e.Row)
	}
	if e.Field != "" {
		f := e.Field
		if strings.ContainsFunc(f, func(r rune) bool { return !unicode.IsPrint(r) }) {
			f = strconv.Quote(f) // a header cell with a line break stays on one line
		}
		fmt.Fprintf(&b, ", field %s", f)
	}
	fmt.Fprintf(&b, ": %v", e.Err)
	return b.String()
}

func (e *ParseError) Unwrap() error { return e.Err }

// ErrEmpty is wrapped by the ParseError of a table without landings.
var ErrEmpty = errors.New("no landings: the table has no data rows")

// roles of the columns of a score sheet.
const (
	colFlower = iota
	colStart
	colEnd
	colDuration
	colBee
	colClip
	colIgnored
	nRoles
)

var roleName = [nRoles]string{"flower_id", "start_s", "end_s", "duration_s", "track_id", "clip", "note"}

// aliases maps a normalised header name to its role.
var aliases = map[string]int{
	"flower_id": colFlower, "flower": colFlower, "flower_name": colFlower,
	"start_s": colStart, "start": colStart, "onset": colStart, "onset_s": colStart, "start_time": colStart, "begin": colStart,
	"end_s": colEnd, "end": colEnd, "offset": colEnd, "offset_s": colEnd, "end_time": colEnd, "stop": colEnd,
	"duration_s": colDuration, "duration": colDuration, "handling_s": colDuration, "handling_time_s": colDuration,
	"track_id": colBee, "bee": colBee, "bee_id": colBee, "track": colBee,
	"clip": colClip, "clip_id": colClip, "video": colClip, "file": colClip,
	"note": colIgnored, "notes": colIgnored, "comment": colIgnored, "comments": colIgnored,
	"remark": colIgnored, "remarks": colIgnored, "observer": colIgnored,
}

// flitlogColumns identify flitlog's visits.csv.
var flitlogColumns = []string{"track_id", "flower_id", "start_s", "end_s", "duration_s", "start_frame", "end_frame"}

// durationTolS is how far a score sheet's duration may be from end - start.
const durationTolS = 0.05

func normHeader(h string) string {
	h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
	h = strings.NewReplacer(" ", "_", "-", "_").Replace(h)
	return h
}

// sniffComma picks the field separator from the first line that is
// neither blank nor a # comment: tab or semicolon when it has one and no
// comma, else comma.
func sniffComma(data []byte) rune {
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 64*1024), len(data)+1)
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if line == "" || line[0] == '#' {
			continue
		}
		switch {
		case strings.Contains(line, ","):
			return ','
		case strings.Contains(line, "\t"):
			return '\t'
		case strings.Contains(line, ";"):
			return ';'
		}
		return ','
	}
	return ','
}

// ReadTableFile reads the landing table at path; see ReadTable.
func ReadTableFile(path string) (*Table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadTable(f, path)
}

// ReadTable reads a landing table: flitlog's visits.csv or a score sheet
// made by hand (the format is described in the package documentation).
// name is the file name used in errors. Bad input returns a *ParseError.
func ReadTable(r io.Reader, name string) (*Table, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, &ParseError{File: name, Err: err}
	}
	data = bytes.TrimPrefix(data, []byte("\ufeff")) // byte order mark of spreadsheet exports
	comma := sniffComma(data)
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comma = comma
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &ParseError{File: name, Row: 1, Err: errors.New("empty file: want a header row such as flower_id,start_s,end_s")}
	}
	if err != nil {
		return nil, csvErr(name, err)
	}
	headerRow, _ := cr.FieldPos(0)

	t := &Table{Name: name}
	idx := [nRoles]int{}
	for i := range idx {
		idx[i] = -1
	}
	present := map[string]int{}
	for i, h := range header {
		present[normHeader(h)] = i
	}
	isFlitlog := true
	for _, c := range flitlogColumns {
		if _, ok := present[c]; !ok {
			isFlitlog = false
			break
		}
	}
	if isFlitlog {
		t.Kind = KindFlitlog
		idx[colFlower] = present["flower_id"]
		idx[colStart] = present["start_s"]
		idx[colEnd] = present["end_s"]
		idx[colBee] = present["track_id"]
		if j, ok := present["clip"]; ok {
			idx[colClip] = j
		}
	} else {
		t.Kind = KindManual
		for i, h := range header {
			role, ok := aliases[normHeader(h)]
			if !ok {
				return nil, &ParseError{File: name, Row: headerRow, Field: strings.TrimSpace(h),
					Err: fmt.Errorf("unknown column %q: a score sheet has flower_id, start_s, end_s or duration_s, and optionally track_id, clip, note", strings.TrimSpace(h))}
			}
			if role == colIgnored {
				continue
			}
			if idx[role] >= 0 {
				return nil, &ParseError{File: name, Row: headerRow, Field: strings.TrimSpace(h),
					Err: fmt.Errorf("column %q means %s, as does column %q", strings.TrimSpace(h), roleName[role], strings.TrimSpace(header[idx[role]]))}
			}
			idx[role] = i
		}
		for _, role := range []int{colFlower, colStart} {
			if idx[role] < 0 {
				return nil, &ParseError{File: name, Row: headerRow, Field: roleName[role],
					Err: fmt.Errorf("missing column %s in the header (have %s)", roleName[role], strings.Join(header, ","))}
			}
		}
		if idx[colEnd] < 0 && idx[colDuration] < 0 {
			return nil, &ParseError{File: name, Row: headerRow, Field: "end_s",
				Err: fmt.Errorf("missing column end_s (or duration_s) in the header (have %s)", strings.Join(header, ","))}
		}
	}
	decimalComma := comma != ','
	field := func(rec []string, role int) (string, string) {
		return strings.TrimSpace(rec[idx[role]]), strings.TrimSpace(header[idx[role]])
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(name, err)
		}
		row, _ := cr.FieldPos(0)
		if len(rec) != len(header) {
			return nil, &ParseError{File: name, Row: row, Err: fmt.Errorf("%d fields, the header has %d", len(rec), len(header))}
		}
		l := Landing{Row: row}
		var col string
		l.FlowerID, col = field(rec, colFlower)
		if l.FlowerID == "" {
			return nil, &ParseError{File: name, Row: row, Field: col, Err: errors.New("empty flower id")}
		}
		if idx[colBee] >= 0 {
			l.Bee, _ = field(rec, colBee)
		}
		s, col := field(rec, colStart)
		if l.StartS, err = parseTime(s, decimalComma); err != nil {
			return nil, &ParseError{File: name, Row: row, Field: col, Err: err}
		}
		if idx[colEnd] >= 0 {
			s, col = field(rec, colEnd)
			if l.EndS, err = parseTime(s, decimalComma); err != nil {
				return nil, &ParseError{File: name, Row: row, Field: col, Err: err}
			}
			if l.EndS < l.StartS {
				return nil, &ParseError{File: name, Row: row, Field: col,
					Err: fmt.Errorf("end %s is before start %s", fmtS(l.EndS), fmtS(l.StartS))}
			}
		}
		if idx[colDuration] >= 0 {
			s, col = field(rec, colDuration)
			d, err := parseTime(s, decimalComma)
			if err != nil {
				return nil, &ParseError{File: name, Row: row, Field: col, Err: err}
			}
			if idx[colEnd] < 0 {
				l.EndS = l.StartS + d
			} else if math.Abs(d-(l.EndS-l.StartS)) > durationTolS+1e-9 {
				return nil, &ParseError{File: name, Row: row, Field: col,
					Err: fmt.Errorf("duration %s differs from end - start = %s by more than %g s", fmtS(d), fmtS(l.EndS-l.StartS), durationTolS)}
			}
		}
		if idx[colClip] >= 0 {
			c, col := field(rec, colClip)
			c = ClipName(c)
			switch {
			case c == "":
			case t.Clip == "":
				t.Clip, t.ClipRow = c, row
			case c != t.Clip:
				return nil, &ParseError{File: name, Row: row, Field: col,
					Err: fmt.Errorf("clip %q differs from clip %q of row %d: a table holds one clip", c, t.Clip, t.ClipRow)}
			}
		}
		t.Landings = append(t.Landings, l)
	}
	if len(t.Landings) == 0 {
		return nil, &ParseError{File: name, Err: ErrEmpty}
	}
	return t, nil
}

func csvErr(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &ParseError{File: name, Row: pe.Line, Err: pe.Err}
	}
	return &ParseError{File: name, Err: err}
}

// ClipName normalises a clip name for comparison: surrounding space,
// folders and the file extension are removed, so "clips/clip01.mp4",
// "clip01.MP4" and "clip01" are the same clip.
func ClipName(s string) string {
	s = strings.TrimSpace(s)
	s = strings.ReplaceAll(s, "\\", "/")
	s = filepath.Base(filepath.FromSlash(s))
	if s == "." || s == "/" {
		return ""
	}
	if ext := filepath.Ext(s); ext != "" && ext != s {
		s = strings.TrimSuffix(s, ext)
	}
	return s
}

var (
	reSeconds = regexp.MustCompile(`^(\d+(?:\.\d*)?|\.\d+)$`)
	reClock   = regexp.MustCompile(`^(?:(\d+):)?(\d+):(\d+(?:\.\d*)?)$`)
)

// ParseTime parses a time of a landing table into seconds. Accepted forms:
// seconds ("83.4", "83"), minutes and seconds ("1:23.4", "01:23"), and
// hours, minutes and seconds ("0:01:23.4"). Minutes and seconds after a
// colon must be below 60; the leading part may be any whole number
// ("90:00" is 5400 s). Signs, exponents, NaN and infinities are rejected.
func ParseTime(s string) (float64, error) { return parseTime(s, false) }

func parseTime(s string, decimalComma bool) (float64, error) {
	in := s
	s = strings.TrimSpace(s)
	if decimalComma {
		s = strings.Replace(s, ",", ".", 1)
	}
	bad := func(why string) error {
		return fmt.Errorf("cannot read %q as a time%s (want seconds 83.4, mm:ss.s 1:23.4 or hh:mm:ss.s 0:01:23.4)", in, why)
	}
	if s == "" {
		return 0, bad("")
	}
	if reSeconds.MatchString(s) {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || math.IsInf(v, 0) {
			return 0, bad("")
		}
		return v, nil
	}
	m := reClock.FindStringSubmatch(s)
	if m == nil {
		return 0, bad("")
	}
	sec, err := strconv.ParseFloat(m[3], 64)
	if err != nil {
		return 0, bad("")
	}
	if sec >= 60 {
		return 0, bad(": seconds after a colon must be below 60")
	}
	mins, err := strconv.ParseFloat(m[2], 64)
	if err != nil {
		return 0, bad("")
	}
	hours := 0.0
	if m[1] != "" {
		if mins >= 60 {
			return 0, bad(": minutes after a colon must be below 60")
		}
		if hours, err = strconv.ParseFloat(m[1], 64); err != nil {
			return 0, bad("")
		}
	}
	v := hours*3600 + mins*60 + sec
	if math.IsInf(v, 0) {
		return 0, bad("")
	}
	return v, nil
}

// fmtS formats seconds for messages.
func fmtS(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) + " s" }
