package agree

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > tol {
		t.Errorf("%s = %.12g, want %.12g (tolerance %g)", what, got, want, tol)
	}
}

// shroutFleiss is the worked example of Shrout & Fleiss (1979): six
// targets (rows) rated by four judges (columns). From memory of the
// paper's data table; the published ICCs below are reproduced from it,
// which supports the recollection.
var shroutFleiss = mat.NewDense(6, 4, []float64{
	9, 2, 5, 8,
	6, 1, 3, 2,
	8, 4, 6, 8,
	7, 1, 2, 6,
	10, 5, 6, 9,
	6, 2, 4, 7,
})

func TestICCShroutFleiss(t *testing.T) {
	for _, tc := range []struct {
		name string
		f    func(mat.Matrix) ICC
		form string
		// Published two-decimal value: Shrout & Fleiss (1979), worked
		// example, from memory.
		paper float64
		// Computed with R 4.2.2, psych 2.2.9: ICC(x, lmer = FALSE)
		// (Debian package r-cran-psych), rows ICC1, ICC2, ICC3.
		psych, psychLo, psychHi float64
	}{
		{"ICC(1,1)", ICC1, "ICC(1,1)", 0.17, 0.165741768405476, -0.1329323248747509, 0.722560062328121},
		{"ICC(2,1)", ICC2, "ICC(2,1)", 0.29, 0.289763779527559, 0.0187865133747120, 0.761084369648953},
		{"ICC(3,1)", ICC3, "ICC(3,1)", 0.71, 0.714840714840715, 0.3424647650339254, 0.945858259955360},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := tc.f(shroutFleiss)
			if got.Form != tc.form {
				t.Errorf("Form = %q, want %q", got.Form, tc.form)
			}
			// The paper prints two decimals.
			near(t, "value vs Shrout & Fleiss (1979), from memory", got.Value, tc.paper, 0.005)
			near(t, "value vs R psych::ICC", got.Value, tc.psych, 1e-12)
			near(t, "lower 95% bound vs R psych::ICC", got.Lower, tc.psychLo, 1e-9)
			near(t, "upper 95% bound vs R psych::ICC", got.Upper, tc.psychHi, 1e-9)
		})
	}
}

// TestICCTwoRaters checks the two-column case that Compare uses, on
// invented durations, against R 4.2.2 psych 2.2.9 ICC(x, lmer = FALSE).
func TestICCTwoRaters(t *testing.T) {
	x := mat.NewDense(7, 2, []float64{
		2.1, 2.4, 3.4, 3.1, 5.0, 5.6, 1.2, 1.0, 7.7, 8.1, 4.4, 4.9, 3.3, 3.0,
	})
	for _, tc := range []struct {
		name        string
		f           func(mat.Matrix) ICC
		val, lo, hi float64
	}{
		{"ICC(1,1)", ICC1, 0.984718422790303, 0.924166208945218, 0.997299880716972},
		{"ICC(2,1)", ICC2, 0.984716981132075, 0.924068952990461, 0.997300230615810},
		{"ICC(3,1)", ICC3, 0.984531220524429, 0.913210786405693, 0.997324887773962},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := tc.f(x)
			near(t, "value", got.Value, tc.val, 1e-12)
			near(t, "lower", got.Lower, tc.lo, 1e-9)
			near(t, "upper", got.Upper, tc.hi, 1e-9)
		})
	}
}

// Peak expiratory flow rate (l/min) of 17 subjects, first reading with
// the Wright peak flow meter and with the mini Wright meter: Bland &
// Altman (1986), Table 1. The data are from memory; they reproduce the
// paper's published mean difference and SD (checked below), which the
// check could not do by chance with a misremembered value.
var (
	pefrWright = []float64{494, 395, 516, 434, 476, 557, 413, 442, 650, 433, 417, 656, 267, 478, 178, 423, 427}
	pefrMini   = []float64{512, 430, 520, 428, 500, 600, 364, 380, 658, 445, 432, 626, 260, 477, 259, 350, 451}
)

