// Package plots draws the pictures of one clip for checking results by
// eye: PNG files made with gonum/plot, pure Go, no OpenCV.
//
//   - PathPlot: the flight paths over the clip's background frame, in
//     image coordinates (px, y downwards, both axes at the same scale),
//     with the flowers of the flower map as outlines with their ids, each
//     track's start (ring, with the track id) and end (X), stretches
//     without a detection dashed, and each landing as a square at the
//     bee's position in its first landed frame.
//   - SpeedPlot: speed (mm/s) over time (s), one panel per track on common
//     axes, the background shaded by flight state (flying, hovering,
//     landed).
//   - TimelinePlot: the visits of the clip, one row per flower, landings
//     as bars coloured by track from start to end (handling time), ends
//     cut by the clip edge marked with an arrowhead, inspections as a tick
//     and a thin line in the lower half of the row.
//
// Colours. Tracks take TrackColor(id), the Okabe & Ito (2008) palette
// without yellow, chosen by id modulo 7, so a track has the same colour in
// every picture and in the overlay video whichever subset is drawn; in the
// path plot each track's id is also written at its start, which tells
// apart tracks whose ids are 7 apart. Flight states take StateColor:
// flying sky blue, hovering orange, landed bluish green, as light tints
// behind the speed line. Lines over the photograph have a white halo, and
// the frame is shown in grey, lightened (Options.BackgroundFade), so that
// the colours stay readable whatever the meadow looks like.
//
// Units and sizes. Time is seconds from the clip's first frame, speed
// mm/s, positions px of the video frame with pixel centres at integer
// coordinates. Pictures default to 1600 px wide at 144 dpi with 12 pt
// text (24 px), which stays legible when the PNG is scaled down to a page
// width. Options sets title, size, dpi, font size, the maximum number of
// tracks (longest kept; the title says how many were left out) and the
// background fading.
//
// Output is deterministic: the same input gives the same bytes (no map
// order, no clock, no randomness), so golden-file tests can compare PNGs.
// The functions are safe for concurrent use.
//
// References:
//   - Okabe M, Ito K (2008) Color Universal Design (CUD): how to make
//     figures and presentations that are friendly to colorblind people.
//     https://jfly.uni-koeln.de/color/ (palette values).
//   - gonum/plot, gonum.org/v1/plot (plotting, PNG rendering via vgimg).
package plots
