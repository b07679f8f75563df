package meadow

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"

	"gocv.io/x/gocv"

	"flitlog/kinematics"
	"flitlog/visits"
)

// small is a quick plain scene used by several tests.
func small(seed int64) Config {
	return Config{Seed: seed, WidthPX: 320, HeightPX: 240, FPS: 30, DurationS: 2, Flowers: 3,
		FlowerRadiusMinMM: 25, FlowerRadiusMaxMM: 35, PXPerMM: 0.8, EntryMaxS: 0.2,
		TextureContrast: 1, Vegetation: 10, WindSwayPX: 2, BeeWings: true, BeeShadow: true, NoiseSigma: 3}
}

func TestPresets(t *testing.T) {
	for _, name := range PresetNames() {
		t.Run(name, func(t *testing.T) {
			cfg, err := Preset(name)
			if err != nil {
				t.Fatal(err)
			}
			s, err := New(cfg)
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			tr := s.Truth()
			checkTruth(t, s)
			bees := len(tr.BeeIDs())
			t.Logf("%s: %d frames %dx%d @ %g fps, %d bees, %d points, %d landings, %d inspections, %d crossings, occluder %v",
				name, tr.Frames, tr.WidthPX, tr.HeightPX, tr.FPS, bees, len(tr.Points), len(tr.Landings), len(tr.Inspections), len(tr.Crossings), tr.Occluder != nil)
			if bees != cfg.Bees {
				t.Errorf("%d bees appear, want %d", bees, cfg.Bees)
			}
			if len(tr.Landings) == 0 {
				t.Errorf("no landings")
			}
			if cfg.Occluder {
				hidden := 0
				for _, p := range tr.Points {
					if !p.Visible {
						hidden++
					}
				}
				t.Logf("%d of %d points hidden by the occluder", hidden, len(tr.Points))
				if tr.Occluder == nil || hidden == 0 {
					t.Errorf("occluder %v, %d hidden points; want an occluder hiding a bee", tr.Occluder, hidden)
				}
			}
			switch name {
			case "single":
				longest := 0.0
				for _, l := range tr.Landings {
					if !l.CensoredEnd {
						longest = math.Max(longest, l.DurationS)
					}
				}
				if longest < 30 {
					t.Errorf("longest complete landing %.2f s, want >= 30 s", longest)
				}
				if len(tr.Inspections) < 2 {
					t.Errorf("%d inspections, want >= 2", len(tr.Inspections))
				}
				if countRevisits(tr) < 1 {
					t.Errorf("no revisit")
				}
				if n := s.reentries(0); n < 1 {
					t.Errorf("bee re-entered the frame %d times, want >= 1", n)
				}
			case "three":
				if tr.WidthPX != 1920 || tr.HeightPX != 1080 {
					t.Errorf("size %dx%d, want 1920x1080", tr.WidthPX, tr.HeightPX)
				}
				lim := 2 * s.cfg.BeeLengthMM * tr.PXPerMM
				close := 0
				for _, c := range tr.Crossings {
					if c.MinDistPX < lim {
						close++
					}
				}
				if close < 2 {
					t.Errorf("%d close passes under %.1f px, want >= 2", close, lim)
				}
			case "windy":
				if s.cfg.ShakePX < 2 || s.cfg.WindSwayPX < 10 {
					t.Errorf("windy preset: shake %g px, sway %g px", s.cfg.ShakePX, s.cfg.WindSwayPX)
				}
			case "highspeed":
				if tr.FPS != 120 || tr.Frames != 600 {
					t.Errorf("fps %g frames %d, want 120 and 600", tr.FPS, tr.Frames)
				}
			case "demo":
				for _, f := range tr.Flowers.Flowers {
					if f.Kind != "white clover" && f.Kind != "borage" {
						t.Errorf("demo flower %s is %q", f.ID, f.Kind)
					}
				}
			}
		})
	}
}

func countRevisits(tr *Truth) int {
	n := 0
	for _, l := range tr.Landings {
		if l.Revisit {
			n++
		}
	}
	return n
}