func TestBlandAltmanPEFR(t *testing.T) {
	// Differences Wright - mini Wright, as in the paper: b = Wright.
	paper := BlandAltman(pefrMini, pefrWright, 2)
	// Bland & Altman (1986), text, from memory: mean difference
	// -2.1 l/min, SD 38.8 l/min, limits (mean -/+ 2 SD) -79.7 to 75.5.
	near(t, "bias vs paper", paper.Bias, -2.1, 0.05)
	near(t, "SD vs paper", paper.SD, 38.8, 0.05)
	// The paper computed the limits from the rounded -2.1 and 38.8.
	near(t, "lower limit vs paper", paper.Lower, -79.7, 0.1)
	near(t, "upper limit vs paper", paper.Upper, 75.5, 0.1)
	// Same paper, from memory: 95% CI of the bias -22.0 to 17.8
	// (t = 2.12, SE 9.4); of the lower limit -114.3 to -45.1 and of the
	// upper limit 40.9 to 110.1 (SE 16.3). The paper rounded SE and t
	// before multiplying, hence the tolerance.
	near(t, "bias CI low vs paper", paper.BiasLow, -22.0, 0.1)
	near(t, "bias CI high vs paper", paper.BiasHigh, 17.8, 0.1)
	near(t, "lower limit CI low vs paper", paper.LowerLow, -114.3, 0.2)
	near(t, "lower limit CI high vs paper", paper.LowerHigh, -45.1, 0.2)
	near(t, "upper limit CI low vs paper", paper.UpperLow, 40.9, 0.2)
	near(t, "upper limit CI high vs paper", paper.UpperHigh, 110.1, 0.2)

	// Full precision: R 4.2.2 mean(w - m) and sd(w - m).
	near(t, "bias vs R", paper.Bias, -2.11764705882353, 1e-12)
	near(t, "SD vs R", paper.SD, 38.7651298736074, 1e-10)
	std := BlandAltman(pefrMini, pefrWright, LoAZ)
	near(t, "1.96 lower limit", std.Lower, -2.11764705882353-1.96*38.7651298736074, 1e-9)
	near(t, "1.96 upper limit", std.Upper, -2.11764705882353+1.96*38.7651298736074, 1e-9)

	// Order of the arguments sets the sign of the difference.
	rev := BlandAltman(pefrWright, pefrMini, 2)
	near(t, "reversed bias", rev.Bias, -paper.Bias, 1e-12)
}

func TestBlandAltmanSmall(t *testing.T) {
	r := BlandAltman(nil, nil, LoAZ)
	if r.N != 0 || !math.IsNaN(r.Bias) || !math.IsNaN(r.SD) {
		t.Errorf("empty: got %+v, want N 0 and NaN", r)
	}
	r = BlandAltman([]float64{1}, []float64{1.5}, LoAZ)
	if r.Bias != 0.5 || !math.IsNaN(r.SD) || !math.IsNaN(r.Lower) {
		t.Errorf("one pair: got %+v, want bias 0.5 and NaN SD, limits", r)
	}
}

func TestLinCCC(t *testing.T) {
	for _, tc := range []struct {
		name               string
		x, y               []float64
		val, lo, hi, r, cb float64
	}{
		// Computed with R 4.2.2, epiR 2.0.57: epi.ccc(x, y, ci =
		// "z-transform") (Debian package r-cran-epir), a general-purpose
		// implementation of Lin (1989); r from cor(x, y).
		{"PEFR Bland & Altman (1986)", pefrWright, pefrMini,
			0.942742431427484, 0.85049187316856, 0.978726279170122, 0.943279446890946, 0.999430693136343},
		{"invented durations", []float64{2.1, 3.4, 5.0, 1.2, 7.7, 4.4, 3.3}, []float64{2.4, 3.1, 5.6, 1.0, 8.1, 4.9, 3.0},
			0.982215112449421, 0.928010832097427, 0.99569733360768, math.NaN(), math.NaN()},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := LinCCC(tc.x, tc.y)
			near(t, "rho_c vs epiR", got.Value, tc.val, 1e-12)
			near(t, "lower vs epiR", got.Lower, tc.lo, 1e-9)
			near(t, "upper vs epiR", got.Upper, tc.hi, 1e-9)
			if !math.IsNaN(tc.r) {
				near(t, "Pearson r vs R cor", got.Pearson, tc.r, 1e-12)
				near(t, "C_b vs epiR", got.Accuracy, tc.cb, 1e-12)
			}
			// Second route (Lin 1989, definition as expected squared distance): rho_c = 1 - E[(x-y)^2] /
			// (s_x^2 + s_y^2 + (xbar - ybar)^2), moments of divisor n.
			n := float64(len(tc.x))
			var mx, my, msd float64
			for i := range tc.x {
				mx += tc.x[i] / n
				my += tc.y[i] / n
				msd += (tc.x[i] - tc.y[i]) * (tc.x[i] - tc.y[i]) / n
			}
			var vx, vy float64
			for i := range tc.x {
				vx += (tc.x[i] - mx) * (tc.x[i] - mx) / n
				vy += (tc.y[i] - my) * (tc.y[i] - my) / n
			}
			near(t, "rho_c vs 1 - MSD/(...)", got.Value, 1-msd/(vx+vy+(mx-my)*(mx-my)), 1e-12)
		})
	}
}

