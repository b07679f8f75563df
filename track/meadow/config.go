package meadow

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
)

// Config describes one synthetic scene. Everything the scene shows follows
// from Config and Seed: two scenes made from equal Configs render identical
// frames and identical ground truth.
//
// Two conventions for zero values:
//   - Camera, plot and behaviour fields (sizes, speeds, times, counts,
//     probabilities) take their documented default when zero.
//     Probabilities that may legitimately be zero are switched off with a
//     negative value.
//   - Effect fields (texture, vegetation, wind, shadows, wings, banding,
//     occluder, illumination, flicker, noise, shake) are off when zero or
//     false. The presets switch them on; Config{} is a plain scene with a
//     flat background, flowers and bees and nothing else.
type Config struct {
	// Name is free text recorded in truth.json; Preset sets it to the
	// preset's name.
	Name string `json:"name,omitempty"`
	// Plot describes the invented place the scene shows (free text).
	Plot string `json:"plot,omitempty"`
	// Seed selects the scene: flower layout, bee paths, texture and
	// per-frame noise all derive from it.
	Seed int64 `json:"seed"`

	// Camera.

	// WidthPX, HeightPX: frame size, px. Default 1280 x 720. Range 64..8192;
	// both even (H.264 needs even sizes).
	WidthPX  int `json:"width_px"`
	HeightPX int `json:"height_px"`
	// FPS: frame rate, frames/s. Default 30. Range 1..1000.
	FPS float64 `json:"fps"`
	// DurationS: clip length, s. Default 60. The clip has
	// round(DurationS*FPS) frames.
	DurationS float64 `json:"duration_s"`
	// PXPerMM: image scale on the flower plane, px/mm. Default WidthPX/600
	// (a field of view 600 mm wide).
	PXPerMM float64 `json:"px_per_mm"`

	// Plot.

	// Flowers: number of flowers. Default 8. Range 1..64.
	Flowers int `json:"flowers"`
	// FlowerKinds: kinds to draw flowers from, each one of KindNames().
	// Default: all kinds.
	FlowerKinds []string `json:"flower_kinds,omitempty"`
	// FlowerRadiusMinMM, FlowerRadiusMaxMM: range of flower radii (petal
	// tips), mm. Default 15 and 30.
	FlowerRadiusMinMM float64 `json:"flower_radius_min_mm"`
	FlowerRadiusMaxMM float64 `json:"flower_radius_max_mm"`

	// Bees.

	// Bees: number of bees. Default 1. Range 1..16.
	Bees int `json:"bees"`
	// BeeLengthMM: body length of bee 0, mm. Default 14 (a bumblebee
	// worker). Other bees vary by up to ±10 %.
	BeeLengthMM float64 `json:"bee_length_mm"`
	// CruiseSpeedMinMMPerS, CruiseSpeedMaxMMPerS: range of cruise speeds,
	// one drawn per flight, mm/s. Default 300 and 600.
	CruiseSpeedMinMMPerS float64 `json:"cruise_speed_min_mm_s"`
	CruiseSpeedMaxMMPerS float64 `json:"cruise_speed_max_mm_s"`
	// AccelMMPerS2: mean acceleration when speeding up and slowing down,
	// mm/s^2. Default 2500.
	AccelMMPerS2 float64 `json:"accel_mm_s2"`
	// ZigzagMM: amplitude of the sideways oscillation of cruising flight,
	// mm. Default 2. Negative: none.
	ZigzagMM float64 `json:"zigzag_mm"`
	// HandlingMedianS, HandlingSigma: handling time on a flower is
	// log-normal with this median (s) and this standard deviation of its
	// natural logarithm. Default 6 s and 0.8. Draws are clipped to
	// [1 s, HandlingMaxS].
	HandlingMedianS float64 `json:"handling_median_s"`
	HandlingSigma   float64 `json:"handling_sigma"`
	// HandlingMaxS: longest drawn handling time, s. Default 45.
	HandlingMaxS float64 `json:"handling_max_s"`
	// WalkSpeedMMPerS: walking speed on a flower, mm/s. Default 8.
	WalkSpeedMMPerS float64 `json:"walk_speed_mm_s"`
	// InspectionProb: probability that an approach to a flower ends as an
	// inspection (hover, then leave) instead of a landing. Default 0.25;
	// negative: no random inspections. Range [0, 0.9].
	InspectionProb float64 `json:"inspection_prob"`
	// RevisitProb: probability that the next flower is one this bee has
	// already landed on. Default 0.3; negative: none. Range [0, 1].
	RevisitProb float64 `json:"revisit_prob"`
	// ExitProb: probability that a bee leaves the frame after a landing and
	// comes back later. Default 0.15; negative: never. Range [0, 1].
	ExitProb float64 `json:"exit_prob"`
	// OutsideMinS, OutsideMaxS: time out of frame before re-entering, s.
	// Default 1.5 and 5.
	OutsideMinS float64 `json:"outside_min_s"`
	OutsideMaxS float64 `json:"outside_max_s"`
	// EntryMaxS: each bee first enters the frame at a time drawn from
	// [0, EntryMaxS], s. Default 2.
	EntryMaxS float64 `json:"entry_max_s"`

	// Requirements, met by construction or New returns an error.

	// MinLongLandingS: if > 0, bee 0 makes at least one landing of at least
	// this handling time, s, wholly inside the clip.
	MinLongLandingS float64 `json:"min_long_landing_s,omitempty"`
	// MinInspections: bee 0 makes at least this many inspections.
	MinInspections int `json:"min_inspections,omitempty"`
	// MinRevisits: bee 0 makes at least this many landings on flowers it
	// landed on before.
	MinRevisits int `json:"min_revisits,omitempty"`
	// MinExits: bee 0 leaves the frame and comes back at least this often.
	MinExits int `json:"min_exits,omitempty"`
	// MinCrossings: at least this many close passes of two airborne bees
	// (centres closer than CrossingBodyLengths body lengths). Needs Bees >= 2.
	MinCrossings int `json:"min_crossings,omitempty"`
	// CrossingBodyLengths: distance that counts as a close pass, in body
	// lengths of bee 0. Default 2.
	CrossingBodyLengths float64 `json:"crossing_body_lengths,omitempty"`

	// Effects: all off when zero / false.

	// TextureContrast: contrast of the textured ground (soil, moss and grass
	// litter), 0 = flat colour, 1 = full. Range [0, 2].
	TextureContrast float64 `json:"texture_contrast,omitempty"`
	// Vegetation: number of swaying grass blades drawn over the ground; a
	// quarter as many clover leaves are added. Range 0..2000.
	Vegetation int `json:"vegetation,omitempty"`
	// WindSwayPX: amplitude of the sway of grass-blade tips and leaves, px.
	WindSwayPX float64 `json:"wind_sway_px,omitempty"`
	// WindPeriodS: main period of the wind sway, s. Default 2.5.
	WindPeriodS float64 `json:"wind_period_s,omitempty"`
	// FlowerSwayPX: amplitude of the sway of flower heads, px. A bee landed
	// on a flower moves with it.
	FlowerSwayPX float64 `json:"flower_sway_px,omitempty"`
	// BeeShadow: draw a soft shadow offset down-right of each bee, close
	// under a landed bee and further away from a flying one.
	BeeShadow bool `json:"bee_shadow,omitempty"`
	// BeeWings: draw a flickering translucent wing blur beside airborne bees.
	BeeWings bool `json:"bee_wings,omitempty"`
	// BeeBanding: draw two yellow bands across the body.
	BeeBanding bool `json:"bee_banding,omitempty"`
	// Occluder: draw a leaf above the flowers across one of the bees'
	// flight paths (bee 0's if possible); bees pass behind it. The bees are
	// re-planned until some flight passes a place clear of flowers.
	Occluder bool `json:"occluder,omitempty"`
	// IlluminationDrift: amplitude of the slow change of scene brightness
	// (passing clouds) as a fraction of brightness. Range [0, 0.5].
	IlluminationDrift float64 `json:"illumination_drift,omitempty"`
	// FlickerDepth: amplitude of mains-light flicker at twice MainsHz as a
	// fraction of brightness, sampled at the frame times (so it aliases at
	// the frame rate). Range [0, 0.5].
	FlickerDepth float64 `json:"flicker_depth,omitempty"`
	// MainsHz: mains frequency, Hz. Default 50 (flicker at 100 Hz).
	MainsHz float64 `json:"mains_hz,omitempty"`
	// NoiseSigma: standard deviation of sensor noise, grey levels (of 255),
	// independent per pixel, channel and frame. Range [0, 40].
	NoiseSigma float64 `json:"noise_sigma,omitempty"`
	// ExposureS: shutter time, s. A bee moving during the exposure is
	// smeared along its motion (the body is averaged over positions
	// spread evenly over the distance travelled in ExposureS, centred on
	// the truth point). 0 = no motion blur. Range [0, 1/FPS].
	ExposureS float64 `json:"exposure_s,omitempty"`
	// ShakePX: amplitude of camera shake, px. The whole image moves; truth
	// points include the shake. Range [0, 50].
	ShakePX float64 `json:"shake_px,omitempty"`
}