// checkTruth checks the internal consistency of a scene's truth.
func checkTruth(t *testing.T, s *Scene) {
	t.Helper()
	tr := s.Truth()
	type key struct{ bee, frame int }
	pts := map[key]TruthPoint{}
	for k, p := range tr.Points {
		if p.Frame < 0 || p.Frame >= tr.Frames {
			t.Fatalf("point %d: frame %d outside clip", k, p.Frame)
		}
		if p.XPX < 0 || p.YPX < 0 || p.XPX > float64(tr.WidthPX-1) || p.YPX > float64(tr.HeightPX-1) {
			t.Fatalf("point %d: (%.1f, %.1f) outside frame", k, p.XPX, p.YPX)
		}
		if !(p.HeadingDeg > -180 && p.HeadingDeg <= 180) {
			t.Fatalf("point %d: heading %g", k, p.HeadingDeg)
		}
		if math.Abs(p.TimeS-float64(p.Frame)/tr.FPS) > 1e-12 {
			t.Fatalf("point %d: time %g for frame %d", k, p.TimeS, p.Frame)
		}
		if _, dup := pts[key{p.BeeID, p.Frame}]; dup {
			t.Fatalf("bee %d has two points in frame %d", p.BeeID, p.Frame)
		}
		pts[key{p.BeeID, p.Frame}] = p
	}
	flowers := map[string]visits.Flower{}
	for _, f := range tr.Flowers.Flowers {
		flowers[f.ID] = f
	}
	// A landed bee sits within half the radius of a flower that sways by
	// at most ~1.2 FlowerSwayPX, seen through a camera shaking by at most
	// ~1.15 ShakePX.
	slack := 1.3*s.cfg.FlowerSwayPX + 1.2*s.cfg.ShakePX*math.Sqrt2 + 1
	frame := 1 / tr.FPS
	for _, l := range tr.Landings {
		f := flowers[l.FlowerID]
		if l.EndFrame < l.StartFrame {
			t.Fatalf("landing %+v: end before start", l)
		}
		if math.Abs(l.StartS-float64(l.StartFrame)*frame) > 1e-9 || math.Abs(l.EndS-float64(l.EndFrame+1)*frame) > 1e-9 ||
			math.Abs(l.DurationS-(l.EndS-l.StartS)) > 1e-9 {
			t.Fatalf("landing %+v: times do not follow the frames", l)
		}
		for i := l.StartFrame; i <= l.EndFrame; i++ {
			p, ok := pts[key{l.TrackID, i}]
			if !ok {
				t.Fatalf("landing %+v: no point in frame %d", l, i)
			}
			if p.State != kinematics.Landed {
				t.Fatalf("landing %+v: frame %d state %v", l, i, p.State)
			}
			if d := math.Hypot(p.XPX-f.XPX, p.YPX-f.YPX); d > 0.5*f.RPX+slack {
				t.Fatalf("landing %+v: frame %d %.1f px from the flower centre, radius %.1f", l, i, d, f.RPX)
			}
		}
		// The frames just outside the landing are not landed on it.
		for _, i := range []int{l.StartFrame - 1, l.EndFrame + 1} {
			if p, ok := pts[key{l.TrackID, i}]; ok && p.State == kinematics.Landed {
				t.Fatalf("landing %+v: frame %d next to it is landed too", l, i)
			}
		}
	}
	for _, in := range tr.Inspections {
		f := flowers[in.FlowerID]
		for i := in.StartFrame; i <= in.EndFrame; i++ {
			p, ok := pts[key{in.TrackID, i}]
			if !ok {
				t.Fatalf("inspection %+v: no point in frame %d", in, i)
			}
			if p.State != kinematics.Hovering {
				t.Fatalf("inspection %+v: frame %d state %v", in, i, p.State)
			}
			lim := f.RPX + 1.1*s.cfg.BeeLengthMM*1.1*tr.PXPerMM + 2*tr.PXPerMM + slack
			if d := math.Hypot(p.XPX-f.XPX, p.YPX-f.YPX); d > lim {
				t.Fatalf("inspection %+v: frame %d %.1f px from the flower centre, limit %.1f", in, i, d, lim)
			}
		}
		// No landing on the flower by the same bee follows without the bee
		// leaving first: the next point after the inspection is airborne.
		if p, ok := pts[key{in.TrackID, in.EndFrame + 1}]; ok && p.State == kinematics.Landed {
			t.Fatalf("inspection %+v ends in a landing", in)
		}
	}
	for _, c := range tr.Crossings {
		pa, oka := pts[key{c.BeeA, c.MinFrame}]
		pb, okb := pts[key{c.BeeB, c.MinFrame}]
		if !oka || !okb {
			t.Fatalf("crossing %+v: bees not both in frame", c)
		}
		if d := math.Hypot(pa.XPX-pb.XPX, pa.YPX-pb.YPX); math.Abs(d-c.MinDistPX) > 1e-6 {
			t.Fatalf("crossing %+v: distance %.3f px in the points", c, d)
		}
		if pa.State == kinematics.Landed || pb.State == kinematics.Landed {
			t.Fatalf("crossing %+v: a bee is landed", c)
		}
	}
}

