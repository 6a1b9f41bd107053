// Package riskfit prepares a risk computation for a design the way
// `scorewright distort` does: the rule is fitted to the design's budget on
// its step menu (contract/budget), or, when the budget has no step, over a
// fine grid of reports paid by the exact formula; the fitted pay A - B·L
// becomes the solver's contract, and the distortion curve runs over the
// same beliefs.
// The command and the workbench share it, so that both show the same
// numbers for the same inputs.
package riskfit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"

	"scorewright/contract/budget"
	"scorewright/contract/risk"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

// MenuError is a step menu the budget's step and report floor cannot make.
type MenuError struct{ Err error }

func (e *MenuError) Error() string { return e.Err.Error() }

// Unwrap returns the menu's own error.
func (e *MenuError) Unwrap() error { return e.Err }

// Fitted is a rule fitted to a budget, ready for risk.NewSolver.
type Fitted struct {
	// Menu is the report menu; nil when the budget has no step, and then
	// every report is paid by the exact formula A - B·L, unrounded.
	Menu *budget.Menu
	// Fit is the fit; without a menu it was made over the reports of a
	// fine grid (Fit.Menu), which only find the range of the efforts.
	Fit *budget.Fit
	// Contract is the fitted pay as the solver takes it; MinPay is the
	// smallest payment the table can make (below the floor only when
	// rounding put one there).
	Contract risk.Contract
}

// New fits rule to b on its step menu, or without a step over the
// finest simplex grid of at most budget.MaxMenu reports, with no rounding
// (the exact formula pays). Errors: a *MenuError, or the fit's error as
// budget.FitRule returned it (a *budget.UnboundedError for a rule infinite
// where a report gives an outcome 0).
func New(rule *bregman.Rule, b design.Budget) (*Fitted, error) {
	n := rule.Outcomes()
	exact := !(b.Step > 0)
	step := b.Step
	if exact {
		K := 1000
		for K > 1 && gridCount(K, n) > budget.MaxMenu {
			K--
		}
		step = 1 / float64(K)
		b.Unit = 0
	}
	menu, err := budget.StepMenu(n, step, b.ReportFloor)
	if err != nil {
		return nil, &MenuError{err}
	}
	fit, err := budget.FitRule(rule, menu, b)
	if err != nil {
		return nil, err
	}
	out := &Fitted{Menu: menu, Fit: fit,
		Contract: risk.Contract{A: fit.A, B: fit.B, MinPay: math.Min(fit.Floor, fit.MinPay), ReportFloor: b.ReportFloor}}
	if exact {
		out.Menu = nil
	}
	return out, nil
}

// gridCount is the number of reports C(K+n-1, n-1) of a simplex grid of
// step 1/K.
func gridCount(K, n int) float64 {
	c := 1.0
	for i := 1; i < n; i++ {
		c = c * float64(K+i) / float64(i)
	}
	return c
}

// PayDesc says in words how pay follows from effort and what it was
// fitted on.
func (f *Fitted) PayDesc() string {
	pay := fmt.Sprintf("pay = %.6g - %.6g × effort", f.Fit.A, f.Fit.B)
	if f.Menu == nil {
		return pay + " for every report (no menu: reports are paid by the exact formula, unrounded; fitted to the budget over " + f.Fit.MenuDesc() + ")"
	}
	return pay + " (fitted to the budget on the menu: " + f.Fit.MenuDesc() + ")"
}

// MenuPick is the menu item a forecaster held to the rounded table picks
// for belief q, nil without a menu.
func (f *Fitted) MenuPick(s *risk.Solver, q []float64) []float64 {
	if f.Menu == nil {
		return nil
	}
	return f.Menu.Reports[s.BestOf(q, f.Fit.Pays)]
}

// Solver returns a solver for a forecaster with utility u and initial
// wealth, paid under the fitted contract.
func (f *Fitted) Solver(rule *bregman.Rule, u risk.Utility, wealth float64) (*risk.Solver, error) {
	return risk.NewSolver(rule, f.Contract, u, wealth)
}

// Belief is the belief a risk computation shows when none is given: the
// budget's reference belief, else the uniform one.
func Belief(b design.Budget, n int) []float64 {
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
// inside the floor; for n > 2 the beliefs risk.DirectionBeliefs gives
// (toward[i] is the outcome belief i heads for), those giving an outcome
// less than the floor left out. along says in words what the beliefs are.
func CurveBeliefs(n int, floor float64) (beliefs [][]float64, toward []int, along string) {
	if n == 2 {
		return risk.BinaryBeliefs(0.01, floor), nil, "event probability, step 0.01"
	}
	all, to := risk.DirectionBeliefs(n, CurveSteps)
	for i, b := range all {
		if floats.Min(b) >= floor {
			beliefs = append(beliefs, b)
			toward = append(toward, to[i])
		}
	}
	return beliefs, toward, fmt.Sprintf("segments from the uniform belief toward each of the %d outcomes, tenths of the way, beliefs below the report floor left out", n)
}
