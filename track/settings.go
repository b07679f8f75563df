package track

import (
	"fmt"
	"math"

	"flitlog/track/link"
)

// Settings tune segmentation and linking. A zero field takes its default
// (DefaultSettings fills them all in, for printing); units are in the
// names. BL below means the expected bee length in the frame,
// BodyLengthMM * PXPerMM pixels.
type Settings struct {
	// PXPerMM is the image scale on the flower plane, px/mm, range
	// (0.05, 200). It sets the expected bee size in pixels and through it
	// the working scale and the size gates. Default 2 (nominal: a
	// 1280 px wide view of a 64 cm patch).
	PXPerMM float64 `toml:"px_per_mm" json:"px_per_mm"`

	// BodyLengthMM is the body length of the bees filmed, mm, range
	// 2..60. Default 14 (a bumblebee worker; a honeybee worker is about 12).
	BodyLengthMM float64 `toml:"body_length_mm" json:"body_length_mm"`

	// ROIMaskPath is an image file the shape of the frame (any size; it
	// is scaled to the frame): white = analyse, black = ignore. Empty
	// (default) = the whole frame.
	ROIMaskPath string `toml:"roi_mask" json:"roi_mask"`

	// Stabilize compensates camera shake: each frame's translation
	// against the background is estimated by phase correlation and undone
	// before differencing. Default false (a tripod).
	Stabilize bool `toml:"stabilize" json:"stabilize"`

	// WorkBeeLengthPX is the bee length aimed at in the reduced working
	// image, px, range 3..64. The frame is reduced by the integer factor
	// max(1, floor(BL / WorkBeeLengthPX)). Default 7: detection cost falls
	// with the square of the factor, and a bee of 7 px is still several
	// pixels wide.
	WorkBeeLengthPX float64 `toml:"work_bee_length_px" json:"work_bee_length_px"`

	// BackgroundTauS is the time constant of the running background for
	// background pixels, s, range 0.1..3600. Default 4: follows passing
	// clouds and slow shadows.
	BackgroundTauS float64 `toml:"background_tau_s" json:"background_tau_s"`

	// ForegroundTauS is the time constant with which dark foreground that
	// is not under a confirmed bee is learned, s, range >= BackgroundTauS.
	// Something that darkens the scene and stays (a fallen petal) is
	// absorbed in about this time. Pixels under a confirmed bee are never
	// learned. Default 60.
	ForegroundTauS float64 `toml:"foreground_tau_s" json:"foreground_tau_s"`

	// ThresholdSigma: a pixel is foreground when it is darker than the
	// background by more than ThresholdSigma standard deviations of that
	// pixel, range 1..20. Default 3.5.
	ThresholdSigma float64 `toml:"threshold_sigma" json:"threshold_sigma"`

	// MinContrastGrey is the least darkening counted as foreground, grey
	// levels of 0..255, range 1..200: the per-pixel standard deviation is
	// floored at MinContrastGrey / ThresholdSigma. Default 14.
	MinContrastGrey float64 `toml:"min_contrast_grey" json:"min_contrast_grey"`

	// MinChromaGrey is the least chromaticity distortion counted as
	// foreground, grey levels of 0..255, range 1..200. Where the ground is
	// about as dark as a bee's body (a dark flower centre, deep shade) and
	// within a body length of a tracked bee, a pixel whose colour differs
	// from the background's by more than this, after scaling the
	// background to the pixel's brightness (Horprasert et al. 1999), and
	// by more than ThresholdSigma standard deviations of that distortion,
	// is bee: its coloured bands, a body of another hue. A shadow or a
	// change of light changes brightness only. The per-pixel deviation is
	// floored at MinChromaGrey / ThresholdSigma. Default 12, set by hand
	// and checked only on synthetic scenes (the bee on a dark flower
	// centre of segment_chroma_test.go), not against the measured colour
	// noise of a real camera; 200 switches the colour test practically
	// off.
	MinChromaGrey float64 `toml:"min_chroma_grey" json:"min_chroma_grey"`

	// ActivityTauS is the time over which each pixel's frequency of being
	// dark foreground is averaged, s, range 0.5..600. Default 8.
	ActivityTauS float64 `toml:"activity_tau_s" json:"activity_tau_s"`

	// MaxActivity: a pixel that was foreground more than this
	// fraction of the time of late (ActivityTauS) is not used for
	// detection, except where a confirmed bee is expected: swaying leaf
	// and flower edges recur, a passing bee covers a pixel for a frame or
	// two. Range (0, 1]; 1 switches it off. Default 0.03.
	MaxActivity float64 `toml:"max_activity" json:"max_activity"`

	// MinAreaFrac and MaxAreaFrac bound a blob's area as fractions of the
	// expected bee area (an ellipse BL long and 0.45 BL wide), range
	// 0 < Min < Max <= 50. Defaults 0.35 (a bee half out of the picture
	// or behind a leaf) and 8 (two or three bees touching, with shadows).
	// A blob of more than 1.3 expected areas that holds the predicted
	// positions of several tracked bees is split among them.
	MinAreaFrac float64 `toml:"min_area_frac" json:"min_area_frac"`
	MaxAreaFrac float64 `toml:"max_area_frac" json:"max_area_frac"`

	// MaxLengthBL is the longest fitted ellipse accepted, body lengths,
	// range 1..20. Default 3.
	MaxLengthBL float64 `toml:"max_length_bl" json:"max_length_bl"`

	// MaxElongation is the largest ratio of the fitted ellipse's axes
	// accepted (rejects grass blades, stems and the thin crescents a
	// swaying flower uncovers), range 1.5..50. Default 4.5: a bee seen
	// from above is about 2.2, and motion blur of up to 1.5 body lengths
	// stays below 4.5; raise it for slow shutters.
	MaxElongation float64 `toml:"max_elongation" json:"max_elongation"`

	// MinWidthBL is the shortest minor axis of the fitted ellipse
	// accepted, body lengths, range 0..1. Default 0.2 (a bee's body is
	// about 0.35 to 0.5 body lengths wide).
	MinWidthBL float64 `toml:"min_width_bl" json:"min_width_bl"`

	// ShadowRatio: pixels darker than this fraction of the background's
	// brightness are taken as bee body; brighter foreground (a shadow
	// dims the ground only by a fraction) counts for area and box but not
	// for the position, and a blob without enough body pixels is dropped.
	// Range (0, 1]. Default 0.55; lower it in harsh sun, where shadows
	// are deep, raise it for pale bees on dark ground.
	ShadowRatio float64 `toml:"shadow_ratio" json:"shadow_ratio"`

	// MinBodyFrac is the least number of body pixels (see ShadowRatio) of
	// a detection, as a fraction of the expected bee area, range (0, 1].
	// Default 0.1.
	MinBodyFrac float64 `toml:"min_body_frac" json:"min_body_frac"`

	// ProtectBL is the radius around each confirmed track's predicted and
	// matched position within which the background is not learned, body
	// lengths, range 0.25..5. Default 1.
	ProtectBL float64 `toml:"protect_bl" json:"protect_bl"`

	// ProtectAfterBL: a confirmed track is protected only once it has
	// been seen this far from where it started, body lengths, range
	// 0..100 (0 = at once), or if it started at the frame border or took
	// over a protected track's bee. A bee arrives flying; a flicker at the
	// edge of a swaying flower stays in place, and protecting it would
	// keep it out of the background for good. Default 2.
	ProtectAfterBL float64 `toml:"protect_after_bl" json:"protect_after_bl"`

	// MinTravelBL: Finish drops a track whose detections never get this
	// far from its first one, body lengths, range 0..100 (0 = keep all).
	// Bees arrive and leave flying; a dark flower centre or a leaf edge
	// swaying in the wind flickers in place. A bee that sits still for
	// the whole clip is part of the background and not seen anyway.
	// Default 1.5.
	MinTravelBL float64 `toml:"min_travel_bl" json:"min_travel_bl"`

	// DisturbedFrac: a frame in which more than this fraction of the
	// analysed area differs from the background (camera bumped, exposure
	// jump, a corrupt frame) gives no detections and is not learned,
	// range (0, 1]. Default 0.25.
	DisturbedFrac float64 `toml:"disturbed_frac" json:"disturbed_frac"`

	// ResetAfterS: after this long a run of disturbed frames is taken as a
	// new scene and the background restarts from the current frame, s,
	// range > 0. Default 1.
	ResetAfterS float64 `toml:"reset_after_s" json:"reset_after_s"`

	// Link tunes the Kalman filter, assignment, coasting and gap closing
	// (see package link). Its FPS, BodyLengthPX and BoundsPX are set from
	// the clip and BL.
	Link link.Settings `toml:"link" json:"link"`
}