// TestHeadingFollowsMotion: in fast flight the body points along the
// direction of travel, atan2(dy, dx) of the image displacement (the
// convention of kinematics.Sample.HeadingDeg), up to the zigzag and the
// turning-rate limit.
func TestHeadingFollowsMotion(t *testing.T) {
	cfg, _ := Preset("three")
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	tr := s.Truth()
	type key struct{ bee, frame int }
	pts := map[key]TruthPoint{}
	for _, p := range tr.Points {
		pts[key{p.BeeID, p.Frame}] = p
	}
	var diffs []float64
	minStep := 200 * tr.PXPerMM / tr.FPS // 200 mm/s
	for _, p := range tr.Points {
		a, oka := pts[key{p.BeeID, p.Frame - 1}]
		b, okb := pts[key{p.BeeID, p.Frame + 1}]
		if !oka || !okb || p.State != kinematics.Flying {
			continue
		}
		dx, dy := b.XPX-a.XPX, b.YPX-a.YPX
		if math.Hypot(dx, dy) < 2*minStep {
			continue
		}
		diffs = append(diffs, math.Abs(math.Remainder(p.HeadingDeg-math.Atan2(dy, dx)*180/math.Pi, 360)))
	}
	sort.Float64s(diffs)
	n := len(diffs)
	if n < 200 {
		t.Fatalf("only %d fast flight points", n)
	}
	p50, p95 := diffs[n/2], diffs[n*95/100]
	t.Logf("%d fast flight points: heading minus travel direction median %.1f deg, 95th percentile %.1f deg, worst %.1f deg",
		n, p50, p95, diffs[n-1])
	if p50 > 10 || p95 > 30 {
		t.Errorf("heading off the travel direction: median %.1f deg (want <= 10), 95th percentile %.1f deg (want <= 30)", p50, p95)
	}
}

// truthBytes serialises a truth with WriteDir for exact comparison.
func truthBytes(t *testing.T, tr *Truth) map[string][]byte {
	t.Helper()
	dir := t.TempDir()
	if err := tr.WriteDir(dir); err != nil {
		t.Fatal(err)
	}
	out := map[string][]byte{}
	for _, n := range []string{FlowersFile, TracksFile, VisitsFile, InspectionsFile, MetaFile} {
		b, err := os.ReadFile(filepath.Join(dir, n))
		if err != nil {
			t.Fatal(err)
		}
		out[n] = b
	}
	return out
}

