package meadow

import (
	"image"
	"image/color"
	"math"
	"math/rand/v2"

	"gocv.io/x/gocv"

	"flitlog/kinematics"
)

// Drawing constants.
const (
	bodyEdgePX   = 1.2 // minimum width of the body's soft edge, px
	bodyEdgeFrac = 0.07
	noiseMargin  = 64 // noise tile is this much larger than the frame, px
	drawShift    = 4  // sub-pixel bits for gocv drawing
)

var (
	groundBGR = [3]float64{72, 104, 96} // flat ground colour
	soilBGR   = [3]float64{58, 82, 106}
	mossBGR   = [3]float64{52, 112, 78}
	bodyBGR   = [3]float64{24, 24, 30}
	bandBGR   = [3]float64{40, 172, 214}
	wingBGR   = [3]float64{214, 214, 204}
)

// blade is one grass blade of the swaying vegetation.
type blade struct {
	x, y, lenPX, wPX float64
	ang, bend        float64 // lean direction, rad; curvature, px at the tip
	freq, ph         float64
	col              color.RGBA
}

// clover is one trifoliate leaf.
type clover struct {
	x, y, rPX, ang float64
	freq, ph       float64
	col            color.RGBA
}

// renderer holds the precomputed images of a scene.
type renderer struct {
	bg      gocv.Mat // static ground, BGR
	noise   gocv.Mat // noise tile, 128 + noise, BGR
	canvas  gocv.Mat // scene before camera shake
	shakeM  gocv.Mat // 2x3 affine
	blades  []blade
	clovers []clover
	pts     gocv.PointsVector
}

func (r *renderer) close() {
	for _, m := range []*gocv.Mat{&r.bg, &r.noise, &r.canvas, &r.shakeM} {
		if m.Ptr() != nil {
			m.Close()
		}
	}
	r.pts.Close()
}

// initRenderer builds the static ground, the vegetation and the noise tile.
func (s *Scene) initRenderer() {
	cfg := &s.cfg
	w, h := cfg.WidthPX, cfg.HeightPX
	r := &renderer{pts: gocv.NewPointsVector()}
	r.bg = s.makeGround()
	if cfg.NoiseSigma > 0 {
		r.noise = makeNoise(cfg.Seed, w+noiseMargin, h+noiseMargin, cfg.NoiseSigma)
	}
	if cfg.ShakePX > 0 {
		r.canvas = gocv.NewMatWithSize(h, w, gocv.MatTypeCV8UC3)
		r.shakeM = gocv.NewMatWithSize(2, 3, gocv.MatTypeCV64F)
	}
	rng := newRNG(cfg.Seed, streamVeg)
	pxmm := cfg.PXPerMM
	for k := 0; k < cfg.Vegetation; k++ {
		g := 90 + rng.Float64()*80
		r.blades = append(r.blades, blade{
			x: rng.Float64() * float64(w), y: rng.Float64() * float64(h),
			lenPX: (25 + 45*rng.Float64()) * pxmm, wPX: (1.8 + 2.2*rng.Float64()) * pxmm,
			ang:  rng.Float64() * 2 * math.Pi,
			bend: (rng.Float64()*2 - 1) * 8 * pxmm,
			freq: 0.7 + 0.6*rng.Float64(), ph: rng.Float64() * 2 * math.Pi,
			col: color.RGBA{R: uint8(0.45 * g), G: uint8(g + 20), B: uint8(0.35 * g), A: 255},
		})
	}
	for k := 0; k < cfg.Vegetation/4; k++ {
		g := 70 + rng.Float64()*50
		r.clovers = append(r.clovers, clover{
			x: rng.Float64() * float64(w), y: rng.Float64() * float64(h),
			rPX: (5 + 3*rng.Float64()) * pxmm, ang: rng.Float64() * 2 * math.Pi,
			freq: 0.8 + 0.4*rng.Float64(), ph: rng.Float64() * 2 * math.Pi,
			col: color.RGBA{R: uint8(0.4 * g), G: uint8(g + 25), B: uint8(0.45 * g), A: 255},
		})
	}
	s.r = r
}

