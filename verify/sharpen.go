package verify

import (
	"fmt"
	"math"

	"scorewright/internal/num"
	"scorewright/internal/simplex"
)

// sharpenEvals caps the function evaluations of one local optimisation:
// enough for Nelder–Mead to settle in the 2n parameters of a witness pair
// at n <= 12, small enough to stay a fraction of the grid's cost.
const sharpenEvals = 4000

// simplexSize is Nelder–Mead's first step where no cell bounds the search.
const simplexSize = 0.02

// minimise runs Nelder–Mead on f from x0, with first steps of size, and returns the best point and
// value it saw with the optimiser's status. A NaN value counts as +Inf so
// that a region where the formula is undefined repels the search rather
// than derailing it (such regions are reported by other checks). ok is
// false when the optimiser failed outright; the caller then keeps its grid
// witness.
func minimise(f func(x []float64) float64, x0 []float64, evals int, size float64) (x []float64, fx float64, status string, ok bool) {
	bestX := clone(x0)
	bestF := math.Inf(1)
	wrapped := func(x []float64) float64 {
		v := f(x)
		if v != v {
			v = math.Inf(1)
		}
		if v < bestF {
			bestF = v
			copy(bestX, x)
		}
		return v
	}
	wrapped(x0)
	st, _ := num.NelderMeadMin(wrapped, x0, num.NMSettings{Evals: evals, Absolute: 1e-15, Relative: 1e-15, Iterations: 40, Size: size})
	// Trust the status, not just the values: a run that stopped for a
	// failure is not a witness, only a run that converged or used its
	// budget while improving.
	return bestX, bestF, statusWords(st), st == num.NMConverged || st == num.NMBudget
}

// pairSearch optimises over a belief–report pair (q, p) on the simplex,
// both through the squares map, starting from (q0, p0). fixBelief keeps q
// at q0 and searches over reports only. The objective receives the two
// points in scratch slices it must not keep.
type pairSearch struct {
	n          int
	q, p       []float64
	fixBelief  bool
	onBoundary bool // when false the belief must stay in the interior
	evals      int
	// cell, when positive, confines the search to the box of half-width
	// cell around the start (half a grid step: the grid point's own
	// cell), so that sharpening refines the grid's witness instead of
	// running off to wherever the amount is unbounded.
	cell float64
	// centreQ and centreP, when set, are the centre of the cell instead
	// of the start (restarts keep the first cell).
	centreQ, centreP []float64
}

// searchEvals caps a search over reports alone, run for many beliefs.
const searchEvals = 400

func newPairSearch(n int) *pairSearch {
	return &pairSearch{n: n, q: make([]float64, n), p: make([]float64, n), evals: sharpenEvals}
}

// run minimises f(q, p) and returns the best pair found.
func (s *pairSearch) run(f func(q, p []float64) float64, q0, p0 []float64) (q, p []float64, v float64, status string, ok bool) {
	n := s.n
	var x0 []float64
	if s.fixBelief {
		x0 = make([]float64, n)
		simplex.ToSquares(x0, p0)
	} else {
		x0 = make([]float64, 2*n)
		simplex.ToSquares(x0[:n], q0)
		simplex.ToSquares(x0[n:], p0)
	}
	cq, cp := q0, p0
	if s.centreQ != nil {
		cq, cp = s.centreQ, s.centreP
	}
	obj := func(x []float64) float64 {
		if s.fixBelief {
			copy(s.q, q0)
			simplex.FromSquares(s.p, x)
		} else {
			simplex.FromSquares(s.q, x[:n])
			simplex.FromSquares(s.p, x[n:])
			if !s.onBoundary && onBoundary(s.q) || !inCell(s.q, cq, s.cell) {
				return math.Inf(1)
			}
		}
		if !inCell(s.p, cp, s.cell) {
			return math.Inf(1)
		}
		return f(s.q, s.p)
	}
	// The first simplex must fit the cell: through the squares map a step
	// dx moves a coordinate by up to 2dx, and a simplex whose every vertex
	// leaves the cell (+Inf) looks converged where it started (p[y]^2 over
	// 3 outcomes stopped at 0.368189762, 7 digits short of 0.368189833).
	x, v, status, ok := minimise(obj, x0, s.evals, cellSimplex(s.cell))
	q, p = make([]float64, n), make([]float64, n)
	if s.fixBelief {
		copy(q, q0)
		simplex.FromSquares(p, x)
	} else {
		simplex.FromSquares(q, x[:n])
		simplex.FromSquares(p, x[n:])
	}
	return q, p, v, status, ok
}

// cellSimplex is the first step of a search confined to a cell of
// half-width cell (0: no cell).
func cellSimplex(cell float64) float64 {
	if cell > 0 {
		return math.Min(simplexSize, cell/4)
	}
	return simplexSize
}

// inCell reports whether x lies within half-width cell of centre in every
// coordinate (always, when cell is 0).
func inCell(x, centre []float64, cell float64) bool {
	if cell <= 0 {
		return true
	}
	for k, v := range x {
		if math.Abs(v-centre[k]) > cell {
			return false
		}
	}
	return true
}

func onBoundary(q []float64) bool {
	for _, v := range q {
		if v == 0 {
			return true
		}
	}
	return false
}

// Sharpening of an audit's gap.
const (
	// settleDigits is the relative change between two successive
	// restarts below which the gap counts as settled: 9 significant
	// digits, with a margin of ten.
	settleDigits = 1e-10
	// maxRestarts bounds the restarts.
	maxRestarts = 40
)

