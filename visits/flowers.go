package visits

// Flower is one flower of a flower map, in pixel coordinates of the video
// frame. A flower is a circle of radius RPX around (XPX, YPX) unless
// PolygonPX is given, in which case the polygon is its outline and the
// circle is used only for drawing and distances.
type Flower struct {
	ID        string       `json:"id"`
	XPX       float64      `json:"x_px"`
	YPX       float64      `json:"y_px"`
	RPX       float64      `json:"r_px"`
	Kind      string       `json:"kind,omitempty"`      // free text, e.g. "white clover"
	RewardUL  *float64     `json:"reward_ul,omitempty"` // nectar standing crop, microlitres
	PolygonPX [][2]float64 `json:"polygon_px,omitempty"`
}

// FlowerMap is the flower map file: the flowers of one camera view.
// FrameWidthPX and FrameHeightPX, when non-zero, record the frame size the
// map was made for; a map made for another frame size is rejected.
type FlowerMap struct {
	FrameWidthPX  int      `json:"frame_width_px,omitempty"`
	FrameHeightPX int      `json:"frame_height_px,omitempty"`
	Flowers       []Flower `json:"flowers"`
}
