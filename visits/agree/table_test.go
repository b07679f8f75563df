package agree

import (
	"bytes"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"

	"flitlog/visits"
)

func TestParseTime(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want float64 // NaN: an error is wanted
	}{
		{"83.4", 83.4},
		{"83", 83},
		{" 0 ", 0},
		{".5", 0.5},
		{"7.", 7},
		{"1:23.4", 83.4},
		{"01:23", 83},
		{"0:00.04", 0.04},
		{"90:00", 5400}, // leading minutes may exceed 59
		{"0:01:23.4", 83.4},
		{"1:00:00", 3600},
		{"12:03:07.25", 12*3600 + 3*60 + 7.25},
		{"", math.NaN()},
		{"-1", math.NaN()},
		{"+1", math.NaN()},
		{"1e3", math.NaN()},
		{"NaN", math.NaN()},
		{"inf", math.NaN()},
		{"0x10", math.NaN()},
		{"1:60", math.NaN()},
		{"1:60:00", math.NaN()},
		{"1:2:3:4", math.NaN()},
		{"1:", math.NaN()},
		{":5", math.NaN()},
		{"1,5", math.NaN()}, // decimal comma only with ; or tab separators
		{"12 s", math.NaN()},
		{"1:7x", math.NaN()},
	} {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParseTime(tc.in)
			if math.IsNaN(tc.want) {
				if err == nil {
					t.Fatalf("ParseTime(%q) = %v, want an error", tc.in, got)
				}
				if !strings.Contains(err.Error(), "mm:ss.s") {
					t.Errorf("error %q does not say which forms are accepted", err)
				}
				return
			}
			if err != nil {
				t.Fatalf("ParseTime(%q): %v", tc.in, err)
			}
			near(t, "ParseTime("+tc.in+")", got, tc.want, 1e-9)
		})
	}
	if v, err := parseTime("1:23,4", true); err != nil || math.Abs(v-83.4) > 1e-9 {
		t.Errorf("decimal comma: got %v, %v; want 83.4", v, err)
	}
}

func TestReadTableVariants(t *testing.T) {
	want := []Landing{
		{Row: 2, FlowerID: "A1", StartS: 12.4, EndS: 15},
		{Row: 3, FlowerID: "A2", StartS: 62.8, EndS: 69.1},
	}
	withBee := func(bees ...string) []Landing {
		out := append([]Landing(nil), want...)
		for i := range out {
			out[i].Bee = bees[i]
		}
		return out
	}
	shift := func(ls []Landing, rows int) []Landing {
		out := append([]Landing(nil), ls...)
		for i := range out {
			out[i].Row += rows
		}
		return out
	}
	for _, tc := range []struct {
		name string
		in   string
		kind string
		clip string
		want []Landing
	}{
		{"seconds", "flower_id,start_s,end_s\nA1,12.4,15\nA2,62.8,69.1\n", KindManual, "", want},
		{"mm:ss.s and aliases", "Flower,Start,End\nA1,0:12.4,0:15.0\nA2,1:02.8,1:09.1\n", KindManual, "", want},
		{"hh:mm:ss.s, bee, note", "bee,flower,onset,offset,notes\nred,A1,0:00:12.4,0:00:15,\"hid, partly\"\nred,A2,00:01:02.8,0:01:09.1,\n",
			KindManual, "", withBee("red", "red")},
		{"duration instead of end", "Flower ID,Start time,Duration\nA1,12.4,2.6\nA2,1:02.8,6.3\n", KindManual, "", want},
		{"end and matching duration", "flower_id,start_s,end_s,duration_s\nA1,12.4,15,2.6\nA2,62.8,69.1,6.3\n", KindManual, "", want},
		{"semicolons and decimal comma", "flower_id;start_s;end_s\nA1;12,4;15\nA2;1:02,8;1:09,1\n", KindManual, "", want},
		{"tabs", "flower_id\tstart_s\tend_s\nA1\t12.4\t15\nA2\t62.8\t69.1\n", KindManual, "", want},
		{"comments, blank lines, BOM, CRLF", "\ufeff# scored by hand\r\nflower_id,start_s,end_s\r\nA1,12.4,15\r\n\r\nA2,62.8,69.1\r\n", KindManual, "",
			[]Landing{{Row: 3, FlowerID: "A1", StartS: 12.4, EndS: 15}, {Row: 5, FlowerID: "A2", StartS: 62.8, EndS: 69.1}}},
		{"clip column", "clip,flower_id,start_s,end_s\nclips/c01.mp4,A1,12.4,15\nc01,A2,62.8,69.1\n", KindManual, "c01", want},
		{"flitlog visits.csv, extra columns ignored",
			"track_id,flower_id,start_s,end_s,duration_s,start_frame,end_frame,whatever_new\n3,A1,12.4,15,2.6,310,374,x\n4,A2,62.8,69.1,6.3,1570,1726,y\n",
			KindFlitlog, "", withBee("3", "4")},
		{"header after comment lines", "# a\n# b\nflower_id,start_s,end_s\nA1,12.4,15\nA2,62.8,69.1\n", KindManual, "", shift(want, 2)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tab, err := ReadTable(strings.NewReader(tc.in), "s.csv")
			if err != nil {
				t.Fatal(err)
			}
			if tab.Kind != tc.kind || tab.Clip != tc.clip || tab.Name != "s.csv" {
				t.Errorf("kind %q clip %q name %q, want %q %q s.csv", tab.Kind, tab.Clip, tab.Name, tc.kind, tc.clip)
			}
			if len(tab.Landings) != len(tc.want) {
				t.Fatalf("got %d landings, want %d: %+v", len(tab.Landings), len(tc.want), tab.Landings)
			}
			for i, l := range tab.Landings {
				w := tc.want[i]
				if l.Row != w.Row || l.FlowerID != w.FlowerID || l.Bee != w.Bee ||
					math.Abs(l.StartS-w.StartS) > 1e-9 || math.Abs(l.EndS-w.EndS) > 1e-9 {
					t.Errorf("landing %d = %+v, want %+v", i, l, w)
				}
			}
		})
	}
}

