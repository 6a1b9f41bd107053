// Package riskfit prepares a risk computation for a design the way
// `scorewright distort` does: the rule is fitted to the design's budget on
// its step menu (contract/budget), the fitted pay A - B·L becomes the
// solver's contract, and the distortion curve runs over the same beliefs.
// The command and the workbench share it, so that both show the same
// numbers for the same inputs.
package riskfit

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"

	"scorewright/contract/budget"
	"scorewright/contract/risk"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

// ErrNoStep says the budget has no report menu step, so there is nothing
// to fit the rule to.
var ErrNoStep = errors.New("riskfit: the budget has no report menu step")

// MenuError is a step menu the budget's step and report floor cannot make.
type MenuError struct{ Err error }

func (e *MenuError) Error() string { return e.Err.Error() }

// Unwrap returns the menu's own error.
func (e *MenuError) Unwrap() error { return e.Err }

// Fitted is a rule fitted to a budget, ready for risk.NewSolver.
type Fitted struct {
	Menu *budget.Menu
	Fit  *budget.Fit
	// Contract is the fitted pay as the solver takes it; MinPay is the
	// smallest payment the table can make (below the floor only when
	// rounding put one there).
	Contract risk.Contract
}

// New fits rule to b on its step menu. Errors: ErrNoStep, a *MenuError,
// or the fit's error as budget.FitRule returned it (a *budget.UnboundedError
// for a rule infinite where a report gives an outcome 0).
func New(rule *bregman.Rule, b design.Budget) (*Fitted, error) {
	if !(b.Step > 0) {
		return nil, ErrNoStep
	}
	menu, err := budget.StepMenu(rule.Outcomes(), b.Step, b.ReportFloor)
	if err != nil {
		return nil, &MenuError{err}
	}
	fit, err := budget.FitRule(rule, menu, b)
	if err != nil {
		return nil, err
	}
	return &Fitted{Menu: menu, Fit: fit,
		Contract: risk.Contract{A: fit.A, B: fit.B, MinPay: math.Min(fit.Floor, fit.MinPay), ReportFloor: b.ReportFloor}}, nil
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
