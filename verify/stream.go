package verify

import (
	"context"
	"math"

	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// menu holds the effort (lower is better) of every report of a grid, one
// row of n values per report: G×n floats, the only table the pair stream
// needs, so memory grows with G and never with G².
type menu struct {
	n    int
	rows []float64
	// infinite is true when some entry is ±Inf, so a belief with a zero
	// coordinate must skip that outcome instead of multiplying 0 by Inf.
	infinite bool
	// bad marks reports whose row has a NaN or both +Inf and -Inf; their
	// rows are set to +Inf so that the stream never picks them, and the
	// boundedness check reports them.
	bad []bool
	// safe is rows with ±Inf replaced by ±safeBig, for beliefs with zero
	// coordinates: 0 × safeBig is exactly 0, so finite expected efforts
	// and their order are exactly those of the 0·Inf = 0 convention, and
	// an infinite one becomes a huge finite one that is never preferred
	// to a finite one. The stream then recomputes the winners' values
	// exactly. nil when no entry is infinite, or when some finite entry
	// is too large for the substitution to keep its order.
	safe []float64
}

// safeBig stands in for an infinite effort; finite efforts must stay below
// safeLimit in magnitude for the substitution to be exact in order (with
// n <= 16 coordinates of at least 1/K, K <= 2^26).
const (
	safeBig   = 1e300
	safeLimit = 1e250
)

func newMenu(n, g int) *menu {
	return &menu{n: n, rows: make([]float64, n*g), bad: make([]bool, g)}
}

// seal scans the rows once after they are filled.
func (m *menu) seal() {
	n := m.n
	for j := range m.bad {
		r := m.rows[j*n : (j+1)*n]
		nan, pos, neg := false, false, false
		for _, v := range r {
			switch {
			case v != v:
				nan = true
			case math.IsInf(v, 1):
				pos = true
			case math.IsInf(v, -1):
				neg = true
			}
		}
		if nan || pos && neg {
			m.bad[j] = true
			for k := range r {
				r[k] = math.Inf(1)
			}
			pos = true
		}
		if pos || neg {
			m.infinite = true
		}
	}
	if !m.infinite {
		return
	}
	m.safe = make([]float64, len(m.rows))
	for i, v := range m.rows {
		switch {
		case math.IsInf(v, 1):
			v = safeBig
		case math.IsInf(v, -1):
			v = -safeBig
		case math.Abs(v) > safeLimit:
			m.safe = nil
			return
		}
		m.safe[i] = v
	}
}

// phi returns sum_k q_k L(report j, k) with 0·Inf = 0, for any belief q
// (a grid point or not).
func (m *menu) phi(q []float64, j int) float64 {
	r := m.rows[j*m.n : (j+1)*m.n]
	var s float64
	for k, x := range q {
		if x != 0 {
			s += x * r[k]
		}
	}
	return s
}

// best is what the stream keeps for one belief: the smallest expected
// effort m1 over all reports, at report arg, and the second smallest m2
// (equal to m1 on a tie). arg is -1 when every report costs +Inf.
type best struct {
	m1, m2    float64
	arg, arg2 int32
}

// stream finds, for every belief of g, the best and second-best report of
// the menu by expected effort. It walks the report tree (prune.go,
// prune_block.go), which skips boxes of reports that cannot enter the best
// two, and returns exactly what streamFull returns. Beliefs are handed out
// a leaf (at most leafSize beliefs) at a time, so cancellation is seen
// after at most leafSize·G pairs; progress counts the G pairs each belief
// settles, visited or pruned.
func stream(ctx context.Context, g *simplex.Grid, m *menu, w int, pr *pool.Meter) ([]best, error) {
	return streamPruned(ctx, g, m, w, pr, nil)
}

// pairStream is stream, or streamFull when s asks for every pair.
func pairStream(ctx context.Context, g *simplex.Grid, m *menu, s Settings, pr *pool.Meter) ([]best, error) {
	if s.everyPair {
		return streamFull(ctx, g, m, s.Workers, pr)
	}
	return stream(ctx, g, m, s.Workers, pr)
}

// streamFull is the full pair stream: every grid belief against every grid
// report, G² pairs. It is the reference the pruned stream is tested and
// measured against.
func streamFull(ctx context.Context, g *simplex.Grid, m *menu, w int, pr *pool.Meter) ([]best, error) {
	return streamWith(ctx, g, m, w, pr, func(q []float64, safe bool) best {
		if safe {
			return scan(q, m.safe, m.n)
		}
		return scan(q, m.rows, m.n)
	})
}

// streamWith runs find (the best two over the menu's rows, or over its
// substituted rows when safe) for every belief, choosing the rows by the
// belief's support: see menu.safe (blockWork.single does the same).
func streamWith(ctx context.Context, g *simplex.Grid, m *menu, w int, pr *pool.Meter, find func(q []float64, safe bool) best) ([]best, error) {
	G := g.Len()
	out := make([]best, G)
	err := pool.Run(ctx, w, G, 1, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			q := g.Point(i)
			var b best
			switch {
			case !m.infinite || !g.Boundary[i]:
				b = find(q, false)
			case m.safe != nil:
				b = find(q, true)
				if b.arg >= 0 {
					b.m1 = m.phi(q, int(b.arg))
				}
				if b.arg2 >= 0 {
					b.m2 = m.phi(q, int(b.arg2))
				}
			default:
				b = scanSupport(q, m.rows, m.n)
			}
			out[i] = b
			pr.Add(int64(G))
		}
	})
	return out, err
}

