package main

import (
	"bytes"
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"gocv.io/x/gocv"

	"flitlog/calibration"
	"flitlog/track/flowerfind"
	"flitlog/visits"
)

const flowersUsage = `
usage: flitlog flowers [flags] CLIP

Proposes a flower map for CLIP, to be checked and edited by hand. The
background of the clip (the median of --frames frames spread over it, in
which bees that move about do not show) is searched for patches of blossom
colour of flower size: presets white, yellow, purple (and blue) and pink
(and red), or colour ranges of your own (--hsv). Each patch becomes a
flower with an id (F01, F02, ... from the top of the picture down), its
centre and radius in pixels, and its colour name as its kind.

The map is written, by default, beside the clip as CLIP's name with
.flowers.json (clips/plot4.mp4 -> clips/plot4.flowers.json), which
'flitlog run' then uses for that clip. Open it in a text editor: delete
false flowers (a white stone, a patch of sky), correct radii, give real
kinds ("white clover") and, for intake rates, the nectar standing crop of
each flower (reward_ul, microlitres). --preview writes a picture of the
background with the flowers drawn and numbered, to check them by eye. An
existing map is never overwritten without --force, since it may hold your
edits.

Colours are in OpenCV's HSV: hue 0-179 (degrees / 2: red 0, yellow 30,
green 60, blue 120, magenta 150), saturation and value 0-255. A hue range
whose first number is larger wraps around red (170-8).

Exit status: 0 written, 1 failed (one line saying what to do), 2 usage
error.

Examples:
  flitlog flowers --px-per-mm 2.1 clips/plot4.mp4
  flitlog flowers --colors white,purple --radius-mm 5-15 --preview check.png clips/plot4.mp4
  flitlog flowers --hsv lilac=125-150,40-255,90-255 --out lilac.flowers.json clips/plot4.mp4
`

// hsvFlag collects repeated --hsv ranges.
type hsvFlag []flowerfind.ColorRange

func (h *hsvFlag) String() string {
	var s []string
	for _, c := range *h {
		s = append(s, c.String())
	}
	return strings.Join(s, " ")
}

func (h *hsvFlag) Set(v string) error {
	c, err := flowerfind.ParseHSV(v)
	if err != nil {
		return err
	}
	*h = append(*h, c)
	return nil
}

