package verify

import (
	"cmp"
	"context"
	"math"
	"slices"

	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// Beliefs a leaf at a time.
//
// The beliefs are the grid's points, so a leaf of the report tree is also
// a block of nearby beliefs. Walking the tree once per block instead of
// once per belief needs a bound that holds for every belief of the block:
// with a_k <= q_k <= b_k over the block,
//
//	B(node) = sum_k min(a_k lo_k, b_k lo_k)  <=  sum_k q_k lo_k
//
// term by term (q_k lo_k is linear in q_k, so smallest at an end), and
// again after rounding, since rounding is monotone and min commutes with
// it. Every belief of the block first takes the best two of its own leaf;
// T, the largest of their second bests, is at least every block belief's
// final second best, so a node with B > T is skipped for the whole block.
// The leaves left (the candidates) are sorted by B, and each belief goes
// through them in that order with its own bound (dotN over the node minimum, prune.go) against
// its own second best, stopping at the first candidate whose B is above
// it: all later ones are at least as high. A NaN bound (0 × Inf) prunes
// nothing and sorts first.

// candidate is a leaf that some belief of the block may need.
type candidate struct {
	node int32
	b    float64
}

// blockWork is one worker's scratch space, reused from block to block.
type blockWork struct {
	cands []candidate
	held  []heldBelief
	// a, b bound the held beliefs' coordinates; T is the largest of their
	// second bests so far.
	a, b  []float64
	T     float64
	stack []candidate
	// visited counts the pairs evaluated (for the benchmark's share).
	visited int64
}

type heldBelief struct {
	i  int32
	st pruneState
}

func newBlockWork(n int) *blockWork {
	return &blockWork{a: make([]float64, n), b: make([]float64, n)}
}

// streamPruned is the pruned stream: the same result as streamFull.
func streamPruned(ctx context.Context, g *simplex.Grid, m *menu, w int, pr *pool.Meter, count *int64) ([]best, error) {
	return streamTree(ctx, newReportTree(g, m), g, m, w, pr, count)
}

// streamTree is streamPruned on the tree t of the menu m over g.
func streamTree(ctx context.Context, t *reportTree, g *simplex.Grid, m *menu, w int, pr *pool.Meter, count *int64) ([]best, error) {
	G := g.Len()
	out := make([]best, G)
	w = pool.Workers(w)
	work := make([]*blockWork, w)
	for i := range work {
		work[i] = newBlockWork(m.n)
	}
	err := t.eachLeaf(ctx, w, func(id, node int) {
		work[id].block(t, g, m, node, out)
		pr.Add(int64(t.end[node]-t.start[node]) * int64(G))
	})
	if count != nil {
		for _, bw := range work {
			*count += bw.visited
		}
	}
	return out, err
}

// eachLeaf calls do(worker, node) for every leaf of t, on w goroutines.
func (t *reportTree) eachLeaf(ctx context.Context, w int, do func(worker, node int)) error {
	leaves := (len(t.start) + 1) / 2
	first := len(t.start) - leaves
	return pool.Run(ctx, w, leaves, 1, func(id, lo, hi int) {
		for l := lo; l < hi; l++ {
			do(id, first+l)
		}
	})
}

// block settles every belief of one leaf: each first takes the best two
// of the leaf's own reports, then the other leaves settle (settleHeld).
func (bw *blockWork) block(t *reportTree, g *simplex.Grid, m *menu, leaf int, out []best) {
	n := t.n
	lo, hi := int(t.start[leaf]), int(t.end[leaf])
	bw.reset()
	for p := lo; p < hi; p++ {
		i := t.idx[p]
		q := g.Point(int(i))
		if m.infinite && g.Boundary[i] {
			out[i] = bw.single(t, m, q)
			continue
		}
		st := pruneState{m1: math.Inf(1), m2: math.Inf(1), a1: -1, a2: -1}
		st.leaf(q, t.rows, t.idx, lo, hi, n)
		bw.visited += int64(hi - lo)
		bw.hold(i, st, q)
	}
	bw.settleHeld(t, g, leaf)
	for _, h := range bw.held {
		out[h.i] = best{h.st.m1, h.st.m2, h.st.a1, h.st.a2}
	}
}

// reset empties the held beliefs.
func (bw *blockWork) reset() {
	for k := range bw.a {
		bw.a[k], bw.b[k] = math.Inf(1), math.Inf(-1)
	}
	bw.held = bw.held[:0]
	bw.T = math.Inf(-1)
}

// hold adds grid belief i (coordinates q) with its best two so far.
func (bw *blockWork) hold(i int32, st pruneState, q []float64) {
	bw.held = append(bw.held, heldBelief{i, st})
	bw.T = max(bw.T, st.m2)
	for k, x := range q {
		bw.a[k], bw.b[k] = min(bw.a[k], x), max(bw.b[k], x)
	}
}

// settleHeld finishes every held belief against the leaves of t other
// than own (-1: none is theirs already): the candidate leaves whose block
// bound is not above T, in the order of that bound, each belief stopping
// at the first above its own second best.
func (bw *blockWork) settleHeld(t *reportTree, g *simplex.Grid, own int) {
	if len(bw.held) == 0 {
		return
	}
	n := t.n
	bw.collect(t, bw.T, own)
	for h := range bw.held {
		st := &bw.held[h].st
		q := g.Point(int(bw.held[h].i))
		for _, c := range bw.cands {
			if c.b > st.m2 {
				break // sorted: every later candidate is as high
			}
			nd := int(c.node)
			if dotN(q, t.lo[nd*n:(nd+1)*n]) > st.m2 || t.models != nil && t.models.bound(nd, q) > st.m2 {
				continue
			}
			st.leaf(q, t.rows, t.idx, int(t.start[nd]), int(t.end[nd]), n)
			bw.visited += int64(t.end[nd] - t.start[nd])
		}
	}
}

// collect lists the leaves other than own whose block bound is not above
// T, sorted by that bound (NaN first).
func (bw *blockWork) collect(t *reportTree, T float64, own int) {
	n := t.n
	bw.cands = bw.cands[:0]
	bw.stack = append(bw.stack[:0], candidate{0, blockBound(bw.a, bw.b, t.lo[:n])})
	for len(bw.stack) > 0 {
		e := bw.stack[len(bw.stack)-1]
		bw.stack = bw.stack[:len(bw.stack)-1]
		if e.b > T {
			continue
		}
		i := int(e.node)
		c := 2*i + 1
		if c >= len(t.start) {
			if i != own {
				bw.cands = append(bw.cands, e)
			}
			continue
		}
		for _, ch := range [2]int{c, c + 1} {
			if b := blockBound(bw.a, bw.b, t.lo[ch*n:(ch+1)*n]); !(b > T) {
				bw.stack = append(bw.stack, candidate{int32(ch), b})
			}
		}
	}
	slices.SortFunc(bw.cands, func(x, y candidate) int { return cmp.Compare(x.b, y.b) })
}

// blockBound is sum_k min(a_k lo_k, b_k lo_k), rounded as dotN rounds.
func blockBound(a, b, lo []float64) float64 {
	s := min(float64(a[0]*lo[0]), float64(b[0]*lo[0]))
	for k := 1; k < len(lo); k++ {
		s = float64(s + min(float64(a[k]*lo[k]), float64(b[k]*lo[k])))
	}
	return s
}

// single settles a belief with zero coordinates against a menu with
// infinite efforts (see settle).
func (bw *blockWork) single(t *reportTree, m *menu, q []float64) best {
	b, c := t.settle(q, m, true)
	bw.visited += c
	return b
}

// settle finds the best two for one belief as the full stream does,
// choosing the rows by the belief's support (see menu.safe): the walk
// over the rows, over the substituted rows (the winners' values then
// recomputed with 0·Inf = 0), or the support scan. It also returns the
// pairs evaluated.
func (t *reportTree) settle(q []float64, m *menu, boundary bool) (best, int64) {
	if !m.infinite || !boundary {
		b, c := t.walk(q, false)
		return b, int64(c)
	}
	if m.safe == nil {
		return scanSupport(q, m.rows, m.n), int64(len(m.bad))
	}
	b, c := t.walk(q, true)
	if b.arg >= 0 {
		b.m1 = m.phi(q, int(b.arg))
	}
	if b.arg2 >= 0 {
		b.m2 = m.phi(q, int(b.arg2))
	}
	return b, int64(c)
}
