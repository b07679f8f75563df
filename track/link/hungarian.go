package link

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Assign solves the linear assignment problem for the r x c cost matrix
// cost, which may be rectangular. Entries equal to +Inf are forbidden
// pairs. Among all matchings that use only allowed pairs, Assign returns
// one with the largest number of pairs and, among those, the least total
// cost:
//
//	minimise  sum_{(i,j) in M} cost[i][j]  over matchings M of maximum size.
//
// Without forbidden pairs every row is matched when r <= c and every column
// when r >= c, as in the classical problem. rowToCol[i] is the column
// assigned to row i, or -1; total is the summed cost of the assigned pairs.
//
// The method is the Hungarian method of Kuhn (1955) and Munkres (1957) in
// its shortest-augmenting-path form with row and column potentials, which
// takes O(n^2 m) time for n = min(r, c), m = max(r, c) (Jonker & Volgenant
// 1987; Burkard, Dell'Amico & Martello 2009, Sec. 4.4). Forbidden pairs are
// replaced by a finite cost B larger than any difference of total finite
// costs, B = max + n (max - min) + 1 over the finite entries, so that an
// optimal full assignment uses as few forbidden pairs as possible and is
// cheapest among those; the forbidden pairs are then removed. The finite
// costs should therefore span a range that B does not swamp in float64
// (about 1e12 times their smallest relevant difference).
//
// Assign panics with a "link: " message if an entry is NaN or -Inf.
func Assign(cost mat.Matrix) (rowToCol []int, total float64) {
	r, c := cost.Dims()
	rowToCol = make([]int, r)
	for i := range rowToCol {
		rowToCol[i] = -1
	}
	if r == 0 || c == 0 {
		return rowToCol, 0
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			v := cost.At(i, j)
			switch {
			case math.IsNaN(v):
				panic("link: NaN in cost matrix")
			case math.IsInf(v, -1):
				panic("link: -Inf in cost matrix")
			case math.IsInf(v, 1):
				continue
			}
			lo = math.Min(lo, v)
			hi = math.Max(hi, v)
		}
	}
	if math.IsInf(lo, 1) {
		return rowToCol, 0 // every pair forbidden
	}
	transposed := r > c
	n, m := r, c
	if transposed {
		n, m = c, r
	}
	big := hi + float64(n)*(hi-lo) + 1
	a := func(i, j int) float64 { // 0-based, n x m view with n <= m
		var v float64
		if transposed {
			v = cost.At(j, i)
		} else {
			v = cost.At(i, j)
		}
		if math.IsInf(v, 1) {
			return big
		}
		return v
	}
	colToRow := hungarian(n, m, a)
	for j, i := range colToRow {
		if i < 0 {
			continue
		}
		row, col := i, j
		if transposed {
			row, col = j, i
		}
		v := cost.At(row, col)
		if math.IsInf(v, 1) {
			continue
		}
		rowToCol[row] = col
		total += v
	}
	return rowToCol, total
}

// hungarian assigns each of n rows to a distinct one of m >= n columns
// minimising the sum of a(i, j), all finite. It returns colToRow (-1 for an
// unused column). Potentials u (rows) and v (columns) keep the reduced
// costs a(i,j) - u[i] - v[j] >= 0, with equality on matched pairs; each row
// is added by a Dijkstra-like search for the shortest augmenting path in
// reduced costs. Indices are 1-based inside, with column 0 as the root of
// the search.
func hungarian(n, m int, a func(i, j int) float64) []int {
	inf := math.Inf(1)
	u := make([]float64, n+1)
	v := make([]float64, m+1)
	p := make([]int, m+1)   // p[j]: row matched to column j (0 = none)
	way := make([]int, m+1) // way[j]: previous column on the shortest path to j
	minv := make([]float64, m+1)
	used := make([]bool, m+1)
	for i := 1; i <= n; i++ {
		p[0] = i
		j0 := 0
		for j := range minv {
			minv[j] = inf
			used[j] = false
		}
		for {
			used[j0] = true
			i0 := p[j0]
			delta := inf
			j1 := -1
			for j := 1; j <= m; j++ {
				if used[j] {
					continue
				}
				cur := a(i0-1, j-1) - u[i0] - v[j]
				if cur < minv[j] {
					minv[j] = cur
					way[j] = j0
				}
				if minv[j] < delta {
					delta = minv[j]
					j1 = j
				}
			}
			if j1 < 0 {
				panic("link: assignment search found no column") // cannot happen with n <= m
			}
			for j := 0; j <= m; j++ {
				if used[j] {
					u[p[j]] += delta
					v[j] -= delta
				} else {
					minv[j] -= delta
				}
			}
			j0 = j1
			if p[j0] == 0 {
				break
			}
		}
		// Augment along the path back to the root.
		for j0 != 0 {
			j1 := way[j0]
			p[j0] = p[j1]
			j0 = j1
		}
	}
	colToRow := make([]int, m)
	for j := 1; j <= m; j++ {
		colToRow[j-1] = p[j] - 1
	}
	return colToRow
}