func TestSameSeedSameTruthAndFrames(t *testing.T) {
	dir := t.TempDir()
	var truths [2]map[string][]byte
	var frames [2][][]byte
	for k := 0; k < 2; k++ {
		path := filepath.Join(dir, []string{"a.mp4", "b.mp4"}[k])
		tr, err := WriteClip(small(11), path, nil)
		if err != nil {
			t.Fatal(err)
		}
		truths[k] = truthBytes(t, tr)
		frames[k] = decodeAll(t, path)
	}
	for n, b := range truths[0] {
		if !bytes.Equal(b, truths[1][n]) {
			t.Errorf("%s differs between two runs with the same seed", n)
		}
	}
	if len(frames[0]) != len(frames[1]) || len(frames[0]) == 0 {
		t.Fatalf("decoded %d and %d frames", len(frames[0]), len(frames[1]))
	}
	for i := range frames[0] {
		if !bytes.Equal(frames[0][i], frames[1][i]) {
			t.Fatalf("decoded frame %d differs between two runs with the same seed", i)
		}
	}
}

func TestRenderOrderIndependent(t *testing.T) {
	cfg := small(4)
	cfg.ShakePX = 2
	cfg.IlluminationDrift = 0.1
	cfg.FlickerDepth = 0.05
	a, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	b, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	ma, mb := gocv.NewMat(), gocv.NewMat()
	defer ma.Close()
	defer mb.Close()
	for i := 0; i <= 40; i++ {
		a.Render(i, &ma)
	}
	b.Render(40, &mb)
	da, _ := ma.DataPtrUint8()
	db, _ := mb.DataPtrUint8()
	if !bytes.Equal(da, db) {
		t.Fatal("frame 40 rendered after frames 0..39 differs from frame 40 rendered first")
	}
}

func TestDifferentSeedsDiffer(t *testing.T) {
	a, err := New(small(1))
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	b, err := New(small(2))
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	ta, tb := truthBytes(t, a.Truth()), truthBytes(t, b.Truth())
	for _, n := range []string{FlowersFile, TracksFile} {
		if bytes.Equal(ta[n], tb[n]) {
			t.Errorf("%s equal for seeds 1 and 2", n)
		}
	}
	ma, mb := gocv.NewMat(), gocv.NewMat()
	defer ma.Close()
	defer mb.Close()
	a.Render(30, &ma)
	b.Render(30, &mb)
	da, _ := ma.DataPtrUint8()
	db, _ := mb.DataPtrUint8()
	if bytes.Equal(da, db) {
		t.Error("frame 30 equal for seeds 1 and 2")
	}
}

// decodeAll decodes a clip and returns each frame's bytes.
func decodeAll(t *testing.T, path string) [][]byte {
	t.Helper()
	vc, err := gocv.VideoCaptureFile(path)
	if err != nil {
		t.Fatal(err)
	}
	defer vc.Close()
	m := gocv.NewMat()
	defer m.Close()
	var out [][]byte
	for vc.Read(&m) {
		if m.Empty() {
			break
		}
		out = append(out, append([]byte(nil), m.ToBytes()...))
	}
	return out
}

func TestClipDecodes(t *testing.T) {
	dir := t.TempDir()
	for _, tc := range []struct {
		file, fourcc string
	}{
		{"clip.mp4", "avc1"},
		{"clip.avi", "MJPG"},
		{"clip.mkv", "h264"},
	} {
		t.Run(tc.file, func(t *testing.T) {
			cfg := small(5)
			path := filepath.Join(dir, tc.file)
			calls := 0
			tr, err := WriteClip(cfg, path, func(done, total int) {
				calls++
				if done != calls || total != 60 {
					t.Fatalf("progress(%d, %d) on call %d", done, total, calls)
				}
			})
			if err != nil {
				t.Fatal(err)
			}
			fi, _ := os.Stat(path)
			vc, err := gocv.VideoCaptureFile(path)
			if err != nil {
				t.Fatal(err)
			}
			defer vc.Close()
			fps := vc.Get(gocv.VideoCaptureFPS)
			codec := vc.CodecString()
			m := gocv.NewMat()
			defer m.Close()
			n := 0
			for vc.Read(&m) && !m.Empty() {
				if m.Cols() != 320 || m.Rows() != 240 || m.Channels() != 3 {
					t.Fatalf("frame %d is %dx%dx%d", n, m.Cols(), m.Rows(), m.Channels())
				}
				n++
			}
			t.Logf("%s: %d bytes, codec %q, %d frames, %g fps", tc.file, fi.Size(), codec, n, fps)
			if n != tr.Frames || n != 60 {
				t.Errorf("decoded %d frames, truth %d, want 60", n, tr.Frames)
			}
			if math.Abs(fps-30) > 1e-6 {
				t.Errorf("fps %g, want 30", fps)
			}
			if !strings.EqualFold(codec, tc.fourcc) {
				t.Errorf("codec %q, want %q", codec, tc.fourcc)
			}
		})
	}
	if _, err := WriteClip(small(5), filepath.Join(dir, "clip.gif"), nil); err == nil {
		t.Error("WriteClip accepted a .gif path")
	}
}