// makeGround renders the static textured ground: blotches of soil and
// moss, mid-scale brightness variation, fine grain and grass litter,
// blended with the flat ground colour by TextureContrast.
func (s *Scene) makeGround() gocv.Mat {
	cfg := &s.cfg
	w, h := cfg.WidthPX, cfg.HeightPX
	flat := gocv.NewMatWithSizeFromScalar(gocv.NewScalar(groundBGR[0], groundBGR[1], groundBGR[2], 0), h, w, gocv.MatTypeCV8UC3)
	if cfg.TextureContrast == 0 {
		return flat
	}
	rng := newRNG(cfg.Seed, streamTexture)
	field := func(cell int) []float32 {
		cw, ch := w/cell+3, h/cell+3
		small := gocv.NewMatWithSize(ch, cw, gocv.MatTypeCV32F)
		defer small.Close()
		d, _ := small.DataPtrFloat32()
		for i := range d {
			d[i] = float32(rng.NormFloat64())
		}
		big := gocv.NewMat()
		defer big.Close()
		gocv.Resize(small, &big, image.Pt(w+3*cell, h+3*cell), 0, 0, gocv.InterpolationCubic)
		roi := big.Region(image.Rect(cell, cell, cell+w, cell+h))
		defer roi.Close()
		c := roi.Clone()
		defer c.Close()
		out, _ := c.DataPtrFloat32()
		return append([]float32(nil), out...)
	}
	blot := field(max(8, w/14))
	mid := field(max(4, w/90))
	tex := gocv.NewMatWithSize(h, w, gocv.MatTypeCV8UC3)
	d, _ := tex.DataPtrUint8()
	for i := 0; i < w*h; i++ {
		m := 0.5 + 0.35*float64(blot[i])
		m = math.Max(0, math.Min(1, m))
		b := 1 + 0.12*float64(mid[i]) + 0.05*rng.NormFloat64()
		for c := 0; c < 3; c++ {
			v := (soilBGR[c]*(1-m) + mossBGR[c]*m) * b
			d[3*i+c] = uint8(math.Max(0, math.Min(255, v+0.5)))
		}
	}
	// Grass litter: short strokes of dry and green grass.
	n := w * h / 700
	for k := 0; k < n; k++ {
		x, y := rng.Float64()*float64(w), rng.Float64()*float64(h)
		a := rng.Float64() * 2 * math.Pi
		l := (4 + 14*rng.Float64()) * cfg.PXPerMM
		var col color.RGBA
		switch rng.IntN(3) {
		case 0: // straw
			v := 110 + rng.Float64()*60
			col = color.RGBA{R: uint8(v), G: uint8(0.9 * v), B: uint8(0.55 * v), A: 255}
		case 1: // dark green
			v := 50 + rng.Float64()*40
			col = color.RGBA{R: uint8(0.6 * v), G: uint8(v + 30), B: uint8(0.5 * v), A: 255}
		default: // shadowed gap
			v := 30 + rng.Float64()*25
			col = color.RGBA{R: uint8(v), G: uint8(v + 8), B: uint8(0.8 * v), A: 255}
		}
		gocv.Line(&tex, image.Pt(int(x), int(y)), image.Pt(int(x+l*math.Cos(a)), int(y+l*math.Sin(a))), col, 1)
	}
	gocv.GaussianBlur(tex, &tex, image.Pt(3, 3), 0.8, 0.8, gocv.BorderReflect101)
	out := gocv.NewMat()
	gocv.AddWeighted(tex, cfg.TextureContrast, flat, 1-cfg.TextureContrast, 0, &out)
	tex.Close()
	flat.Close()
	return out
}

