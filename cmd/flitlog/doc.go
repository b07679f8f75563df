/*
Flitlog scores field video of foraging bees: when each bee lands on which
flower, how long it handles it (handling time), how long it flies to the
next (inter-visit interval), which flowers it inspects and leaves, and how
fast and how straight it flies. It runs on an ordinary CPU.

Usage:

	flitlog <command> [flags] [arguments]

The commands are:

	run        score clips and folders of clips
	demo       render the built-in demo scene, score it, print a scorecard
	flowers    propose a flower map from a clip's background by blossom colour
	calibrate  make a calibration file (scale bar, plane points, chessboard)
	agree      agreement between two landing tables (flitlog or hand-scored)
	version    print the versions of flitlog, gocv and OpenCV
	help       show help for a command

Every command takes --help. Flags may stand before or after the
arguments. An unknown command or flag is a one-line error and exit status 2.

# Run

	flitlog run [--flowers FILE] [--px-per-mm X | --calibration FILE] [--fps F]
	            [--out DIR] [--workers N] [--overlay] [--no-plots] [--config FILE]
	            [--print-config] [--force] [--quiet] [--body-length-mm L]
	            [--roi IMAGE] [--stabilize] PATH...

PATH is a clip or a folder, searched recursively for clips (.mp4 .mov .avi
.mkv .m4v .mts .m2ts .webm .mpg .mpeg .wmv .3gp, in any case). Clips are
processed by --workers parallel workers (default: the number of cores, at
most 4). On a terminal one progress bar covers the batch and names the
running clips with their frame progress and the frames/s; elsewhere a plain
line is printed per clip and every 10 s; --quiet prints only errors.

Each clip's outputs go to DIR/<clip name>/ (DIR defaults to flitlog-out):
tracks.csv, visits.csv, inspections.csv, flights.csv, summary.json, the
plots path.png, speed.png and timeline.png (not with --no-plots) and, with
--overlay, overlay.mp4. DIR/clips.csv has one row per clip with its status
(ok, partial, failed) and the reason. A clip's files are written into a
temporary folder that replaces the clip's folder only when complete.

Flowers: --flowers FILE is used for every clip; otherwise a clip uses
CLIP.flowers.json beside it (as 'flitlog flowers' writes). Without a flower
map the tracks and kinematics are still written and landings are not scored.

Scale: --px-per-mm X for a camera looking straight down at the flowers, or
--calibration FILE from 'flitlog calibrate'. Without either, 2 px/mm is
assumed and every summary says so.

Settings: defaults, then --config FILE (TOML), then flags. --print-config
prints the effective settings, with units in their names, as a file to edit.

Resume: a clip whose outputs are complete and whose input (size and
modification time), settings, flower map, calibration and flitlog version
are unchanged is not redone; --force redoes it. Ctrl-C stops within a frame
and keeps every clip already finished.

Exit status: 0 all clips ok, 1 some clip failed or was partial, 2 usage
error.

# Demo

	flitlog demo [--out DIR] [--overlay] [--scene NAME]

Renders a synthetic clip of an invented allotment bed with two bumblebees,
whose every position, landing and inspection is known, scores it exactly as
'flitlog run' would and prints a scorecard comparing the written tables with
the truth: MOTA and IDF1, position error, landing F1, onset and offset errors
in frames, inspection recall and handling times. Outputs go to DIR (default
flitlog-demo).

# Flowers

	flitlog flowers [--colors LIST] [--hsv NAME=H1-H2,S1-S2,V1-V2] [--radius-mm MIN-MAX]
	                [--px-per-mm X | --calibration FILE] [--frames N] [--out FILE]
	                [--preview PNG] [--force] CLIP

Proposes a flower map from the clip's background by blossom colour, to be
checked and edited by hand.

# Calibrate

	flitlog calibrate scale --p1 X,Y --p2 X,Y --length-mm L --frame WxH --out FILE
	flitlog calibrate plane --point X,Y=XMM,YMM ... --frame WxH --out FILE [--lens FILE]
	flitlog calibrate chessboard --dir DIR --inner CxR --square-mm S [--out FILE]

Makes a calibration file: a scale from a reference of known length, a plane
homography from four or more measured points, or lens distortion from
chessboard photos.

# Agree

	flitlog agree [--tolerance-s S] [--fps F | --grid-s S] [--from-s T] [--to-s T] [--out DIR] A B

Compares two landing tables (flitlog's visits.csv or a hand-scored sheet):
event precision, recall and F1, onset and offset differences, Bland-Altman
limits of agreement, ICC(2,1), Lin's concordance correlation and frame-wise
Cohen's kappa.

# Examples

	flitlog demo
	flitlog flowers --px-per-mm 2.1 clips/plot4.mp4
	flitlog run --px-per-mm 2.1 --out results/ clips/
	flitlog run --calibration cam1.json --flowers patch.json --overlay clip01.mp4
	flitlog run --print-config > settings.toml
	flitlog agree my_scores.csv results/clip01/visits.csv
*/
package main
