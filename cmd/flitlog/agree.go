package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"flitlog/visits/agree"
)

const agreeUsage = `
usage: flitlog agree [flags] A B

Measures how well two landing tables of the same clip agree: flitlog's
visits.csv against a sheet scored by hand, or two people's sheets. A is
the reference (usually the careful person); all differences are B - A.

Tables. Either may be flitlog's visits.csv or a CSV score sheet with a
header row and one row per landing:
  flower_id   required (also: flower)
  start_s     landing time, required (also: start, onset, begin)
  end_s       take-off time (also: end, offset, stop); or instead
  duration_s  handling time (also: duration)
  track_id    bee label, optional (also: bee); not used for matching
  clip        clip name, optional; both tables must name the same clip
  note        free text, ignored (also: notes, comment, observer)
Column names ignore case. Times are seconds from the clip's first frame,
as 83.4, mm:ss.s (1:23.4) or hh:mm:ss.s (0:01:23.4). Commas, semicolons
or tabs separate fields (with semicolons or tabs, 1:23,4 is read too).
Lines starting with # are skipped. Any other column is an error.
Example sheet:
  flower_id,start_s,end_s,bee
  A1,0:12.4,0:15.0,red dot
  A2,1:02.8,1:09.1,red dot

What it reports:
  Landings: one-to-one matching on the same flower (overlapping, or apart
    by at most --tolerance-s); precision, recall, F1; onset and offset
    differences (median, 95th percentile of |B - A|).
  Handling time of matched landings: Bland-Altman bias and 95% limits of
    agreement (Bland & Altman 1986); ICC(2,1), two-way random effects,
    absolute agreement (Shrout & Fleiss 1979); Lin's concordance
    correlation (Lin 1989); each with a 95% confidence interval.
  Frames: landed / not landed per flower on a time grid (--grid-s, or
    every frame with --fps): agreement and Cohen's kappa (Cohen 1960).
The report goes to the terminal; with --out DIR also DIR/agreement.json
(every number, matched pairs, missed and extra landings) and
DIR/bland-altman.png.

Exit status: 0 compared, 1 a table could not be read or the tables are of
different clips (one line naming file, row and field), 2 usage error.

Examples:
  flitlog agree sheet_anna.csv flitlog-out/clip01/visits.csv
  flitlog agree --out agreement/ --fps 25 anna.csv ben.csv
  flitlog agree --from-s 0:00 --to-s 5:00 anna.csv flitlog-out/clip01/visits.csv
`

func cmdAgree(args []string, stdout, stderr io.Writer) int {
	flags := newFlagSet("agree")
	var (
		out   = flags.String("out", "", "write agreement.json and bland-altman.png to `DIR` (created if needed)")
		tolS  = flags.Float64("tolerance-s", agree.DefaultToleranceS, "largest gap between two landings on one flower that may still match, s (`S` >= 0; 0: they must overlap or touch)")
		fps   = flags.Float64("fps", 0, "frame rate `F` > 0: sample the landed state at every frame, 1/F s apart")
		gridS = flags.Float64("grid-s", agree.DefaultGridS, "time step `S` > 0 of the landed / not landed comparison, s")
		from  = flags.String("from-s", "", "compare only from `TIME` (s, mm:ss.s or hh:mm:ss.s); default the first landing")
		to    = flags.String("to-s", "", "compare only up to `TIME`; default the last take-off")
	)
	pos, code, done := parseArgs(flags, args, agreeUsage, stdout, stderr)
	if done {
		return code
	}
	usageErr := func(format string, a ...any) int {
		fmt.Fprintf(stderr, "flitlog agree: "+format+"; run 'flitlog agree --help'\n", a...)
		return exitUsage
	}
	if len(pos) != 2 {
		return usageErr("want two landing tables A and B, got %d argument(s)", len(pos))
	}
	set := map[string]bool{}
	flags.Visit(func(f *flag.Flag) { set[f.Name] = true })
	opt := agree.Options{ToleranceS: *tolS, GridS: *gridS}
	if !(*tolS >= 0) || math.IsInf(*tolS, 0) {
		return usageErr("--tolerance-s must be >= 0 s, got %v", *tolS)
	}
	if *tolS == 0 {
		opt.ToleranceS = -1 // agree.Options: negative means overlap or touch
	}
	if set["fps"] && set["grid-s"] {
		return usageErr("give --fps or --grid-s, not both")
	}
	if set["fps"] {
		if !(*fps > 0) || math.IsInf(*fps, 0) {
			return usageErr("--fps must be > 0 frames/s, got %v", *fps)
		}
		opt.GridS = 1 / *fps
	} else if !(*gridS > 0) || math.IsInf(*gridS, 0) {
		return usageErr("--grid-s must be > 0 s, got %v", *gridS)
	}
	var fromS, toS float64
	var err error
	if set["from-s"] {
		if fromS, err = agree.ParseTime(*from); err != nil {
			return usageErr("--from-s: %v", err)
		}
	}
	if set["to-s"] {
		if toS, err = agree.ParseTime(*to); err != nil {
			return usageErr("--to-s: %v", err)
		}
	}

	var tabs [2]*agree.Table
	for i, p := range pos {
		t, err := agree.ReadTableFile(p)
		if err != nil {
			var pe *agree.ParseError
			if errors.As(err, &pe) {
				fmt.Fprintf(stderr, "flitlog agree: %s\n", oneLine(err.Error()))
			} else {
				fmt.Fprintf(stderr, "flitlog agree: %s: %s\n", p, errText(err))
			}
			return exitSome
		}
		tabs[i] = t
	}
	if set["from-s"] || set["to-s"] {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, t := range tabs {
			for _, l := range t.Landings {
				lo, hi = math.Min(lo, l.StartS), math.Max(hi, l.EndS)
			}
		}
		if !set["from-s"] {
			fromS = math.Min(lo, toS)
		}
		if !set["to-s"] {
			toS = hi
		}
		if !(toS > fromS) {
			return usageErr("--to-s (%g s) must be after --from-s (%g s)", toS, fromS)
		}
		opt.FromS, opt.ToS = fromS, toS
	}

	r, err := agree.Compare(tabs[0], tabs[1], opt)
	if err != nil {
		fmt.Fprintf(stderr, "flitlog agree: %s\n", oneLine(err.Error()))
		return exitSome
	}
	if err := r.WriteText(stdout); err != nil {
		fmt.Fprintf(stderr, "flitlog agree: writing the report: %v\n", err)
		return exitSome
	}
	if *out == "" {
		return exitOK
	}
	if err := os.MkdirAll(*out, 0o755); err != nil {
		fmt.Fprintf(stderr, "flitlog agree: --out %s: %s\n", *out, errText(err))
		return exitSome
	}
	for _, f := range []struct {
		name  string
		write func(io.Writer) error
	}{
		{"agreement.json", r.WriteJSON},
		{"bland-altman.png", r.WriteBlandAltmanPNG},
	} {
		path := filepath.Join(*out, f.name)
		if err := writeFileAtomic(path, f.write); err != nil {
			fmt.Fprintf(stderr, "flitlog agree: %s: %s\n", path, errText(err))
			return exitSome
		}
		fmt.Fprintf(stderr, "flitlog agree: wrote %s\n", path)
	}
	return exitOK
}
