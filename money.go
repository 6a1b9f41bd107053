package scorewright

import (
	"context"
	"fmt"

	"gonum.org/v1/gonum/floats"

	"scorewright/contract/backtest"
	"scorewright/contract/backtest/history"
	"scorewright/contract/budget"
	"scorewright/contract/risk"
	"scorewright/generator/design"
	"scorewright/internal/pool"
)

// The money side of a rule over outcomes: fits to a budget, backtests and
// risk. cmd and tui call these, not contract/budget, contract/backtest or
// contract/risk, so that what a fit, a replay or a risk run means is
// decided here once; both front ends only print what comes back.

// FitFormula fits the rule to budget b with every report paid by the
// exact formula A - B·L at the report as written, clamped at clamp when it
// is above 0 (budget.FormulaTerms). A rule not over outcomes gives a
// *NeedsOutcomesError.
func (r *Rule) FitFormula(b design.Budget, clamp float64) (*budget.Terms, error) {
	rule, err := r.OverOutcomes()
	if err != nil {
		return nil, err
	}
	return budget.FormulaTerms(rule, b, clamp)
}

// FitMenu fits the rule to budget b on menu m as the payment table is
// fitted (budget.TableTerms): a report on the menu is paid its table
// entry, one off it the same formula rounded. recordFloor says forecasts
// are recorded at the report floor (a menu built from the step).
func (r *Rule) FitMenu(ctx context.Context, m *budget.Menu, b design.Budget, recordFloor bool) (*budget.Terms, error) {
	rule, err := r.OverOutcomes()
	if err != nil {
		return nil, err
	}
	return budget.TableTerms(ctx, rule, m, b, recordFloor)
}

// FitTable fits the rule to its design's budget on the menu its payment
// table is made on (the design's menu file, else its step; the design's
// clamp either way), as FitMenu does: the terms a backtest of the design
// pays by, so that it pays what the table would. ErrNoMenu when the
// budget has neither a menu file nor a step.
func (r *Rule) FitTable(ctx context.Context) (*budget.Terms, error) {
	rule, m, err := r.menu(nil)
	if err != nil {
		return nil, err
	}
	// Forecasts are recorded at the report floor only on a step's menu,
	// as the command's backtest records them.
	return budget.TableTerms(ctx, rule, m, r.d.Budget, r.d.Budget.Menu == "")
}

// FitSteps fits the rule to budget b as a risk computation does
// (budget.StepTerms): on the step's menu when b has a step, else on the
// design's menu file when b names one (the menu the table is made on,
// with b's clamp), else by the exact formula.
func (r *Rule) FitSteps(b design.Budget) (*budget.Terms, error) {
	rule, err := r.OverOutcomes()
	if err != nil {
		return nil, err
	}
	if b.Menu != "" && !(b.Step > 0) {
		// The contract pays only the file's reports: a forecaster held
		// to them picks among them, so they are the risk's menu too.
		d := *r.d
		d.Budget = b
		m, err := DesignMenu(&d)
		if err != nil {
			return nil, err
		}
		m.Clamp = b.Clamp
		fit, err := budget.FitRule(rule, m, b)
		if err != nil {
			return nil, err
		}
		return &budget.Terms{Fit: fit, Low: fit.MinPay, High: fit.MaxPay}, nil
	}
	return budget.StepTerms(rule, b)
}

// Scheme is how a backtest pays under fitted terms t, named name in its
// report (backtest.TermsScheme).
func Scheme(name string, t *budget.Terms) backtest.Scheme { return backtest.TermsScheme(name, t) }

// Backtest replays history h under the schemes (backtest.Run).
func Backtest(ctx context.Context, h *history.Reader, schemes []backtest.Scheme, opt backtest.Options) (*backtest.Result, error) {
	return backtest.Run(ctx, h, schemes, opt)
}

// Distortion is a risk computation for a rule fitted to its budget: the
// solver of the best report for a forecaster of utility u, and the terms
// it was fitted on.
type Distortion struct {
	*risk.Solver
	terms *budget.Terms
	n     int
}

