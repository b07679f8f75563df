package link

import (
	"fmt"

	"gonum.org/v1/gonum/stat/distuv"
)

// GateD2 returns the gate on the squared Mahalanobis distance for a
// detection of a 2-D position: the quantile of the chi-square distribution
// with 2 degrees of freedom at probability p in (0, 1). A target's own
// detection falls inside the gate with probability p when the filter's
// covariances are right. For p = 0.99 it is 9.21.
//
// With 2 degrees of freedom the quantile has the closed form -2 ln(1 - p);
// it is computed here with gonum's chi-square distribution.
func GateD2(p float64) float64 {
	if !(p > 0 && p < 1) {
		panic(fmt.Sprintf("link: gate probability %v not in (0, 1)", p))
	}
	return distuv.ChiSquared{K: 2}.Quantile(p)
}
