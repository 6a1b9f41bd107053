package risk

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"

	"scorewright/contract/budget"
	"scorewright/generator/design"
)

// TermsContract is the fitted pay of terms t as the solver takes it: A and
// B of the fit, the smallest payment the table can make (below the floor
// only when rounding put one there) and the budget's report floor.
// budget.StepTerms makes the terms `scorewright distort` and the
// workbench's risk view compute with.
func TermsContract(t *budget.Terms) Contract {
	f := t.Fit
	return Contract{A: f.A, B: f.B, MinPay: math.Min(f.Floor, f.MinPay), ReportFloor: f.ReportFloor}
}

// PayDesc says in words how pay follows from effort under t and what it
// was fitted on.
func PayDesc(t *budget.Terms) string {
	pay := fmt.Sprintf("pay = %.6g - %.6g × effort", t.Fit.A, t.Fit.B)
	if t.ByFormula {
		return pay + " for every report (no menu: reports are paid by the exact formula, unrounded; fitted to the budget over " + t.Fit.MenuDesc() + ")"
	}
	return pay + " (fitted to the budget on the menu: " + t.Fit.MenuDesc() + ")"
}

// MenuPick is the menu item a forecaster held to the rounded table of t
// picks for belief q, nil without a menu.
func MenuPick(t *budget.Terms, s *Solver, q []float64) []float64 {
	if t.ByFormula {
		return nil
	}
	return t.Fit.Menu.Reports[s.BestOf(q, t.Fit.Pays)]
}

// DefaultBelief is the belief a risk computation shows when none is
// given: the budget's reference belief, else the uniform one.
func DefaultBelief(b design.Budget, n int) []float64 {
	if b.Reference != nil {
		return append([]float64(nil), b.Reference...)
	}
	q := make([]float64, n)
	for i := range q {
		q[i] = 1 / float64(n)
	}
	return q
}

// CurveSteps is how many steps the segments of an n > 2 curve are cut
// into (tenths of the way from the uniform belief to each vertex).
const CurveSteps = 10

// CurveBeliefs are the beliefs of the distortion curve for n outcomes
// with a report floor: for n = 2 event probabilities in steps of 0.01
// inside the floor; for n > 2 the beliefs DirectionBeliefs gives
// (toward[i] is the outcome belief i heads for), those giving an outcome
// less than the floor left out. along says in words what the beliefs are.
func CurveBeliefs(n int, floor float64) (beliefs [][]float64, toward []int, along string) {
	if n == 2 {
		return BinaryBeliefs(0.01, floor), nil, "event probability, step 0.01"
	}
	all, to := DirectionBeliefs(n, CurveSteps)
	for i, b := range all {
		if floats.Min(b) >= floor {
			beliefs = append(beliefs, b)
			toward = append(toward, to[i])
		}
	}
	return beliefs, toward, fmt.Sprintf("segments from the uniform belief toward each of the %d outcomes, tenths of the way, beliefs below the report floor left out", n)
}
