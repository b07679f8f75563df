package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/BurntSushi/toml"

	"flitlog/kinematics"
	"flitlog/track"
	"flitlog/visits"
)

// Settings are the effective settings of a run: defaults, then the settings
// file (--config), then flags. Every field is written to summary.json and
// shown by 'flitlog run --print-config'. Units are in the names.
type Settings struct {
	Video       VideoSettings       `toml:"video" json:"video"`
	Calibration CalibrationSettings `toml:"calibration" json:"calibration"`
	Flowers     FlowerSettings      `toml:"flowers" json:"flowers"`
	Track       track.Settings      `toml:"track" json:"track"`
	Kinematics  kinematics.Settings `toml:"kinematics" json:"kinematics"`
	Visits      visits.Settings     `toml:"visits" json:"visits"`
	Output      OutputSettings      `toml:"output" json:"output"`
}

// VideoSettings control decoding.
type VideoSettings struct {
	// FPS overrides the container's frame rate when > 0 (frames/s). Use it
	// for high-speed cameras that store a playback rate instead of the
	// capture rate. 0 = use the container's timestamps.
	FPS float64 `toml:"fps" json:"fps"`
}

// CalibrationSettings choose how pixels become millimetres. Exactly one of
// PXPerMM or File may be set; with neither, DefaultPXPerMM applies and a
// warning says that distances and speeds are only nominal.
type CalibrationSettings struct {
	PXPerMM float64 `toml:"px_per_mm" json:"px_per_mm"` // quick path: pixels per millimetre on the flower plane
	File    string  `toml:"file" json:"file"`           // calibration JSON from 'flitlog calibrate'
}

// DefaultPXPerMM is the scale assumed without calibration (px/mm): a
// 1280 px wide view of a 60 cm flower patch.
const DefaultPXPerMM = 2.0

// FlowerSettings choose the flower map.
type FlowerSettings struct {
	// File is the flower map JSON used for every clip. Empty: each clip
	// uses CLIP.flowers.json beside it when present (as written by
	// 'flitlog flowers CLIP'), else visits are not scored.
	File string `toml:"file" json:"file"`
}

// OutputSettings choose what is written besides the tables.
type OutputSettings struct {
	Plots   bool `toml:"plots" json:"plots"`     // PNG plots of path, speed and visit timeline
	Overlay bool `toml:"overlay" json:"overlay"` // overlay.mp4 for checking by eye (a second decoding pass)
}

// DefaultSettings returns the settings used when nothing is given.
func DefaultSettings() Settings {
	return Settings{
		Track:      track.DefaultSettings(),
		Kinematics: kinematics.DefaultSettings(),
		Visits:     visits.DefaultSettings(),
		Output:     OutputSettings{Plots: true},
	}
}

// LoadSettingsFile reads a TOML settings file over s. Unknown keys are an
// error naming the key, so a typo never silently falls back to a default.
func LoadSettingsFile(path string, s *Settings) error {
	b, err := os.ReadFile(path)
	if err != nil {
		return fmt.Errorf("settings file %s: %v", path, errText(err))
	}
	return parseSettings(path, b, s)
}

func parseSettings(name string, b []byte, s *Settings) error {
	md, err := toml.NewDecoder(bytes.NewReader(b)).Decode(s)
	if err != nil {
		var pe toml.ParseError
		if asParseError(err, &pe) {
			return fmt.Errorf("settings file %s: line %d: %s: fix the TOML syntax", name, pe.Position.Line, oneLine(pe.Message))
		}
		return fmt.Errorf("settings file %s: %s", name, oneLine(err.Error()))
	}
	if und := md.Undecoded(); len(und) > 0 {
		keys := make([]string, len(und))
		for i, k := range und {
			keys[i] = k.String()
		}
		return fmt.Errorf("settings file %s: unknown setting %s: see 'flitlog run --print-config' for the names", name, strings.Join(keys, ", "))
	}
	return nil
}

// Validate checks settings that do not depend on a clip.
func (s *Settings) Validate() error {
	if s.Video.FPS < 0 || s.Video.FPS != s.Video.FPS {
		return fmt.Errorf("fps must be > 0 (or 0 to use the clip's own timestamps), got %g", s.Video.FPS)
	}
	if s.Calibration.PXPerMM < 0 || s.Calibration.PXPerMM != s.Calibration.PXPerMM {
		return fmt.Errorf("px-per-mm must be > 0, got %g: measure a scale bar with 'flitlog calibrate scale'", s.Calibration.PXPerMM)
	}
	if s.Calibration.PXPerMM > 0 && s.Calibration.File != "" {
		return fmt.Errorf("give either --px-per-mm or --calibration, not both")
	}
	if err := s.Track.Validate(); err != nil {
		return fmt.Errorf("track settings: %v", err)
	}
	if err := s.Kinematics.Validate(); err != nil {
		return fmt.Errorf("kinematics settings: %v", err)
	}
	if err := s.Visits.Validate(); err != nil {
		return fmt.Errorf("visits settings: %v", err)
	}
	return nil
}

// WriteTOML writes the settings as a TOML file with a header comment.
func (s *Settings) WriteTOML(w io.Writer) error {
	fmt.Fprintln(w, "# flitlog settings: defaults, then --config FILE, then flags.")
	fmt.Fprintln(w, "# Units are in the names (_mm, _s, _px, _mm_per_s, _hz). Save this as a")
	fmt.Fprintln(w, "# file, edit it and pass it back with 'flitlog run --config FILE'.")
	var b bytes.Buffer
	if err := toml.NewEncoder(&b).Encode(s); err != nil {
		return err
	}
	text := strings.Replace(b.String(), "  [track.link]\n",
		"  # Linking. 0 = the default, derived per clip from its frame rate and\n"+
			"  # the bee's length in px (see package flitlog/track/link).\n  [track.link]\n", 1)
	_, err := io.WriteString(w, text)
	return err
}

// Hash returns a SHA-256 over everything that changes the results of a
// clip: the settings (without output choices that do not change tables)
// and the contents of the files they name.
func (s Settings) Hash(extraFiles ...string) string {
	h := sha256.New()
	c := s
	c.Output = OutputSettings{}
	toml.NewEncoder(h).Encode(c)
	for _, f := range extraFiles {
		if f == "" {
			continue
		}
		b, err := os.ReadFile(f)
		if err != nil {
			fmt.Fprintf(h, "missing:%s", f)
			continue
		}
		h.Write(b)
	}
	return hex.EncodeToString(h.Sum(nil))
}

func oneLine(s string) string {
	s = strings.TrimSpace(s)
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		s = s[:i]
	}
	return s
}
