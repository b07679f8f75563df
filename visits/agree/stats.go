package agree

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Level is the confidence level of every interval in this package.
const Level = 0.95

// LoAZ is the multiplier of the SD of the differences for 95 % limits of
// agreement under normality, the 0.975 quantile of the standard normal
// distribution rounded as in common practice. Bland & Altman (1986) used 2.
const LoAZ = 1.96

// Quantile returns the p-quantile of x by linear interpolation between
// order statistics, definition 7 of Hyndman & Fan (1996) (R's default):
// with the sorted values x_(1) <= ... <= x_(n) and h = (n-1) p + 1,
//
//	Q(p) = x_(floor h) + (h - floor h) (x_(floor h + 1) - x_(floor h)).
//
// x is not modified. It returns NaN for an empty x and panics unless
// 0 <= p <= 1.
func Quantile(p float64, x []float64) float64 {
	if !(p >= 0 && p <= 1) {
		panic("agree: quantile probability outside [0, 1]")
	}
	if len(x) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	h := float64(len(s)-1) * p
	lo := math.Floor(h)
	i := int(lo)
	if i+1 >= len(s) {
		return s[len(s)-1]
	}
	return s[i] + (h-lo)*(s[i+1]-s[i])
}

// EventScores returns precision = matched/nB, recall = matched/nA and
// F1 = 2 matched/(nA + nB), the harmonic mean of the two, for a one-to-one
// matching of nA reference events (table A) with nB events (table B).
// A ratio with a zero denominator is NaN. It panics unless
// 0 <= matched <= min(nA, nB).
func EventScores(matched, nA, nB int) (precision, recall, f1 float64) {
	if matched < 0 || matched > nA || matched > nB {
		panic("agree: matched count outside [0, min(nA, nB)]")
	}
	div := func(a, b int) float64 {
		if b == 0 {
			return math.NaN()
		}
		return float64(a) / float64(b)
	}
	return div(matched, nB), div(matched, nA), div(2*matched, nA+nB)
}

// BlandAltmanResult holds the Bland-Altman analysis of paired measurements,
// in the unit of the measurements. Differences are d_i = b_i - a_i.
type BlandAltmanResult struct {
	N    int
	Bias float64 // mean difference dbar
	SD   float64 // standard deviation s of the differences (n-1 divisor)
	Z    float64 // multiplier of SD for the limits
	// Limits of agreement Bias -/+ Z SD.
	Lower, Upper float64
	// 95 % confidence intervals: of the bias, dbar -/+ t s / sqrt(n); of
	// each limit, limit -/+ t sqrt(3 s^2 / n); t is the 0.975 quantile of
	// Student's t with n-1 degrees of freedom (Bland & Altman 1986, on
	// the precision of the estimated limits). NaN when N < 2.
	BiasLow, BiasHigh   float64
	LowerLow, LowerHigh float64
	UpperLow, UpperHigh float64
}

// BlandAltman returns bias and limits of agreement of two methods that
// measured the same subjects, a[i] and b[i] being subject i (Bland &
// Altman 1986): with d_i = b_i - a_i,
//
//	bias = dbar = sum_i d_i / n,  s^2 = sum_i (d_i - dbar)^2 / (n - 1),
//	limits = dbar -/+ z s.
//
// z = LoAZ (1.96) gives 95 % limits when the differences are normal;
// Bland & Altman (1986) used z = 2. Confidence intervals are described at
// BlandAltmanResult. SD and intervals are NaN when n < 2; everything is NaN
// when n = 0. It panics if len(a) != len(b) or z <= 0.
func BlandAltman(a, b []float64, z float64) BlandAltmanResult {
	if len(a) != len(b) {
		panic("agree: slice lengths do not match")
	}
	if !(z > 0) {
		panic("agree: limits multiplier z must be positive")
	}
	nan := math.NaN()
	r := BlandAltmanResult{N: len(a), Z: z, Bias: nan, SD: nan, Lower: nan, Upper: nan,
		BiasLow: nan, BiasHigh: nan, LowerLow: nan, LowerHigh: nan, UpperLow: nan, UpperHigh: nan}
	n := float64(len(a))
	if len(a) == 0 {
		return r
	}
	var sum float64
	for i := range a {
		sum += b[i] - a[i]
	}
	r.Bias = sum / n
	if len(a) < 2 {
		return r
	}
	var ss float64
	for i := range a {
		d := b[i] - a[i] - r.Bias
		ss += d * d
	}
	r.SD = math.Sqrt(ss / (n - 1))
	r.Lower, r.Upper = r.Bias-z*r.SD, r.Bias+z*r.SD
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: n - 1}.Quantile(1 - (1-Level)/2)
	seBias := r.SD / math.Sqrt(n)
	seLim := math.Sqrt(3 * r.SD * r.SD / n)
	r.BiasLow, r.BiasHigh = r.Bias-t*seBias, r.Bias+t*seBias
	r.LowerLow, r.LowerHigh = r.Lower-t*seLim, r.Lower+t*seLim
	r.UpperLow, r.UpperHigh = r.Upper-t*seLim, r.Upper+t*seLim
	return r
}