// DefaultPXPerMM is the scale assumed when Settings.PXPerMM is 0, px/mm.
const DefaultPXPerMM = 2.0

// DefaultSettings returns the settings with every segmentation field set
// to its default. The Link fields stay zero (their defaults depend on the
// clip's frame rate and the bee size; see link.DefaultSettings).
func DefaultSettings() Settings {
	return Settings{}.withDefaults()
}

func (s Settings) withDefaults() Settings {
	def := func(p *float64, v float64) {
		if *p == 0 {
			*p = v
		}
	}
	def(&s.PXPerMM, DefaultPXPerMM)
	def(&s.BodyLengthMM, 14)
	def(&s.WorkBeeLengthPX, 7)
	def(&s.BackgroundTauS, 4)
	def(&s.ForegroundTauS, 60)
	def(&s.ThresholdSigma, 3.5)
	def(&s.MinContrastGrey, 14)
	def(&s.MinChromaGrey, 12)
	def(&s.ActivityTauS, 8)
	def(&s.MaxActivity, 0.03)
	def(&s.MinAreaFrac, 0.35)
	def(&s.MaxAreaFrac, 8)
	def(&s.MaxLengthBL, 3)
	def(&s.MaxElongation, 4.5)
	def(&s.MinWidthBL, 0.2)
	def(&s.ShadowRatio, 0.55)
	def(&s.MinBodyFrac, 0.1)
	def(&s.ProtectBL, 1)
	def(&s.ProtectAfterBL, 2)
	def(&s.MinTravelBL, 1.5)
	def(&s.DisturbedFrac, 0.25)
	def(&s.ResetAfterS, 1)
	return s
}

