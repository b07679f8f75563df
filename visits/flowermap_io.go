package visits

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
)

// MapError is a problem with a flower map: malformed JSON or a bad value.
// It says where (file, line, flower, field) and what to fix.
type MapError struct {
	File     string // file name; empty when read from a stream
	Line     int    // 1-based line in the JSON text; 0 when unknown
	FlowerID string // id of the flower concerned; empty for map-level problems
	Index    int    // 0-based position of the flower in "flowers"; -1 for map-level problems
	Field    string // JSON field name, e.g. "r_px"; empty when not about one field
	Msg      string // what is wrong and what to do
}

func (e *MapError) Error() string {
	var b strings.Builder
	switch {
	case e.File != "" && e.Line > 0:
		fmt.Fprintf(&b, "%s:%d: ", e.File, e.Line)
	case e.File != "":
		fmt.Fprintf(&b, "%s: ", e.File)
	case e.Line > 0:
		fmt.Fprintf(&b, "line %d: ", e.Line)
	}
	switch {
	case e.FlowerID != "":
		fmt.Fprintf(&b, "flower %q: ", e.FlowerID)
	case e.Index >= 0:
		fmt.Fprintf(&b, "flower #%d: ", e.Index+1)
	}
	if e.Field != "" {
		fmt.Fprintf(&b, "field %s: ", e.Field)
	}
	b.WriteString(e.Msg)
	return b.String()
}

// ReadFlowerMap reads a flower map in the JSON format of DESIGN.md:
//
//	{"frame_width_px": 1280, "frame_height_px": 720,
//	 "flowers": [{"id": "A1", "x_px": 412.0, "y_px": 300.5, "r_px": 24.0,
//	              "kind": "clover", "reward_ul": 1.5, "polygon_px": [[x, y], ...]}]}
//
// Unknown fields are rejected (a misspelt "r_px" would otherwise silently
// become a zero radius). The values are checked as by Validate(0, 0), that
// is everything except the frame-size checks. Errors are *MapError and name
// the line, and the flower and field where that applies.
func ReadFlowerMap(r io.Reader) (FlowerMap, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return FlowerMap{}, &MapError{Index: -1, Msg: "reading flower map: " + err.Error()}
	}
	fm, lines, err := decodeFlowerMap(data)
	if err != nil {
		return FlowerMap{}, err
	}
	if err := fm.validate(0, 0, lines); err != nil {
		return FlowerMap{}, err
	}
	return fm, nil
}

// LoadFlowerMap reads the flower map file at path; errors name the file.
func LoadFlowerMap(path string) (FlowerMap, error) {
	f, err := os.Open(path)
	if err != nil {
		return FlowerMap{}, fmt.Errorf("flower map: %w", err)
	}
	defer f.Close()
	fm, err := ReadFlowerMap(f)
	if err != nil {
		var me *MapError
		if errors.As(err, &me) {
			me.File = path
			return FlowerMap{}, me
		}
		return FlowerMap{}, fmt.Errorf("%s: %w", path, err)
	}
	return fm, nil
}

// WriteFlowerMap writes fm as indented JSON, one flower per line, in a form
// ReadFlowerMap reads back unchanged.
func WriteFlowerMap(w io.Writer, fm FlowerMap) error {
	var b bytes.Buffer
	b.WriteString("{\n")
	if fm.FrameWidthPX != 0 || fm.FrameHeightPX != 0 {
		fmt.Fprintf(&b, "  \"frame_width_px\": %d,\n  \"frame_height_px\": %d,\n", fm.FrameWidthPX, fm.FrameHeightPX)
	}
	b.WriteString("  \"flowers\": [")
	for i, f := range fm.Flowers {
		for _, v := range []float64{f.XPX, f.YPX, f.RPX} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("visits: flower %q: position or radius is %v, which JSON cannot hold", f.ID, v)
			}
		}
		line, err := json.Marshal(f)
		if err != nil {
			return fmt.Errorf("visits: flower %q: %w", f.ID, err)
		}
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString("\n    ")
		b.Write(line)
	}
	if len(fm.Flowers) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("]\n}\n")
	_, err := w.Write(b.Bytes())
	return err
}

// lineAt returns the 1-based line of byte offset off in data.
func lineAt(data []byte, off int64) int {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	if off < 0 {
		off = 0
	}
	return 1 + bytes.Count(data[:off], []byte("\n"))
}

// skipSpaceComma returns the offset of the first byte at or after off that
// is not JSON white space or a comma: where the next value starts.
func skipSpaceComma(data []byte, off int64) int64 {
	for off < int64(len(data)) {
		switch data[off] {
		case ' ', '\t', '\r', '\n', ',', ':':
			off++
		default:
			return off
		}
	}
	return off
}

