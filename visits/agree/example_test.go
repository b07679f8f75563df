package agree_test

import (
	"fmt"
	"log"
	"strings"

	"flitlog/visits/agree"
)

// Compare a score sheet made by hand (times in mm:ss.s) with flitlog's
// visits.csv of the same clip.
func ExampleCompare() {
	sheet := `flower,start,end,bee
A1,0:02.0,0:06.5,red dot
A2,0:10.0,0:14.0,red dot
A1,0:31.0,0:33.0,blue dot
A2,0:40.0,0:47.5,blue dot
`
	auto := `track_id,flower_id,start_s,end_s,duration_s,start_frame,end_frame
1,A1,2.2,6.4,4.2,55,159
1,A2,10.1,14.2,4.1,252,354
2,A1,31.0,32.6,1.6,775,814
2,A2,40.3,47.5,7.2,1007,1186
3,A2,52.0,52.8,0.8,1300,1319
`
	a, err := agree.ReadTable(strings.NewReader(sheet), "manual.csv")
	if err != nil {
		log.Fatal(err)
	}
	b, err := agree.ReadTable(strings.NewReader(auto), "visits.csv")
	if err != nil {
		log.Fatal(err)
	}
	r, err := agree.Compare(a, b, agree.Options{GridS: 1.0 / 25})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%s vs %s\n", a.Kind, b.Kind)
	fmt.Printf("matched %d, missed %d, extra %d\n", len(r.Matches), len(r.OnlyA), len(r.OnlyB))
	fmt.Printf("precision %.2f, recall %.2f, F1 %.2f\n", r.Precision, r.Recall, r.F1)
	fmt.Printf("onset median %+.2f s\n", r.Onset.MedianS)
	fmt.Printf("handling time bias %+.3f s, limits %+.3f to %+.3f s\n", r.Durations.Bias, r.Durations.Lower, r.Durations.Upper)
	fmt.Printf("%s %.3f\n", r.ICC.Form, r.ICC.Value)
	fmt.Printf("frame-wise kappa %.3f\n", r.Frames.Kappa.Value)
	// Output:
	// manual vs flitlog
	// matched 4, missed 0, extra 1
	// precision 0.80, recall 1.00, F1 0.89
	// onset median +0.15 s
	// handling time bias -0.225 s, limits -0.660 to +0.210 s
	// ICC(2,1) 0.992
	// frame-wise kappa 0.927
}