// TestCentroid checks that the intensity-weighted centroid of the bee's
// darkness (frame without bees minus frame with bees) lies at the truth
// point. Flowers are hidden so that every frame, landed ones included,
// has a flat background around the bee.
func TestCentroid(t *testing.T) {
	for _, tc := range []struct {
		name   string
		modify func(*Config)
		tolPX  float64
	}{
		{"body only", func(*Config) {}, 0.5},
		{"banding", func(c *Config) { c.BeeBanding = true }, 0.5},
		{"banding and wings", func(c *Config) { c.BeeBanding = true; c.BeeWings = true }, 0.5},
		{"small bee", func(c *Config) { c.PXPerMM = 1; c.BeeLengthMM = 10 }, 0.5},
		{"motion blur 1/250 s", func(c *Config) { c.ExposureS = 1.0 / 250; c.BeeBanding = true }, 0.5},
		{"motion blur 1/30 s", func(c *Config) { c.ExposureS = 1.0 / 30 }, 0.5},
		{"camera shake 3 px", func(c *Config) { c.ShakePX = 3 }, 0.5},
	} {
		t.Run(tc.name, func(t *testing.T) {
			cfg := Config{Seed: 21, WidthPX: 640, HeightPX: 480, FPS: 30, DurationS: 20, Flowers: 4, Bees: 1,
				FlowerRadiusMinMM: 15, FlowerRadiusMaxMM: 20, HandlingMedianS: 1, HandlingSigma: 0.2,
				InspectionProb: 0.5, ExitProb: -1, PXPerMM: 2.13}
			tc.modify(&cfg)
			s, err := New(cfg)
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			bg, fr := gocv.NewMat(), gocv.NewMat()
			defer bg.Close()
			defer fr.Close()
			s.hideFlowers = true
			maxErr, sumErr, n := 0.0, 0.0, 0
			states := map[kinematics.State]int{}
			w, h := s.Size()
			for i := 0; i < s.Frames(); i += 2 {
				var here []*beeTrack
				for _, b := range s.bees {
					if b.present[i] {
						here = append(here, b)
					}
				}
				if len(here) != 1 {
					continue // measure one bee at a time
				}
				b := here[0]
				R := 0.8*b.lenPX + 4
				cx, cy := b.x[i]+s.shakeX[i], b.y[i]+s.shakeY[i]
				x0, y0 := int(math.Floor(cx-R)), int(math.Floor(cy-R))
				x1, y1 := int(math.Ceil(cx+R)), int(math.Ceil(cy+R))
				if x0 < 0 || y0 < 0 || x1 >= w || y1 >= h {
					continue
				}
				s.hideBees = true
				s.Render(i, &bg)
				s.hideBees = false
				s.Render(i, &fr)
				db, _ := bg.DataPtrUint8()
				df, _ := fr.DataPtrUint8()
				var sw, sx, sy float64
				for y := y0; y <= y1; y++ {
					for x := x0; x <= x1; x++ {
						o := 3 * (y*w + x)
						d := float64(int(db[o])+int(db[o+1])+int(db[o+2])) - float64(int(df[o])+int(df[o+1])+int(df[o+2]))
						sw += d
						sx += d * float64(x)
						sy += d * float64(y)
					}
				}
				e := math.Hypot(sx/sw-b.x[i]-s.shakeX[i], sy/sw-b.y[i]-s.shakeY[i])
				maxErr = math.Max(maxErr, e)
				sumErr += e
				n++
				states[b.state[i]]++
			}
			t.Logf("%s: %d frames (flying %d, hovering %d, landed %d): centroid error max %.4f px, mean %.4f px",
				tc.name, n, states[kinematics.Flying], states[kinematics.Hovering], states[kinematics.Landed], maxErr, sumErr/float64(n))
			if n < 100 || states[kinematics.Landed] == 0 || states[kinematics.Flying] == 0 || states[kinematics.Hovering] == 0 {
				t.Fatalf("only %d frames measured (%v)", n, states)
			}
			if maxErr > tc.tolPX {
				t.Errorf("max centroid error %.3f px > %.1f px", maxErr, tc.tolPX)
			}
		})
	}
}