// withDefaults returns c with zero fields replaced by their defaults.
func (c Config) withDefaults() Config {
	def := func(p *float64, v float64) {
		if *p == 0 {
			*p = v
		}
	}
	if c.WidthPX == 0 {
		c.WidthPX = 1280
	}
	if c.HeightPX == 0 {
		c.HeightPX = 720
	}
	def(&c.FPS, 30)
	def(&c.DurationS, 60)
	def(&c.PXPerMM, float64(c.WidthPX)/600)
	if c.Flowers == 0 {
		c.Flowers = 8
	}
	def(&c.FlowerRadiusMinMM, 15)
	def(&c.FlowerRadiusMaxMM, 30)
	if c.Bees == 0 {
		c.Bees = 1
	}
	def(&c.BeeLengthMM, 14)
	def(&c.CruiseSpeedMinMMPerS, 300)
	def(&c.CruiseSpeedMaxMMPerS, 600)
	def(&c.AccelMMPerS2, 2500)
	def(&c.ZigzagMM, 2)
	def(&c.HandlingMedianS, 6)
	def(&c.HandlingSigma, 0.8)
	def(&c.HandlingMaxS, 45)
	def(&c.WalkSpeedMMPerS, 8)
	def(&c.InspectionProb, 0.25)
	def(&c.RevisitProb, 0.3)
	def(&c.ExitProb, 0.15)
	def(&c.OutsideMinS, 1.5)
	def(&c.OutsideMaxS, 5)
	def(&c.EntryMaxS, 2)
	def(&c.CrossingBodyLengths, 2)
	def(&c.WindPeriodS, 2.5)
	def(&c.MainsHz, 50)
	return c
}