// normTable holds standard normal quantiles for fast noise generation.
var normTable = func() []float32 {
	const n = 1 << 16
	t := make([]float32, n)
	// Inverse-CDF samples of a standard normal at (k+0.5)/n, shuffled by a
	// fixed permutation so that consecutive indices are unrelated.
	rng := rand.New(rand.NewPCG(12345, 678))
	for k := range t {
		t[k] = float32(invNorm((float64(k) + 0.5) / n))
	}
	rng.Shuffle(n, func(i, j int) { t[i], t[j] = t[j], t[i] })
	return t
}()

// invNorm is the standard normal quantile function (Acklam's rational
// approximation, relative error below 1.2e-9).
func invNorm(p float64) float64 {
	a := [6]float64{-3.969683028665376e+01, 2.209460984245205e+02, -2.759285104469687e+02, 1.383577518672690e+02, -3.066479806614716e+01, 2.506628277459239e+00}
	b := [5]float64{-5.447609879822406e+01, 1.615858368580409e+02, -1.556989798598866e+02, 6.680131188771972e+01, -1.328068155288572e+01}
	c := [6]float64{-7.784894002430293e-03, -3.223964580411365e-01, -2.400758277161838e+00, -2.549732539343734e+00, 4.374664141464968e+00, 2.938163982698783e+00}
	d := [4]float64{7.784695709041462e-03, 3.224671290700398e-01, 2.445134137142996e+00, 3.754408661907416e+00}
	const pl = 0.02425
	switch {
	case p < pl:
		q := math.Sqrt(-2 * math.Log(p))
		return (((((c[0]*q+c[1])*q+c[2])*q+c[3])*q+c[4])*q + c[5]) / ((((d[0]*q+d[1])*q+d[2])*q+d[3])*q + 1)
	case p > 1-pl:
		q := math.Sqrt(-2 * math.Log(1-p))
		return -(((((c[0]*q+c[1])*q+c[2])*q+c[3])*q+c[4])*q + c[5]) / ((((d[0]*q+d[1])*q+d[2])*q+d[3])*q + 1)
	}
	q := p - 0.5
	r := q * q
	return (((((a[0]*r+a[1])*r+a[2])*r+a[3])*r+a[4])*r + a[5]) * q / (((((b[0]*r+b[1])*r+b[2])*r+b[3])*r+b[4])*r + 1)
}

// makeNoise returns a w x h BGR tile of 128 + sigma*N(0,1), rounded and
// clamped.
func makeNoise(seed int64, w, h int, sigma float64) gocv.Mat {
	m := gocv.NewMatWithSize(h, w, gocv.MatTypeCV8UC3)
	d, _ := m.DataPtrUint8()
	rng := newRNG(seed, streamNoise)
	var lut [1 << 16]uint8
	for k := range lut {
		v := 128 + sigma*float64(normTable[k])
		lut[k] = uint8(math.Max(0, math.Min(255, math.Round(v))))
	}
	for i := 0; i+4 <= len(d); i += 4 {
		u := rng.Uint64()
		d[i] = lut[u&0xffff]
		d[i+1] = lut[(u>>16)&0xffff]
		d[i+2] = lut[(u>>32)&0xffff]
		d[i+3] = lut[u>>48]
	}
	for i := len(d) &^ 3; i < len(d); i++ {
		d[i] = lut[rng.Uint64()&0xffff]
	}
	return m
}

