package plots

import (
	"image"
	"image/color"
	"math"

	"flitlog/kinematics"
	"flitlog/visits"
)

// A small invented scene for tests (synthetic ground truth): a 1280x720
// frame at 30 fps, 12 s long, three flowers, two bees.
//
// Track 1 (frames 0..299): flies in from the lower left, lands on A1
// (45..104), flies to B2 and lands (165..254), flies to C3 and hovers next
// to it without landing (inspection 280..299), then is lost.
// Track 2 (frames 90..359): flies in from the upper right, hovers by C3
// (inspection 150..189), flies to A1 with a tracking gap (frames 200..205
// missing) and coasted points (206..212), lands on A1 (235..284), flies to
// B2 and is still landed there when the clip ends (320..359, censored).
const (
	sceneW, sceneH = 1280, 720
	sceneFPS       = 30.0
	sceneFrames    = 360
	scenePXPerMM   = 4.0
)

type sceneData struct {
	fm          visits.FlowerMap
	tracks      []kinematics.Result
	landings    []visits.Landing
	inspections []visits.Inspection
	durationS   float64
	bg          *image.RGBA
}

// segment is one piece of a scripted path: from frame a to frame b
// (inclusive) the bee moves from p to q in state st.
type segment struct {
	a, b  int
	p, q  [2]float64
	st    kinematics.State
	wavPX float64 // lateral wiggle amplitude while flying, px
}

func newScene() sceneData {
	fm := visits.FlowerMap{
		FrameWidthPX: sceneW, FrameHeightPX: sceneH,
		Flowers: []visits.Flower{
			{ID: "A1", XPX: 320, YPX: 260, RPX: 44, Kind: "borage"},
			{ID: "B2", XPX: 780, YPX: 470, RPX: 52, Kind: "borage"},
			{ID: "C3", XPX: 1060, YPX: 200, RPX: 38, Kind: "phacelia"},
		},
	}
	a1 := [2]float64{325, 256}
	b2 := [2]float64{772, 476}
	nearC3 := [2]float64{1070, 272}
	t1 := scripted(1, []segment{
		{0, 44, [2]float64{40, 640}, a1, kinematics.Flying, 30},
		{45, 104, a1, a1, kinematics.Landed, 0},
		{105, 164, a1, b2, kinematics.Flying, 60},
		{165, 254, b2, b2, kinematics.Landed, 0},
		{255, 279, b2, nearC3, kinematics.Flying, 20},
		{280, 299, nearC3, nearC3, kinematics.Hovering, 0},
	}, [2]int{}, [2]int{})
	nearC3b := [2]float64{990, 150}
	a1b := [2]float64{312, 266}
	b2b := [2]float64{790, 462}
	t2 := scripted(2, []segment{
		{90, 149, [2]float64{1240, 40}, nearC3b, kinematics.Flying, 25},
		{150, 189, nearC3b, nearC3b, kinematics.Hovering, 0},
		{190, 234, nearC3b, a1b, kinematics.Flying, 40},
		{235, 284, a1b, a1b, kinematics.Landed, 0},
		{285, 319, a1b, b2b, kinematics.Flying, 35},
		{320, 359, b2b, b2b, kinematics.Landed, 0},
	}, [2]int{200, 205}, [2]int{206, 212})

	fr := func(f int) float64 { return float64(f) / sceneFPS }
	land := func(id int, fl string, a, b int, cens bool, idx int) visits.Landing {
		return visits.Landing{TrackID: id, FlowerID: fl, StartFrame: a, EndFrame: b,
			StartS: fr(a), EndS: fr(b + 1), DurationS: fr(b+1) - fr(a), Index: idx,
			ApproachSpeedMMPerS: math.NaN(), DepartureSpeedMMPerS: math.NaN(),
			SincePrevVisitS: math.NaN(), CensoredEnd: cens}
	}
	insp := func(id int, fl string, a, b int) visits.Inspection {
		return visits.Inspection{TrackID: id, FlowerID: fl, StartFrame: a, EndFrame: b,
			StartS: fr(a), EndS: fr(b + 1), DurationS: fr(b+1) - fr(a), MinDistMM: 5}
	}
	return sceneData{
		fm:     fm,
		tracks: []kinematics.Result{t1, t2},
		landings: []visits.Landing{
			land(1, "A1", 45, 104, false, 1),
			land(1, "B2", 165, 254, false, 2),
			land(2, "A1", 235, 284, false, 1),
			land(2, "B2", 320, 359, true, 2),
		},
		inspections: []visits.Inspection{
			insp(2, "C3", 150, 189),
			insp(1, "C3", 280, 299),
		},
		durationS: fr(sceneFrames),
		bg:        sceneBackground(fm),
	}
}