// scan is the inner loop: every report against one belief (q has n
// coordinates). It allocates nothing; every n the engine takes has its own
// kernel (kernels_scan.go, written by kernelgen), and the loop below is
// only for an n beyond them.
//
//go:generate go run ./internal/kernelgen -dir .
func scan(q, rows []float64, n int) best {
	if b, ok := scanFixed(q, rows, n); ok {
		return b
	}
	m1, m2, arg, arg2 := math.Inf(1), math.Inf(1), -1, -1
	for j, off := 0, 0; off+n <= len(rows); j, off = j+1, off+n {
		phi := dotN(q, rows[off:off+n:off+n])
		m1, m2, arg, arg2 = fold(m1, m2, arg, arg2, phi, j)
	}
	return best{m1, m2, int32(arg), int32(arg2)}
}

// fold keeps the two smallest values seen, and where: phi at report j
// against the best m1 (at a1) and the second best m2 (at a2). It is small
// enough to be inlined into every kernel.
func fold(m1, m2 float64, a1, a2 int, phi float64, j int) (float64, float64, int, int) {
	if phi < m2 {
		if phi < m1 {
			return phi, m1, j, a1
		}
		return m1, phi, a1, j
	}
	return m1, m2, a1, a2
}

// scanSupport is scan for a belief with zero coordinates against a menu
// with infinite entries: outcomes the belief rules out are skipped, so an
// infinite effort there costs nothing (0·Inf = 0).
func scanSupport(q, rows []float64, n int) best {
	var supp [16]int
	s := 0
	for k, x := range q {
		if x != 0 {
			supp[s] = k
			s++
		}
	}
	m1, m2, arg, arg2 := math.Inf(1), math.Inf(1), -1, -1
	for j, off := 0, 0; off+n <= len(rows); j, off = j+1, off+n {
		var phi float64
		for _, k := range supp[:s] {
			phi += q[k] * rows[off+k]
		}
		m1, m2, arg, arg2 = fold(m1, m2, arg, arg2, phi, j)
	}
	return best{m1, m2, int32(arg), int32(arg2)}
}

// dotN is phi(q, report) = sum_k q_k r_k, summed from k = 0 up with
// every product and sum rounded once: the explicit float64 conversions
// forbid fused multiply-adds, so the full stream, the pruned one, the
// bounds of prune.go and the kernels (which spell out this same sum)
// compute the same values on every platform (see prune.go for why that
// makes the pruning exact).
func dotN(q, r []float64) float64 {
	r = r[:len(q)]
	s := float64(q[0] * r[0])
	for k := 1; k < len(q); k++ {
		s = float64(s + float64(q[k]*r[k]))
	}
	return s
}
