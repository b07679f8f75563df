package visits

import (
	"bytes"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
)

// sameFloat treats NaN as equal to NaN.
func sameFloat(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }

func TestLandingsCSVRoundTrip(t *testing.T) {
	nan := math.NaN()
	ls := []Landing{
		{TrackID: 3, FlowerID: "F01", StartFrame: 30, EndFrame: 119, StartS: 1, EndS: 4, DurationS: 3,
			ApproachSpeedMMPerS: 55.5, DepartureSpeedMMPerS: nan, SincePrevVisitS: nan, Index: 1,
			CensoredStart: true, FlowerKind: "white, \"double\" clover", RewardUL: 6},
		{TrackID: 3, FlowerID: "F02", StartFrame: 150, EndFrame: 179, StartS: 5, EndS: 6.000000000000001, DurationS: 1.0000000000000009,
			ApproachSpeedMMPerS: 1.0 / 3, DepartureSpeedMMPerS: 1e-7, SincePrevVisitS: 12.25, Index: 2, Revisit: true,
			CensoredEnd: true, RewardUL: nan},
	}
	var b bytes.Buffer
	if err := WriteLandingsCSV(&b, ls); err != nil {
		t.Fatal(err)
	}
	header := strings.SplitN(b.String(), "\n", 2)[0]
	if !strings.HasPrefix(header, "track_id,flower_id,start_s,end_s,duration_s,") {
		t.Errorf("header %q does not start with the DESIGN.md columns", header)
	}
	got, err := ReadLandingsCSV(bytes.NewReader(b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(ls) {
		t.Fatalf("got %d rows, want %d", len(got), len(ls))
	}
	for i := range ls {
		g, w := got[i], ls[i]
		for _, p := range []struct {
			name string
			a, b float64
		}{
			{"StartS", g.StartS, w.StartS}, {"EndS", g.EndS, w.EndS}, {"DurationS", g.DurationS, w.DurationS},
			{"Approach", g.ApproachSpeedMMPerS, w.ApproachSpeedMMPerS}, {"Departure", g.DepartureSpeedMMPerS, w.DepartureSpeedMMPerS},
			{"SincePrev", g.SincePrevVisitS, w.SincePrevVisitS}, {"Reward", g.RewardUL, w.RewardUL},
		} {
			if !sameFloat(p.a, p.b) {
				t.Errorf("row %d %s = %v, want %v (exactly)", i, p.name, p.a, p.b)
			}
		}
		g.StartS, g.EndS, g.DurationS, g.ApproachSpeedMMPerS, g.DepartureSpeedMMPerS, g.SincePrevVisitS, g.RewardUL = 0, 0, 0, 0, 0, 0, 0
		w.StartS, w.EndS, w.DurationS, w.ApproachSpeedMMPerS, w.DepartureSpeedMMPerS, w.SincePrevVisitS, w.RewardUL = 0, 0, 0, 0, 0, 0, 0
		if !reflect.DeepEqual(g, w) {
			t.Errorf("row %d:\ngot  %+v\nwant %+v", i, g, w)
		}
	}
	// Second write is byte-identical.
	var b2 bytes.Buffer
	if err := WriteLandingsCSV(&b2, got); err != nil {
		t.Fatal(err)
	}
	if b.String() != b2.String() {
		t.Errorf("second write differs:\n%s\n%s", b.String(), b2.String())
	}
}

func TestInspectionsAndFlightsCSVRoundTrip(t *testing.T) {
	is := []Inspection{{TrackID: 1, FlowerID: "F03", StartFrame: 10, EndFrame: 29, StartS: 1.0 / 3, EndS: 1, DurationS: 2.0 / 3,
		MinDistMM: math.NaN(), FlowerKind: "yellow", CensoredEnd: true}}
	var b bytes.Buffer
	if err := WriteInspectionsCSV(&b, is); err != nil {
		t.Fatal(err)
	}
	gi, err := ReadInspectionsCSV(&b)
	if err != nil {
		t.Fatal(err)
	}
	if len(gi) != 1 || !math.IsNaN(gi[0].MinDistMM) {
		t.Fatalf("got %+v", gi)
	}
	gi[0].MinDistMM, is[0].MinDistMM = 0, 0
	if !reflect.DeepEqual(gi, is) {
		t.Errorf("inspections:\ngot  %+v\nwant %+v", gi, is)
	}

	fs := []Flight{{TrackID: 2, FromFlowerID: "F01", ToFlowerID: "F02", FromKind: "a", ToKind: "b", FromIndex: 1,
		StartFrame: 120, EndFrame: 150, StartS: 4, EndS: 5, DurationS: 1, DistanceMM: 80.5, FlowerDistanceMM: 81,
		PathLengthMM: 95.25, MeanSpeedMMPerS: 95.25, Inspections: 2}}
	b.Reset()
	if err := WriteFlightsCSV(&b, fs); err != nil {
		t.Fatal(err)
	}
	if h := strings.SplitN(b.String(), "\n", 2)[0]; !strings.HasPrefix(h, "track_id,from_flower_id,to_flower_id,start_s,end_s,duration_s") {
		t.Errorf("flights header %q", h)
	}
	gf, err := ReadFlightsCSV(&b)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(gf, fs) {
		t.Errorf("flights:\ngot  %+v\nwant %+v", gf, fs)
	}
}

func TestReadLandingsCSVErrors(t *testing.T) {
	cases := []struct {
		name, csv string
		line      int
		col       string
	}{
		{"missing column", "track_id,flower_id,start_s\n1,A,0\n", 1, "end_s"},
		{"bad number", "track_id,flower_id,start_s,end_s\n1,A,0,1\n2,B,zero,1\n", 3, "start_s"},
		{"bad bool", "track_id,flower_id,start_s,end_s,revisit\n1,A,0,1,yes\n", 2, "revisit"},
		{"bad track", "track_id,flower_id,start_s,end_s\n1.5,A,0,1\n", 2, "track_id"},
		{"short row", "track_id,flower_id,start_s,end_s\n1,A,0\n", 2, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadLandingsCSV(strings.NewReader(c.csv))
			var ce *CSVError
			if !errors.As(err, &ce) {
				t.Fatalf("err = %v, want *CSVError", err)
			}
			if ce.Line != c.line || ce.Column != c.col {
				t.Errorf("got line %d column %q (%v); want line %d column %q", ce.Line, ce.Column, err, c.line, c.col)
			}
		})
	}
	// Extra and reordered columns are fine; missing optional ones read as NaN.
	ls, err := ReadLandingsCSV(strings.NewReader("end_s,note,flower_id,start_s,track_id\n2.5,hi,F9,1,7\n"))
	if err != nil {
		t.Fatal(err)
	}
	if len(ls) != 1 || ls[0].TrackID != 7 || ls[0].FlowerID != "F9" || ls[0].StartS != 1 || ls[0].EndS != 2.5 || !math.IsNaN(ls[0].DurationS) {
		t.Errorf("got %+v", ls)
	}
}
