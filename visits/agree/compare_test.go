package agree

import (
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/")

func table(t *testing.T, name, csv string) *Table {
	t.Helper()
	tab, err := ReadTable(strings.NewReader(csv), name)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

// Synthetic ground truth: a person's sheet (A) and a table B made from it
// with known changes: onsets later by 0.1 to 0.5 s, offsets earlier by
// 0.2 s, one landing missed (row 5), one extra landing (B row 7).
const (
	sheetA = `flower_id,start_s,end_s,bee
A1,0:01.0,0:05.0,red
A2,0:08.0,0:12.0,red
A1,0:20.0,0:21.0,blue
B3,0:30.0,0:40.0,blue
A2,0:50.0,0:52.0,red
B3,1:00.0,1:03.0,blue
`
	tableB = `flower_id,start_s,end_s
A1,1.1,4.8
A2,8.2,11.8
A1,20.3,20.8
B3,30.4,39.8
B3,60.5,62.8
A1,70,71
`
)

func TestCompareSynthetic(t *testing.T) {
	a, b := table(t, "a.csv", sheetA), table(t, "b.csv", tableB)
	r, err := Compare(a, b, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Matches) != 5 || len(r.OnlyA) != 1 || len(r.OnlyB) != 1 {
		t.Fatalf("matched %d, only A %d, only B %d; want 5, 1, 1", len(r.Matches), len(r.OnlyA), len(r.OnlyB))
	}
	if a.Landings[r.OnlyA[0]].Row != 6 || b.Landings[r.OnlyB[0]].Row != 7 {
		t.Errorf("unmatched rows A %d, B %d; want 6 and 7", a.Landings[r.OnlyA[0]].Row, b.Landings[r.OnlyB[0]].Row)
	}
	// Synthetic truth: 5 matched of 6 in each table.
	near(t, "precision", r.Precision, 5.0/6, 1e-12)
	near(t, "recall", r.Recall, 5.0/6, 1e-12)
	near(t, "F1", r.F1, 5.0/6, 1e-12)
	// Onset differences 0.1 0.2 0.3 0.4 0.5: median 0.3; 95th
	// percentile (type 7) 0.4 + 0.8*0.1 = 0.48. Offsets all -0.2.
	near(t, "onset median", r.Onset.MedianS, 0.3, 1e-9)
	near(t, "onset p95 |d|", r.Onset.P95AbsS, 0.48, 1e-9)
	near(t, "offset median", r.Offset.MedianS, -0.2, 1e-9)
	near(t, "offset p95 |d|", r.Offset.P95AbsS, 0.2, 1e-9)
	// Duration differences B - A: -0.3 -0.4 -0.5 -0.6 -0.7: bias -0.5,
	// SD sqrt(0.025) = 0.1581.
	near(t, "bias", r.Durations.Bias, -0.5, 1e-9)
	near(t, "SD", r.Durations.SD, math.Sqrt(0.025), 1e-9)
	if r.ICC.Form != "ICC(2,1)" || len(r.ICCAll) != 3 || !(r.ICC.Value > 0.9 && r.ICC.Value < 1) {
		t.Errorf("ICC %+v: want ICC(2,1) between 0.9 and 1", r.ICC)
	}
	if !(r.Concordance.Value > 0.9 && r.Concordance.Value < r.Concordance.Pearson) {
		t.Errorf("CCC %+v: want above 0.9 and below r (durations are biased)", r.Concordance)
	}
	// Frame-wise: span 1 s to 71 s, 700 times x 3 flowers.
	if r.Frames.Times != 700 || r.Frames.Flowers != 3 {
		t.Errorf("frames %d x %d flowers, want 700 x 3", r.Frames.Times, r.Frames.Flowers)
	}
	// Landed cells: A 4+4+1+10+2+3 = 24 s, B 3.7+3.6+0.5+9.4+2.3+1 =
	// 20.5 s, both = matched overlaps 3.7+3.6+0.5+9.4+2.3 = 19.5 s.
	if r.Frames.Both != 195 || r.Frames.OnlyA != 45 || r.Frames.OnlyB != 10 || r.Frames.Neither != 2100-250 {
		t.Errorf("frame table both %d, A %d, B %d, neither %d; want 195 45 10 1850", r.Frames.Both, r.Frames.OnlyA, r.Frames.OnlyB, r.Frames.Neither)
	}
	if len(r.Warnings) != 1 || !strings.Contains(r.Warnings[0], "only 5 matched") {
		t.Errorf("warnings %q, want one about the few matched landings", r.Warnings)
	}
}

func TestCompareFramesByHand(t *testing.T) {
	// A landed 1.0-2.0 s, B 1.5-2.5 s, grid 0.1 s from 1.0 to 2.5 s:
	// 15 times; both 5, A only 5, B only 5. By hand: p_o = 1/3,
	// p_e = (2/3)^2 + (1/3)^2 = 5/9, kappa = (1/3 - 5/9)/(4/9) = -0.5.
	fr := CompareFrames([]Landing{ld("F", 1, 2)}, []Landing{ld("F", 1.5, 2.5)}, 1, 2.5, 0.1)
	if fr.Times != 15 || fr.Both != 5 || fr.OnlyA != 5 || fr.OnlyB != 5 || fr.Neither != 0 {
		t.Fatalf("got %+v", fr)
	}
	near(t, "agreement", fr.Agreement, 1.0/3, 1e-12)
	near(t, "kappa", fr.Kappa.Value, -0.5, 1e-12)

	// Frames at 25 fps: flitlog's landing of frames 10..39 has StartS
	// 10/25 and EndS 40/25; sampled at the frame times it covers exactly
	// 30 frames, despite 0.04 not being exact in binary.
	st := FrameStates([]Landing{ld("F", 10.0/25, 40.0/25)}, 0, 1.0/25, 100)["F"]
	n, first := 0, -1
	for k, v := range st {
		if v {
			n++
			if first < 0 {
				first = k
			}
		}
	}
	if n != 30 || first != 10 {
		t.Errorf("25 fps: %d landed frames from %d, want 30 from 10", n, first)
	}
}

func TestCompareWindowAndErrors(t *testing.T) {
	a, b := table(t, "a.csv", sheetA), table(t, "b.csv", tableB)
	r, err := Compare(a, b, Options{FromS: 0, ToS: 25, GridS: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.InA) != 3 || len(r.InB) != 3 || len(r.Matches) != 3 || r.Frames.Times != 50 {
		t.Errorf("window 0-25 s: in A %d, in B %d, matched %d, times %d; want 3 3 3 50", len(r.InA), len(r.InB), len(r.Matches), r.Frames.Times)
	}
	// Overlap required: B's landings all overlap A's, so nothing changes.
	r, _ = Compare(a, b, Options{ToleranceS: -1})
	if len(r.Matches) != 5 || r.ToleranceS != 0 {
		t.Errorf("no tolerance: %d matches, tolerance %g; want 5, 0", len(r.Matches), r.ToleranceS)
	}

	c1 := table(t, "m.csv", "clip,flower_id,start_s,end_s\nc01.mp4,A1,1,2\n")
	c2 := table(t, "n.csv", "clip,flower_id,start_s,end_s\n\nc02.mp4,A1,1,2\n")
	_, err = Compare(c1, c2, Options{})
	var ce *ClipError
	if !errors.As(err, &ce) {
		t.Fatalf("different clips: got %v, want a *ClipError", err)
	}
	want := `n.csv: row 3, field clip: clip "c02" differs from clip "c01" of m.csv row 2: compare tables of the same clip`
	if err.Error() != want {
		t.Errorf("message\n %s\nwant\n %s", err, want)
	}
	if _, err := Compare(c1, table(t, "o.csv", "flower_id,start_s,end_s\nA1,1,2\n"), Options{}); err != nil {
		t.Errorf("a table without clip column compares with any: %v", err)
	}
}

func TestCompareFewMatches(t *testing.T) {
	a := table(t, "a.csv", "flower_id,start_s,end_s\nA1,1,2\n")
	b := table(t, "b.csv", "flower_id,start_s,end_s\nB1,1,2\n")
	r, err := Compare(a, b, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Matches) != 0 || r.Precision != 0 || r.Recall != 0 || !math.IsNaN(r.ICC.Value) || !math.IsNaN(r.Durations.Bias) {
		t.Errorf("no matches: %+v", r)
	}
	if len(r.Warnings) != 3 { // two flower-id warnings and one about matches
		t.Errorf("warnings %q, want 3", r.Warnings)
	}
	var buf bytes.Buffer
	if err := r.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(buf.Bytes(), &m); err != nil {
		t.Fatalf("agreement.json does not parse: %v", err)
	}
	if v := m["durations"].(map[string]any)["bland_altman"].(map[string]any)["bias_s"]; v != nil {
		t.Errorf("undefined bias written as %v, want null", v)
	}
	if err := r.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	if err := r.WriteBlandAltmanPNG(&buf); err != nil {
		t.Errorf("plot of no matches: %v", err)
	}
}

// TestGolden compares the text report, agreement.json and the
// Bland-Altman PNG of the synthetic tables with golden files (go test
// -update rewrites them), and checks that a second run is identical.
func TestGolden(t *testing.T) {
	a, b := table(t, "a.csv", sheetA), table(t, "b.csv", tableB)
	outputs := func() map[string][]byte {
		r, err := Compare(a, b, Options{})
		if err != nil {
			t.Fatal(err)
		}
		var txt, js, img bytes.Buffer
		if err := r.WriteText(&txt); err != nil {
			t.Fatal(err)
		}
		if err := r.WriteJSON(&js); err != nil {
			t.Fatal(err)
		}
		if err := r.WriteBlandAltmanPNG(&img); err != nil {
			t.Fatal(err)
		}
		return map[string][]byte{"report.golden.txt": txt.Bytes(), "agreement.golden.json": js.Bytes(), "bland-altman.golden.png": img.Bytes()}
	}
	first, second := outputs(), outputs()
	for name, got := range first {
		if !bytes.Equal(got, second[name]) {
			t.Errorf("%s differs between two runs", name)
		}
		path := filepath.Join("testdata", name)
		if *update {
			if err := os.MkdirAll("testdata", 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test -update to create it)", err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from %s; if the change is wanted, run go test -update and look at it", name, path)
		}
	}
	img, err := png.Decode(bytes.NewReader(first["bland-altman.golden.png"]))
	if err != nil {
		t.Fatal(err)
	}
	if s := img.Bounds().Size(); s.X != 672 || s.Y != 480 {
		t.Errorf("PNG %v, want 672 x 480 (7 x 5 in at 96 dpi)", s)
	}
	var js map[string]any
	if err := json.Unmarshal(first["agreement.golden.json"], &js); err != nil {
		t.Fatal(err)
	}
	if js["durations"].(map[string]any)["icc"].(map[string]any)["form"] != "ICC(2,1)" {
		t.Error("agreement.json does not name the ICC form")
	}
}