// Render draws frame i into dst as a BGR CV_8UC3 image of the scene's size,
// reallocating dst only if its size or type differs. Render(i) gives the
// same image whatever frames were rendered before. It panics if i is out of
// range.
func (s *Scene) Render(i int, dst *gocv.Mat) {
	if i < 0 || i >= s.n {
		panic("meadow: frame index out of range")
	}
	if s.r == nil {
		s.initRenderer()
	}
	cfg := &s.cfg
	w, h := cfg.WidthPX, cfg.HeightPX
	if dst.Ptr() == nil || dst.Empty() || dst.Rows() != h || dst.Cols() != w || dst.Type() != gocv.MatTypeCV8UC3 || !dst.IsContinuous() {
		if dst.Ptr() != nil {
			dst.Close()
		}
		*dst = gocv.NewMatWithSize(h, w, gocv.MatTypeCV8UC3)
	}
	r := s.r
	canvas := dst
	if cfg.ShakePX > 0 {
		canvas = &r.canvas
	}
	r.bg.CopyTo(canvas)
	t := s.frameTime(i)
	frng := newRNG(cfg.Seed, streamFrameBase+uint64(i))
	s.drawVegetation(canvas, t)
	if !s.hideFlowers {
		s.drawFlowers(canvas, t)
	}
	if !s.hideBees {
		s.drawBees(canvas, i, frng)
	}
	s.drawLeaf(canvas, t)
	if cfg.ShakePX > 0 {
		r.shakeM.SetDoubleAt(0, 0, 1)
		r.shakeM.SetDoubleAt(0, 1, 0)
		r.shakeM.SetDoubleAt(0, 2, s.shakeX[i])
		r.shakeM.SetDoubleAt(1, 0, 0)
		r.shakeM.SetDoubleAt(1, 1, 1)
		r.shakeM.SetDoubleAt(1, 2, s.shakeY[i])
		gocv.WarpAffineWithParams(r.canvas, dst, r.shakeM, image.Pt(w, h), gocv.InterpolationLinear, gocv.BorderReflect101, color.RGBA{})
	}
	g := s.gain[i]
	if cfg.NoiseSigma > 0 {
		ox, oy := frng.IntN(noiseMargin), frng.IntN(noiseMargin)
		roi := r.noise.Region(image.Rect(ox, oy, ox+w, oy+h))
		gocv.AddWeighted(*dst, g, roi, 1, -128, dst)
		roi.Close()
	} else if g != 1 {
		dst.ConvertToWithParams(dst, gocv.MatTypeCV8UC3, float32(g), 0)
	}
}

// fx converts a coordinate to gocv's fixed-point drawing units.
func fx(v float64) int { return int(math.Round(v * (1 << drawShift))) }

// drawVegetation draws the swaying grass blades and clover leaves.
func (s *Scene) drawVegetation(img *gocv.Mat, t float64) {
	cfg := &s.cfg
	r := s.r
	const nSeg = 6
	var left, right [nSeg + 1]image.Point
	for _, b := range r.blades {
		sway := cfg.WindSwayPX * wind(t, cfg.WindPeriodS, b.freq, b.ph)
		ca, sa := math.Cos(b.ang), math.Sin(b.ang)
		for k := 0; k <= nSeg; k++ {
			u := float64(k) / nSeg
			// Centre line: straight lean, bent by curvature and by the wind
			// (mostly along x, growing with the square of the distance from
			// the base).
			cx := b.x + u*b.lenPX*ca - u*u*b.bend*sa + u*u*sway
			cy := b.y + u*b.lenPX*sa + u*u*b.bend*ca + 0.3*u*u*sway
			hw := 0.5 * b.wPX * (1 - 0.9*u)
			left[k] = image.Pt(fx(cx-hw*sa), fx(cy+hw*ca))
			right[nSeg-k] = image.Pt(fx(cx+hw*sa), fx(cy-hw*ca))
		}
		poly := append(append(make([]image.Point, 0, 2*nSeg+2), left[:]...), right[:]...)
		pv := gocv.NewPointsVectorFromPoints([][]image.Point{poly})
		gocv.FillPolyWithParams(img, pv, b.col, gocv.LineAA, drawShift, image.Point{})
		pv.Close()
	}
	for _, c := range r.clovers {
		sway := 0.5 * cfg.WindSwayPX * wind(t, cfg.WindPeriodS, c.freq, c.ph)
		for k := 0; k < 3; k++ {
			a := c.ang + 2*math.Pi*float64(k)/3
			x := c.x + sway + 0.9*c.rPX*math.Cos(a)
			y := c.y + 0.3*sway + 0.9*c.rPX*math.Sin(a)
			gocv.EllipseWithParams(img, image.Pt(fx(x), fx(y)), image.Pt(fx(c.rPX), fx(0.8*c.rPX)), a*180/math.Pi, 0, 360,
				c.col, -1, gocv.LineAA, drawShift)
		}
	}
}