// TestReadTableFlitlogWriter reads what visits.WriteLandingsCSV writes.
func TestReadTableFlitlogWriter(t *testing.T) {
	in := []visits.Landing{
		{TrackID: 1, FlowerID: "A1", StartFrame: 10, EndFrame: 39, StartS: 0.4, EndS: 1.6, DurationS: 1.2,
			ApproachSpeedMMPerS: math.NaN(), DepartureSpeedMMPerS: math.NaN(), SincePrevVisitS: math.NaN(), RewardUL: math.NaN()},
		{TrackID: 2, FlowerID: "B2", StartFrame: 100, EndFrame: 149, StartS: 4, EndS: 6, DurationS: 2,
			ApproachSpeedMMPerS: 80, DepartureSpeedMMPerS: 95, SincePrevVisitS: math.NaN(), RewardUL: 0.3, CensoredEnd: true},
	}
	var buf bytes.Buffer
	if err := visits.WriteLandingsCSV(&buf, in); err != nil {
		t.Fatal(err)
	}
	tab, err := ReadTable(&buf, "out/c01/visits.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := []Landing{
		{Row: 2, Bee: "1", FlowerID: "A1", StartS: 0.4, EndS: 1.6},
		{Row: 3, Bee: "2", FlowerID: "B2", StartS: 4, EndS: 6},
	}
	if tab.Kind != KindFlitlog || !reflect.DeepEqual(tab.Landings, want) {
		t.Errorf("got %s %+v, want flitlog %+v", tab.Kind, tab.Landings, want)
	}
}

