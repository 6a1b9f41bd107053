package verify

import (
	"math"

	"scorewright/internal/simplex"
)

// Pruning the pair stream.
//
// For a belief q the stream wants the two reports j with the smallest
// expected effort phi(q, j) = sum_k q_k r_jk. The reports are put in a
// binary tree of boxes (split at the median of the widest coordinate), and
// every node keeps lo_k, the smallest r_jk over its reports. For q >= 0,
//
//	bound(node) = sum_k q_k lo_k  <=  phi(q, j)  for every report j in it,
//
// and this holds for the computed values too, not only the exact ones: the
// bound is evaluated in the same order as phi, every product and sum
// rounded once (the explicit float64 conversions forbid fused
// multiply-adds), and rounding to nearest is monotone, so q_k lo_k <= q_k
// r_jk and each partial sum stays below the other after rounding. A node
// whose bound is above the second best found so far (strictly) holds no
// report that could enter the best two, and is skipped whole.
//
// The reports are visited in the order of the tree, not of the grid, so
// the best two are kept by (value, grid index) — the smaller index wins a
// tie — which is exactly what the full stream's fold keeps when it meets
// the reports in grid order: the result (best, second best, both values,
// both reports) is identical, ties included. A NaN value never enters
// either, as in the full stream; a NaN bound never prunes.
//
// For a strictly proper rule phi(q, p) - phi(q, q) grows like |p - q|²
// while a box's bound falls short of its best report by about its size, so
// only boxes near the honest report (and small ones) are opened: the work
// per belief grows like the square root of the grid, not like the grid.

// leafSize is the most reports a leaf of the tree holds: small enough for
// tight boxes, large enough that the leaf loop, not the walk, dominates.
const leafSize = 64

// reportTree is the box hierarchy over a menu's reports.
type reportTree struct {
	n int
	// idx is the grid index of each report in tree order; rows and safe
	// are the menu's rows (and substituted rows) in that order.
	idx        []int32
	rows, safe []float64
	// node i covers tree positions [start[i], end[i]); its children are
	// 2i+1 and 2i+2, and it is a leaf when 2i+1 >= len(start).
	start, end []int32
	// lo and loSafe hold n per node: the smallest row entry per outcome.
	lo, loSafe []float64
	// models bound each leaf's rows more tightly (prune_linear.go).
	models *leafModels
}

// newReportTree builds the tree for the menu m over the grid g.
func newReportTree(g *simplex.Grid, m *menu) *reportTree {
	n, G := m.n, len(m.bad)
	leaves := 1
	for leaves*leafSize < G {
		leaves *= 2
	}
	nodes := 2*leaves - 1
	t := &reportTree{n: n, idx: make([]int32, G), start: make([]int32, nodes), end: make([]int32, nodes)}
	for i := range t.idx {
		t.idx[i] = int32(i)
	}
	t.split(g, 0, 0, G)
	t.rows = permute(m.rows, t.idx, n)
	t.lo = t.bounds(t.rows)
	if leafWidth(n, G) <= modelWidth {
		t.models = newLeafModels(t, g.Coords)
	}
	if m.safe != nil {
		t.safe = permute(m.safe, t.idx, n)
		t.loSafe = t.bounds(t.safe)
	}
	return t
}

// split orders tree positions [lo, hi) for node i: the median of the
// coordinate with the widest spread divides them between the children.
func (t *reportTree) split(g *simplex.Grid, i, lo, hi int) {
	t.start[i], t.end[i] = int32(lo), int32(hi)
	c := 2*i + 1
	if c >= len(t.start) {
		return
	}
	ids := t.idx[lo:hi]
	n := g.N
	var a, b [16]float64 // coordinates lie in [0, 1]
	for k := range n {
		a[k], b[k] = 2, -1
	}
	for _, j := range ids {
		for k, v := range g.Coords[int(j)*n : int(j)*n+n] {
			if v < a[k] {
				a[k] = v
			}
			if v > b[k] {
				b[k] = v
			}
		}
	}
	axis := 0
	for k := 1; k < n; k++ {
		if b[k]-a[k] > b[axis]-a[axis] {
			axis = k
		}
	}
	mid := (hi - lo) / 2
	selectNth(ids, mid, g.Coords[axis:], n)
	t.split(g, c, lo, lo+mid)
	t.split(g, c+1, lo+mid, hi)
}