func bgr(c [3]uint8) color.RGBA { return color.RGBA{B: c[0], G: c[1], R: c[2], A: 255} }

func shade(c [3]uint8, f float64) color.RGBA {
	return color.RGBA{B: uint8(float64(c[0]) * f), G: uint8(float64(c[1]) * f), R: uint8(float64(c[2]) * f), A: 255}
}

// drawFlowers draws every flower head at its swayed position.
func (s *Scene) drawFlowers(img *gocv.Mat, t float64) {
	cfg := &s.cfg
	for fi := range s.flowers {
		f := &s.flowers[fi]
		k := &kinds[f.kind]
		dx, dy := f.sway(cfg, t)
		cx, cy := f.x+dx, f.y+dy
		for layer := 0; layer < k.innerLayers; layer++ {
			outer := f.r
			col := bgr(k.petalBGR)
			rot := f.rot
			if layer == 1 {
				outer = 0.78 * f.r
				col = shade(k.petalBGR, 0.9)
				rot += math.Pi / float64(k.petals)
			}
			inner := k.petalInner * f.r
			semiL := (outer - inner) / 2
			semiW := math.Max(1, k.petalWidth*(outer-inner))
			rc := inner + semiL
			// Each petal: a darker outline, then the petal, so that
			// overlapping petals stay apart.
			edge := shade(k.petalBGR, 0.8)
			if layer == 1 {
				edge = shade(k.petalBGR, 0.72)
			}
			for p := 0; p < k.petals; p++ {
				a := rot + 2*math.Pi*float64(p)/float64(k.petals)
				c := image.Pt(fx(cx+rc*math.Cos(a)), fx(cy+rc*math.Sin(a)))
				gocv.EllipseWithParams(img, c, image.Pt(fx(semiL+0.6), fx(semiW+0.6)), a*180/math.Pi, 0, 360, edge, -1, gocv.LineAA, drawShift)
				gocv.EllipseWithParams(img, c, image.Pt(fx(semiL-0.4), fx(math.Max(0.5, semiW-0.4))), a*180/math.Pi, 0, 360, col, -1, gocv.LineAA, drawShift)
			}
		}
		cr := k.centreFrac * f.r
		gocv.CircleWithParams(img, image.Pt(fx(cx), fx(cy)), fx(cr), bgr(k.centreBGR), -1, gocv.LineAA, drawShift)
	}
}

// drawLeaf draws the occluder leaf with its midrib.
func (s *Scene) drawLeaf(img *gocv.Mat, t float64) {
	l := s.leaf
	if l == nil {
		return
	}
	x, y := l.at(&s.cfg, t)
	deg := l.ang * 180 / math.Pi
	gocv.EllipseWithParams(img, image.Pt(fx(x), fx(y)), image.Pt(fx(l.a), fx(l.b)), deg, 0, 360,
		color.RGBA{R: 46, G: 98, B: 38, A: 255}, -1, gocv.LineAA, drawShift)
	gocv.EllipseWithParams(img, image.Pt(fx(x), fx(y)), image.Pt(fx(0.92*l.a), fx(1)), deg, 0, 360,
		color.RGBA{R: 90, G: 140, B: 70, A: 255}, -1, gocv.LineAA, drawShift)
}

