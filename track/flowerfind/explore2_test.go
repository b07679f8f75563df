package flowerfind_test

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"flitlog/kinematics"
	"flitlog/track/meadow"
)

func resid(xs, ys []float64, lin bool) float64 {
	n := float64(len(xs))
	var mt, mx, my float64
	for i := range xs {
		mt += float64(i)
		mx += xs[i]
		my += ys[i]
	}
	mt /= n
	mx /= n
	my /= n
	var stt, stx, sty float64
	for i := range xs {
		dt := float64(i) - mt
		stt += dt * dt
		stx += dt * (xs[i] - mx)
		sty += dt * (ys[i] - my)
	}
	bx, by := 0.0, 0.0
	if lin {
		bx, by = stx/stt, sty/stt
	}
	var ss float64
	for i := range xs {
		dt := float64(i) - mt
		rx := xs[i] - mx - bx*dt
		ry := ys[i] - my - by*dt
		ss += rx*rx + ry*ry
	}
	return math.Sqrt(ss / (2 * n))
}

func TestExploreSpeeds(t *testing.T) {
	for _, name := range []string{"single", "three"} {
		cfg, _ := meadow.Preset(name)
		sc, _ := meadow.New(cfg)
		tr := sc.Truth()
		for _, sig := range []float64{0, 1} {
			rng := rand.New(rand.NewPCG(1, 2))
			feat := map[string][]float64{}
			for _, bee := range tr.BeeIDs() {
				ps := tr.Track(bee)
				xs := make([]float64, len(ps))
				ys := make([]float64, len(ps))
				for i, p := range ps {
					xs[i] = (p.XPX + sig*rng.NormFloat64()) / tr.PXPerMM
					ys[i] = (p.YPX + sig*rng.NormFloat64()) / tr.PXPerMM
				}
				W := 15
				for i := 0; i+W <= len(ps); i++ {
					if ps[i+W-1].Frame != ps[i].Frame+W-1 {
						continue
					}
					same := true
					for j := i; j < i+W; j++ {
						if ps[j].State != ps[i].State {
							same = false
						}
					}
					if !same {
						continue
					}
					st := ps[i].State.String()
					feat[st+" const"] = append(feat[st+" const"], resid(xs[i:i+W], ys[i:i+W], false))
					feat[st+" lin"] = append(feat[st+" lin"], resid(xs[i:i+W], ys[i:i+W], true))
				}
			}
			keys := []string{}
			for k := range feat {
				keys = append(keys, k)
			}
			sort.Strings(keys)
			for _, k := range keys {
				v := feat[k]
				sort.Float64s(v)
				q := func(p float64) float64 { return v[int(p*float64(len(v)-1))] }
				t.Logf("%s sig %.0f %-16s n=%5d resid mm q00 %.2f q01 %.2f q05 %.2f q50 %.2f q95 %.2f q99 %.2f max %.2f", name, sig, k, len(v), q(0), q(.01), q(.05), q(.5), q(.95), q(.99), q(1))
			}
		}
	}
	_ = kinematics.Landed
}
