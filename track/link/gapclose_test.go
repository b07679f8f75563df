package link

import (
	"math"
	"slices"
	"testing"
)

// line returns a fragment moving at (vx, vy) px/frame over frames
// [f0, f1], all points observed.
func line(id, f0, f1 int, x0, y0, vx, vy float64) fragment {
	f := fragment{ids: []int{id}}
	for k := f0; k <= f1; k++ {
		t := float64(k - f0)
		f.points = append(f.points, Point{Frame: k, XPX: x0 + vx*t, YPX: y0 + vy*t, Observed: true})
	}
	f.endSpeedPXPS = math.Hypot(vx, vy) * 30
	return f
}

var box640 = frameBox{0, 0, 640, 480}

func TestCloseGaps(t *testing.T) {
	s := DefaultSettings(30, 20)
	cases := []struct {
		name  string
		frags []fragment
		want  [][]int // provisional IDs of each joined track, by first frame
		// exit is true if the joined gap is an exit from the picture,
		// which gets no points; otherwise every frame has a point.
		exit bool
	}{
		{
			name: "chain across two short gaps",
			frags: []fragment{
				line(1, 0, 9, 100, 200, 5, 0),
				line(2, 15, 24, 175, 200, 5, 0),
				line(3, 30, 39, 250, 200, 5, 0),
			},
			want: [][]int{{1, 2, 3}},
		},
		{
			name: "two ends compete for one start: the nearer wins",
			frags: []fragment{
				line(1, 0, 9, 100, 200, 5, 0),   // ends at (145, 200)
				line(2, 0, 9, 100, 300, 5, 0),   // ends at (145, 300)
				line(3, 12, 20, 160, 205, 5, 0), // starts near 1's end
			},
			want: [][]int{{1, 3}, {2}},
		},
		{
			name: "long gap mid-picture far away: not joined",
			frags: []fragment{
				line(1, 0, 29, 200, 200, 5, 0),   // ends at (345, 200)
				line(2, 60, 89, 300, 350, -5, 0), // starts 160 px away, 1 s later
			},
			want: [][]int{{1}, {2}},
		},
		{
			name: "long gap from border to border: joined",
			frags: []fragment{
				line(1, 0, 29, 490, 200, 5, 0),    // ends at (635, 200), at the border
				line(2, 90, 119, 636, 330, -5, 0), // re-enters 130 px lower 2 s later
			},
			want: [][]int{{1, 2}},
			exit: true,
		},
		{
			name: "long gap mid-picture nearby (occlusion): joined",
			frags: []fragment{
				line(1, 0, 29, 200, 200, 5, 0),  // ends at (345, 200)
				line(2, 60, 89, 390, 210, 5, 0), // 46 px further, 1 s later
			},
			want: [][]int{{1, 2}},
		},
		{
			name: "two still ends 60 px apart, 2 s: not joined (foliage)",
			frags: []fragment{
				line(1, 0, 29, 300, 300, 0, 0),
				line(2, 90, 119, 360, 300, 0, 0),
			},
			want: [][]int{{1}, {2}},
		},
		{
			name: "sat unseen 6 s, took off unseen just before: joined",
			frags: []fragment{
				line(1, 0, 29, 300, 300, 0, 0),
				line(2, 210, 239, 315, 300, 10, 0), // 300 px/s, 15 px from the seat
			},
			want: [][]int{{1, 2}},
		},
		{
			name: "sitting bee unseen for 6 s: joined",
			frags: []fragment{
				line(1, 0, 29, 300, 300, 0, 0),
				line(2, 210, 239, 303, 300, 3, 0),
			},
			want: [][]int{{1, 2}},
		},
		{
			name: "fast bee gone for 6 s, same place: not joined",
			frags: []fragment{
				line(1, 0, 29, 155, 300, 5, 0), // ends at (300, 300) at 150 px/s
				line(2, 210, 239, 303, 300, 3, 0),
			},
			want: [][]int{{1}, {2}},
		},
		{
			name: "start before end: no join without overlap rule",
			frags: []fragment{
				line(1, 0, 60, 100, 100, 2, 0),
				line(2, 10, 70, 400, 400, 2, 0),
			},
			want: [][]int{{1}, {2}},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := closeGaps(tc.frags, s, box640)
			if len(got) != len(tc.want) {
				t.Fatalf("got %d tracks %v, want %v", len(got), idsOf(got), tc.want)
			}
			for i := range got {
				if !slices.Equal(got[i].ids, tc.want[i]) {
					t.Errorf("track %d: ids %v, want %v", i, got[i].ids, tc.want[i])
				}
				if !tc.exit {
					checkContiguous(t, got[i].points)
					continue
				}
				// No invented points while the bee was out of the picture.
				for k, p := range got[i].points {
					if !p.Observed || (k > 0 && p.Frame <= got[i].points[k-1].Frame) {
						t.Errorf("point %d %+v: want only the detections, in frame order", k, p)
					}
				}
				if n := len(got[i].points); n != 60 {
					t.Errorf("%d points, want the 60 detections", n)
				}
			}
		})
	}
}