// Validate reports the first field out of range, naming it. Zero fields
// are valid (they take their defaults).
func (s Settings) Validate() error {
	d := s.withDefaults()
	type rng struct {
		name      string
		v, lo, hi float64
		openLo    bool
	}
	for _, r := range []rng{
		{"px_per_mm", d.PXPerMM, 0.05, 200, true},
		{"body_length_mm", d.BodyLengthMM, 2, 60, false},
		{"work_bee_length_px", d.WorkBeeLengthPX, 3, 64, false},
		{"background_tau_s", d.BackgroundTauS, 0.1, 3600, false},
		{"foreground_tau_s", d.ForegroundTauS, d.BackgroundTauS, math.Inf(1), false},
		{"threshold_sigma", d.ThresholdSigma, 1, 20, false},
		{"min_contrast_grey", d.MinContrastGrey, 1, 200, false},
		{"min_chroma_grey", d.MinChromaGrey, 1, 200, false},
		{"activity_tau_s", d.ActivityTauS, 0.5, 600, false},
		{"max_activity", d.MaxActivity, 0, 1, true},
		{"min_area_frac", d.MinAreaFrac, 0, d.MaxAreaFrac, true},
		{"max_area_frac", d.MaxAreaFrac, d.MinAreaFrac, 50, true},
		{"max_length_bl", d.MaxLengthBL, 1, 20, false},
		{"max_elongation", d.MaxElongation, 1.5, 50, false},
		{"min_width_bl", d.MinWidthBL, 0, 1, false},
		{"shadow_ratio", d.ShadowRatio, 0, 1, true},
		{"min_body_frac", d.MinBodyFrac, 0, 1, true},
		{"protect_bl", d.ProtectBL, 0.25, 5, false},
		{"protect_after_bl", d.ProtectAfterBL, 0, 100, false},
		{"min_travel_bl", d.MinTravelBL, 0, 100, false},
		{"disturbed_frac", d.DisturbedFrac, 0, 1, true},
		{"reset_after_s", d.ResetAfterS, 0, math.Inf(1), true},
	} {
		bad := math.IsNaN(r.v) || r.v > r.hi || r.v < r.lo || (r.openLo && r.v == r.lo)
		if bad {
			lo := "["
			if r.openLo {
				lo = "("
			}
			return fmt.Errorf("track setting %s = %g: want a value in %s%g, %g]", r.name, r.v, lo, r.lo, r.hi)
		}
	}
	return nil
}

