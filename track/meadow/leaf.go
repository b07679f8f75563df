package meadow

import "math"

// leaf is the occluder: an elliptical leaf held above the flowers, swaying
// a little with the wind. Bees pass behind it.
type leaf struct {
	x, y, a, b float64 // rest centre and semi-axes, px
	ang        float64 // major axis, image angle, rad
	ph         float64 // sway phase
}

// at returns the leaf centre at time t, px.
func (l *leaf) at(cfg *Config, t float64) (x, y float64) {
	a := 0.3 * cfg.WindSwayPX
	return l.x + a*wind(t, cfg.WindPeriodS, 0.9, l.ph), l.y + 0.5*a*wind(t, cfg.WindPeriodS, 1.1, l.ph+1)
}

// placeLeaf puts the leaf over a point one third, half or two thirds
// along one of the bees' flights within the clip (bee 0's preferred),
// aligned with the flight there and clear of every flower. Without such a
// point there is no leaf.
func (s *Scene) placeLeaf() {
	s.leaf = nil
	if !s.cfg.Occluder || len(s.bees) == 0 {
		return
	}
	cfg := &s.cfg
	L := s.bees[0].lenPX
	a, bb := 3*L, 1.1*L
	var cand []leaf
	for _, b := range s.bees {
		for _, sg := range b.plan.segs {
			if sg.kind != segFly || sg.t0 < 0 || sg.t1 > cfg.DurationS || sg.fl.length < 6*L {
				continue
			}
			for _, frac := range []float64{0.5, 1.0 / 3, 2.0 / 3} {
				tm := frac * sg.fl.duration()
				x, y := sg.fl.pos(tm)
				x1, y1 := sg.fl.pos(tm - 0.01)
				x2, y2 := sg.fl.pos(tm + 0.01)
				if x < a || y < a || x > float64(cfg.WidthPX)-a || y > float64(cfg.HeightPX)-a {
					continue
				}
				clear := true
				for _, f := range s.flowers {
					if math.Hypot(x-f.x, y-f.y) < f.r+a+0.3*L {
						clear = false
						break
					}
				}
				if clear {
					cand = append(cand, leaf{x: x, y: y, a: a, b: bb, ang: math.Atan2(y2-y1, x2-x1)})
					break
				}
			}
		}
		if len(cand) > 0 {
			break
		}
	}
	if len(cand) == 0 {
		return
	}
	rng := newRNG(cfg.Seed, streamLeaf)
	l := cand[rng.IntN(len(cand))]
	l.ph = rng.Float64() * 2 * math.Pi
	s.leaf = &l
}

// computeVisibility marks each bee frame visible unless the body, with its
// soft edge, lies wholly inside the leaf.
func (s *Scene) computeVisibility() {
	for _, b := range s.bees {
		for i := range b.visible {
			b.visible[i] = b.present[i]
			if !b.present[i] || s.leaf == nil {
				continue
			}
			b.visible[i] = !s.hidden(b, i)
		}
	}
}

// hidden reports whether bee b is wholly behind the leaf in frame i.
func (s *Scene) hidden(b *beeTrack, i int) bool {
	l := s.leaf
	lx, ly := l.at(&s.cfg, s.frameTime(i))
	ca, sa := math.Cos(l.ang), math.Sin(l.ang)
	cb, sb := math.Cos(b.head[i]), math.Sin(b.head[i])
	ra, rb := b.lenPX/2+bodyEdgePX, b.wPX/2+bodyEdgePX
	for k := 0; k < 24; k++ {
		th := 2 * math.Pi * float64(k) / 24
		u, v := ra*math.Cos(th), rb*math.Sin(th)
		px := b.x[i] + u*cb - v*sb - lx
		py := b.y[i] + u*sb + v*cb - ly
		lu := px*ca + py*sa
		lv := -px*sa + py*ca
		if (lu/(l.a-1))*(lu/(l.a-1))+(lv/(l.b-1))*(lv/(l.b-1)) > 1 {
			return false
		}
	}
	return true
}
