package link

import (
	"math"
	"testing"
)

// TestGateD2 compares the gate constant with printed chi-square tables
// (2 degrees of freedom, upper-tail probability 1 - p) and with the closed
// form -2 ln(1 - p) of the 2-dof quantile.
func TestGateD2(t *testing.T) {
	cases := []struct {
		p, table float64
	}{
		// Upper critical values of the chi-square distribution, nu = 2, as
		// printed in any statistical table (e.g. NIST/SEMATECH
		// e-Handbook of Statistical Methods, Sec. 1.3.6.7.4): 9.210 at
		// 0.01, 5.991 at 0.05, 13.816 at 0.001.
		{0.99, 9.210},
		{0.95, 5.991},
		{0.999, 13.816},
	}
	for _, c := range cases {
		got := GateD2(c.p)
		if math.Abs(got-c.table) > 0.0005 {
			t.Errorf("GateD2(%v) = %.5f, table %.3f", c.p, got, c.table)
		}
		// 2-dof chi-square CDF is 1 - exp(-x/2) (common practice).
		if closed := -2 * math.Log(1-c.p); math.Abs(got-closed) > 1e-9 {
			t.Errorf("GateD2(%v) = %.12f, closed form %.12f", c.p, got, closed)
		}
	}
}
