package agree

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
)

// maxListed is how many unmatched landings of each table WriteText lists.
const maxListed = 10

func f3(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 3, 64)
}

func f2s(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return fmt.Sprintf("%+.2f s", v)
}

func ci(lo, hi float64, f func(float64) string) string {
	if math.IsNaN(lo) || math.IsNaN(hi) {
		return "95% CI n/a"
	}
	return "95% CI " + f(lo) + " to " + f(hi)
}

func kindWords(t *Table) string {
	if t.Kind == KindFlitlog {
		return "flitlog visits table"
	}
	return "score sheet"
}

// WriteText writes the report for a person to read.
func (r *Report) WriteText(w io.Writer) error {
	bw := bufio.NewWriter(w)
	p := func(format string, args ...any) { fmt.Fprintf(bw, format, args...) }
	desc := func(label string, t *Table, n int) {
		p("%s = %s (%s, %d landings", label, t.Name, kindWords(t), len(t.Landings))
		if n != len(t.Landings) {
			p(", %d in the span", n)
		}
		if t.Clip != "" {
			p(", clip %s", t.Clip)
		}
		p(")\n")
	}
	desc("A", r.A, len(r.InA))
	desc("B", r.B, len(r.InB))
	p("A is the reference; differences are B - A. Span %.2f to %.2f s", r.FromS, r.ToS)
	if !r.WindowGiven {
		p(" (first start to last end)")
	}
	p(".\n\n")

	if r.ToleranceS > 0 {
		p("Landings (one-to-one, same flower, overlapping or apart by at most %g s)\n", r.ToleranceS)
	} else {
		p("Landings (one-to-one, same flower, overlapping or touching)\n")
	}
	p("  matched %d, only in A %d (missed), only in B %d (extra)\n", len(r.Matches), len(r.OnlyA), len(r.OnlyB))
	p("  precision %s   recall %s   F1 %s\n", f3(r.Precision), f3(r.Recall), f3(r.F1))
	for _, d := range []struct {
		name string
		s    DiffSummary
	}{{"onset ", r.Onset}, {"offset", r.Offset}} {
		p("  %s B - A: median %s, mean %s, 95th percentile of |B - A| %s\n", d.name, f2s(d.s.MedianS), f2s(d.s.MeanS), abs2s(d.s.P95AbsS))
	}
	p("\nHandling time over %d matched landings\n", len(r.Matches))
	ba := r.Durations
	p("  Bland-Altman bias %s (%s), SD of the differences %s\n", f2s(ba.Bias), ci(ba.BiasLow, ba.BiasHigh, f2s), abs2s(ba.SD))
	p("  95%% limits of agreement (bias -/+ %.2f SD) %s to %s\n", ba.Z, f2s(ba.Lower), f2s(ba.Upper))
	p("  %s, %s: %s (%s)\n", r.ICC.Form, r.ICC.Model, f3(r.ICC.Value), ci(r.ICC.Lower, r.ICC.Upper, f3))
	for _, c := range r.ICCAll {
		if c.Form != r.ICC.Form {
			p("    for comparison %s, %s: %s\n", c.Form, c.Model, f3(c.Value))
		}
	}
	c := r.Concordance
	p("  Lin's concordance correlation: %s (%s); Pearson r %s, accuracy C_b %s\n", f3(c.Value), ci(c.Lower, c.Upper, f3), f3(c.Pearson), f3(c.Accuracy))

	fr := r.Frames
	p("\nLanded / not landed, per flower, every %g s (%d times x %d flowers)\n", fr.GridS, fr.Times, fr.Flowers)
	p("  landed in both %d, A only %d, B only %d, neither %d\n", fr.Both, fr.OnlyA, fr.OnlyB, fr.Neither)
	p("  agreement %s, chance agreement %s, Cohen's kappa %s\n", f3(fr.Agreement), f3(fr.Kappa.Chance), f3(fr.Kappa.Value))

	list := func(title string, t *Table, idx []int) {
		if len(idx) == 0 {
			return
		}
		p("\n%s\n", title)
		for i, k := range idx {
			if i == maxListed {
				p("  ... and %d more (all in agreement.json)\n", len(idx)-maxListed)
				break
			}
			l := t.Landings[k]
			p("  %s row %d: flower %s, %.2f to %.2f s", t.Name, l.Row, l.FlowerID, l.StartS, l.EndS)
			if l.Bee != "" {
				p(", bee %s", l.Bee)
			}
			p("\n")
		}
	}
	list("Missed (in A only):", r.A, r.OnlyA)
	list("Extra (in B only):", r.B, r.OnlyB)
	if len(r.Warnings) > 0 {
		p("\nWarnings:\n")
		for _, w := range r.Warnings {
			p("  %s\n", w)
		}
	}
	return bw.Flush()
}