// BodyLengthPX is the expected bee length in the frame, px.
func (s Settings) BodyLengthPX() float64 {
	d := s.withDefaults()
	return d.BodyLengthMM * d.PXPerMM
}

// segParams derives the per-clip segmentation parameters for a frame of
// w x h px at fps frames/s.
func (s Settings) segParams(w, h int, fps float64) segParams {
	bl := s.BodyLengthMM * s.PXPerMM
	k := max(1, int(math.Floor(bl/s.WorkBeeLengthPX)))
	k = min(k, max(1, min(w, h)/16)) // keep at least 16 working px across
	blw := bl / float64(k)
	expArea := math.Pi / 4 * blw * 0.45 * blw
	floor := s.MinContrastGrey / s.ThresholdSigma
	cFloor := s.MinChromaGrey / s.ThresholdSigma
	return segParams{
		factor: k, workW: w / k, workH: h / k, fps: fps,
		beeLenPX:       bl,
		bgTauS:         s.BackgroundTauS,
		fgTauS:         s.ForegroundTauS,
		warmS:          math.Min(1, s.BackgroundTauS),
		thresh2:        s.ThresholdSigma * s.ThresholdSigma,
		varFloor:       floor * floor,
		varInit:        4 * floor * floor,
		varClamp:       60 * 60,
		minContrast:    s.MinContrastGrey,
		minAreaWork:    math.Max(1, 0.5*s.MinAreaFrac*expArea),
		minAreaPX:      s.MinAreaFrac * math.Pi / 4 * bl * 0.45 * bl,
		minWidthPX:     s.MinWidthBL * bl,
		splitAreaPX:    1.3 * math.Pi / 4 * bl * 0.45 * bl,
		maxAreaWork:    s.MaxAreaFrac * expArea,
		maxLenPX:       s.MaxLengthBL * bl,
		maxElong:       s.MaxElongation,
		actTauS:        s.ActivityTauS,
		maxActivity:    s.MaxActivity,
		shadowRatio:    s.ShadowRatio,
		minBodyPX:      math.Max(2, s.MinBodyFrac*math.Pi/4*bl*0.45*bl),
		disturbedFrac:  s.DisturbedFrac,
		resetS:         s.ResetAfterS,
		stabilize:      s.Stabilize,
		maxShiftWorkPX: 0.1 * float64(min(w, h)/k),
		colourEvery:    max(1, int(math.Round(fps))),
		minChroma:      s.MinChromaGrey,
		cVarFloor:      cFloor * cFloor,
		cVarInit:       4 * cFloor * cFloor,
	}
}
