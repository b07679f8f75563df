package flowerfind

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// ColorRange is a range of colours in OpenCV's 8-bit HSV: hue H in 0..179
// (degrees / 2), saturation S and value V in 0..255. A range with HLo > HHi
// wraps around red (for example 165-8 is 165..179 and 0..8).
type ColorRange struct {
	Name     string // becomes the flower's kind
	HLo, HHi int
	SLo, SHi int
	VLo, VHi int
}

// presets are colour ranges of common blossom colours, for flowers seen
// in daylight against green vegetation and soil (chosen for the task and
// checked on the test images; adjust with --hsv for other light).
var presets = []ColorRange{
	// White: any hue, little saturation, bright (clover heads, daisies,
	// blackberry). Shadowed white petals fall out; lower VLo for dull light.
	{Name: "white", HLo: 0, HHi: 179, SLo: 0, SHi: 45, VLo: 175, VHi: 255},
	// Yellow: hue 36..68 degrees, strongly saturated and bright
	// (dandelion, buttercup, rapeseed); dull yellow-brown soil and dry
	// grass (saturation about 110, value about 130) stay out.
	{Name: "yellow", HLo: 18, HHi: 34, SLo: 140, SHi: 255, VLo: 150, VHi: 255},
	// Purple and blue: hue 190..290 degrees (borage, phacelia, viper's
	// bugloss, lavender).
	{Name: "purple", HLo: 95, HHi: 145, SLo: 70, SHi: 255, VLo: 70, VHi: 255},
	// Pink and red: hue 290..16 degrees, wrapping (red campion, clover
	// in flower, poppy, knapweed).
	{Name: "pink", HLo: 146, HHi: 8, SLo: 70, SHi: 255, VLo: 90, VHi: 255},
}

// Preset returns the preset named name (white, yellow, purple, pink; "blue"
// and "red" are accepted for purple and pink).
func Preset(name string) (ColorRange, bool) {
	switch name {
	case "blue":
		name = "purple"
	case "red":
		name = "pink"
	}
	for _, p := range presets {
		if p.Name == name {
			return p, true
		}
	}
	return ColorRange{}, false
}

// PresetNames returns the names of the presets, sorted.
func PresetNames() []string {
	n := make([]string, len(presets))
	for i, p := range presets {
		n[i] = p.Name
	}
	sort.Strings(n)
	return n
}

// Presets returns all presets.
func Presets() []ColorRange { return append([]ColorRange(nil), presets...) }

// Validate reports a range outside OpenCV's 8-bit HSV or with low > high
// in S or V.
func (c ColorRange) Validate() error {
	switch {
	case c.Name == "":
		return fmt.Errorf("colour range needs a name (it becomes the flowers' kind)")
	case c.HLo < 0 || c.HHi < 0 || c.HLo > 179 || c.HHi > 179:
		return fmt.Errorf("colour %s: hue %d-%d out of 0-179 (OpenCV hue is degrees / 2)", c.Name, c.HLo, c.HHi)
	case c.SLo < 0 || c.SHi > 255 || c.SLo > c.SHi:
		return fmt.Errorf("colour %s: saturation %d-%d: want 0 <= low <= high <= 255", c.Name, c.SLo, c.SHi)
	case c.VLo < 0 || c.VHi > 255 || c.VLo > c.VHi:
		return fmt.Errorf("colour %s: value %d-%d: want 0 <= low <= high <= 255", c.Name, c.VLo, c.VHi)
	}
	return nil
}

// ParseHSV parses a colour range written name=h1-h2,s1-s2,v1-v2, for
// example "lilac=120-150,40-255,80-255" (OpenCV 8-bit HSV units).
func ParseHSV(s string) (ColorRange, error) {
	name, spec, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return ColorRange{}, fmt.Errorf("colour range %q: want name=h1-h2,s1-s2,v1-v2 (e.g. lilac=120-150,40-255,80-255)", s)
	}
	parts := strings.Split(spec, ",")
	if len(parts) != 3 {
		return ColorRange{}, fmt.Errorf("colour range %q: want three ranges h1-h2,s1-s2,v1-v2 after %s=", s, name)
	}
	var v [6]int
	for i, p := range parts {
		lo, hi, ok := strings.Cut(strings.TrimSpace(p), "-")
		a, err1 := strconv.Atoi(strings.TrimSpace(lo))
		b, err2 := strconv.Atoi(strings.TrimSpace(hi))
		if !ok || err1 != nil || err2 != nil {
			return ColorRange{}, fmt.Errorf("colour range %q: %q is not a range of whole numbers like 20-35", s, p)
		}
		v[2*i], v[2*i+1] = a, b
	}
	c := ColorRange{Name: name, HLo: v[0], HHi: v[1], SLo: v[2], SHi: v[3], VLo: v[4], VHi: v[5]}
	return c, c.Validate()
}

// String writes c as ParseHSV reads it.
func (c ColorRange) String() string {
	return fmt.Sprintf("%s=%d-%d,%d-%d,%d-%d", c.Name, c.HLo, c.HHi, c.SLo, c.SHi, c.VLo, c.VHi)
}