// ICC is an intraclass correlation coefficient with its 95 % confidence
// interval.
type ICC struct {
	Form  string // Shrout & Fleiss (1979) name: "ICC(1,1)", "ICC(2,1)", "ICC(3,1)"
	Model string // in words
	Value float64
	// 95 % confidence interval of Shrout & Fleiss (1979) for the form;
	// NaN when not defined.
	Lower, Upper float64
}

// anova holds the mean squares of a two-way ANOVA without replication of
// an n targets x k judges table (Shrout & Fleiss 1979).
type anova struct {
	n, k               float64
	bms, wms, jms, ems float64
}

func twoWay(x mat.Matrix) anova {
	rows, cols := x.Dims()
	if rows < 2 || cols < 2 {
		panic("agree: ICC needs at least 2 targets and 2 judges")
	}
	n, k := float64(rows), float64(cols)
	var gm float64
	rowMean := make([]float64, rows)
	colMean := make([]float64, cols)
	for i := 0; i < rows; i++ {
		for j := 0; j < cols; j++ {
			v := x.At(i, j)
			gm += v
			rowMean[i] += v
			colMean[j] += v
		}
	}
	gm /= n * k
	var ssr, ssc, sst float64
	for i := range rowMean {
		rowMean[i] /= k
		ssr += (rowMean[i] - gm) * (rowMean[i] - gm)
	}
	ssr *= k
	for j := range colMean {
		colMean[j] /= n
		ssc += (colMean[j] - gm) * (colMean[j] - gm)
	}
	ssc *= n
	for i := 0; i < rows; i++ {
		for j := 0; j < cols; j++ {
			d := x.At(i, j) - gm
			sst += d * d
		}
	}
	sse := sst - ssr - ssc
	ssw := sst - ssr
	return anova{n: n, k: k,
		bms: ssr / (n - 1),
		wms: ssw / (n * (k - 1)),
		jms: ssc / (k - 1),
		ems: sse / ((n - 1) * (k - 1)),
	}
}

func fq(p, d1, d2 float64) float64 { return distuv.F{D1: d1, D2: d2}.Quantile(p) }

// ICC1 returns ICC(1,1) of Shrout & Fleiss (1979): one-way random effects,
// single rating, for an n targets (rows) x k judges (columns) table, each
// target rated by a different set of judges:
//
//	ICC(1,1) = (BMS - WMS) / (BMS + (k-1) WMS)
//
// with BMS the between-targets and WMS the within-target mean square.
// Confidence interval (Shrout & Fleiss 1979): F0 = BMS/WMS, FL = F0/F(1-a/2;
// n-1, n(k-1)), FU = F0 F(1-a/2; n(k-1), n-1), bounds (F-1)/(F+k-1).
// It panics unless n >= 2 and k >= 2.
func ICC1(x mat.Matrix) ICC {
	a := twoWay(x)
	n, k := a.n, a.k
	r := ICC{Form: "ICC(1,1)", Model: "one-way random effects, single rating"}
	r.Value = (a.bms - a.wms) / (a.bms + (k-1)*a.wms)
	p := 1 - (1-Level)/2
	f0 := a.bms / a.wms
	fl := f0 / fq(p, n-1, n*(k-1))
	fu := f0 * fq(p, n*(k-1), n-1)
	r.Lower, r.Upper = (fl-1)/(fl+k-1), (fu-1)/(fu+k-1)
	return r
}