// clampNeg maps the "negative means off" probabilities to 0.
func clampNeg(p float64) float64 {
	if p < 0 {
		return 0
	}
	return p
}

// validate reports the first field of c (after defaults) that is out of
// range, naming it.
func (c Config) validate() error {
	bad := func(field string, v any, want string) error {
		return fmt.Errorf("meadow: config field %s = %v: want %s", field, v, want)
	}
	switch {
	case c.WidthPX < 64 || c.WidthPX > 8192 || c.WidthPX%2 != 0:
		return bad("WidthPX", c.WidthPX, "even, 64..8192")
	case c.HeightPX < 64 || c.HeightPX > 8192 || c.HeightPX%2 != 0:
		return bad("HeightPX", c.HeightPX, "even, 64..8192")
	case !(c.FPS >= 1 && c.FPS <= 1000):
		return bad("FPS", c.FPS, "1..1000")
	case !(c.DurationS > 0 && c.DurationS <= 3600):
		return bad("DurationS", c.DurationS, "(0, 3600]")
	case !(c.PXPerMM > 0.1 && c.PXPerMM < 100):
		return bad("PXPerMM", c.PXPerMM, "(0.1, 100)")
	case c.Flowers < 1 || c.Flowers > 64:
		return bad("Flowers", c.Flowers, "1..64")
	case !(c.FlowerRadiusMinMM > 0 && c.FlowerRadiusMaxMM >= c.FlowerRadiusMinMM):
		return bad("FlowerRadiusMinMM/MaxMM", [2]float64{c.FlowerRadiusMinMM, c.FlowerRadiusMaxMM}, "0 < min <= max")
	case c.Bees < 1 || c.Bees > 16:
		return bad("Bees", c.Bees, "1..16")
	case !(c.BeeLengthMM >= 2 && c.BeeLengthMM <= 60):
		return bad("BeeLengthMM", c.BeeLengthMM, "2..60")
	case !(c.CruiseSpeedMinMMPerS > 0 && c.CruiseSpeedMaxMMPerS >= c.CruiseSpeedMinMMPerS):
		return bad("CruiseSpeedMinMMPerS/MaxMMPerS", [2]float64{c.CruiseSpeedMinMMPerS, c.CruiseSpeedMaxMMPerS}, "0 < min <= max")
	case !(c.AccelMMPerS2 > 0):
		return bad("AccelMMPerS2", c.AccelMMPerS2, "> 0")
	case !(c.HandlingMedianS > 0 && c.HandlingSigma >= 0 && c.HandlingMaxS >= 1):
		return bad("HandlingMedianS/HandlingSigma/HandlingMaxS", [3]float64{c.HandlingMedianS, c.HandlingSigma, c.HandlingMaxS}, "median > 0, sigma >= 0, max >= 1")
	case !(c.WalkSpeedMMPerS > 0):
		return bad("WalkSpeedMMPerS", c.WalkSpeedMMPerS, "> 0")
	case clampNeg(c.InspectionProb) > 0.9:
		return bad("InspectionProb", c.InspectionProb, "<= 0.9")
	case clampNeg(c.RevisitProb) > 1:
		return bad("RevisitProb", c.RevisitProb, "<= 1")
	case clampNeg(c.ExitProb) > 1:
		return bad("ExitProb", c.ExitProb, "<= 1")
	case !(c.OutsideMinS > 0 && c.OutsideMaxS >= c.OutsideMinS):
		return bad("OutsideMinS/OutsideMaxS", [2]float64{c.OutsideMinS, c.OutsideMaxS}, "0 < min <= max")
	case !(c.EntryMaxS >= 0):
		return bad("EntryMaxS", c.EntryMaxS, ">= 0")
	case c.MinLongLandingS < 0 || c.MinInspections < 0 || c.MinRevisits < 0 || c.MinExits < 0 || c.MinCrossings < 0:
		return errors.New("meadow: config requirement fields (Min*) must not be negative")
	case c.MinCrossings > 0 && c.Bees < 2:
		return bad("MinCrossings", c.MinCrossings, "0 when Bees < 2")
	case c.TextureContrast < 0 || c.TextureContrast > 2:
		return bad("TextureContrast", c.TextureContrast, "[0, 2]")
	case c.Vegetation < 0 || c.Vegetation > 2000:
		return bad("Vegetation", c.Vegetation, "0..2000")
	case c.WindSwayPX < 0 || c.WindSwayPX > 100:
		return bad("WindSwayPX", c.WindSwayPX, "[0, 100]")
	case !(c.WindPeriodS > 0):
		return bad("WindPeriodS", c.WindPeriodS, "> 0")
	case c.FlowerSwayPX < 0 || c.FlowerSwayPX > 50:
		return bad("FlowerSwayPX", c.FlowerSwayPX, "[0, 50]")
	case c.IlluminationDrift < 0 || c.IlluminationDrift > 0.5:
		return bad("IlluminationDrift", c.IlluminationDrift, "[0, 0.5]")
	case c.FlickerDepth < 0 || c.FlickerDepth > 0.5:
		return bad("FlickerDepth", c.FlickerDepth, "[0, 0.5]")
	case !(c.MainsHz > 0):
		return bad("MainsHz", c.MainsHz, "> 0")
	case c.NoiseSigma < 0 || c.NoiseSigma > 40:
		return bad("NoiseSigma", c.NoiseSigma, "[0, 40]")
	case c.ExposureS < 0 || c.ExposureS > 1/c.FPS:
		return bad("ExposureS", c.ExposureS, "[0, 1/FPS]")
	case c.ShakePX < 0 || c.ShakePX > 50:
		return bad("ShakePX", c.ShakePX, "[0, 50]")
	}
	for _, k := range c.FlowerKinds {
		if _, ok := kindByName(k); !ok {
			return bad("FlowerKinds", k, "one of "+strings.Join(KindNames(), ", "))
		}
	}
	return nil
}

