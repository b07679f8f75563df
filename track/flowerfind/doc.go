// Package flowerfind proposes a flower map from a clip's background image
// by blossom colour, for the user to check and edit (flitlog flowers).
//
// # Method
//
// The background is the per-pixel, per-channel median of frames spread
// over the clip (BackgroundFromClip, MedianBackground): a bee that does not
// sit in one place for half of the sampled frames leaves no trace.
//
// Find blurs the background (5x5 Gaussian), converts it to HSV and, for
// each colour range, takes the pixels inside the range as a mask. A
// morphological closing with a disc a quarter of the smallest flower
// radius across joins the petals of a flower; an opening with a 3x3 disc
// removes specks. Each outer contour of the mask is a blob, holes filled;
// its centre is the centroid of the region inside the contour (shoelace
// formulas) and its radius the largest distance from there to the
// contour. A blob is proposed as a flower when its radius lies in
// [RadiusMinMM, RadiusMaxMM] (converted with PXPerMM) and it fills at least
// MinFill of its circle, which rejects grass blades and streaks. Where
// blobs overlap (a yellow disc inside a white flower, or one flower in two
// ranges), the larger is kept. Flowers are numbered F01, F02, ... in rows
// from the top of the image; a flower's kind is its colour range's name.
//
// # Colours
//
// Colour ranges are in OpenCV's 8-bit HSV: hue 0-179 (degrees / 2),
// saturation and value 0-255; a hue range whose low end is above its high
// end wraps around red. The presets (white, yellow, purple, pink) are
// ranges chosen for blossoms in daylight against green vegetation and
// soil; yellow asks for strong saturation and brightness so that dull
// yellow-brown soil stays out. A colour-only method also proposes anything
// else of blossom colour and size: a white stone, sky seen through
// leaves, a dropped label. The map is a proposal to edit.
//
// # Units
//
// Positions and radii in the map are pixels of the full-size frame; the
// radius gate is in mm and converted with Options.PXPerMM (px/mm).
//
// References:
//
//   - Smith A.R. (1978) Color gamut transform pairs. Computer Graphics
//     12(3): 12-19 (the HSV colour space).
//   - Suzuki S., Abe K. (1985) Topological structural analysis of
//     digitized binary images by border following. Computer Vision,
//     Graphics, and Image Processing 30: 32-46 (OpenCV's findContours).
//   - Serra J. (1982) Image Analysis and Mathematical Morphology.
//     Academic Press (closing and opening).
package flowerfind
