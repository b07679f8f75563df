package track

import "flitlog/track/link"

// Detection, Point and Track are defined in package link (pure Go, so that
// linking and its tests need no OpenCV) and used here under the same names.
type (
	Detection = link.Detection
	Point     = link.Point
	Track     = link.Track
)

// FrameInfo describes one decoded frame.
type FrameInfo struct {
	Index int     // from 0
	TimeS float64 // seconds from the first frame (container timestamp, or Index/fps)
}