// WithoutEffects returns c with every effect switched off: flat background, no
// vegetation, wind, flower sway, shadows, wings, banding, occluder,
// illumination drift, flicker, noise or shake. Geometry and behaviour are
// unchanged, so the bees follow the same paths.
func (c Config) WithoutEffects() Config {
	c.TextureContrast = 0
	c.Vegetation = 0
	c.WindSwayPX = 0
	c.FlowerSwayPX = 0
	c.BeeShadow = false
	c.BeeWings = false
	c.BeeBanding = false
	c.Occluder = false
	c.IlluminationDrift = 0
	c.FlickerDepth = 0
	c.NoiseSigma = 0
	c.ExposureS = 0
	c.ShakePX = 0
	return c
}

// withEffects switches on the common outdoor effects at moderate strength.
func (c Config) withEffects() Config {
	c.TextureContrast = 1
	c.Vegetation = 60
	c.WindSwayPX = 3
	c.FlowerSwayPX = 1.5
	c.BeeShadow = true
	c.BeeWings = true
	c.BeeBanding = true
	c.IlluminationDrift = 0.06
	c.FlickerDepth = 0.02
	c.NoiseSigma = 2.5
	c.ExposureS = 1.0 / 250
	return c
}

// presets maps preset names to constructors.
var presets = map[string]func() Config{
	// One bee over seven flowers; one handling bout of at least 30 s,
	// inspections, a revisit and an exit with re-entry.
	"single": func() Config {
		c := Config{
			Name: "single", Seed: 1, WidthPX: 1280, HeightPX: 720, FPS: 30, DurationS: 75,
			Flowers: 7, Bees: 1,
			MinLongLandingS: 30, MinInspections: 2, MinRevisits: 1, MinExits: 1,
		}.withEffects()
		c.Occluder = true
		return c
	},
	// Three bees over ten flowers in full HD, with close passes.
	"three": func() Config {
		c := Config{
			Name: "three", Seed: 3, WidthPX: 1920, HeightPX: 1080, FPS: 30, DurationS: 60,
			Flowers: 10, Bees: 3, HandlingMedianS: 4, InspectionProb: 0.2,
			MinCrossings: 2, CrossingBodyLengths: 2,
		}.withEffects()
		return c
	},
	// Strong wind: large sway of grass and flowers, and camera shake.
	"windy": func() Config {
		c := Config{
			Name: "windy", Seed: 5, WidthPX: 1280, HeightPX: 720, FPS: 30, DurationS: 40,
			Flowers: 8, Bees: 1, MinInspections: 1,
		}.withEffects()
		c.Vegetation = 120
		c.WindSwayPX = 14
		c.WindPeriodS = 1.6
		c.FlowerSwayPX = 6
		c.ShakePX = 3
		return c
	},
	// A short clip at 120 frames/s.
	"highspeed": func() Config {
		c := Config{
			Name: "highspeed", Seed: 7, WidthPX: 1280, HeightPX: 720, FPS: 120, DurationS: 5,
			Flowers: 6, Bees: 1, EntryMaxS: 0.3, HandlingMedianS: 1.5, MinInspections: 1,
		}.withEffects()
		c.ExposureS = 1.0 / 1000
		return c
	},
	// The built-in demo: two bumblebees working white clover and borage.
	"demo": func() Config {
		c := Config{
			Name: "demo", Seed: 2024, WidthPX: 1280, HeightPX: 720, FPS: 30, DurationS: 45,
			Plot:        "Quince Row allotments, bed 4: a strip of white clover with borage at the path edge (invented)",
			Flowers:     8,
			FlowerKinds: []string{"white clover", "borage"},
			Bees:        2, HandlingMedianS: 5, MinInspections: 1, MinRevisits: 1,
		}.withEffects()
		c.Occluder = true
		return c
	},
}