// decodeFlowerMap decodes the JSON token by token so that every error can
// be given a line, and returns the line on which each flower starts.
func decodeFlowerMap(data []byte) (FlowerMap, []flowerPos, error) {
	var fm FlowerMap
	var lines []flowerPos
	dec := json.NewDecoder(bytes.NewReader(data))
	errAt := func(off int64, idx int, id, field, msg string) error {
		return &MapError{Line: lineAt(data, off), Index: idx, FlowerID: id, Field: field, Msg: msg}
	}
	jsonErr := func(err error, base int64, idx int, id string) error {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			return errAt(base+se.Offset, idx, id, "", "malformed JSON: "+strings.TrimPrefix(se.Error(), "json: ")+" (check for a missing comma, quote or bracket)")
		case errors.As(err, &te):
			field := te.Field
			if k := strings.LastIndex(field, "."); k >= 0 {
				field = field[k+1:]
			}
			return errAt(base+te.Offset, idx, id, field, fmt.Sprintf("got a JSON %s, want %s", te.Value, jsonTypeName(te.Type.String())))
		case err == io.ErrUnexpectedEOF || err == io.EOF:
			return errAt(int64(len(data)), idx, id, "", "malformed JSON: unexpected end of file (unclosed bracket or brace?)")
		}
		msg := strings.TrimPrefix(err.Error(), "json: ")
		field := ""
		if rest, ok := strings.CutPrefix(msg, "unknown field "); ok {
			field = strings.Trim(rest, `"`)
			msg = "unknown field; flower fields are id, x_px, y_px, r_px, kind, reward_ul, polygon_px"
		}
		return errAt(base, idx, id, field, msg)
	}

	tok, err := dec.Token()
	if err != nil {
		return fm, nil, jsonErr(err, 0, -1, "")
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return fm, nil, errAt(0, -1, "", "", `malformed JSON: a flower map is an object {"flowers": [...]}`)
	}
	sawFlowers := false
	for dec.More() {
		keyOff := skipSpaceComma(data, dec.InputOffset())
		tok, err := dec.Token()
		if err != nil {
			return fm, nil, jsonErr(err, 0, -1, "")
		}
		key, _ := tok.(string)
		switch key {
		case "frame_width_px", "frame_height_px":
			var v int
			if err := dec.Decode(&v); err != nil {
				var te *json.UnmarshalTypeError
				if errors.As(err, &te) {
					return fm, nil, errAt(keyOff, -1, "", key, "want a whole number of pixels")
				}
				return fm, nil, jsonErr(err, 0, -1, "")
			}
			if key == "frame_width_px" {
				fm.FrameWidthPX = v
			} else {
				fm.FrameHeightPX = v
			}
		case "flowers":
			sawFlowers = true
			tok, err := dec.Token()
			if err != nil {
				return fm, nil, jsonErr(err, 0, -1, "")
			}
			if tok == nil {
				break
			}
			if d, ok := tok.(json.Delim); !ok || d != '[' {
				return fm, nil, errAt(keyOff, -1, "", "flowers", "want a list [...] of flowers")
			}
			for dec.More() {
				off := skipSpaceComma(data, dec.InputOffset())
				idx := len(fm.Flowers)
				// Decode into raw first, so that an error in a flower
				// can name the flower's id when it has one.
				var raw json.RawMessage
				if err := dec.Decode(&raw); err != nil {
					return fm, nil, jsonErr(err, 0, idx, "")
				}
				var probe struct {
					ID any `json:"id"`
				}
				_ = json.Unmarshal(raw, &probe)
				id, _ := probe.ID.(string)
				var f Flower
				fd := json.NewDecoder(bytes.NewReader(raw))
				fd.DisallowUnknownFields()
				if err := fd.Decode(&f); err != nil {
					var te *json.UnmarshalTypeError
					if errors.As(err, &te) {
						// te.Offset is relative to raw.
						return fm, nil, jsonErr(err, off, idx, id)
					}
					e := jsonErr(err, off, idx, id).(*MapError)
					if e.Field != "" {
						if k := fieldOffset(raw, e.Field); k >= 0 {
							e.Line = lineAt(data, off+k)
						}
					}
					return fm, nil, e
				}
				fm.Flowers = append(fm.Flowers, f)
				fp := flowerPos{line: lineAt(data, off), fields: map[string]int{}}
				for _, name := range []string{"id", "x_px", "y_px", "r_px", "kind", "reward_ul", "polygon_px"} {
					if k := fieldOffset(raw, name); k >= 0 {
						fp.fields[name] = lineAt(data, off+k)
					}
				}
				lines = append(lines, fp)
			}
			if _, err := dec.Token(); err != nil { // ']'
				return fm, nil, jsonErr(err, 0, -1, "")
			}
		default:
			return fm, nil, errAt(keyOff, -1, "", key, `unknown field; a flower map has "flowers" and optionally "frame_width_px", "frame_height_px"`)
		}
	}
	if _, err := dec.Token(); err != nil { // '}'
		return fm, nil, jsonErr(err, 0, -1, "")
	}
	if _, err := dec.Token(); err != io.EOF {
		return fm, nil, errAt(dec.InputOffset(), -1, "", "", "malformed JSON: text after the closing brace of the flower map")
	}
	if !sawFlowers {
		return fm, nil, errAt(0, -1, "", "flowers", `missing; a flower map needs "flowers": [...]`)
	}
	return fm, lines, nil
}

// flowerPos is where a flower and its fields are in the JSON text.
type flowerPos struct {
	line   int            // line of the flower's opening brace
	fields map[string]int // line of each field's key
}

// fieldOffset returns the offset of the key "name" in raw, or -1.
func fieldOffset(raw []byte, name string) int64 {
	return int64(bytes.Index(raw, []byte(`"`+name+`"`)))
}

func jsonTypeName(goType string) string {
	switch goType {
	case "float64", "*float64":
		return "a number"
	case "int":
		return "a whole number"
	case "string":
		return "a text in quotes"
	case "[2]float64":
		return "a point [x, y]"
	case "[][2]float64":
		return "a list of points [[x, y], ...]"
	}
	return goType
}