// scripted builds a track from segments: flying moves along an eased
// straight line with a sideways sine wiggle, hovering circles 8 px around
// its point, landed jitters by 1 px. Frames in missing are left out;
// frames in coasted are marked not observed. Speeds are central
// differences of the mm positions.
func scripted(id int, segs []segment, missing, coasted [2]int) kinematics.Result {
	var ss []kinematics.Sample
	for _, sg := range segs {
		for f := sg.a; f <= sg.b; f++ {
			if missing != [2]int{} && f >= missing[0] && f <= missing[1] {
				continue
			}
			u := 0.0
			if sg.b > sg.a {
				u = float64(f-sg.a) / float64(sg.b-sg.a)
			}
			e := 0.5 - 0.5*math.Cos(math.Pi*u)
			x := sg.p[0] + (sg.q[0]-sg.p[0])*e
			y := sg.p[1] + (sg.q[1]-sg.p[1])*e
			switch sg.st {
			case kinematics.Flying:
				dx, dy := sg.q[0]-sg.p[0], sg.q[1]-sg.p[1]
				l := math.Hypot(dx, dy)
				if l > 0 {
					w := sg.wavPX * math.Sin(2*math.Pi*u*1.5)
					x += -dy / l * w
					y += dx / l * w
				}
			case kinematics.Hovering:
				a := 2 * math.Pi * float64(f-sg.a) / 20
				x += 8 * math.Cos(a)
				y += 8 * math.Sin(a)
			case kinematics.Landed:
				x += math.Sin(float64(f) * 0.7)
				y += math.Cos(float64(f) * 0.9)
			}
			obs := !(coasted != [2]int{} && f >= coasted[0] && f <= coasted[1])
			ss = append(ss, kinematics.Sample{
				Point: kinematics.Point{Frame: f, TimeS: float64(f) / sceneFPS,
					XPX: x, YPX: y, XMM: x / scenePXPerMM, YMM: y / scenePXPerMM, Observed: obs},
				State: sg.st,
			})
		}
	}
	for j := range ss {
		lo, hi := j, j
		if j > 0 && ss[j-1].Frame == ss[j].Frame-1 {
			lo = j - 1
		}
		if j+1 < len(ss) && ss[j+1].Frame == ss[j].Frame+1 {
			hi = j + 1
		}
		if lo == hi {
			ss[j].SpeedMMPerS = math.NaN()
			continue
		}
		dt := ss[hi].TimeS - ss[lo].TimeS
		ss[j].VXMMPerS = (ss[hi].XMM - ss[lo].XMM) / dt
		ss[j].VYMMPerS = (ss[hi].YMM - ss[lo].YMM) / dt
		ss[j].SpeedMMPerS = math.Hypot(ss[j].VXMMPerS, ss[j].VYMMPerS)
	}
	return kinematics.Result{ID: id, Samples: ss}
}

// sceneBackground paints a plain meadow: a vertical green gradient, a few
// leaf ellipses and pale petal disks under the flowers.
func sceneBackground(fm visits.FlowerMap) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, sceneW, sceneH))
	leaves := [][5]float64{ // cx, cy, rx, ry, shade
		{180, 480, 120, 40, 0.75}, {600, 150, 90, 30, 0.8}, {980, 560, 140, 45, 0.7},
		{500, 620, 70, 25, 0.85}, {1180, 380, 80, 35, 0.78},
	}
	for y := 0; y < sceneH; y++ {
		g := 0.55 + 0.25*float64(y)/sceneH
		for x := 0; x < sceneW; x++ {
			r, gg, b := 70*g, 140*g, 60*g
			for _, lf := range leaves {
				dx, dy := (float64(x)-lf[0])/lf[2], (float64(y)-lf[1])/lf[3]
				if dx*dx+dy*dy <= 1 {
					r, gg, b = r*lf[4], gg*lf[4], b*lf[4]
				}
			}
			for _, fl := range fm.Flowers {
				d := math.Hypot(float64(x)-fl.XPX, float64(y)-fl.YPX)
				switch {
				case d <= fl.RPX*0.25:
					r, gg, b = 230, 190, 40
				case d <= fl.RPX*0.85:
					r, gg, b = 150, 170, 235
				}
			}
			img.Set(x, y, color.RGBA{uint8(r), uint8(gg), uint8(b), 255})
		}
	}
	return img
}