// drawBees draws shadows, then wings and bodies, of the bees present in
// frame i.
func (s *Scene) drawBees(img *gocv.Mat, i int, frng *rand.Rand) {
	cfg := &s.cfg
	d, err := img.DataPtrUint8()
	if err != nil {
		panic("meadow: canvas not continuous")
	}
	w, h := cfg.WidthPX, cfg.HeightPX
	if cfg.BeeShadow {
		for _, b := range s.bees {
			if !b.present[i] {
				continue
			}
			hgt := b.height[i]
			off := (0.12 + 0.55*hgt) * b.lenPX
			sx, sy := b.x[i]+0.5*off, b.y[i]+0.85*off
			soft := 0.2*b.lenPX + 0.15*hgt*b.lenPX
			depth := 0.3 / (1 + 0.6*hgt)
			paintEllipse(d, w, h, sx, sy, b.head[i], 0.52*b.lenPX, 0.28*b.lenPX, soft, func(px []uint8, c float64) {
				f := 1 - depth*c
				px[0] = uint8(float64(px[0])*f + 0.5)
				px[1] = uint8(float64(px[1])*f + 0.5)
				px[2] = uint8(float64(px[2])*f + 0.5)
			})
		}
	}
	for _, b := range s.bees {
		if !b.present[i] {
			continue
		}
		x, y, th := b.x[i], b.y[i], b.head[i]
		L, W := b.lenPX, b.wPX
		if cfg.BeeWings && b.state[i] != kinematics.Landed {
			alpha := 0.15 + 0.25*frng.Float64()
			lat := W/2 + 0.1*L
			for _, side := range []float64{-1, 1} {
				cx := x - side*lat*math.Sin(th)
				cy := y + side*lat*math.Cos(th)
				// Each wing blur is aligned with the body axis and centred
				// level with the body centre, so the pair (and the part of
				// it the body covers) is symmetric about the centre.
				paintEllipse(d, w, h, cx, cy, th, 0.3*L, 0.15*L, 1.5, func(px []uint8, c float64) {
					a := alpha * c
					for k := 0; k < 3; k++ {
						px[k] = uint8(float64(px[k])*(1-a) + wingBGR[k]*a + 0.5)
					}
				})
			}
		}
		bx, by := 0.0, 0.0
		if cfg.ExposureS > 0 {
			bx, by = b.vx[i]*cfg.ExposureS, b.vy[i]*cfg.ExposureS
		}
		paintBody(d, w, h, x, y, th, L, W, bx, by, cfg.BeeBanding)
	}
}

// bodyColour returns the body colour at u px along the body axis from the
// centre of a bee of length L: dark, with two yellow bands at ±0.2 L (one
// across the front of the thorax, one across the abdomen) when banding.
// The pattern is symmetric in u so the darkness centroid stays at the body
// centre.
func bodyColour(u, L float64, banding bool) [3]float64 {
	col := bodyBGR
	if banding {
		bu := math.Abs(math.Abs(u)/L-0.2) / 0.08
		if bu < 1 {
			m := 0.7 * (1 - smoothstep(bu))
			for k := 0; k < 3; k++ {
				col[k] = col[k]*(1-m) + bandBGR[k]*m
			}
		}
	}
	return col
}