func TestReadTableBadInput(t *testing.T) {
	for _, tc := range []struct {
		name  string
		in    string
		row   int
		field string
		text  string // part of the message
	}{
		{"unknown column", "flower_id,start_s,end_s,bee_colour\nA1,1,2,red\n", 1, "bee_colour", `unknown column "bee_colour"`},
		{"two columns for start", "flower_id,start,onset,end\nA1,1,1,2\n", 1, "onset", "means start_s"},
		{"missing flower", "start_s,end_s\n1,2\n", 1, "flower_id", "missing column flower_id"},
		{"missing end and duration", "flower_id,start_s\nA1,1\n", 1, "end_s", "missing column end_s"},
		{"unparseable start", "flower_id,start_s,end_s\nA1,1,2\nA1,1:7x,9\n", 3, "start_s", `cannot read "1:7x" as a time`},
		{"seconds past 59", "flower_id,start,end\nA1,0:58,0:61\n", 2, "end", "below 60"},
		{"end before start", "flower_id,start_s,end_s\nA1,1,2\nA1,1:05,1:04.5\n", 3, "end_s", "end 64.5 s is before start 65 s"},
		{"duration disagrees", "flower_id,start_s,end_s,duration\nA1,1,2,3\n", 2, "duration", "differs from end - start"},
		{"empty flower", "flower_id,start_s,end_s\n,1,2\n", 2, "flower_id", "empty flower id"},
		{"empty time", "flower_id,start_s,end_s\nA1,,2\n", 2, "start_s", `cannot read ""`},
		{"no rows", "flower_id,start_s,end_s\n", 0, "", "no landings"},
		{"empty file", "", 1, "", "empty file"},
		{"only comments", "# nothing\n\n", 1, "", "empty file"},
		{"short row", "flower_id,start_s,end_s\nA1,1\n", 2, "", "2 fields, the header has 3"},
		{"two clips in one table", "clip,flower_id,start_s,end_s\nc01.mp4,A1,1,2\nc02.mp4,A1,3,4\n", 3, "clip", `clip "c02" differs from clip "c01" of row 2`},
		{"bad quote", "flower_id,start_s,end_s\nA1,\"1,2\n", 2, "", "quote"},
		{"flitlog table, bad number", "track_id,flower_id,start_s,end_s,duration_s,start_frame,end_frame\n1,A1,x,2,1,0,1\n", 2, "start_s", `cannot read "x"`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadTable(strings.NewReader(tc.in), "sheet.csv")
			if err == nil {
				t.Fatal("no error")
			}
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T %v is not a *ParseError", err, err)
			}
			if pe.File != "sheet.csv" || pe.Row != tc.row || pe.Field != tc.field {
				t.Errorf("file %q row %d field %q, want sheet.csv row %d field %q (%v)", pe.File, pe.Row, pe.Field, tc.row, tc.field, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "sheet.csv") || !strings.Contains(msg, tc.text) || strings.Contains(msg, "\n") {
				t.Errorf("message %q: want one line starting with the file and containing %q", msg, tc.text)
			}
		})
	}
	_, err := ReadTable(strings.NewReader("flower_id,start_s,end_s\n"), "e.csv")
	if !errors.Is(err, ErrEmpty) {
		t.Errorf("empty table: %v does not wrap ErrEmpty", err)
	}
}

func TestClipName(t *testing.T) {
	for in, want := range map[string]string{
		"clip01.mp4":              "clip01",
		" clips/2026/clip01.MP4 ": "clip01",
		`D:\field\clip01.avi`:     "clip01",
		"clip01":                  "clip01",
		"":                        "",
		".hidden":                 ".hidden",
	} {
		if got := ClipName(in); got != want {
			t.Errorf("ClipName(%q) = %q, want %q", in, got, want)
		}
	}
}

// FuzzReadTable: the reader never panics, and what it accepts is sane.
func FuzzReadTable(f *testing.F) {
	for _, s := range []string{
		"flower_id,start_s,end_s\nA1,1,2\n",
		"Flower;Start;Duration\nA1;0:01,5;2\n",
		"bee,flower,onset,offset,notes\nred,A1,0:00:12.4,0:00:15,x\n",
		"track_id,flower_id,start_s,end_s,duration_s,start_frame,end_frame\n1,A1,1,2,1,10,19\n",
		"clip,flower_id,start_s,end_s\nc1,A1,1,2\nc2,A1,1,2\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		tab, err := ReadTable(strings.NewReader(s), "f.csv")
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) || strings.Contains(err.Error(), "\n") {
				t.Fatalf("error %q: want a one-line *ParseError", err)
			}
			return
		}
		if len(tab.Landings) == 0 {
			t.Fatal("accepted a table without landings")
		}
		for _, l := range tab.Landings {
			if !(l.StartS >= 0) || !(l.EndS >= l.StartS) || math.IsInf(l.EndS, 0) || strings.TrimSpace(l.FlowerID) == "" {
				t.Fatalf("accepted a bad landing %+v", l)
			}
		}
	})
}