func TestLinCCCEdge(t *testing.T) {
	same := LinCCC([]float64{1, 2, 3, 4}, []float64{1, 2, 3, 4})
	if same.Value != 1 || !math.IsNaN(same.Lower) {
		t.Errorf("identical: got %+v, want 1 and NaN interval", same)
	}
	// Perfectly correlated but shifted by 1: r = 1, rho_c < 1.
	sh := LinCCC([]float64{1, 2, 3, 4}, []float64{2, 3, 4, 5})
	near(t, "shifted Pearson", sh.Pearson, 1, 1e-12)
	// s_x^2 = s_y^2 = s_xy = 1.25, shift 1: 2.5/(2.5+1).
	near(t, "shifted rho_c", sh.Value, 2.5/3.5, 1e-12)
	if c := LinCCC([]float64{1}, []float64{2}); !math.IsNaN(c.Value) {
		t.Errorf("one pair: rho_c = %v, want NaN", c.Value)
	}
}

func TestCohenKappa(t *testing.T) {
	for _, tc := range []struct {
		name   string
		table  *mat.Dense
		want   float64
		tol    float64
		source string
	}{
		// Rows: rater A yes/no; columns: rater B yes/no.
		{"wikipedia 20 5 10 15", mat.NewDense(2, 2, []float64{20, 5, 10, 15}), 0.4, 1e-12,
			"Wikipedia 'Cohen's kappa', worked example (p_o 0.7, p_e 0.5), from memory; R psych::cohen.kappa gives 0.4"},
		{"wikipedia 45 15 25 15", mat.NewDense(2, 2, []float64{45, 15, 25, 15}), 0.130434782608696, 1e-12,
			"Wikipedia 'Cohen's kappa', same agreement different marginals, 0.1304 from memory; value R 4.2.2 psych::cohen.kappa"},
		{"wikipedia 25 35 5 35", mat.NewDense(2, 2, []float64{25, 35, 5, 35}), 0.259259259259259, 1e-12,
			"Wikipedia 'Cohen's kappa', 0.2593 from memory; value R 4.2.2 psych::cohen.kappa"},
		{"3 x 3 invented", mat.NewDense(3, 3, []float64{10, 2, 1, 3, 12, 4, 0, 2, 9}), 0.577741407528641, 1e-12,
			"R 4.2.2 psych::cohen.kappa"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := CohenKappa(tc.table)
			near(t, "kappa ("+tc.source+")", got.Value, tc.want, tc.tol)
		})
	}
	k := CohenKappa(mat.NewDense(2, 2, []float64{20, 5, 10, 15}))
	near(t, "p_o of the Wikipedia example", k.Observed, 0.7, 1e-12)
	near(t, "p_e of the Wikipedia example", k.Chance, 0.5, 1e-12)
	if k := CohenKappa(mat.NewDense(2, 2, []float64{0, 0, 0, 7})); !math.IsNaN(k.Value) || k.Observed != 1 {
		t.Errorf("one category only: got %+v, want kappa NaN, p_o 1", k)
	}
}

func TestQuantile(t *testing.T) {
	x := []float64{1, 3, 2, 10, 7, 4.5}
	// R 4.2.2: quantile(c(1,3,2,10,7,4.5), p, type = 7).
	for _, tc := range []struct{ p, want float64 }{
		{0, 1}, {0.1, 1.5}, {0.25, 2.25}, {0.5, 3.75}, {0.9, 8.5}, {0.95, 9.25}, {1, 10},
	} {
		near(t, "Quantile", Quantile(tc.p, x), tc.want, 1e-12)
	}
	if x[0] != 1 || x[3] != 10 {
		t.Errorf("Quantile modified its input: %v", x)
	}
	if !math.IsNaN(Quantile(0.5, nil)) {
		t.Error("Quantile of nothing should be NaN")
	}
}

func TestEventScores(t *testing.T) {
	for _, tc := range []struct {
		name      string
		m, na, nb int
		p, r, f1  float64
	}{
		// Definitions: precision m/nB, recall m/nA, F1 their harmonic mean.
		{"8 of 10 vs 9", 8, 10, 9, 8.0 / 9, 0.8, 2 * (8.0 / 9) * 0.8 / (8.0/9 + 0.8)},
		{"perfect", 5, 5, 5, 1, 1, 1},
		{"none matched", 0, 3, 4, 0, 0, 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p, r, f1 := EventScores(tc.m, tc.na, tc.nb)
			near(t, "precision", p, tc.p, 1e-12)
			near(t, "recall", r, tc.r, 1e-12)
			near(t, "F1", f1, tc.f1, 1e-12)
		})
	}
	if p, _, _ := EventScores(0, 3, 0); !math.IsNaN(p) {
		t.Errorf("precision with empty B = %v, want NaN", p)
	}
}