// ICC2 returns ICC(2,1) of Shrout & Fleiss (1979): two-way random effects,
// absolute agreement, single rating; judges are a random sample of
// judges, and their systematic differences count as disagreement:
//
//	ICC(2,1) = (BMS - EMS) / (BMS + (k-1) EMS + k (JMS - EMS)/n)
//
// with BMS, JMS and EMS the mean squares of targets, judges and residual.
// Confidence interval: the approximation of Shrout & Fleiss (1979) with
// Satterthwaite degrees of freedom v:
//
//	Fj = JMS/EMS, I = ICC(2,1)
//	v  = (k-1)(n-1) [k I Fj + n (1 + (k-1) I) - k I]^2 /
//	     ((n-1) k^2 I^2 Fj^2 + [n (1 + (k-1) I) - k I]^2)
//	F* = F(1-a/2; n-1, v), F** = F(1-a/2; v, n-1)
//	lower = n (BMS - F* EMS) / (F* [k JMS + (kn - k - n) EMS] + n BMS)
//	upper = n (F** BMS - EMS) / (k JMS + (kn - k - n) EMS + n F** BMS)
//
// It panics unless n >= 2 and k >= 2.
func ICC2(x mat.Matrix) ICC {
	a := twoWay(x)
	n, k := a.n, a.k
	r := ICC{Form: "ICC(2,1)", Model: "two-way random effects, absolute agreement, single rating"}
	i := (a.bms - a.ems) / (a.bms + (k-1)*a.ems + k*(a.jms-a.ems)/n)
	r.Value = i
	p := 1 - (1-Level)/2
	fj := a.jms / a.ems
	c := n*(1+(k-1)*i) - k*i
	v := (k - 1) * (n - 1) * (k*i*fj + c) * (k*i*fj + c) / ((n-1)*k*k*i*i*fj*fj + c*c)
	fs := fq(p, n-1, v)
	fss := fq(p, v, n-1)
	r.Lower = n * (a.bms - fs*a.ems) / (fs*(k*a.jms+(k*n-k-n)*a.ems) + n*a.bms)
	r.Upper = n * (fss*a.bms - a.ems) / (k*a.jms + (k*n-k-n)*a.ems + n*fss*a.bms)
	return r
}

// ICC3 returns ICC(3,1) of Shrout & Fleiss (1979): two-way mixed effects,
// consistency, single rating; the judges are the only judges of interest
// and their systematic differences do not count:
//
//	ICC(3,1) = (BMS - EMS) / (BMS + (k-1) EMS)
//
// Confidence interval (Shrout & Fleiss 1979): F0 = BMS/EMS, FL = F0/F(1-a/2;
// n-1, (n-1)(k-1)), FU = F0 F(1-a/2; (n-1)(k-1), n-1), bounds
// (F-1)/(F+k-1). It panics unless n >= 2 and k >= 2.
func ICC3(x mat.Matrix) ICC {
	a := twoWay(x)
	n, k := a.n, a.k
	r := ICC{Form: "ICC(3,1)", Model: "two-way mixed effects, consistency, single rating"}
	r.Value = (a.bms - a.ems) / (a.bms + (k-1)*a.ems)
	p := 1 - (1-Level)/2
	f0 := a.bms / a.ems
	fl := f0 / fq(p, n-1, (n-1)*(k-1))
	fu := f0 * fq(p, (n-1)*(k-1), n-1)
	r.Lower, r.Upper = (fl-1)/(fl+k-1), (fu-1)/(fu+k-1)
	return r
}

// CCC is Lin's concordance correlation coefficient with its 95 %
// confidence interval.
type CCC struct {
	N     int
	Value float64 // rho_c
	// 95 % confidence interval from Fisher's z; NaN when N < 3.
	Lower, Upper float64
	Pearson      float64 // r, the precision part
	Accuracy     float64 // C_b = rho_c / r, the accuracy part
}

