package mot_test

import (
	"fmt"

	"flitlog/track/mot"
)

func ExampleEvaluate() {
	// One bee seen in frames 0-3; the tracker follows it with track 7,
	// loses it and continues with track 8 from frame 2.
	truth := []mot.Obs{
		{Frame: 0, ID: 1, XPX: 10, YPX: 10}, {Frame: 1, ID: 1, XPX: 12, YPX: 10},
		{Frame: 2, ID: 1, XPX: 14, YPX: 10}, {Frame: 3, ID: 1, XPX: 16, YPX: 10},
	}
	hyp := []mot.Obs{
		{Frame: 0, ID: 7, XPX: 10, YPX: 11}, {Frame: 1, ID: 7, XPX: 12, YPX: 11},
		{Frame: 2, ID: 8, XPX: 14, YPX: 9}, {Frame: 3, ID: 8, XPX: 16, YPX: 9},
	}
	sc, err := mot.Evaluate(truth, hyp, 5)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("MOTA %.2f MOTP %.1f px, %d ID switch, IDF1 %.2f\n", sc.MOTA, sc.MOTP, sc.IDSwitches, sc.IDF1)
	// Output: MOTA 0.75 MOTP 1.0 px, 1 ID switch, IDF1 0.50
}