// Distort sets up the risk computation of the rule under fitted terms t
// (from FitSteps) for utility u over initial wealth plus pay.
func (r *Rule) Distort(t *budget.Terms, u risk.Utility, wealth float64) (*Distortion, error) {
	rule, err := r.OverOutcomes()
	if err != nil {
		return nil, err
	}
	s, err := risk.NewSolver(rule, risk.TermsContract(t), u, wealth)
	if err != nil {
		return nil, err
	}
	return &Distortion{Solver: s, terms: t, n: rule.Outcomes()}, nil
}

// SmallestPay is the smallest payment terms t can make, as a risk
// computation counts it (below the floor only where rounding put one).
func SmallestPay(t *budget.Terms) float64 { return risk.TermsContract(t).MinPay }

// MenuPick is the menu item a forecaster held to the rounded table picks
// for belief q, nil without a menu.
func (d *Distortion) MenuPick(q []float64) []float64 { return risk.MenuPick(d.terms, d.Solver, q) }

// PayLine says in words how pay follows from effort and what it was
// fitted on: the one wording of the command and the workbench.
func (d *Distortion) PayLine() string { return risk.PayDesc(d.terms) }

// Curve is the distortion over the beliefs risk.CurveBeliefs gives for the
// outcomes and the terms' report floor: the best report of each belief
// solved (a belief not settled is in Curve.Failed). toward[i] is the
// outcome Curve.Points[i] heads for (n > 2; nil for n = 2); along says in
// words what the beliefs are.
func (d *Distortion) Curve(ctx context.Context, progress pool.Progress) (curve *risk.Curve, toward []int, along string, err error) {
	beliefs, to, along := risk.CurveBeliefs(d.n, d.terms.Fit.ReportFloor)
	if curve, err = d.Distortion(ctx, beliefs, progress); err != nil {
		return nil, nil, "", err
	}
	// toward follows the solved points only.
	for i, j := 0, 0; i < len(beliefs) && j < len(curve.Points) && to != nil; i++ {
		if floats.EqualApprox(beliefs[i], curve.Points[j].Belief, 1e-12) {
			toward = append(toward, to[i])
			j++
		}
	}
	return curve, toward, along, nil
}

// DefaultBelief is the belief a risk computation shows when none is
// given: budget b's reference belief, else the uniform one over n.
func DefaultBelief(b design.Budget, n int) []float64 { return risk.DefaultBelief(b, n) }

// ReliabilityCurves are the PAV reliability curves, with consistency
// bands, of the forecasters a backtest result details, for event 0 of a
// two-outcome design (backtest.ReliabilityCurves).
func ReliabilityCurves(res *backtest.Result) []backtest.Curve {
	return backtest.ReliabilityCurves(res, 0)
}

// AllReliabilityCurves are ReliabilityCurves for every forecaster, not
// only the detailed ones; it reads the forecasts once more.
func AllReliabilityCurves(res *backtest.Result) ([]backtest.Curve, error) {
	return backtest.AllReliabilityCurves(res, 0)
}

// StepMenu is the report menu of budget b's step over n outcomes, reports
// below b's report floor left out (budget.StepMenu).
func StepMenu(n int, b design.Budget) (*budget.Menu, error) {
	return budget.StepMenu(n, b.Step, b.ReportFloor)
}

// FileMenu is the report menu read from the CSV file at path, for n
// outcomes (budget.FileMenu).
func FileMenu(path string, n int) (*budget.Menu, error) { return budget.FileMenu(path, n) }

// DesignMenu is the report menu of the file design d names in its budget
// (Budget.Menu, read relative to the design's folder). An error says it
// is the design's menu: a bare "open x.csv: no such file" after a design
// was given would not say which setting named the file.
func DesignMenu(d *design.Design) (*budget.Menu, error) {
	m, err := budget.FileMenu(d.MenuPath(), d.N())
	if err != nil {
		return nil, fmt.Errorf("the design's report menu (menu = %q under [budget]): %w", d.Budget.Menu, err)
	}
	// The record names the file as the design does, beside the design,
	// not by this machine's absolute path: the record goes into annexes
	// that other people sign and keep.
	m.Desc = fmt.Sprintf("%d reports listed in %s (the design's menu file)", len(m.Reports), d.Budget.Menu)
	return m, nil
}