func abs2s(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return fmt.Sprintf("%.2f s", v)
}

// num is a float64 that encodes NaN and infinities as JSON null.
type num float64

func (n num) MarshalJSON() ([]byte, error) {
	v := float64(n)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

type jsonTable struct {
	File     string `json:"file"`
	Kind     string `json:"kind"`
	Clip     string `json:"clip,omitempty"`
	Landings int    `json:"landings"`
	InSpan   int    `json:"landings_in_span"`
}

type jsonDiff struct {
	N       int `json:"n"`
	MedianS num `json:"median_s"`
	MeanS   num `json:"mean_s"`
	P95AbsS num `json:"p95_abs_s"`
	MaxAbsS num `json:"max_abs_s"`
}

type jsonICC struct {
	Form  string `json:"form"`
	Model string `json:"model"`
	Value num    `json:"value"`
	CI95  [2]num `json:"ci95"`
}

type jsonLanding struct {
	Row      int    `json:"row"`
	Bee      string `json:"bee,omitempty"`
	FlowerID string `json:"flower_id"`
	StartS   num    `json:"start_s"`
	EndS     num    `json:"end_s"`
}

type jsonMatch struct {
	FlowerID    string `json:"flower_id"`
	ARow        int    `json:"a_row"`
	BRow        int    `json:"b_row"`
	AStartS     num    `json:"a_start_s"`
	AEndS       num    `json:"a_end_s"`
	BStartS     num    `json:"b_start_s"`
	BEndS       num    `json:"b_end_s"`
	OnsetDiffS  num    `json:"onset_diff_s"`
	OffsetDiffS num    `json:"offset_diff_s"`
}

type jsonReport struct {
	A          jsonTable `json:"a"`
	B          jsonTable `json:"b"`
	Reference  string    `json:"reference"`
	Difference string    `json:"difference"`
	Settings   struct {
		ToleranceS num  `json:"tolerance_s"`
		GridS      num  `json:"grid_s"`
		FromS      num  `json:"from_s"`
		ToS        num  `json:"to_s"`
		SpanGiven  bool `json:"span_given"`
	} `json:"settings"`
	Events struct {
		Matched   int      `json:"matched"`
		OnlyA     int      `json:"only_a"`
		OnlyB     int      `json:"only_b"`
		Precision num      `json:"precision"`
		Recall    num      `json:"recall"`
		F1        num      `json:"f1"`
		Onset     jsonDiff `json:"onset_diff"`
		Offset    jsonDiff `json:"offset_diff"`
	} `json:"events"`
	Durations struct {
		N           int `json:"n"`
		BlandAltman struct {
			BiasS      num    `json:"bias_s"`
			SDS        num    `json:"sd_s"`
			Z          num    `json:"z"`
			LowerS     num    `json:"lower_s"`
			UpperS     num    `json:"upper_s"`
			BiasCI95S  [2]num `json:"bias_ci95_s"`
			LowerCI95S [2]num `json:"lower_ci95_s"`
			UpperCI95S [2]num `json:"upper_ci95_s"`
		} `json:"bland_altman"`
		ICC    jsonICC   `json:"icc"`
		ICCAll []jsonICC `json:"icc_all"`
		CCC    struct {
			Value    num    `json:"value"`
			CI95     [2]num `json:"ci95"`
			Pearson  num    `json:"pearson_r"`
			Accuracy num    `json:"accuracy_cb"`
		} `json:"lin_ccc"`
	} `json:"durations"`
	Frames struct {
		GridS     num `json:"grid_s"`
		FromS     num `json:"from_s"`
		ToS       num `json:"to_s"`
		Times     int `json:"times"`
		Flowers   int `json:"flowers"`
		Both      int `json:"landed_both"`
		OnlyA     int `json:"landed_a_only"`
		OnlyB     int `json:"landed_b_only"`
		Neither   int `json:"landed_neither"`
		Agreement num `json:"agreement"`
		Chance    num `json:"chance_agreement"`
		Kappa     num `json:"cohen_kappa"`
	} `json:"frames"`
	Matches  []jsonMatch   `json:"matches"`
	MissedA  []jsonLanding `json:"only_a"`
	ExtraB   []jsonLanding `json:"only_b"`
	Warnings []string      `json:"warnings"`
}

func toJSONICC(c ICC) jsonICC {
	return jsonICC{Form: c.Form, Model: c.Model, Value: num(c.Value), CI95: [2]num{num(c.Lower), num(c.Upper)}}
}

func toJSONDiff(d DiffSummary) jsonDiff {
	return jsonDiff{N: d.N, MedianS: num(d.MedianS), MeanS: num(d.MeanS), P95AbsS: num(d.P95AbsS), MaxAbsS: num(d.MaxAbsS)}
}

// WriteJSON writes the report as agreement.json: indented JSON with units
// in the key names; NaN (a statistic that is not defined) is null.
func (r *Report) WriteJSON(w io.Writer) error {
	var j jsonReport
	j.A = jsonTable{File: r.A.Name, Kind: r.A.Kind, Clip: r.A.Clip, Landings: len(r.A.Landings), InSpan: len(r.InA)}
	j.B = jsonTable{File: r.B.Name, Kind: r.B.Kind, Clip: r.B.Clip, Landings: len(r.B.Landings), InSpan: len(r.InB)}
	j.Reference = "a"
	j.Difference = "b - a"
	j.Settings.ToleranceS = num(r.ToleranceS)
	j.Settings.GridS = num(r.Frames.GridS)
	j.Settings.FromS, j.Settings.ToS = num(r.FromS), num(r.ToS)
	j.Settings.SpanGiven = r.WindowGiven
	e := &j.Events
	e.Matched, e.OnlyA, e.OnlyB = len(r.Matches), len(r.OnlyA), len(r.OnlyB)
	e.Precision, e.Recall, e.F1 = num(r.Precision), num(r.Recall), num(r.F1)
	e.Onset, e.Offset = toJSONDiff(r.Onset), toJSONDiff(r.Offset)
	d := &j.Durations
	ba := r.Durations
	d.N = ba.N
	d.BlandAltman.BiasS, d.BlandAltman.SDS, d.BlandAltman.Z = num(ba.Bias), num(ba.SD), num(ba.Z)
	d.BlandAltman.LowerS, d.BlandAltman.UpperS = num(ba.Lower), num(ba.Upper)
	d.BlandAltman.BiasCI95S = [2]num{num(ba.BiasLow), num(ba.BiasHigh)}
	d.BlandAltman.LowerCI95S = [2]num{num(ba.LowerLow), num(ba.LowerHigh)}
	d.BlandAltman.UpperCI95S = [2]num{num(ba.UpperLow), num(ba.UpperHigh)}
	d.ICC = toJSONICC(r.ICC)
	d.ICCAll = []jsonICC{}
	for _, c := range r.ICCAll {
		d.ICCAll = append(d.ICCAll, toJSONICC(c))
	}
	c := r.Concordance
	d.CCC.Value, d.CCC.CI95 = num(c.Value), [2]num{num(c.Lower), num(c.Upper)}
	d.CCC.Pearson, d.CCC.Accuracy = num(c.Pearson), num(c.Accuracy)
	f, fr := &j.Frames, r.Frames
	f.GridS, f.FromS, f.ToS = num(fr.GridS), num(fr.FromS), num(fr.ToS)
	f.Times, f.Flowers = fr.Times, fr.Flowers
	f.Both, f.OnlyA, f.OnlyB, f.Neither = fr.Both, fr.OnlyA, fr.OnlyB, fr.Neither
	f.Agreement, f.Chance, f.Kappa = num(fr.Agreement), num(fr.Kappa.Chance), num(fr.Kappa.Value)
	j.Matches = []jsonMatch{}
	for _, m := range r.Matches {
		x, y := r.A.Landings[m.A], r.B.Landings[m.B]
		j.Matches = append(j.Matches, jsonMatch{FlowerID: m.FlowerID, ARow: x.Row, BRow: y.Row,
			AStartS: num(x.StartS), AEndS: num(x.EndS), BStartS: num(y.StartS), BEndS: num(y.EndS),
			OnsetDiffS: num(m.OnsetDiffS), OffsetDiffS: num(m.OffsetDiffS)})
	}
	land := func(t *Table, idx []int) []jsonLanding {
		out := []jsonLanding{}
		for _, k := range idx {
			l := t.Landings[k]
			out = append(out, jsonLanding{Row: l.Row, Bee: l.Bee, FlowerID: l.FlowerID, StartS: num(l.StartS), EndS: num(l.EndS)})
		}
		return out
	}
	j.MissedA, j.ExtraB = land(r.A, r.OnlyA), land(r.B, r.OnlyB)
	j.Warnings = append([]string{}, r.Warnings...)
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(&j)
}
