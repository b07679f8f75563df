package calibration

import (
	"math"
	"strings"
	"testing"
)

func TestTimeBase(t *testing.T) {
	vfr := []float64{10.0, 10.04, 10.07, 10.11, 10.14} // synthetic, first frame at 10 s
	cases := []struct {
		name              string
		times             []float64
		nominal, override float64
		frame             int
		wantS, wantFPS    float64
		wantSource        string
		wantWarn          string
	}{
		{"override wins over timestamps", vfr, 30, 240, 48, 0.2, 240, "fps override 240", ""},
		{"timestamps from the first frame", vfr, 29, 0, 3, 0.11, 4 / 0.14, "container timestamps", ""},
		{"past the last timestamp", vfr, 29, 0, 6, 0.14 + 2*0.14/4, 4 / 0.14, "container timestamps", ""},
		{"nominal without timestamps", nil, 25, 0, 50, 2, 25, "nominal frame rate 25", ""},
		{"timestamps not increasing", []float64{0, 0, 0}, 25, 0, 50, 2, 25, "nominal frame rate 25", "frame 1 at 0 s does not come after frame 0"},
		{"NaN timestamp", []float64{0, math.NaN(), 0.08}, 25, 0, 1, 0.04, 25, "nominal frame rate 25", "frame 1 has time NaN"},
		{"timestamps disagree with header", []float64{0, 0.1, 0.2, 0.3}, 30, 0, 2, 0.2, 10, "container timestamps", "timestamps give 10 frames/s but the header says 30"},
		{"timestamps rescue a missing rate", []float64{0, 0.5, 1}, 0, 0, 4, 2, 2, "container timestamps", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tb, err := NewTimeBase(c.times, c.nominal, c.override)
			if err != nil {
				t.Fatal(err)
			}
			if got := tb.Seconds(c.frame); math.Abs(got-c.wantS) > 1e-12 {
				t.Errorf("Seconds(%d) = %.15g, want %g", c.frame, got, c.wantS)
			}
			if math.Abs(tb.FPS()-c.wantFPS) > 1e-9 || tb.Source() != c.wantSource {
				t.Errorf("FPS %g source %q, want %g %q", tb.FPS(), tb.Source(), c.wantFPS, c.wantSource)
			}
			w := strings.Join(tb.Warnings, "; ")
			if (c.wantWarn == "") != (w == "") || !strings.Contains(w, c.wantWarn) {
				t.Errorf("warnings %q, want %q", w, c.wantWarn)
			}
			if tb.Seconds(0) != 0 {
				t.Errorf("Seconds(0) = %g, want 0", tb.Seconds(0))
			}
		})
	}
	for _, c := range []struct {
		name              string
		times             []float64
		nominal, override float64
		wantIn            string
	}{
		{"negative override", nil, 30, -1, "give --fps > 0"},
		{"NaN override", nil, 30, math.NaN(), "give --fps > 0"},
		{"no rate at all", nil, 0, 0, "states no usable frame rate (0 frames/s) and no usable timestamps: give --fps"},
		{"bad timestamps and no rate", []float64{1, 1}, math.NaN(), 0, "give --fps"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewTimeBase(c.times, c.nominal, c.override)
			if err == nil || !strings.Contains(err.Error(), c.wantIn) {
				t.Errorf("error %v, want it to contain %q", err, c.wantIn)
			}
		})
	}
	t.Run("negative frame panics", func(t *testing.T) {
		defer func() {
			if r := recover(); r == nil || !strings.HasPrefix(r.(string), "calibration: ") {
				t.Errorf("recover() = %v", r)
			}
		}()
		tb, _ := NewTimeBase(nil, 30, 0)
		tb.Seconds(-1)
	})
}