// PresetNames returns the names accepted by Preset, sorted.
func PresetNames() []string {
	names := make([]string, 0, len(presets))
	for n := range presets {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

// Preset returns the named preset configuration (see PresetNames):
//
//	single     1 bee, 1280x720 @ 30 fps, 75 s: a landing >= 30 s, 2 inspections, a revisit, an exit and re-entry, a leaf occluder
//	three      3 bees, 1920x1080 @ 30 fps, 60 s: at least 2 close passes (< 2 body lengths)
//	windy      1 bee, 1280x720 @ 30 fps, 40 s: strong sway of grass and flowers, 3 px camera shake
//	highspeed  1 bee, 1280x720 @ 120 fps, 5 s
//	demo       2 bees, 1280x720 @ 30 fps, 45 s, white clover and borage in an invented allotment bed
//
// All presets switch on texture (1), vegetation (60 blades, 120 in windy),
// wind (3 px, 14 px in windy), flower sway (1.5 px, 6 px in windy),
// shadows, wings, banding, illumination drift (6 %), flicker (2 %), noise
// (2.5 grey levels) and motion blur (1/250 s exposure, 1/1000 s in
// highspeed).
func Preset(name string) (Config, error) {
	f, ok := presets[name]
	if !ok {
		return Config{}, fmt.Errorf("meadow: unknown preset %q (want one of %s)", name, strings.Join(PresetNames(), ", "))
	}
	return f(), nil
}

// frames returns the number of frames of a defaulted config.
func (c Config) frames() int {
	return int(math.Round(c.DurationS * c.FPS))
}