// paintBody draws a bee's body: the soft-edged ellipse of length L and
// width W along angle th centred on (cx, cy) (coverage as in
// paintEllipseUV), averaged over positions spaced at most 0.75 px apart
// along the motion-blur vector (bx, by) px and centred on (cx, cy).
func paintBody(d []uint8, w, h int, cx, cy, th, L, W, bx, by float64, banding bool) {
	a, b := L/2, W/2
	edge := math.Max(bodyEdgePX, bodyEdgeFrac*L)
	bl := math.Hypot(bx, by)
	K := 1
	if bl > 0.25 {
		K = min(16, int(math.Ceil(bl/0.75))+1)
	}
	R := math.Max(a, b) + edge + 1 + bl/2
	x0, x1 := max(int(math.Floor(cx-R)), 0), min(int(math.Ceil(cx+R)), w-1)
	y0, y1 := max(int(math.Floor(cy-R)), 0), min(int(math.Ceil(cy+R)), h-1)
	ct, st := math.Cos(th), math.Sin(th)
	ia2, ib2 := 1/(a*a), 1/(b*b)
	invK := 1 / float64(K)
	for py := y0; py <= y1; py++ {
		row := d[py*w*3:]
		for px := x0; px <= x1; px++ {
			var cs float64
			var col [3]float64
			for k := 0; k < K; k++ {
				off := 0.0
				if K > 1 {
					off = float64(k)/float64(K-1) - 0.5
				}
				dx := float64(px) - cx - off*bx
				dy := float64(py) - cy - off*by
				u := dx*ct + dy*st
				v := -dx*st + dy*ct
				r2 := u*u*ia2 + v*v*ib2
				c := 1.0
				if r2 >= 1e-12 {
					rho := math.Sqrt(r2)
					dist := (rho - 1) / math.Hypot(u*ia2/rho, v*ib2/rho)
					c = smoothstep(0.5 - dist/edge)
					if c <= 0 {
						continue
					}
				}
				bc := bodyColour(u, L, banding)
				cs += c
				col[0] += c * bc[0]
				col[1] += c * bc[1]
				col[2] += c * bc[2]
			}
			if cs == 0 {
				continue
			}
			C := cs * invK
			p := row[3*px : 3*px+3]
			for k := 0; k < 3; k++ {
				p[k] = uint8(float64(p[k])*(1-C) + col[k]*invK + 0.5)
			}
		}
	}
}

// paintEllipse calls blend for every pixel near the ellipse with centre
// (cx, cy), semi-axes a (along angle th) and b, with its soft-edged
// coverage c in (0, 1].
func paintEllipse(d []uint8, w, h int, cx, cy, th, a, b, edge float64, blend func(px []uint8, c float64)) {
	paintEllipseUV(d, w, h, cx, cy, th, a, b, edge, func(px []uint8, c, _, _ float64) { blend(px, c) })
}

// paintEllipseUV is paintEllipse that also passes the pixel's position in
// ellipse coordinates (u along the major axis, v across), px.
//
// Coverage: with rho = sqrt((u/a)^2 + (v/b)^2), the signed distance to the
// outline is approximated by dist = (rho - 1) / |grad rho|, and
// c = smoothstep(0.5 - dist/edge): a soft edge edge px wide centred on the
// outline, point-symmetric about the centre, so the coverage-weighted
// centroid is the centre up to sampling error.
func paintEllipseUV(d []uint8, w, h int, cx, cy, th, a, b, edge float64, blend func(px []uint8, c, u, v float64)) {
	R := math.Max(a, b) + edge + 1
	x0, x1 := int(math.Floor(cx-R)), int(math.Ceil(cx+R))
	y0, y1 := int(math.Floor(cy-R)), int(math.Ceil(cy+R))
	x0, y0 = max(x0, 0), max(y0, 0)
	x1, y1 = min(x1, w-1), min(y1, h-1)
	ct, st := math.Cos(th), math.Sin(th)
	ia2, ib2 := 1/(a*a), 1/(b*b)
	for py := y0; py <= y1; py++ {
		dy := float64(py) - cy
		row := d[py*w*3:]
		for px := x0; px <= x1; px++ {
			dx := float64(px) - cx
			u := dx*ct + dy*st
			v := -dx*st + dy*ct
			r2 := u*u*ia2 + v*v*ib2
			var c float64
			if r2 < 1e-12 {
				c = 1
			} else {
				rho := math.Sqrt(r2)
				gx, gy := u*ia2/rho, v*ib2/rho
				dist := (rho - 1) / math.Hypot(gx, gy)
				c = smoothstep(0.5 - dist/edge)
				if c <= 0 {
					continue
				}
			}
			blend(row[3*px:3*px+3], c, u, v)
		}
	}
}