// TestCloseGapsOverlap: a lost track followed clutter for 6 frames while a
// new track took over its bee; the old track is cut before the overlap
// and joined to the new one.
func TestCloseGapsOverlap(t *testing.T) {
	s := DefaultSettings(30, 20)
	a := line(1, 0, 20, 100, 200, 5, 0)
	for k := 15; k <= 20; k++ { // tail wanders off on clutter
		a.points[k].YPX += 15 * float64(k-14)
	}
	b := line(2, 15, 40, 175, 200, 5, 0)
	got := closeGaps([]fragment{a, b}, s, box640)
	if len(got) != 1 || !slices.Equal(got[0].ids, []int{1, 2}) {
		t.Fatalf("got %v, want one track [1 2]", idsOf(got))
	}
	pts := got[0].points
	checkContiguous(t, pts)
	if pts[0].Frame != 0 || pts[len(pts)-1].Frame != 40 {
		t.Fatalf("frames %d..%d, want 0..40", pts[0].Frame, pts[len(pts)-1].Frame)
	}
	for _, p := range pts {
		if want := 100 + 5*float64(p.Frame); math.Abs(p.XPX-want) > 1e-9 || math.Abs(p.YPX-200) > 1e-9 {
			t.Errorf("frame %d at (%v, %v), want (%v, 200): the clutter tail should be cut", p.Frame, p.XPX, p.YPX, want)
		}
	}
}

// TestGapFill: frames between joined fragments are filled by linear
// interpolation and marked unobserved.
func TestGapFill(t *testing.T) {
	s := DefaultSettings(30, 20)
	got := closeGaps([]fragment{line(1, 0, 9, 100, 200, 5, 0), line(2, 20, 29, 200, 100, 5, 0)}, s, box640)
	if len(got) != 1 {
		t.Fatalf("got %v", idsOf(got))
	}
	for _, p := range got[0].points {
		if p.Frame > 9 && p.Frame < 20 {
			w := float64(p.Frame-9) / 11
			wx, wy := 145+w*55, 200-w*100
			if p.Observed || math.Abs(p.XPX-wx) > 1e-9 || math.Abs(p.YPX-wy) > 1e-9 {
				t.Errorf("frame %d: %+v, want unobserved at (%v, %v)", p.Frame, p, wx, wy)
			}
		}
	}
}

func checkContiguous(t *testing.T, pts []Point) {
	t.Helper()
	for k := 1; k < len(pts); k++ {
		if pts[k].Frame != pts[k-1].Frame+1 {
			t.Fatalf("frame %d follows %d", pts[k].Frame, pts[k-1].Frame)
		}
	}
}

func idsOf(f []fragment) [][]int {
	var out [][]int
	for _, x := range f {
		out = append(out, x.ids)
	}
	return out
}

// TestSplitLongCoasts: a track is cut where it coasted (missed its target)
// for more than maxRun frames in a row, not where it was merged with
// another track's blob, and the coasted points are left out.
func TestSplitLongCoasts(t *testing.T) {
	mk := func(kinds string) ([]Point, []bool) {
		// 'o' detection, 'c' coasted, 'm' merged
		var pts []Point
		var co []bool
		for i, k := range kinds {
			pts = append(pts, Point{Frame: i, Observed: k == 'o'})
			co = append(co, k == 'c')
		}
		return pts, co
	}
	cases := []struct {
		name  string
		kinds string
		want  [][2]int // first and last frame of each piece
	}{
		{"no gap", "oooo", [][2]int{{0, 3}}},
		{"short coast kept", "oocccoo", [][2]int{{0, 6}}},
		{"long coast split", "oocccccoo", [][2]int{{0, 1}, {7, 8}}},
		{"long merge kept", "oommmmmoo", [][2]int{{0, 8}}},
		{"two long coasts", "occcccoccccco", [][2]int{{0, 0}, {6, 6}, {12, 12}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			pts, co := mk(tc.kinds)
			got := splitLongCoasts(pts, co, 4)
			if len(got) != len(tc.want) {
				t.Fatalf("%d pieces, want %d", len(got), len(tc.want))
			}
			for i, p := range got {
				if p[0].Frame != tc.want[i][0] || p[len(p)-1].Frame != tc.want[i][1] {
					t.Errorf("piece %d: frames %d-%d, want %d-%d", i, p[0].Frame, p[len(p)-1].Frame, tc.want[i][0], tc.want[i][1])
				}
			}
		})
	}
}