func TestWriteDirRoundTrip(t *testing.T) {
	cfg, _ := Preset("demo")
	cfg.DurationS = 20
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	tr := s.Truth()
	if err := tr.WriteDir(dir); err != nil {
		t.Fatal(err)
	}
	got, err := ReadTruthDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	a, b := truthBytes(t, tr), truthBytes(t, got)
	for n := range a {
		if !bytes.Equal(a[n], b[n]) {
			t.Errorf("%s changes on a write-read-write round trip", n)
		}
	}
	if len(got.Points) != len(tr.Points) || got.Points[len(got.Points)/2] != tr.Points[len(tr.Points)/2] {
		t.Errorf("points differ after round trip")
	}
	if got.Config.Seed != cfg.Seed || got.Config.Plot != cfg.Plot || len(got.Config.FlowerKinds) != 2 {
		t.Errorf("config differs after round trip: %+v", got.Config)
	}
	if got.Flowers.FrameWidthPX != 1280 || len(got.Flowers.Flowers) != len(tr.Flowers.Flowers) {
		t.Errorf("flower map differs after round trip: %+v", got.Flowers)
	}
	// A damaged tracks file is reported with its line and field.
	bad := strings.Replace(string(truthBytes(t, tr)[TracksFile]), "flying", "gliding", 1)
	if err := os.WriteFile(filepath.Join(dir, TracksFile), []byte(bad), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadTruthDir(dir); err == nil || !strings.Contains(err.Error(), "field state") {
		t.Errorf("damaged tracks file: error %v, want one naming field state", err)
	}
}

func TestConfigErrors(t *testing.T) {
	for _, tc := range []struct {
		name   string
		modify func(*Config)
		want   string
	}{
		{"odd width", func(c *Config) { c.WidthPX = 641 }, "WidthPX"},
		{"negative noise", func(c *Config) { c.NoiseSigma = -1 }, "NoiseSigma"},
		{"unknown kind", func(c *Config) { c.FlowerKinds = []string{"tulip"} }, "FlowerKinds"},
		{"crossings with one bee", func(c *Config) { c.MinCrossings = 1 }, "MinCrossings"},
		{"long landing too long for the clip", func(c *Config) { c.DurationS = 20; c.MinLongLandingS = 30 }, "MinLongLandingS"},
		{"too many flowers", func(c *Config) { c.Flowers = 60; c.FlowerRadiusMinMM = 40; c.FlowerRadiusMaxMM = 40 }, "cannot place"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			cfg := Config{Seed: 1}
			tc.modify(&cfg)
			_, err := New(cfg)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one mentioning %q", err, tc.want)
			}
		})
	}
	if _, err := Preset("nope"); err == nil {
		t.Error("Preset accepted an unknown name")
	}
}

