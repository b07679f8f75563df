package meadow

import (
	"fmt"
	"math"
	"math/rand/v2"

	"flitlog/visits"
)

// flowerKind is the look of one kind of flower seen from above.
type flowerKind struct {
	name        string
	petals      int     // petals (or florets) around the centre
	petalWidth  float64 // petal half-width / petal length
	petalBGR    [3]uint8
	centreBGR   [3]uint8
	centreFrac  float64 // centre radius / flower radius
	petalInner  float64 // petal start radius / flower radius
	innerLayers int     // 2: a second, shorter ring of petals (composite heads)
}

// kinds is the palette of flower kinds, in the order of KindNames.
var kinds = []flowerKind{
	{name: "white clover", petals: 18, petalWidth: 0.24, petalBGR: [3]uint8{222, 236, 238},
		centreBGR: [3]uint8{170, 205, 196}, centreFrac: 0.36, petalInner: 0.25, innerLayers: 2},
	{name: "dandelion", petals: 26, petalWidth: 0.13, petalBGR: [3]uint8{30, 200, 250},
		centreBGR: [3]uint8{15, 160, 232}, centreFrac: 0.30, petalInner: 0.2, innerLayers: 2},
	{name: "borage", petals: 5, petalWidth: 0.42, petalBGR: [3]uint8{212, 110, 82},
		centreBGR: [3]uint8{48, 30, 34}, centreFrac: 0.2, petalInner: 0.1, innerLayers: 1},
	{name: "red campion", petals: 5, petalWidth: 0.5, petalBGR: [3]uint8{160, 100, 228},
		centreBGR: [3]uint8{228, 215, 245}, centreFrac: 0.16, petalInner: 0.1, innerLayers: 1},
}

// KindNames returns the names of the flower kinds the scene can draw:
// white (white clover), yellow (dandelion), purple-blue (borage) and pink
// (red campion).
func KindNames() []string {
	n := make([]string, len(kinds))
	for i, k := range kinds {
		n[i] = k.name
	}
	return n
}

func kindByName(name string) (int, bool) {
	for i, k := range kinds {
		if k.name == name {
			return i, true
		}
	}
	return 0, false
}

// flower is one planned flower.
type flower struct {
	id       string
	x, y, r  float64 // rest position and radius, px
	kind     int
	rot      float64 // petal rotation, rad
	swayFreq float64 // sway frequency factor
	swayPh   [2]float64
}

// layoutFlowers places cfg.Flowers flowers at random, each at least 1.5 body
// lengths plus its radius from the frame edge and two body lengths apart
// from its neighbours' edges.
func layoutFlowers(cfg Config, rng *rand.Rand, beeLenPX float64) ([]flower, error) {
	kindIdx := make([]int, 0, len(kinds))
	if len(cfg.FlowerKinds) == 0 {
		for i := range kinds {
			kindIdx = append(kindIdx, i)
		}
	} else {
		for _, n := range cfg.FlowerKinds {
			i, _ := kindByName(n)
			kindIdx = append(kindIdx, i)
		}
	}
	w, h := float64(cfg.WidthPX), float64(cfg.HeightPX)
	fs := make([]flower, 0, cfg.Flowers)
	for len(fs) < cfg.Flowers {
		placed := false
		for attempt := 0; attempt < 2000 && !placed; attempt++ {
			r := (cfg.FlowerRadiusMinMM + rng.Float64()*(cfg.FlowerRadiusMaxMM-cfg.FlowerRadiusMinMM)) * cfg.PXPerMM
			m := r + 1.5*beeLenPX
			if 2*m >= w || 2*m >= h {
				break
			}
			x := m + rng.Float64()*(w-2*m)
			y := m + rng.Float64()*(h-2*m)
			ok := true
			for _, o := range fs {
				if math.Hypot(x-o.x, y-o.y) < r+o.r+2*beeLenPX {
					ok = false
					break
				}
			}
			if !ok {
				continue
			}
			fs = append(fs, flower{
				x: x, y: y, r: r,
				kind:     kindIdx[rng.IntN(len(kindIdx))],
				rot:      rng.Float64() * 2 * math.Pi,
				swayFreq: 0.8 + 0.4*rng.Float64(),
				swayPh:   [2]float64{rng.Float64() * 2 * math.Pi, rng.Float64() * 2 * math.Pi},
			})
			placed = true
		}
		if !placed {
			return nil, fmt.Errorf("meadow: cannot place %d flowers of radius %.0f..%.0f mm in a %dx%d frame (placed %d)",
				cfg.Flowers, cfg.FlowerRadiusMinMM, cfg.FlowerRadiusMaxMM, cfg.WidthPX, cfg.HeightPX, len(fs))
		}
	}
	// Ids follow placement order: F1, F2, ...
	for i := range fs {
		fs[i].id = fmt.Sprintf("F%d", i+1)
	}
	return fs, nil
}

// wind returns the wind drive at time t: a main oscillation of period
// periodS modulated by slow gusts, in [-1, 1] scaled by freq.
func wind(t, periodS, freq, phase float64) float64 {
	gust := 0.65 + 0.35*math.Sin(2*math.Pi*t/(4.3*periodS)+0.7*phase)
	return gust * (0.8*math.Sin(2*math.Pi*freq*t/periodS+phase) + 0.2*math.Sin(2*math.Pi*2.7*freq*t/periodS+2*phase))
}

// sway returns the displacement of flower f at time t, px.
func (f *flower) sway(cfg *Config, t float64) (dx, dy float64) {
	if cfg.FlowerSwayPX == 0 {
		return 0, 0
	}
	a := cfg.FlowerSwayPX
	return a * wind(t, cfg.WindPeriodS, f.swayFreq, f.swayPh[0]),
		0.6 * a * wind(t, cfg.WindPeriodS, 1.13*f.swayFreq, f.swayPh[1])
}

// flowerMap returns the flower map of the planned flowers at rest.
func flowerMap(cfg Config, fs []flower) visits.FlowerMap {
	fm := visits.FlowerMap{FrameWidthPX: cfg.WidthPX, FrameHeightPX: cfg.HeightPX}
	for _, f := range fs {
		fm.Flowers = append(fm.Flowers, visits.Flower{
			ID: f.id, XPX: f.x, YPX: f.y, RPX: f.r, Kind: kinds[f.kind].name,
		})
	}
	return fm
}