// cmdFlowers is 'flitlog flowers'.
func cmdFlowers(args []string, stdout, stderr io.Writer) int {
	flags := newFlagSet("flowers")
	colors := flags.String("colors", "", "colour presets to look for, comma-separated: "+strings.Join(flowerfind.PresetNames(), ",")+
		" (blue = purple, red = pink); default all, or none when --hsv is given")
	var hsv hsvFlag
	flags.Var(&hsv, "hsv", "a colour range of your own, `NAME=H1-H2,S1-S2,V1-V2` in OpenCV HSV; NAME becomes the flowers' kind; repeatable")
	radius := flags.String("radius-mm", "4-40", "radius of the flowers (to the petal tips), `MIN-MAX` mm")
	pxPerMM := flags.Float64("px-per-mm", 0, fmt.Sprintf("image scale on the flower plane, px/mm (default %g, assumed, with a warning)", DefaultPXPerMM))
	calFile := flags.String("calibration", "", "take the scale from this calibration `FILE` (from 'flitlog calibrate') instead of --px-per-mm")
	frames := flags.Int("frames", 25, "frames sampled over the clip for its background")
	out := flags.String("out", "", "write the map to `FILE` (- for standard output); default CLIP's folder/NAME.flowers.json")
	force := flags.Bool("force", false, "overwrite an existing flower map")
	preview := flags.String("preview", "", "also write the background with the proposed flowers drawn to this PNG `FILE`")
	pos, code, done := parseArgs(flags, args, flowersUsage, stdout, stderr)
	if done {
		return code
	}
	fail := func(format string, a ...any) int {
		fmt.Fprintf(stderr, "flitlog flowers: "+format+"\n", a...)
		return exitSome
	}
	usageErr := func(format string, a ...any) int {
		fmt.Fprintf(stderr, "flitlog flowers: "+format+"; run 'flitlog flowers --help'\n", a...)
		return exitUsage
	}
	if len(pos) != 1 {
		return usageErr("want one CLIP, got %d arguments", len(pos))
	}
	clip := pos[0]

	opts := flowerfind.Options{}
	if *colors != "" || len(hsv) == 0 {
		names := flowerfind.PresetNames()
		if *colors != "" {
			names = strings.Split(*colors, ",")
		}
		for _, n := range names {
			c, ok := flowerfind.Preset(strings.TrimSpace(strings.ToLower(n)))
			if !ok {
				return usageErr("--colors: unknown colour %q (presets: %s; or give your own with --hsv)", n, strings.Join(flowerfind.PresetNames(), ", "))
			}
			opts.Colors = append(opts.Colors, c)
		}
	}
	opts.Colors = append(opts.Colors, hsv...)
	lo, hi, ok := strings.Cut(*radius, "-")
	rMin, err1 := strconv.ParseFloat(strings.TrimSpace(lo), 64)
	rMax, err2 := strconv.ParseFloat(strings.TrimSpace(hi), 64)
	if !ok || err1 != nil || err2 != nil || !(rMin > 0) || !(rMax >= rMin) || math.IsInf(rMax, 0) {
		return usageErr("--radius-mm %q: want MIN-MAX in mm with 0 < MIN <= MAX, e.g. 4-40", *radius)
	}
	opts.RadiusMinMM, opts.RadiusMaxMM = rMin, rMax
	if *frames < 1 {
		return usageErr("--frames %d: want at least 1", *frames)
	}
	if *pxPerMM < 0 || math.IsNaN(*pxPerMM) || math.IsInf(*pxPerMM, 0) {
		return usageErr("--px-per-mm %g: want a scale > 0", *pxPerMM)
	}
	if *pxPerMM > 0 && *calFile != "" {
		return usageErr("give either --px-per-mm or --calibration, not both")
	}

	fi, err := os.Stat(clip)
	switch {
	case err != nil:
		return fail("%s: %s", clip, errText(err))
	case fi.IsDir():
		return fail("%s is a folder: give one clip", clip)
	}
	outPath := *out
	if outPath == "" {
		outPath = filepath.Join(filepath.Dir(clip), clipBase(clip)+".flowers.json")
	}
	if outPath != "-" && !*force {
		if _, err := os.Stat(outPath); err == nil {
			return fail("%s exists and may hold your edits: give --force to overwrite it, or --out another file", outPath)
		} else if !errors.Is(err, fs.ErrNotExist) {
			return fail("%s: %s", outPath, errText(err))
		}
	}

	bg, err := flowerfind.BackgroundFromClip(clip, *frames)
	if err != nil {
		return fail("%s", oneLine(err.Error()))
	}
	defer bg.Close()
	w, h := bg.Cols(), bg.Rows()
	switch {
	case *calFile != "":
		c, err := calibration.Load(*calFile)
		if err != nil {
			return fail("%s", oneLine(err.Error()))
		}
		if err := c.CheckFrameSize(w, h); err != nil {
			return fail("calibration %s: %s", *calFile, oneLine(err.Error()))
		}
		opts.PXPerMM = c.NominalPXPerMM()
	case *pxPerMM > 0:
		opts.PXPerMM = *pxPerMM
	default:
		opts.PXPerMM = DefaultPXPerMM
		fmt.Fprintf(stderr, "flitlog flowers: no scale given: assumed %g px/mm, so --radius-mm is nominal; give --px-per-mm or --calibration\n", DefaultPXPerMM)
	}
	fm, err := flowerfind.Find(bg, opts)
	if err != nil {
		return fail("%s", oneLine(err.Error()))
	}
	if *preview != "" {
		if err := writePreview(*preview, bg, fm); err != nil {
			return fail("preview %s: %s", *preview, oneLine(errText(err)))
		}
	}
	if len(fm.Flowers) == 0 {
		return fail("no flowers found in %s (%dx%d, %s): try other --colors or an --hsv range, a wider --radius-mm, or check --px-per-mm",
			clip, w, h, radiusText(opts))
	}
	if err := fm.Validate(w, h); err != nil { // cannot fail for a found map; checked all the same
		return fail("%s", err)
	}
	var buf bytes.Buffer
	if err := visits.WriteFlowerMap(&buf, fm); err != nil {
		return fail("%s", err)
	}
	if outPath == "-" {
		if _, err := stdout.Write(buf.Bytes()); err != nil {
			return fail("writing: %s", err)
		}
	} else if err := writeFileAtomic(outPath, func(w io.Writer) error { _, err := w.Write(buf.Bytes()); return err }); err != nil {
		return fail("%s: %s", outPath, errText(err))
	}
	where := outPath
	if outPath == "-" {
		where = "standard output"
	}
	fmt.Fprintf(stderr, "flitlog flowers: %d flowers (%s) written to %s; check them, delete false ones, and add kinds and reward_ul\n",
		len(fm.Flowers), kindCounts(fm), where)
	return exitOK
}

func radiusText(o flowerfind.Options) string {
	return fmt.Sprintf("radius %g-%g mm at %g px/mm", o.RadiusMinMM, o.RadiusMaxMM, o.PXPerMM)
}

// kindCounts is "3 white, 2 purple" for the flowers of fm.
func kindCounts(fm visits.FlowerMap) string {
	n := map[string]int{}
	for _, f := range fm.Flowers {
		n[f.Kind]++
	}
	kinds := make([]string, 0, len(n))
	for k := range n {
		kinds = append(kinds, k)
	}
	sort.Strings(kinds)
	parts := make([]string, len(kinds))
	for i, k := range kinds {
		parts[i] = fmt.Sprintf("%d %s", n[k], k)
	}
	return strings.Join(parts, ", ")
}

// writePreview writes bg with each flower's circle and id drawn, as PNG.
func writePreview(path string, bg gocv.Mat, fm visits.FlowerMap) error {
	img := bg.Clone()
	defer img.Close()
	mark := color.RGBA{R: 255, G: 0, B: 255, A: 255}
	for _, f := range fm.Flowers {
		c := image.Pt(int(math.Round(f.XPX)), int(math.Round(f.YPX)))
		gocv.Circle(&img, c, int(math.Round(f.RPX)), mark, 2)
		gocv.PutText(&img, f.ID, image.Pt(c.X+int(f.RPX)+3, c.Y+5), gocv.FontHersheySimplex, 0.5, mark, 1)
	}
	buf, err := gocv.IMEncode(gocv.PNGFileExt, img)
	if err != nil {
		return err
	}
	defer buf.Close()
	return writeFileAtomic(path, func(w io.Writer) error { _, err := w.Write(buf.GetBytes()); return err })
}