// TestShortenedSingle: the single preset shortened still meets its
// requirements: all of them in 45 s, the long landing alone in 33 s.
func TestShortenedSingle(t *testing.T) {
	for _, tc := range []struct {
		name      string
		durationS float64
		longOnly  bool
	}{
		{"all requirements", 45, false},
		{"long landing only", 33, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			for seed := int64(1); seed <= 5; seed++ {
				cfg, _ := Preset("single")
				cfg.Seed = seed
				cfg.DurationS = tc.durationS
				if tc.longOnly {
					cfg.MinInspections, cfg.MinRevisits, cfg.MinExits = 0, 0, 0
				}
				s, err := New(cfg)
				if err != nil {
					t.Fatalf("seed %d: %v", seed, err)
				}
				checkTruth(t, s)
				ok := false
				for _, l := range s.Truth().Landings {
					ok = ok || (l.TrackID == 0 && !l.CensoredEnd && l.DurationS >= 30)
				}
				if !ok {
					t.Errorf("seed %d: no complete landing of 30 s", seed)
				}
			}
		})
	}
}

// TestFlickerAliasing: mains flicker at 2*50 Hz sampled at 30 frames/s
// appears at |100 - 3*30| = 10 Hz (sampling theorem, aliasing; common
// practice).
func TestFlickerAliasing(t *testing.T) {
	for _, tc := range []struct {
		fps, wantHz float64
	}{
		{30, 10},
		{120, 20}, // |100 - 1*120|
		{25, 0},   // 100 = 4*25: the flicker is frozen
	} {
		cfg := Config{Seed: 3, WidthPX: 160, HeightPX: 120, FPS: tc.fps, DurationS: 4, PXPerMM: 0.4,
			FlowerRadiusMinMM: 20, FlowerRadiusMaxMM: 30, Flowers: 2, FlickerDepth: 0.1, EntryMaxS: 3.5}
		s, err := New(cfg)
		if err != nil {
			t.Fatal(err)
		}
		m := gocv.NewMat()
		var y []float64
		for i := 0; i < s.Frames(); i++ {
			s.Render(i, &m)
			y = append(y, m.Mean().Val2)
		}
		m.Close()
		s.Close()
		mean := 0.0
		for _, v := range y {
			mean += v
		}
		mean /= float64(len(y))
		// Dominant frequency by a direct DFT over 0..fps/2 in 0.25 Hz steps.
		best, bestP := 0.0, 0.0
		varSum := 0.0
		for _, v := range y {
			varSum += (v - mean) * (v - mean)
		}
		for f := 0.25; f <= tc.fps/2; f += 0.25 {
			var re, im float64
			for i, v := range y {
				a := 2 * math.Pi * f * float64(i) / tc.fps
				re += (v - mean) * math.Cos(a)
				im += (v - mean) * math.Sin(a)
			}
			if p := re*re + im*im; p > bestP {
				best, bestP = f, p
			}
		}
		if tc.wantHz == 0 {
			if sd := math.Sqrt(varSum / float64(len(y))); sd > 0.3 {
				t.Errorf("fps %g: brightness varies (sd %.2f grey levels), want frozen flicker", tc.fps, sd)
			}
			continue
		}
		if math.Abs(best-tc.wantHz) > 0.25 {
			t.Errorf("fps %g: flicker at %.2f Hz, want %.2f Hz", tc.fps, best, tc.wantHz)
		}
	}
}

