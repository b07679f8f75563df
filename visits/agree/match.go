package agree

import (
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"

	"flitlog/track/link"
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
		// Non-candidate pairs are forbidden (+Inf); link.Assign finds the
		// most pairs and, among those, the least total boundary error.
		cost := mat.NewDense(len(g.as), len(g.bs), nil)
		for x := range g.as {
			for y := range g.bs {
				cost.Set(x, y, math.Inf(1))
			}
		}
		for _, e := range g.es {
			cost.Set(ra[e.i], cb[e.j], boundaryErrS(a[e.i], b[e.j]))
		}
		rowToCol, _ := link.Assign(cost)
		for x, y := range rowToCol {
			if y >= 0 {
				pairs = append(pairs, Pair{A: g.as[x], B: g.bs[y]})
			}
		}
	}
	sort.Slice(pairs, func(x, y int) bool { return pairs[x].A < pairs[y].A })
	return pairs
}
