package link

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

var inf = math.Inf(1)

// bruteAssign enumerates every matching (each row takes a free allowed
// column or none) and returns the largest size and, for that size, the
// least total cost.
func bruteAssign(c [][]float64) (size int, cost float64) {
	r := len(c)
	m := 0
	if r > 0 {
		m = len(c[0])
	}
	used := make([]bool, m)
	bestSize, bestCost := -1, inf
	var rec func(i, n int, sum float64)
	rec = func(i, n int, sum float64) {
		if i == r {
			if n > bestSize || (n == bestSize && sum < bestCost) {
				bestSize, bestCost = n, sum
			}
			return
		}
		rec(i+1, n, sum) // row i unmatched
		for j := 0; j < m; j++ {
			if used[j] || math.IsInf(c[i][j], 1) {
				continue
			}
			used[j] = true
			rec(i+1, n+1, sum+c[i][j])
			used[j] = false
		}
	}
	rec(0, 0, 0)
	if bestSize == 0 {
		bestCost = 0
	}
	return bestSize, bestCost
}

func dense(c [][]float64) *mat.Dense {
	m := mat.NewDense(len(c), len(c[0]), nil)
	for i := range c {
		m.SetRow(i, c[i])
	}
	return m
}

// checkAssignment verifies that rowToCol is a matching of allowed pairs
// and returns its size and total cost.
func checkAssignment(t *testing.T, c [][]float64, rowToCol []int, total float64) (int, float64) {
	t.Helper()
	seen := map[int]bool{}
	n, sum := 0, 0.0
	for i, j := range rowToCol {
		if j < 0 {
			continue
		}
		if seen[j] {
			t.Fatalf("column %d assigned twice: %v", j, rowToCol)
		}
		seen[j] = true
		if math.IsInf(c[i][j], 1) {
			t.Fatalf("forbidden pair (%d, %d) assigned", i, j)
		}
		n++
		sum += c[i][j]
	}
	if math.Abs(sum-total) > 1e-9*(1+math.Abs(sum)) {
		t.Fatalf("reported total %v, pairs sum to %v", total, sum)
	}
	return n, sum
}

// TestAssignBruteForce: the assignment is optimal (maximum size, then
// minimum cost) against enumeration of all matchings on seeded random
// matrices of many shapes, with and without forbidden pairs.
func TestAssignBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	trials := 0
	for r := 1; r <= 6; r++ {
		for c := 1; c <= 6; c++ {
			for _, pInf := range []float64{0, 0.2, 0.5, 0.8} {
				for rep := 0; rep < 12; rep++ {
					m := make([][]float64, r)
					for i := range m {
						m[i] = make([]float64, c)
						for j := range m[i] {
							switch {
							case rng.Float64() < pInf:
								m[i][j] = inf
							case rep%3 == 0:
								m[i][j] = float64(rng.IntN(5)) // many ties
							default:
								m[i][j] = rng.NormFloat64() * 10 // negative costs too
							}
						}
					}
					rowToCol, total := Assign(dense(m))
					gotN, gotC := checkAssignment(t, m, rowToCol, total)
					wantN, wantC := bruteAssign(m)
					if gotN != wantN || math.Abs(gotC-wantC) > 1e-9*(1+math.Abs(wantC)) {
						t.Fatalf("%dx%d pInf=%v: got size %d cost %v, brute force %d %v\n%v",
							r, c, pInf, gotN, gotC, wantN, wantC, m)
					}
					trials++
				}
			}
		}
	}
	if trials != 6*6*4*12 {
		t.Fatalf("ran %d trials", trials)
	}
}

// TestAssignWorkedExamples checks small problems with known optima.
func TestAssignWorkedExamples(t *testing.T) {
	cases := []struct {
		name      string
		cost      [][]float64
		wantTotal float64
		wantRow   []int // nil: only the total is checked
	}{
		{
			// Taha, Operations Research: An Introduction, the assignment
			// model example of three children and three chores (Mr. Klyne's
			// children), optimal cost $27: from memory, and confirmed by
			// hand enumeration of the 6 permutations (38, 37, 27, 30, 30, 34).
			name:      "Taha chores",
			cost:      [][]float64{{15, 10, 9}, {9, 15, 10}, {10, 12, 8}},
			wantTotal: 27,
			wantRow:   []int{1, 0, 2},
		},
		{
			// Hand-worked: both rows can only take column 0; the cheaper
			// row must get it. (Assigning rows in order and skipping rows
			// without an augmenting path would wrongly give 10.)
			name:      "two rows one column",
			cost:      [][]float64{{10}, {1}},
			wantTotal: 1,
			wantRow:   []int{-1, 0},
		},
		{
			// Hand-worked: row 1 has no allowed pair; the maximum matching
			// has 2 pairs, (0,0) and (2,1), cost 1 + 3 = 4, although
			// (2,0) alone would cost only 2.
			name:      "forbidden row",
			cost:      [][]float64{{1, inf}, {inf, inf}, {2, 3}},
			wantTotal: 4,
			wantRow:   []int{0, -1, 1},
		},
		{
			// Hand-worked 2x4: best columns are 3 (cost 0) and 1 (cost 1).
			name:      "wide",
			cost:      [][]float64{{5, 1, 7, 9}, {4, 3, 6, 0}},
			wantTotal: 1,
			wantRow:   []int{1, 3},
		},
		{
			name:      "all forbidden",
			cost:      [][]float64{{inf, inf}, {inf, inf}},
			wantTotal: 0,
			wantRow:   []int{-1, -1},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rowToCol, total := Assign(dense(tc.cost))
			checkAssignment(t, tc.cost, rowToCol, total)
			if math.Abs(total-tc.wantTotal) > 1e-12 {
				t.Errorf("total = %v, want %v", total, tc.wantTotal)
			}
			if tc.wantRow != nil {
				for i := range tc.wantRow {
					if rowToCol[i] != tc.wantRow[i] {
						t.Errorf("rowToCol = %v, want %v", rowToCol, tc.wantRow)
						break
					}
				}
			}
		})
	}
}

// TestAssignLarge: O(n^3) in practice - a 300x300 problem solves fast and
// its total is never worse than the identity or a greedy assignment.
func TestAssignLarge(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	n := 300
	c := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			c.Set(i, j, rng.Float64())
		}
	}
	rowToCol, total := Assign(c)
	ident := 0.0
	for i := 0; i < n; i++ {
		ident += c.At(i, i)
	}
	greedy, used := 0.0, make([]bool, n)
	for i := 0; i < n; i++ {
		best := -1
		for j := 0; j < n; j++ {
			if !used[j] && (best < 0 || c.At(i, j) < c.At(i, best)) {
				best = j
			}
		}
		used[best] = true
		greedy += c.At(i, best)
	}
	for i, j := range rowToCol {
		if j < 0 {
			t.Fatalf("row %d unassigned", i)
		}
	}
	// For n uniform(0,1) costs the optimum tends to pi^2/6 = 1.645
	// (Aldous 2001, the zeta(2) limit of the random assignment problem; from
	// memory). The finite-n mean is a little lower.
	if total > greedy || total > ident || math.Abs(total-math.Pi*math.Pi/6) > 0.25 {
		t.Errorf("total %v, greedy %v, identity %v, limit pi^2/6 = %v", total, greedy, ident, math.Pi*math.Pi/6)
	}
}

func TestAssignPanics(t *testing.T) {
	for _, v := range []float64{math.NaN(), math.Inf(-1)} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("no panic for %v", v)
				}
			}()
			Assign(dense([][]float64{{1, v}}))
		}()
	}
}