// TestShakeMovesTruth: with camera shake the truth point follows the
// shaken image; the landed bee's centroid against the shaken bee-less frame
// stays on it.
func TestShakeMovesTruth(t *testing.T) {
	cfg := Config{Seed: 8, WidthPX: 640, HeightPX: 480, DurationS: 6, Flowers: 3, PXPerMM: 2, EntryMaxS: 0.1, ShakePX: 4}
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	plain := cfg
	plain.ShakePX = 0
	p, err := New(plain)
	if err != nil {
		t.Fatal(err)
	}
	defer p.Close()
	maxShift := 0.0
	tp := map[int]TruthPoint{}
	for _, q := range p.Truth().Points {
		tp[q.Frame] = q
	}
	n := 0
	for _, q := range s.Truth().Points {
		o, ok := tp[q.Frame]
		if !ok {
			continue
		}
		dx, dy := q.XPX-o.XPX, q.YPX-o.YPX
		if math.Abs(dx-s.shakeX[q.Frame]) > 1e-9 || math.Abs(dy-s.shakeY[q.Frame]) > 1e-9 {
			t.Fatalf("frame %d: truth moved by (%.3f, %.3f), shake (%.3f, %.3f)", q.Frame, dx, dy, s.shakeX[q.Frame], s.shakeY[q.Frame])
		}
		maxShift = math.Max(maxShift, math.Hypot(dx, dy))
		n++
	}
	t.Logf("%d points, largest shake %.2f px", n, maxShift)
	if n == 0 || maxShift < 1 || maxShift > 2*cfg.ShakePX {
		t.Errorf("shake of %.2f px over %d points, want between 1 and %g px", maxShift, n, 2*cfg.ShakePX)
	}
}

// TestRenderSpeed measures rendering time per frame for the 720p and 1080p
// presets (all effects on). The bound is loose: the machine is shared.
func TestRenderSpeed(t *testing.T) {
	for _, name := range []string{"single", "three", "windy"} {
		cfg, _ := Preset(name)
		s, err := New(cfg)
		if err != nil {
			t.Fatal(err)
		}
		m := gocv.NewMat()
		s.Render(0, &m) // builds the renderer
		const n = 60
		start := time.Now()
		for i := 1; i <= n; i++ {
			s.Render(900+i, &m)
		}
		ms := float64(time.Since(start).Microseconds()) / 1000 / n
		m.Close()
		s.Close()
		t.Logf("%s (%dx%d): %.2f ms per frame", name, cfg.WidthPX, cfg.HeightPX, ms)
		if ms > 100 {
			t.Errorf("%s: %.1f ms per frame", name, ms)
		}
	}
}

// TestOccluderHides: where the truth says a bee is not visible, rendering
// the bees changes no pixel near it; where it is visible just before or
// after, the bee shows.
func TestOccluderHides(t *testing.T) {
	cfg, _ := Preset("single")
	cfg = cfg.WithoutEffects()
	cfg.Occluder = true
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	tr := s.Truth()
	with, without := gocv.NewMat(), gocv.NewMat()
	defer with.Close()
	defer without.Close()
	diff := func(p TruthPoint) float64 {
		s.hideBees = true
		s.Render(p.Frame, &without)
		s.hideBees = false
		s.Render(p.Frame, &with)
		a, _ := with.DataPtrUint8()
		b, _ := without.DataPtrUint8()
		w, h := s.Size()
		R := int(s.cfg.BeeLengthMM * tr.PXPerMM)
		sum := 0.0
		for y := max(0, int(p.YPX)-R); y <= min(h-1, int(p.YPX)+R); y++ {
			for x := max(0, int(p.XPX)-R); x <= min(w-1, int(p.XPX)+R); x++ {
				for c := 0; c < 3; c++ {
					sum += math.Abs(float64(a[3*(y*w+x)+c]) - float64(b[3*(y*w+x)+c]))
				}
			}
		}
		return sum
	}
	hidden, shown := 0, 0
	for k, p := range tr.Points {
		if p.Visible {
			continue
		}
		hidden++
		if d := diff(p); d != 0 {
			t.Errorf("frame %d: bee marked hidden changes the image by %.0f grey levels", p.Frame, d)
		}
		for _, q := range []int{k - 3, k + 3} {
			if q >= 0 && q < len(tr.Points) && tr.Points[q].Visible && tr.Points[q].BeeID == p.BeeID {
				shown++
				if d := diff(tr.Points[q]); d < 1000 {
					t.Errorf("frame %d: visible bee changes the image by only %.0f grey levels", tr.Points[q].Frame, d)
				}
			}
		}
	}
	t.Logf("%d hidden points, %d visible neighbours checked", hidden, shown)
	if hidden == 0 || shown == 0 {
		t.Fatalf("%d hidden points, %d visible neighbours", hidden, shown)
	}
}
