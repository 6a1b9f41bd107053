package verify

import (
	"context"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"scorewright/verify/simplex"
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
}

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
}

// phi returns sum_k q_k row_k with 0·Inf = 0.
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

// progress counts work done across the phases of a long call and reports
// it from one goroutine, so the caller's callback is never called
// concurrently.
type progress struct {
	done  atomic.Int64
	total int64
	fn    func(done, total int64)
	stop  chan struct{}
	wg    sync.WaitGroup
}

func startProgress(fn func(done, total int64), total int64) *progress {
	p := &progress{total: total, fn: fn, stop: make(chan struct{})}
	if fn == nil {
		return p
	}
	p.wg.Add(1)
	go func() {
		defer p.wg.Done()
		t := time.NewTicker(100 * time.Millisecond)
		defer t.Stop()
		for {
			select {
			case <-p.stop:
				return
			case <-t.C:
				p.fn(min(p.done.Load(), p.total), p.total)
			}
		}
	}()
	return p
}

func (p *progress) add(n int64) { p.done.Add(n) }

// finish stops the reporter; a call that completed reports done = total.
func (p *progress) finish(completed bool) {
	close(p.stop)
	p.wg.Wait()
	if p.fn != nil && completed {
		p.fn(p.total, p.total)
	}
}

func workers(w int) int {
	if w <= 0 {
		w = runtime.GOMAXPROCS(0)
	}
	return w
}

// parallel runs body(i) for i in [0, count) on w goroutines, handing out
// indices in chunks, and stops early (returning ctx.Err()) when ctx is
// cancelled. It is the one place the checks fan out over cores.
func parallel(ctx context.Context, w, count, chunk int, body func(worker, lo, hi int)) error {
	w = workers(w)
	if chunk < 1 {
		chunk = 1
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	done := ctx.Done()
	var stopped atomic.Bool
	for id := 0; id < w; id++ {
		wg.Add(1)
		go func(id int) {
			defer wg.Done()
			for {
				select {
				case <-done:
					stopped.Store(true)
					return
				default:
				}
				lo := int(next.Add(int64(chunk))) - chunk
				if lo >= count {
					return
				}
				body(id, lo, min(lo+chunk, count))
			}
		}(id)
	}
	wg.Wait()
	if stopped.Load() || ctx.Err() != nil {
		return ctx.Err()
	}
	return nil
}

// stream finds, for every belief of g, the best and second-best report of
// the menu by expected effort: G² pairs, each a handful of multiply-adds
// on the precomputed rows. Beliefs are handed out one row at a time, so
// cancellation is seen after at most G pairs.
func stream(ctx context.Context, g *simplex.Grid, m *menu, w int, pr *progress) ([]best, error) {
	G := g.Len()
	out := make([]best, G)
	err := parallel(ctx, w, G, 1, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			q := g.Point(i)
			var b best
			if m.infinite && g.Boundary[i] {
				b = scanSupport(q, m.rows, m.n)
			} else {
				b = scan(q, m.rows, m.n)
			}
			out[i] = b
			pr.add(int64(G))
		}
	})
	return out, err
}

// scan is the inner loop: every report against one belief. It allocates
// nothing and is specialised for the common small n.
func scan(q, rows []float64, n int) best {
	switch n {
	case 2:
		return scan2(q[0], q[1], rows)
	case 3:
		return scan3(q[0], q[1], q[2], rows)
	case 4:
		return scan4(q[0], q[1], q[2], q[3], rows)
	}
	m1, m2, arg, arg2 := math.Inf(1), math.Inf(1), -1, -1
	for j, off := 0, 0; off+n <= len(rows); j, off = j+1, off+n {
		r := rows[off : off+n : off+n]
		var phi float64
		for k, x := range q {
			phi += x * r[k]
		}
		if phi < m2 {
			if phi < m1 {
				m1, m2, arg, arg2 = phi, m1, j, arg
			} else {
				m2, arg2 = phi, j
			}
		}
	}
	return best{m1, m2, int32(arg), int32(arg2)}
}

func scan2(q0, q1 float64, rows []float64) best {
	m1, m2, arg, arg2 := math.Inf(1), math.Inf(1), -1, -1
	for j, off := 0, 0; off+2 <= len(rows); j, off = j+1, off+2 {
		r := rows[off : off+2 : off+2]
		phi := q0*r[0] + q1*r[1]
		if phi < m2 {
			if phi < m1 {
				m1, m2, arg, arg2 = phi, m1, j, arg
			} else {
				m2, arg2 = phi, j
			}
		}
	}
	return best{m1, m2, int32(arg), int32(arg2)}
}

func scan3(q0, q1, q2 float64, rows []float64) best {
	m1, m2, arg, arg2 := math.Inf(1), math.Inf(1), -1, -1
	for j, off := 0, 0; off+3 <= len(rows); j, off = j+1, off+3 {
		r := rows[off : off+3 : off+3]
		phi := q0*r[0] + q1*r[1] + q2*r[2]
		if phi < m2 {
			if phi < m1 {
				m1, m2, arg, arg2 = phi, m1, j, arg
			} else {
				m2, arg2 = phi, j
			}
		}
	}
	return best{m1, m2, int32(arg), int32(arg2)}
}

func scan4(q0, q1, q2, q3 float64, rows []float64) best {
	m1, m2, arg, arg2 := math.Inf(1), math.Inf(1), -1, -1
	for j, off := 0, 0; off+4 <= len(rows); j, off = j+1, off+4 {
		r := rows[off : off+4 : off+4]
		phi := q0*r[0] + q1*r[1] + q2*r[2] + q3*r[3]
		if phi < m2 {
			if phi < m1 {
				m1, m2, arg, arg2 = phi, m1, j, arg
			} else {
				m2, arg2 = phi, j
			}
		}
	}
	return best{m1, m2, int32(arg), int32(arg2)}
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
		if phi < m2 {
			if phi < m1 {
				m1, m2, arg, arg2 = phi, m1, j, arg
			} else {
				m2, arg2 = phi, j
			}
		}
	}
	return best{m1, m2, int32(arg), int32(arg2)}
}
