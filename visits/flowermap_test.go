package visits

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func ptr(v float64) *float64 { return &v }

func TestFlowerMapRoundTrip(t *testing.T) {
	fm := FlowerMap{
		FrameWidthPX: 1280, FrameHeightPX: 720,
		Flowers: []Flower{
			{ID: "A1", XPX: 412, YPX: 300.5, RPX: 24, Kind: "white clover", RewardUL: ptr(1.25)},
			{ID: "A2", XPX: -10, YPX: 100, RPX: 30}, // partly outside the frame: fine
			{ID: "P1", XPX: 600, YPX: 400, RPX: 20, PolygonPX: [][2]float64{{590, 390}, {610, 390}, {610, 410}, {590, 410}}},
		},
	}
	var b bytes.Buffer
	if err := WriteFlowerMap(&b, fm); err != nil {
		t.Fatal(err)
	}
	got, err := ReadFlowerMap(bytes.NewReader(b.Bytes()))
	if err != nil {
		t.Fatalf("read back: %v\n%s", err, b.String())
	}
	if !reflect.DeepEqual(got, fm) {
		t.Errorf("round trip:\ngot  %+v\nwant %+v", got, fm)
	}
	if err := got.Validate(1280, 720); err != nil {
		t.Errorf("Validate: %v", err)
	}
	// Idempotence: writing the map read back gives the same bytes.
	var b2 bytes.Buffer
	if err := WriteFlowerMap(&b2, got); err != nil {
		t.Fatal(err)
	}
	if b.String() != b2.String() {
		t.Errorf("second write differs:\n%s\n%s", b.String(), b2.String())
	}
	// The minimal DESIGN.md example reads.
	if _, err := ReadFlowerMap(strings.NewReader(`{"flowers": [{"id": "A1", "x_px": 412.0, "y_px": 300.5, "r_px": 24.0}]}`)); err != nil {
		t.Errorf("DESIGN.md example: %v", err)
	}
}

func TestFlowerMapBadInput(t *testing.T) {
	cases := []struct {
		name string
		json string
		line int
		id   string
		fld  string
		want string // part of the message
	}{
		{"missing comma", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2, \"r_px\": 3}\n {\"id\": \"B\"}]}", 3, "", "", "malformed JSON"},
		{"string for number", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2, \"r_px\": 3},\n {\"id\": \"B\",\n  \"x_px\": \"ten\", \"y_px\": 2, \"r_px\": 3}]}", 4, "B", "x_px", "want a number"},
		{"misspelt field", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2,\n  \"radius\": 3}]}", 3, "A", "radius", "unknown field"},
		{"unclosed", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2, \"r_px\": 3},\n", 3, "", "", "unexpected end"},
		{"duplicate id", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2, \"r_px\": 3},\n {\"id\": \"A\", \"x_px\": 50, \"y_px\": 2, \"r_px\": 3}]}", 3, "A", "id", "duplicate id"},
		{"negative radius", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2,\n  \"r_px\": -3}]}", 3, "A", "r_px", "must be > 0"},
		{"zero radius", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2}]}", 2, "A", "r_px", "must be > 0"},
		{"negative reward", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2, \"r_px\": 3, \"reward_ul\": -1}]}", 2, "A", "reward_ul", ">= 0"},
		{"missing id", "{\"flowers\": [\n {\"x_px\": 1, \"y_px\": 2, \"r_px\": 3}]}", 2, "", "id", "missing id"},
		{"polygon too short", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2, \"r_px\": 3,\n  \"polygon_px\": [[0, 0], [1, 1]]}]}", 3, "A", "polygon_px", "at least 3"},
		{"polygon crossing", "{\"flowers\": [\n {\"id\": \"A\", \"x_px\": 1, \"y_px\": 2, \"r_px\": 3, \"polygon_px\": [[0, 0], [10, 10], [10, 0], [0, 10]]}]}", 2, "A", "polygon_px", "cross"},
		{"no flowers key", "{\"flower\": []}", 1, "", "flower", "unknown field"},
		{"not an object", "[]", 1, "", "", "is an object"},
		{"half frame size", "{\"frame_width_px\": 640, \"flowers\": []}", 0, "", "frame_width_px", "give both"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadFlowerMap(strings.NewReader(c.json))
			var me *MapError
			if !errors.As(err, &me) {
				t.Fatalf("err = %v, want a *MapError", err)
			}
			if me.Line != c.line || me.FlowerID != c.id || me.Field != c.fld || !strings.Contains(me.Msg, c.want) {
				t.Errorf("got line %d id %q field %q msg %q; want line %d id %q field %q msg containing %q",
					me.Line, me.FlowerID, me.Field, me.Msg, c.line, c.id, c.fld, c.want)
			}
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("error is not one line: %q", err.Error())
			}
		})
	}
}

