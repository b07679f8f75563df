package agree

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

func ld(flower string, start, end float64) Landing {
	return Landing{FlowerID: flower, StartS: start, EndS: end}
}

func TestMatchLandingsConstructed(t *testing.T) {
	for _, tc := range []struct {
		name string
		a, b []Landing
		tolS float64
		want []Pair
	}{
		{"identical",
			[]Landing{ld("A1", 1, 3), ld("A2", 2, 5), ld("A1", 10, 12)},
			[]Landing{ld("A1", 1, 3), ld("A2", 2, 5), ld("A1", 10, 12)},
			0.5, []Pair{{0, 0}, {1, 1}, {2, 2}}},
		{"order of rows does not matter",
			[]Landing{ld("A1", 10, 12), ld("A1", 1, 3)},
			[]Landing{ld("A1", 1.2, 3.1), ld("A1", 9.8, 12.4)},
			0.5, []Pair{{0, 1}, {1, 0}}},
		{"apart by 0.3 s: matched within tolerance 0.5",
			[]Landing{ld("A1", 1, 2)}, []Landing{ld("A1", 2.3, 3)},
			0.5, []Pair{{0, 0}}},
		{"apart by 0.3 s: not matched when overlap is required",
			[]Landing{ld("A1", 1, 2)}, []Landing{ld("A1", 2.3, 3)},
			-1, nil},
		{"touching counts with tolerance 0",
			[]Landing{ld("A1", 1, 2)}, []Landing{ld("A1", 2, 3)},
			0, []Pair{{0, 0}}},
		{"apart by 0.6 s: not matched",
			[]Landing{ld("A1", 1, 2)}, []Landing{ld("A1", 2.6, 3)},
			0.5, nil},
		{"other flower never matches",
			[]Landing{ld("A1", 1, 2)}, []Landing{ld("B7", 1, 2)},
			0.5, nil},
		{"flower ids ignore case and space",
			[]Landing{ld("a1", 1, 2)}, []Landing{ld(" A1 ", 1, 2)},
			0.5, []Pair{{0, 0}}},
		{"one A, two B: the closer boundaries win",
			[]Landing{ld("A1", 5, 9)},
			[]Landing{ld("A1", 4, 6), ld("A1", 5.1, 8.8)},
			0.5, []Pair{{0, 1}}},
		{"most pairs beats most overlap",
			// Greedy by overlap would take A0-B0 (overlap 3 s) and leave
			// A1 without a partner; the optimum matches both.
			[]Landing{ld("F", 0, 4), ld("F", 4.3, 5)},
			[]Landing{ld("F", 1, 4.6), ld("F", 0, 0.8)},
			0.1, []Pair{{0, 1}, {1, 0}}},
		{"empty side", []Landing{ld("A1", 1, 2)}, nil, 0.5, nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := MatchLandings(tc.a, tc.b, tc.tolS)
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("MatchLandings = %v, want %v", got, tc.want)
			}
		})
	}
}

// bruteMatch returns the largest number of candidate pairs in a
// one-to-one matching and the least total boundary error among matchings
// of that size, by trying every matching.
func bruteMatch(a, b []Landing, tolS float64) (int, float64) {
	bestN, bestC := 0, 0.0
	used := make([]bool, len(b))
	var rec func(i, n int, c float64)
	rec = func(i, n int, c float64) {
		if i == len(a) {
			if n > bestN || (n == bestN && c < bestC) {
				bestN, bestC = n, c
			}
			return
		}
		rec(i+1, n, c) // a[i] unmatched
		for j := range b {
			if used[j] || flowerKey(a[i].FlowerID) != flowerKey(b[j].FlowerID) || Gap(a[i], b[j]) > tolS {
				continue
			}
			used[j] = true
			rec(i+1, n+1, c+boundaryErrS(a[i], b[j]))
			used[j] = false
		}
	}
	rec(0, 0, 0)
	return bestN, bestC
}

// TestMatchLandingsOptimal: the matching is optimal against brute force
// on random tables (seeded), crowded so that groups are large.
func TestMatchLandingsOptimal(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 1))
	flowers := []string{"A1", "A2"}
	gen := func(n int) []Landing {
		ls := make([]Landing, n)
		for i := range ls {
			s := rng.Float64() * 20
			ls[i] = ld(flowers[rng.IntN(len(flowers))], s, s+0.2+rng.Float64()*4)
		}
		return ls
	}
	for trial := 0; trial < 300; trial++ {
		a, b := gen(1+rng.IntN(7)), gen(1+rng.IntN(7))
		tol := rng.Float64()
		pairs := MatchLandings(a, b, tol)
		seenA, seenB := map[int]bool{}, map[int]bool{}
		var cost float64
		for _, p := range pairs {
			if seenA[p.A] || seenB[p.B] {
				t.Fatalf("trial %d: not one-to-one: %v", trial, pairs)
			}
			seenA[p.A], seenB[p.B] = true, true
			if flowerKey(a[p.A].FlowerID) != flowerKey(b[p.B].FlowerID) || Gap(a[p.A], b[p.B]) > tol {
				t.Fatalf("trial %d: pair %v is not a candidate", trial, p)
			}
			cost += boundaryErrS(a[p.A], b[p.B])
		}
		n, c := bruteMatch(a, b, tol)
		if len(pairs) != n || math.Abs(cost-c) > 1e-9 {
			t.Fatalf("trial %d: %d pairs, cost %.6f; brute force %d pairs, cost %.6f", trial, len(pairs), cost, n, c)
		}
	}
}

func TestGap(t *testing.T) {
	for _, tc := range []struct {
		name string
		a, b Landing
		want float64
	}{
		{"overlap 1 s", ld("F", 0, 2), ld("F", 1, 3), -1},
		{"inside", ld("F", 0, 10), ld("F", 2, 3), -1},
		{"touch", ld("F", 0, 2), ld("F", 2, 3), 0},
		{"apart 0.5 s", ld("F", 3, 4), ld("F", 0, 2.5), 0.5},
	} {
		t.Run(tc.name, func(t *testing.T) {
			near(t, "Gap", Gap(tc.a, tc.b), tc.want, 1e-12)
		})
	}
}