// selectNth reorders ids so that ids[k] has rank k by key (key[j·stride]
// for report j), smaller keys before it and larger after (quickselect,
// middle pivot; the lattice's many equal keys are split evenly by the
// three-way partition).
func selectNth(ids []int32, k int, key []float64, stride int) {
	lo, hi := 0, len(ids)
	for hi-lo > 1 {
		p := key[int(ids[lo+(hi-lo)/2])*stride]
		// Three-way partition of [lo, hi) around p.
		lt, i, gt := lo, lo, hi
		for i < gt {
			v := key[int(ids[i])*stride]
			switch {
			case v < p:
				ids[lt], ids[i] = ids[i], ids[lt]
				lt++
				i++
			case v > p:
				gt--
				ids[gt], ids[i] = ids[i], ids[gt]
			default:
				i++
			}
		}
		switch {
		case k < lt:
			hi = lt
		case k >= gt:
			lo = gt
		default:
			return
		}
	}
}

func permute(rows []float64, idx []int32, n int) []float64 {
	out := make([]float64, len(rows))
	for t, j := range idx {
		copy(out[t*n:(t+1)*n], rows[int(j)*n:(int(j)+1)*n])
	}
	return out
}

// bounds computes every node's per-outcome minimum, leaves from their
// rows, inner nodes from their children.
func (t *reportTree) bounds(rows []float64) []float64 {
	n, nodes := t.n, len(t.start)
	lo := make([]float64, nodes*n)
	for i := nodes - 1; i >= 0; i-- {
		b := lo[i*n : (i+1)*n]
		if c := 2*i + 1; c < nodes {
			l, r := lo[c*n:(c+1)*n], lo[(c+1)*n:(c+2)*n]
			for k := range b {
				b[k] = min(l[k], r[k]) // min keeps a NaN, which then never prunes
			}
			continue
		}
		for k := range b {
			b[k] = math.Inf(1)
		}
		for p := int(t.start[i]); p < int(t.end[i]); p++ {
			for k, v := range rows[p*n : (p+1)*n] {
				b[k] = min(b[k], v)
			}
		}
	}
	return lo
}

// walk is the pruned counterpart of the full stream's scan over rows (the
// tree's rows, or its substituted rows when safe): the same best two, and
// how many reports it evaluated. The stream walks once per block of
// beliefs (prune_block.go); one belief at a time is left for the beliefs
// the blocks do not take.
func (t *reportTree) walk(q []float64, safe bool) (best, int) {
	st := pruneState{m1: math.Inf(1), m2: math.Inf(1), a1: -1, a2: -1}
	rows, lo := t.rows, t.lo
	if safe {
		rows, lo = t.safe, t.loSafe
	}
	n := t.n
	// Depth-first, the child with the lower bound first: it holds the
	// honest report's neighbourhood, which sets a tight second best early.
	var stack [64]struct {
		node  int32
		bound float64
	}
	stack[0].node, stack[0].bound = 0, dotN(q, lo[:n])
	visited := 0
	for sp := 1; sp > 0; {
		sp--
		e := stack[sp]
		if e.bound > st.m2 {
			continue
		}
		i := int(e.node)
		c := 2*i + 1
		if c >= len(t.start) {
			st.leaf(q, rows, t.idx, int(t.start[i]), int(t.end[i]), n)
			visited += int(t.end[i] - t.start[i])
			continue
		}
		bl, br := dotN(q, lo[c*n:(c+1)*n]), dotN(q, lo[(c+1)*n:(c+2)*n])
		near, far := int32(c), int32(c+1)
		if br < bl {
			near, far, bl, br = far, near, br, bl
		}
		if !(br > st.m2) {
			stack[sp].node, stack[sp].bound = far, br
			sp++
		}
		if !(bl > st.m2) {
			stack[sp].node, stack[sp].bound = near, bl
			sp++
		}
	}
	return best{st.m1, st.m2, st.a1, st.a2}, visited
}

// pruneState is the best two so far, by (value, grid index).
type pruneState struct {
	m1, m2 float64
	a1, a2 int32
}

// offer folds phi at grid report j in by (value, index): the order the
// full stream's fold keeps when it meets reports in grid order.
func (s *pruneState) offer(phi float64, j int32) {
	if phi < s.m2 || phi == s.m2 && j < s.a2 {
		if phi < s.m1 || phi == s.m1 && j < s.a1 {
			s.m1, s.m2, s.a1, s.a2 = phi, s.m1, j, s.a1
			return
		}
		s.m2, s.a2 = phi, j
	}
}

// leaf evaluates tree positions [lo, hi): the same arithmetic as the full
// stream's kernels (dotN's sum), so the values agree bit for bit. Every n
// the engine takes has its own kernel (kernels_leaf.go); the loop below is
// only for an n beyond them.
func (s *pruneState) leaf(q, rows []float64, idx []int32, lo, hi, n int) {
	if s.leafFixed(q, rows, idx, lo, hi, n) {
		return
	}
	for p := lo; p < hi; p++ {
		if phi := dotN(q, rows[p*n:(p+1)*n]); phi <= s.m2 {
			s.offer(phi, idx[p])
		}
	}
}
