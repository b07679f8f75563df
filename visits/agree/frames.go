package agree

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// DefaultGridS is the default step of the frame-wise time grid, s.
const DefaultGridS = 0.1

// gridEps absorbs rounding when a time falls on a grid time: k*step
// computed in floating point may differ from a time written in a table
// by a few ulp.
const gridEps = 1e-9

// FrameAgreement is the frame-wise agreement of the landed / not landed
// state of each flower, pooled over flowers and grid times.
type FrameAgreement struct {
	GridS     float64 // grid step, s
	FromS     float64 // first grid time, s
	ToS       float64 // grid times are < ToS, s
	Times     int     // grid times
	Flowers   int     // flowers in either table
	Both      int     // cells landed in A and in B
	OnlyA     int     // landed in A only
	OnlyB     int     // landed in B only
	Neither   int     // landed in neither
	Agreement float64 // (Both + Neither) / cells
	Kappa     Kappa   // Cohen (1960) of the 2 x 2 table
}

// firstTick returns the first grid index k with k*step >= t (within
// rounding).
func firstTick(t, step float64) int {
	return int(math.Ceil(t/step - gridEps))
}

// FrameStates returns the landed / not landed state of each grid cell for
// each flower: out[flower][k] is true when a landing on that flower has
// StartS <= (k0+k)*stepS < EndS, with k0 = ceil(fromS/stepS) (within
// rounding) and n cells. Flower ids are keyed ignoring case and
// surrounding space. It panics unless stepS > 0.
func FrameStates(ls []Landing, fromS, stepS float64, n int) map[string][]bool {
	if !(stepS > 0) {
		panic("agree: grid step must be positive")
	}
	k0 := firstTick(fromS, stepS)
	out := map[string][]bool{}
	for _, l := range ls {
		key := flowerKey(l.FlowerID)
		s, ok := out[key]
		if !ok {
			s = make([]bool, n)
			out[key] = s
		}
		lo := firstTick(l.StartS, stepS) - k0
		hi := firstTick(l.EndS, stepS) - k0 // exclusive
		if lo < 0 {
			lo = 0
		}
		if hi > n {
			hi = n
		}
		for k := lo; k < hi; k++ {
			s[k] = true
		}
	}
	return out
}

// CompareFrames samples the landed state of every flower of a and b on the
// grid times k*stepS in [fromS, toS) and returns the pooled 2 x 2 table
// with the proportion of agreement and Cohen's kappa (Cohen 1960). It
// panics unless stepS > 0.
func CompareFrames(a, b []Landing, fromS, toS, stepS float64) FrameAgreement {
	if !(stepS > 0) {
		panic("agree: grid step must be positive")
	}
	k0 := firstTick(fromS, stepS)
	k1 := firstTick(toS, stepS)
	n := k1 - k0
	if n < 0 {
		n = 0
	}
	fa := FrameStates(a, fromS, stepS, n)
	fb := FrameStates(b, fromS, stepS, n)
	keys := map[string]bool{}
	for k := range fa {
		keys[k] = true
	}
	for k := range fb {
		keys[k] = true
	}
	flowers := make([]string, 0, len(keys))
	for k := range keys {
		flowers = append(flowers, k)
	}
	sort.Strings(flowers)
	r := FrameAgreement{GridS: stepS, FromS: float64(k0) * stepS, ToS: toS, Times: n, Flowers: len(flowers)}
	for _, f := range flowers {
		sa, sb := fa[f], fb[f]
		for k := 0; k < n; k++ {
			la := sa != nil && sa[k]
			lb := sb != nil && sb[k]
			switch {
			case la && lb:
				r.Both++
			case la:
				r.OnlyA++
			case lb:
				r.OnlyB++
			default:
				r.Neither++
			}
		}
	}
	t := mat.NewDense(2, 2, []float64{float64(r.Both), float64(r.OnlyA), float64(r.OnlyB), float64(r.Neither)})
	r.Kappa = CohenKappa(t)
	r.Agreement = r.Kappa.Observed
	return r
}