// sharpenGap maximises gain(q, r) (the expected pay of report r over the
// honest report's, for belief q) jointly over belief and report from the
// gap's witness, first within the witness's grid cell (half-width cell; 0:
// no bound), so that an amount unbounded near a face does not drag the
// witness there. Nelder–Mead stops short of the maximum when the best
// report sits on a face and the belief inside, so it is restarted from its
// best point, with a fresh simplex, until two successive runs agree to
// settleDigits relative (then the gap has 9 significant digits) or the
// restarts run out. A maximum on the cell's edge lies beyond it (the
// grid's witness of p[y] over 3 outcomes, (0.67, 0.17, 0.16), has the
// maximiser (2/3, 1/6, 1/6) outside its cell), so the cell is doubled
// until the maximum is inside it or it covers the simplex. gap.Precision
// says how it ended.
func sharpenGap(gap *Gap, n int, cell float64, gain func(q, r []float64) float64) {
	ps := newPairSearch(n)
	ps.onBoundary, ps.cell = true, cell
	ps.centreQ, ps.centreP = clone(gap.Belief), clone(gap.BestReport)
	best, q, r := gap.Max, gap.Belief, gap.BestReport
	moved, settled, failed, runs := false, false, false, 0
	for !failed {
		settled = false
		for runs < maxRestarts {
			runs++
			q2, r2, v, status, ok := ps.run(func(q, r []float64) float64 { return -gain(q, r) }, q, r)
			gap.Status = status
			if !ok || math.IsInf(v, 0) {
				failed = true
				break
			}
			change := -v - best
			if improves(-v, best, true) {
				best, q, r, moved = -v, q2, r2, true
			}
			if !(change > settleDigits*math.Abs(best)) {
				settled = true
				break
			}
		}
		if runs >= maxRestarts || ps.cell <= 0 || ps.cell >= 1 || !(onEdge(q, ps.centreQ, ps.cell) || onEdge(r, ps.centreP, ps.cell)) {
			break
		}
		ps.cell *= 2
	}
	if moved {
		best, q, r = snapWitness(best, q, r, gain)
		gap.GridMax, gap.Max, gap.Belief, gap.BestReport, gap.Sharpened = gap.Max, best, q, r, true
	}
	switch {
	case settled:
		gap.Precision = fmt.Sprintf("sharpened until a local search changed it by less than %.0g relative (%s): 9 significant digits", settleDigits, searches(runs))
	case failed:
		gap.Precision = fmt.Sprintf("the local search stopped after %s (the optimiser failed or the amount is not finite nearby): fewer than 9 significant digits are settled", searches(runs))
	default:
		gap.Precision = fmt.Sprintf("sharpening stopped after %s still improving the gap: fewer than 9 significant digits are settled", searches(runs))
	}
}

// roundingDigits caps the precision claimed for a settled gap by what the
// payments' rounding allows (SureDigits).
func roundingDigits(gap *Gap, rounding float64) {
	gap.Precision += SureDigits(gap.Max, rounding)
}

// SureDigits is what a gap's precision must add when rounding, the bound
// on the rounding of the payments it is computed from, is above its ninth
// significant digit: a gap computed as the difference of expected
// payments of size 1e10 (a payout with the term 1e10·y) is known only to
// about 1e-5, however well a search settled it, so 0.01125 has two or
// three sure digits, not nine. "" when the rounding is below that.
func SureDigits(gap, rounding float64) string {
	if !(rounding > 0) || !(gap > 0) || math.IsInf(gap, 0) || rounding <= settleDigits*gap {
		return ""
	}
	d := math.Max(math.Floor(math.Log10(gap/rounding)), 0)
	return fmt.Sprintf("; but the payments are known only to %.3g (the rounding of the terms they sum), so only %.0f significant digits of the gap are sure", rounding, d)
}

// snapLimit is the size below which a coordinate of a sharpened witness
// is tried as exactly 0. The search works through the squares map, so a
// maximum on a face is approached as x^2 with x ~ 1e-10 and reads as
// 2.75e-19, noise that a witness must not print.
const snapLimit = 1e-9

// snapWitness sets the coordinates of q and r below snapLimit to 0 (and
// renormalises) and keeps the snapped pair when its gain is no smaller
// than best beyond rounding; the gain returned is the snapped pair's own,
// so that the witness and its amount always agree.
func snapWitness(best float64, q, r []float64, gain func(q, r []float64) float64) (float64, []float64, []float64) {
	sq, okq := snapped(q)
	sr, okr := snapped(r)
	if !okq && !okr {
		return best, q, r
	}
	v := gain(sq, sr)
	if v >= best-1e-13*math.Abs(best) {
		return v, sq, sr
	}
	return best, q, r
}

// snapped returns x with coordinates below snapLimit set to 0 and the rest
// rescaled to sum 1, and whether anything changed.
func snapped(x []float64) ([]float64, bool) {
	out := clone(x)
	var sum float64
	changed := false
	for k, v := range out {
		if v != 0 && v < snapLimit {
			out[k], changed = 0, true
		}
		sum += out[k]
	}
	if !changed || sum <= 0 {
		return x, false
	}
	for k := range out {
		out[k] /= sum
	}
	return out, true
}

// onEdge reports whether x touches the edge of the box of half-width cell
// around centre in some coordinate.
func onEdge(x, centre []float64, cell float64) bool {
	for k, v := range x {
		if math.Abs(v-centre[k]) > cell*(1-1e-6) {
			return true
		}
	}
	return false
}

// searches is a count of local searches in words.
func searches(n int) string {
	if n == 1 {
		return "1 local search"
	}
	return fmt.Sprintf("%d local searches", n)
}

// statusWords says in plain words how the search ended, for notes a
// person reads.
func statusWords(s num.NMStatus) string {
	switch s {
	case num.NMConverged:
		return "converged"
	case num.NMBudget:
		return "stopped at its work limit"
	case num.NMNonFiniteStart:
		return "stopped without converging (its starting value is not finite)"
	}
	return "stopped without converging"
}