// LinCCC returns Lin's concordance correlation coefficient of paired
// measurements x[i], y[i] (Lin 1989, with moments of divisor n):
//
//	rho_c = 2 s_xy / (s_x^2 + s_y^2 + (xbar - ybar)^2)
//
// It is 1 only when all points lie on the line y = x. The 95 % interval
// transforms with z = atanh(rho_c) and the asymptotic variance of Lin
// (1989) in the form printed in Lin (2000):
//
//	var(z) = 1/(n-2) [ (1-r^2) rho_c^2 / ((1-rho_c^2) r^2)
//	         + 2 rho_c^3 (1-rho_c) u^2 / (r (1-rho_c^2)^2)
//	         - rho_c^4 u^4 / (2 r^2 (1-rho_c^2)^2) ],
//	u = (ybar - xbar) / sqrt(s_x s_y),
//
// then tanh(z -/+ 1.96 sqrt(var(z))). The value is NaN when n < 2 or both
// series are constant; the interval is NaN when n < 3 or |rho_c| = 1.
// It panics if len(x) != len(y).
func LinCCC(x, y []float64) CCC {
	if len(x) != len(y) {
		panic("agree: slice lengths do not match")
	}
	nan := math.NaN()
	r := CCC{N: len(x), Value: nan, Lower: nan, Upper: nan, Pearson: nan, Accuracy: nan}
	if len(x) < 2 {
		return r
	}
	n := float64(len(x))
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= n
	my /= n
	var sxx, syy, sxy float64
	for i := range x {
		dx, dy := x[i]-mx, y[i]-my
		sxx += dx * dx
		syy += dy * dy
		sxy += dx * dy
	}
	sxx /= n
	syy /= n
	sxy /= n
	den := sxx + syy + (mx-my)*(mx-my)
	if den == 0 {
		return r
	}
	rc := 2 * sxy / den
	r.Value = rc
	if sxx > 0 && syy > 0 {
		r.Pearson = sxy / math.Sqrt(sxx*syy)
		r.Accuracy = rc / r.Pearson
	}
	if len(x) < 3 || math.Abs(rc) >= 1 || math.IsNaN(r.Pearson) || r.Pearson == 0 {
		return r
	}
	rr := r.Pearson
	u := (my - mx) / math.Sqrt(math.Sqrt(sxx*syy))
	q := 1 - rc*rc
	vz := ((1-rr*rr)*rc*rc/(q*rr*rr) +
		2*rc*rc*rc*(1-rc)*u*u/(rr*q*q) -
		rc*rc*rc*rc*u*u*u*u/(2*rr*rr*q*q)) / (n - 2)
	if !(vz >= 0) {
		return r
	}
	z := math.Atanh(rc)
	zq := distuv.UnitNormal.Quantile(1 - (1-Level)/2)
	r.Lower = math.Tanh(z - zq*math.Sqrt(vz))
	r.Upper = math.Tanh(z + zq*math.Sqrt(vz))
	return r
}

// Kappa is Cohen's kappa of a contingency table of two raters.
type Kappa struct {
	N        float64 // total count
	Observed float64 // p_o, proportion of agreement
	Chance   float64 // p_e, agreement expected by chance
	Value    float64 // kappa
}

// CohenKappa returns Cohen's kappa of a square table t whose cell (i, j)
// counts the items rater A put in category i and rater B in category j
// (Cohen 1960):
//
//	p_o = sum_i t_ii / N,  p_e = sum_i (row_i / N)(col_i / N),
//	kappa = (p_o - p_e) / (1 - p_e).
//
// Value is NaN when N = 0 or p_e = 1 (both raters used one category
// only). It panics if t is not square or has a negative cell.
func CohenKappa(t mat.Matrix) Kappa {
	r, c := t.Dims()
	if r != c {
		panic("agree: kappa table is not square")
	}
	var n, diag float64
	row := make([]float64, r)
	col := make([]float64, c)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			v := t.At(i, j)
			if v < 0 {
				panic("agree: negative count in kappa table")
			}
			n += v
			row[i] += v
			col[j] += v
			if i == j {
				diag += v
			}
		}
	}
	k := Kappa{N: n, Observed: math.NaN(), Chance: math.NaN(), Value: math.NaN()}
	if n == 0 {
		return k
	}
	k.Observed = diag / n
	var pe float64
	for i := range row {
		pe += row[i] / n * col[i] / n
	}
	k.Chance = pe
	if pe < 1 {
		k.Value = (k.Observed - pe) / (1 - pe)
	}
	return k
}