func TestFlowerMapValidateFrame(t *testing.T) {
	base := func() FlowerMap {
		return FlowerMap{Flowers: []Flower{{ID: "A", XPX: 100, YPX: 100, RPX: 20}}}
	}
	cases := []struct {
		name  string
		edit  func(*FlowerMap)
		field string // "" for no error
		want  string
	}{
		{"ok", func(*FlowerMap) {}, "", ""},
		{"partly outside left", func(fm *FlowerMap) { fm.Flowers[0].XPX = -15 }, "", ""},
		{"partly outside bottom right", func(fm *FlowerMap) { fm.Flowers[0].XPX, fm.Flowers[0].YPX = 650, 490 }, "", ""},
		{"entirely outside right", func(fm *FlowerMap) { fm.Flowers[0].XPX = 700 }, "x_px", "entirely outside the 640x480 frame"},
		{"entirely outside corner", func(fm *FlowerMap) { fm.Flowers[0].XPX, fm.Flowers[0].YPX = -15, -15 }, "x_px", "entirely outside"},
		{"polygon outside", func(fm *FlowerMap) {
			fm.Flowers[0].PolygonPX = [][2]float64{{700, 10}, {720, 10}, {720, 30}}
		}, "x_px", "entirely outside"},
		{"other frame size", func(fm *FlowerMap) { fm.FrameWidthPX, fm.FrameHeightPX = 1920, 1080 }, "frame_width_px", "made for 1920x1080 frames but the clip is 640x480"},
		{"same frame size", func(fm *FlowerMap) { fm.FrameWidthPX, fm.FrameHeightPX = 640, 480 }, "", ""},
		{"duplicate", func(fm *FlowerMap) { fm.Flowers = append(fm.Flowers, fm.Flowers[0]) }, "id", "duplicate"},
		{"negative radius", func(fm *FlowerMap) { fm.Flowers[0].RPX = -1 }, "r_px", "> 0"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			fm := base()
			c.edit(&fm)
			err := fm.Validate(640, 480)
			if c.field == "" {
				if err != nil {
					t.Fatalf("unexpected error %v", err)
				}
				return
			}
			var me *MapError
			if !errors.As(err, &me) {
				t.Fatalf("err = %v, want *MapError", err)
			}
			if me.Field != c.field || !strings.Contains(me.Msg, c.want) {
				t.Errorf("got field %q msg %q; want field %q msg containing %q", me.Field, me.Msg, c.field, c.want)
			}
		})
	}
}

func TestLoadFlowerMapNamesFile(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "meadow.flowers.json")
	if err := os.WriteFile(p, []byte("{\"flowers\": [\n{\"id\": \"A\", \"x_px\": 1, \"y_px\": 1, \"r_px\": 0}]}"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := LoadFlowerMap(p)
	if err == nil || !strings.HasPrefix(err.Error(), p+":2: flower \"A\": field r_px:") {
		t.Errorf("err = %v, want it to start with %q", err, p+":2: flower \"A\": field r_px:")
	}
	_, err = LoadFlowerMap(filepath.Join(dir, "missing.json"))
	if err == nil || !strings.Contains(err.Error(), "missing.json") {
		t.Errorf("missing file: err = %v", err)
	}
}

func TestEdgeDistPolygonAndCircle(t *testing.T) {
	sq := Flower{ID: "S", XPX: 5, YPX: 5, RPX: 5, PolygonPX: [][2]float64{{0, 0}, {10, 0}, {10, 10}, {0, 10}}}
	c := Flower{ID: "C", XPX: 0, YPX: 0, RPX: 5}
	cases := []struct {
		name string
		f    Flower
		x, y float64
		want float64
	}{
		{"square centre", sq, 5, 5, -5},
		{"square inside near edge", sq, 9, 5, -1},
		{"square outside", sq, 13, 5, 3},
		{"square corner diagonal", sq, 13, 14, 5}, // 3-4-5 triangle
		{"circle centre", c, 0, 0, -5},
		{"circle outside", c, 3, 4 + 5*4.0/5*0, 0}, // (3,4) on the edge
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.f.EdgeDistPX(tc.x, tc.y); abs(got-tc.want) > 1e-12 {
				t.Errorf("EdgeDistPX(%v, %v) = %v, want %v", tc.x, tc.y, got, tc.want)
			}
		})
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// FuzzReadFlowerMap: reading never panics; a map that reads without error
// is written and read back unchanged.
func FuzzReadFlowerMap(f *testing.F) {
	f.Add(`{"flowers": [{"id": "A1", "x_px": 412.0, "y_px": 300.5, "r_px": 24.0}]}`)
	f.Add(`{"frame_width_px": 640, "frame_height_px": 480, "flowers": [{"id": "A", "x_px": 1, "y_px": 2, "r_px": 3, "kind": "k", "reward_ul": 0.5, "polygon_px": [[0, 0], [5, 0], [0, 5]]}]}`)
	f.Add(`{"flowers": [`)
	f.Add(`[]`)
	f.Fuzz(func(t *testing.T, s string) {
		fm, err := ReadFlowerMap(strings.NewReader(s))
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("error is not one line: %q", err)
			}
			return
		}
		var b bytes.Buffer
		if err := WriteFlowerMap(&b, fm); err != nil {
			t.Fatalf("write: %v", err)
		}
		back, err := ReadFlowerMap(&b)
		if err != nil {
			t.Fatalf("read back: %v\n%s", err, b.String())
		}
		if !reflect.DeepEqual(back, fm) {
			t.Fatalf("round trip changed the map:\n%+v\n%+v", fm, back)
		}
	})
}
