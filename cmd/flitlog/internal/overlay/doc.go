// Package overlay writes the overlay video of a clip: the original frames
// with the tracking and visit results drawn on them, for checking by eye.
//
// The CLI decodes the clip a second time after analysis. A Timeline built
// from the whole-clip results (NewTimeline) gives for each frame a
// FrameState (Timeline.At: binary search per track, so a sequential pass
// costs O(tracks log samples) per frame and allocates nothing once warm),
// and Writer.Draw draws it onto the frame and writes it:
//
//	w, err := overlay.Create(filepath.Join(dir, "overlay.mp4"), width, height, fps)
//	tl := overlay.NewTimeline(flowers, results, landings, inspections)
//	for each decoded frame i at time t: err = w.Draw(&frame, i, tl.At(i, t))
//	err = w.Close() // then report w.Path(), and warn if w.FellBack()
//
// What is drawn, in this order:
//   - each flower's outline (circle, or polygon when the map has one) and
//     id: white; yellow and thicker while a bee is landed on it; orange
//     while a bee inspects it;
//   - each track's trail over the last TrailS seconds (default 1 s) in the
//     track's colour with a dark edge, fading in 4 steps of opacity
//     (1, 0.75, 0.5, 0.25) with age; the trail is broken at frame gaps;
//   - each track's current position: a disc when flying, a diamond when
//     hovering, a square when landed, filled in the state colour (hollow
//     when the position was coasted, not observed), with the track id in
//     the track's colour and, while landed, the flower id and the handling
//     time so far in s;
//   - the clip time (s) and frame index in the top-left corner and a key
//     to the marker shapes in the bottom-left corner.
//
// Colours are those of the PNG pictures (plots.TrackColor,
// plots.StateColor: Okabe-Ito), and marker shape repeats the state, so
// the video reads without colour vision. Sizes scale with the frame:
// s = min(width, height)/720 clamped to [0.75, 4]; lines are about 2.5 s
// px wide and text 0.6 s Hershey scale. Positions are px of the video
// frame, times s from the clip's first frame.
//
// Container and codec: Create tries H.264 ("avc1") in .mp4 through
// OpenCV's FFmpeg backend and falls back to Motion JPEG ("MJPG") in .avi
// when no H.264 encoder is available; Path, Codec and FellBack report the
// outcome.
//
// References:
//   - Okabe M, Ito K (2008) Color Universal Design (CUD): how to make
//     figures and presentations that are friendly to colorblind people.
//     https://jfly.uni-koeln.de/color/ (palette values).
//   - OpenCV 4.6 VideoWriter and drawing functions (imgproc), via
//     gocv.io/x/gocv.
package overlay
