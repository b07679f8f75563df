package visits_test

import (
	"fmt"
	"math"
	"os"
	"strings"

	"flitlog/kinematics"
	"flitlog/visits"
)

// A bee flies to a flower at 300 mm/s, sits on it for 2 s and flies on,
// speeding up by 1.25 mm per frame each frame (1.1 m/s^2 at 30 frames/s).
func ExampleAnalyze() {
	fm, err := visits.ReadFlowerMap(strings.NewReader(
		`{"flowers": [{"id": "F1", "x_px": 400, "y_px": 300, "r_px": 30, "kind": "clover", "reward_ul": 1.5}]}`))
	if err != nil {
		fmt.Println(err)
		return
	}
	const fps, pxPerMM = 30.0, 2.0
	tr := kinematics.Track{ID: 1}
	x := 100.0 // px
	for f := 0; f < 150; f++ {
		switch {
		case f < 30: // flying in at 10 mm per frame
			x = 100 + 20*float64(f)
		case f < 90: // landed at x = 400 px from frame 30 to 89
			x = 400
		default: // taking off: 2.5 px more per frame each frame, up to 20 px
			k := float64(f - 89)
			x = 400 + 1.25*k*(k+1)
			if k > 8 {
				x = 400 + 90 + 20*(k-8)
			}
		}
		tr.Points = append(tr.Points, kinematics.Point{Frame: f, TimeS: float64(f) / fps,
			XPX: x, YPX: 300, XMM: x / pxPerMM, YMM: 300 / pxPerMM, Observed: true})
	}
	kr, err := kinematics.Analyze(tr, kinematics.DefaultSettings())
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := visits.Analyze([]kinematics.Result{kr}, fm, visits.Clip{FPS: fps, PXPerMM: pxPerMM}, visits.DefaultSettings())
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range res.Landings {
		fmt.Printf("bee %d on %s (%s): frames %d-%d, %.2f-%.2f s, handling %.2f s, %.1f uL, left at %.0f mm/s\n",
			l.TrackID, l.FlowerID, l.FlowerKind, l.StartFrame, l.EndFrame, l.StartS, l.EndS, l.DurationS, l.RewardUL, l.DepartureSpeedMMPerS)
	}
	c := res.Summary.Clip
	fmt.Printf("%d landing, %.1f landings/min, intake %.2f uL per s of handling\n", c.Landings, c.LandingsPerMin, c.IntakeULPerHandlingS)
	// Output:
	// bee 1 on F1 (clover): frames 30-89, 1.00-3.00 s, handling 2.00 s, 1.5 uL, left at 150 mm/s
	// 1 landing, 12.0 landings/min, intake 0.75 uL per s of handling
}

// Landings are written to and read from visits.csv; NaN is an empty field.
func ExampleWriteLandingsCSV() {
	ls := []visits.Landing{{TrackID: 2, FlowerID: "F3", StartFrame: 45, EndFrame: 134, StartS: 1.5, EndS: 4.5, DurationS: 3,
		ApproachSpeedMMPerS: 120, DepartureSpeedMMPerS: 250, SincePrevVisitS: math.NaN(), Index: 1, FlowerKind: "borage", RewardUL: math.NaN()}}
	if err := visits.WriteLandingsCSV(os.Stdout, ls); err != nil {
		fmt.Println(err)
	}
	back, err := visits.ReadLandingsCSV(strings.NewReader("track_id,flower_id,start_s,end_s\n2,F3,1.5,4.5\n"))
	fmt.Println(len(back), back[0].FlowerID, back[0].EndS-back[0].StartS, err)
	// Output:
	// track_id,flower_id,start_s,end_s,duration_s,start_frame,end_frame,flower_kind,index,revisit,since_prev_visit_s,approach_speed_mm_s,departure_speed_mm_s,censored_start,censored_end,reward_ul
	// 2,F3,1.5,4.5,3,45,134,borage,1,false,,120,250,false,false,
	// 1 F3 3 <nil>
}

// Found landings are matched to true ones by flower and time; track ids
// need not agree.
func ExampleScoreAgainstTruth() {
	truth := []visits.Landing{
		{TrackID: 0, FlowerID: "F1", StartFrame: 30, EndFrame: 120},
		{TrackID: 0, FlowerID: "F2", StartFrame: 200, EndFrame: 260},
	}
	found := []visits.Landing{
		{TrackID: 7, FlowerID: "F1", StartFrame: 29, EndFrame: 120},
		{TrackID: 7, FlowerID: "F2", StartFrame: 201, EndFrame: 262},
	}
	s := visits.ScoreAgainstTruth(truth, nil, found, nil)
	fmt.Printf("F1 %.2f, onset error median %.1f frames, offset error median %.1f frames, targets: %v\n",
		s.LandingF1, s.OnsetErrMedianFrames, s.OffsetErrMedianFrames, s.MeetsTargets())
	// Output:
	// F1 1.00, onset error median 1.0 frames, offset error median 1.0 frames, targets: <nil>
}
