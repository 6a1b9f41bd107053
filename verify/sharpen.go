package verify

import (
	"math"

	"gonum.org/v1/gonum/optimize"

	"scorewright/internal/simplex"
)

// sharpenEvals caps the function evaluations of one local optimisation:
// enough for Nelder–Mead to settle in the 2n parameters of a witness pair
// at n <= 12, small enough to stay a fraction of the grid's cost.
const sharpenEvals = 4000

// minimise runs Nelder–Mead on f from x0 and returns the best point and
// value it saw with the optimiser's status. A NaN value counts as +Inf so
// that a region where the formula is undefined repels the search rather
// than derailing it (such regions are reported by other checks). ok is
// false when the optimiser failed outright; the caller then keeps its grid
// witness.
func minimise(f func(x []float64) float64, x0 []float64, evals int) (x []float64, fx float64, status string, ok bool) {
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
	res, err := optimize.Minimize(optimize.Problem{Func: wrapped}, clone(x0), &optimize.Settings{
		FuncEvaluations: evals,
		Converger:       &optimize.FunctionConverge{Absolute: 1e-15, Relative: 1e-15, Iterations: 40},
	}, &optimize.NelderMead{SimplexSize: 0.02})
	if res == nil {
		return bestX, bestF, "optimiser gave no result: " + errString(err), false
	}
	status = res.Status.String()
	if err != nil {
		status += ": " + err.Error()
	}
	// Trust the status, not just the error: a run that stopped for a
	// failure is not a witness, only a run that converged or used its
	// budget while improving.
	switch res.Status {
	case optimize.Success, optimize.FunctionConvergence, optimize.FunctionEvaluationLimit,
		optimize.IterationLimit, optimize.FunctionThreshold, optimize.StepConvergence:
		ok = true
	}
	return bestX, bestF, status, ok
}

func errString(err error) string {
	if err == nil {
		return "no error"
	}
	return err.Error()
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
	obj := func(x []float64) float64 {
		if s.fixBelief {
			copy(s.q, q0)
			simplex.FromSquares(s.p, x)
		} else {
			simplex.FromSquares(s.q, x[:n])
			simplex.FromSquares(s.p, x[n:])
			if !s.onBoundary && onBoundary(s.q) || !inCell(s.q, q0, s.cell) {
				return math.Inf(1)
			}
		}
		if !inCell(s.p, p0, s.cell) {
			return math.Inf(1)
		}
		return f(s.q, s.p)
	}
	x, v, status, ok := minimise(obj, x0, s.evals)
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
