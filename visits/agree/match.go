package agree

import (
	"math"
	"sort"
	"strings"
)

// DefaultToleranceS is the default largest gap, in seconds, between two
// landings on the same flower that may still match.
const DefaultToleranceS = 0.5

// Pair is a matched pair of landings: indices into the A and B slices.
type Pair struct{ A, B int }

// Gap returns the time between two intervals, in seconds: negative by the
// length of their overlap when they overlap, zero when they touch,
// positive when they are apart:
//
//	gap = max(a.StartS, b.StartS) - min(a.EndS, b.EndS).
func Gap(a, b Landing) float64 {
	return math.Max(a.StartS, b.StartS) - math.Min(a.EndS, b.EndS)
}

// boundaryErrS is the matching cost of a pair: |onset_B - onset_A| +
// |offset_B - offset_A|, s.
func boundaryErrS(a, b Landing) float64 {
	return math.Abs(b.StartS-a.StartS) + math.Abs(b.EndS-a.EndS)
}

func flowerKey(id string) string { return strings.ToUpper(strings.TrimSpace(id)) }

// MatchLandings matches landings of a and b one to one. Landings a[i] and
// b[j] may match when they are on the same flower (ids compared ignoring
// case and surrounding space) and Gap(a[i], b[j]) <= toleranceS; a
// negative toleranceS is treated as zero (they must overlap or touch).
// Among all matchings it returns one with the most pairs and, among
// those, the least total boundary error sum |onset_B - onset_A| +
// |offset_B - offset_A|. That is found exactly: the candidate pairs split
// into groups of landings connected by candidate pairs, and each group is
// solved as an assignment problem by the Hungarian method (Kuhn 1955,
// Munkres 1957) with cost M for a non-candidate pair, M larger than the
// group's total candidate cost, so that a matching with fewer pairs
// always costs more. Pairs are returned sorted by A index.
func MatchLandings(a, b []Landing, toleranceS float64) []Pair {
	if toleranceS < 0 || math.IsNaN(toleranceS) {
		toleranceS = 0
	}
	// Candidate pairs, found per flower with both sides sorted by start.
	byFlower := map[string][2][]int{}
	for i := range a {
		k := flowerKey(a[i].FlowerID)
		v := byFlower[k]
		v[0] = append(v[0], i)
		byFlower[k] = v
	}
	for j := range b {
		k := flowerKey(b[j].FlowerID)
		v := byFlower[k]
		v[1] = append(v[1], j)
		byFlower[k] = v
	}
	type edge struct{ i, j int }
	var edges []edge
	keys := make([]string, 0, len(byFlower))
	for k := range byFlower {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		ai, bj := byFlower[k][0], byFlower[k][1]
		sort.Slice(bj, func(x, y int) bool { return b[bj[x]].StartS < b[bj[y]].StartS })
		for _, i := range ai {
			for _, j := range bj {
				if b[j].StartS > a[i].EndS+toleranceS {
					break // later b start even later
				}
				if Gap(a[i], b[j]) <= toleranceS {
					edges = append(edges, edge{i, j})
				}
			}
		}
	}
	// Groups: connected components of the bipartite candidate graph.
	// Nodes 0..len(a)-1 are A, len(a).. are B.
	parent := make([]int, len(a)+len(b))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(x int) int {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	for _, e := range edges {
		ra, rb := find(e.i), find(len(a)+e.j)
		if ra != rb {
			parent[ra] = rb
		}
	}
	type group struct {
		as, bs []int
		es     []edge
	}
	groups := map[int]*group{}
	var order []int
	for _, e := range edges {
		r := find(e.i)
		g, ok := groups[r]
		if !ok {
			g = &group{}
			groups[r] = g
			order = append(order, r)
		}
		g.es = append(g.es, e)
	}
	for i := range a {
		if g, ok := groups[find(i)]; ok {
			g.as = append(g.as, i)
		}
	}
	for j := range b {
		if g, ok := groups[find(len(a)+j)]; ok {
			g.bs = append(g.bs, j)
		}
	}
	var pairs []Pair
	for _, r := range order {
		g := groups[r]
		ra := make(map[int]int, len(g.as))
		for x, i := range g.as {
			ra[i] = x
		}
		cb := make(map[int]int, len(g.bs))
		for y, j := range g.bs {
			cb[j] = y
		}
		// Rows are the smaller side, as hungarian wants rows <= columns.
		swap := len(g.as) > len(g.bs)
		nr, nc := len(g.as), len(g.bs)
		if swap {
			nr, nc = nc, nr
		}
		cost := make([][]float64, nr)
		ok := make([][]bool, nr)
		for x := range cost {
			cost[x] = make([]float64, nc)
			ok[x] = make([]bool, nc)
		}
		var total float64
		for _, e := range g.es {
			c := boundaryErrS(a[e.i], b[e.j])
			total += c
			x, y := ra[e.i], cb[e.j]
			if swap {
				x, y = y, x
			}
			cost[x][y] = c
			ok[x][y] = true
		}
		big := 1 + 2*total
		for x := range cost {
			for y := range cost[x] {
				if !ok[x][y] {
					cost[x][y] = big
				}
			}
		}
		for x, y := range hungarian(cost) {
			if !ok[x][y] {
				continue
			}
			i, j := x, y
			if swap {
				i, j = y, x
			}
			pairs = append(pairs, Pair{A: g.as[i], B: g.bs[j]})
		}
	}
	sort.Slice(pairs, func(x, y int) bool { return pairs[x].A < pairs[y].A })
	return pairs
}

// hungarian solves the rectangular assignment problem: it returns, for
// each row of an n x m cost matrix with n <= m, the column assigned to it
// such that the columns differ and the total cost is least. It is the
// O(n^2 m) shortest augmenting path form of the Hungarian method with row
// and column potentials u, v, where cost[i][j] - u[i] - v[j] >= 0 holds
// throughout and is zero on the assignment (Kuhn 1955; Munkres 1957).
func hungarian(cost [][]float64) []int {
	n := len(cost)
	if n == 0 {
		return nil
	}
	m := len(cost[0])
	if n > m {
		panic("agree: hungarian wants rows <= columns")
	}
	inf := math.Inf(1)
	// 1-based arrays; column 0 is a virtual column holding the row being
	// inserted.
	u := make([]float64, n+1)
	v := make([]float64, m+1)
	p := make([]int, m+1) // p[j]: row assigned to column j (0 = none)
	way := make([]int, m+1)
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
			i0, delta, j1 := p[j0], inf, 0
			for j := 1; j <= m; j++ {
				if used[j] {
					continue
				}
				// Reduced cost of row i0, column j.
				cur := cost[i0-1][j-1] - u[i0] - v[j]
				if cur < minv[j] {
					minv[j], way[j] = cur, j0
				}
				if minv[j] < delta {
					delta, j1 = minv[j], j
				}
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
		// Augment along the alternating path.
		for j0 != 0 {
			j1 := way[j0]
			p[j0] = p[j1]
			j0 = j1
		}
	}
	ans := make([]int, n)
	for j := 1; j <= m; j++ {
		if p[j] != 0 {
			ans[p[j]-1] = j - 1
		}
	}
	return ans
}
