package main

import (
	"bytes"
	"encoding/json"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Synthetic ground truth for the agree command: a sheet scored by hand
// (A) and flitlog's visits.csv (B) of the same clip, made so that 3 of
// A's 4 landings are found and B has one extra.
const (
	agreeSheet = `# clip01 scored by hand
clip,flower,start,end,bee,notes
clip01.mp4,A1,0:01.0,0:05.0,red,
clip01.mp4,A2,0:08.0,0:12.0,red,"long visit, partly hidden"
clip01.mp4,A1,0:20.0,0:21.0,blue,
clip01.mp4,B3,0:30.0,0:40.0,blue,
`
	agreeVisits = `track_id,flower_id,start_s,end_s,duration_s,start_frame,end_frame,index
1,A1,1.1,4.8,3.7,28,119,1
1,A2,8.2,11.8,3.6,205,294,2
2,A1,20.3,20.8,0.5,508,519,1
5,B3,50,52,2,1250,1299,1
`
)

func agreeTempFiles(t *testing.T, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, s := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func runAgree(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := cmdAgree(args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestAgreeCommand(t *testing.T) {
	dir := agreeTempFiles(t, map[string]string{"sheet.csv": agreeSheet, "visits.csv": agreeVisits})
	a, b := filepath.Join(dir, "sheet.csv"), filepath.Join(dir, "visits.csv")
	outDir := filepath.Join(dir, "agreement")
	code, stdout, stderr := runAgree(a, b, "--out", outDir, "--fps", "25")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for _, want := range []string{
		"matched 3, only in A 1 (missed), only in B 1 (extra)",
		"precision 0.750   recall 0.750   F1 0.750",
		"ICC(2,1), two-way random effects, absolute agreement",
		"Lin's concordance correlation",
		"every 0.04 s",
		"Cohen's kappa",
		"sheet.csv row 6: flower B3, 30.00 to 40.00 s, bee blue",
	} {
		if !strings.Contains(stdout, want) {
			t.Errorf("report lacks %q:\n%s", want, stdout)
		}
	}
	var js struct {
		Events struct {
			Matched   int     `json:"matched"`
			Precision float64 `json:"precision"`
		} `json:"events"`
		Durations struct {
			ICC struct {
				Form string `json:"form"`
			} `json:"icc"`
		} `json:"durations"`
		Frames struct {
			GridS float64 `json:"grid_s"`
		} `json:"frames"`
	}
	b1, err := os.ReadFile(filepath.Join(outDir, "agreement.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b1, &js); err != nil {
		t.Fatalf("agreement.json: %v", err)
	}
	if js.Events.Matched != 3 || js.Events.Precision != 0.75 || js.Durations.ICC.Form != "ICC(2,1)" || js.Frames.GridS != 0.04 {
		t.Errorf("agreement.json: %+v", js)
	}
	f, err := os.Open(filepath.Join(outDir, "bland-altman.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := png.Decode(f); err != nil {
		t.Errorf("bland-altman.png: %v", err)
	}
	if !strings.Contains(stderr, "wrote ") {
		t.Errorf("stderr %q does not say what was written", stderr)
	}
}

func TestAgreeCommandErrors(t *testing.T) {
	dir := agreeTempFiles(t, map[string]string{
		"sheet.csv":     agreeSheet,
		"visits.csv":    agreeVisits,
		"bad_time.csv":  "flower_id,start_s,end_s\nA1,1,2\nA1,1:7x,9\n",
		"backwards.csv": "flower_id,start_s,end_s\nA1,5,4\n",
		"unknown.csv":   "flower_id,start_s,end_s,colour\nA1,1,2,red\n",
		"empty.csv":     "flower_id,start_s,end_s\n",
		"clip02.csv":    "clip,flower_id,start_s,end_s\nclip02.avi,A1,1,2\n",
	})
	p := func(name string) string { return filepath.Join(dir, name) }
	for _, tc := range []struct {
		name string
		args []string
		code int
		want []string // parts of the one-line message
	}{
		{"help", []string{"--help"}, exitOK, nil},
		{"no arguments", nil, exitUsage, []string{"want two landing tables"}},
		{"three arguments", []string{p("sheet.csv"), p("visits.csv"), p("sheet.csv")}, exitUsage, []string{"got 3"}},
		{"unknown flag", []string{"--tolerance", "1", p("sheet.csv"), p("visits.csv")}, exitUsage, []string{"tolerance"}},
		{"negative tolerance", []string{"--tolerance-s", "-1", p("sheet.csv"), p("visits.csv")}, exitUsage, []string{"--tolerance-s must be >= 0"}},
		{"fps and grid", []string{"--fps", "25", "--grid-s", "0.1", p("sheet.csv"), p("visits.csv")}, exitUsage, []string{"not both"}},
		{"zero fps", []string{"--fps", "0", p("sheet.csv"), p("visits.csv")}, exitUsage, []string{"--fps must be > 0"}},
		{"bad from", []string{"--from-s", "1:99", p("sheet.csv"), p("visits.csv")}, exitUsage, []string{"--from-s", "below 60"}},
		{"to before from", []string{"--from-s", "30", "--to-s", "0:10", p("sheet.csv"), p("visits.csv")}, exitUsage, []string{"must be after"}},
		{"missing file", []string{p("nope.csv"), p("visits.csv")}, exitSome, []string{"nope.csv", "no such file"}},
		{"bad time", []string{p("sheet.csv"), p("bad_time.csv")}, exitSome, []string{"bad_time.csv: row 3, field start_s", `"1:7x"`}},
		{"end before start", []string{p("backwards.csv"), p("visits.csv")}, exitSome, []string{"backwards.csv: row 2, field end_s", "before start"}},
		{"unknown column", []string{p("unknown.csv"), p("visits.csv")}, exitSome, []string{"unknown.csv: row 1, field colour", "unknown column"}},
		{"empty table", []string{p("sheet.csv"), p("empty.csv")}, exitSome, []string{"empty.csv", "no landings"}},
		{"different clips", []string{p("sheet.csv"), p("clip02.csv")}, exitSome, []string{"clip02.csv: row 2, field clip", `"clip02" differs from clip "clip01"`, "sheet.csv row 3"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, stdout, stderr := runAgree(tc.args...)
			if code != tc.code {
				t.Fatalf("exit %d, want %d; stderr %q", code, tc.code, stderr)
			}
			if tc.code == exitOK {
				if !strings.Contains(stdout, "usage: flitlog agree") || !strings.Contains(stdout, "mm:ss.s") || !strings.Contains(stdout, "-tolerance-s") {
					t.Errorf("help text:\n%s", stdout)
				}
				return
			}
			if strings.Count(stderr, "\n") != 1 || !strings.HasPrefix(stderr, "flitlog agree: ") {
				t.Errorf("stderr %q: want one line starting 'flitlog agree: '", stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q lacks %q", stderr, w)
				}
			}
			if stdout != "" {
				t.Errorf("stdout %q, want nothing on error", stdout)
			}
		})
	}
}

func TestAgreeCommandWindowAndTolerance(t *testing.T) {
	dir := agreeTempFiles(t, map[string]string{"sheet.csv": agreeSheet, "visits.csv": agreeVisits,
		"late.csv": "flower_id,start_s,end_s\nA1,5.3,6\n"})
	a, b := filepath.Join(dir, "sheet.csv"), filepath.Join(dir, "visits.csv")
	code, stdout, stderr := runAgree("--from-s", "0:00", "--to-s", "0:15", a, b)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "Span 0.00 to 15.00 s.") || !strings.Contains(stdout, "matched 2, only in A 0 (missed), only in B 0 (extra)") {
		t.Errorf("window 0-15 s:\n%s", stdout)
	}
	// A1 ends at 5.0 s in the sheet; late.csv's landing starts at 5.3 s.
	late := filepath.Join(dir, "late.csv")
	if _, stdout, _ := runAgree(a, late); !strings.Contains(stdout, "matched 1,") {
		t.Errorf("default tolerance 0.5 s should match a 0.3 s gap:\n%s", stdout)
	}
	if _, stdout, _ := runAgree("--tolerance-s", "0", a, late); !strings.Contains(stdout, "matched 0,") || !strings.Contains(stdout, "overlapping or touching") {
		t.Errorf("--tolerance-s 0 should require overlap:\n%s", stdout)
	}
}
