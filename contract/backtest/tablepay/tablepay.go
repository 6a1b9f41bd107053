// Package tablepay pays a backtest as a fitted payment table would: the
// rule is fitted to the design's budget on its report menu
// (contract/budget), a forecast on the menu earns exactly its table entry
// and one off the menu the same formula, A - B·L then rounded. The
// command `scorewright backtest` and the workbench share it, so that the
// two pay a history alike.
package tablepay

import (
	"context"
	"fmt"
	"math"

	"scorewright/contract/backtest"
	"scorewright/contract/budget"
	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/formula"
)

// MenuTolerance is how close a forecast must be to a menu item, entry by
// entry, to count as that item: far below any printed precision, far
// above the error of renormalising a row that summed to 1 within 1e-6.
const MenuTolerance = 1e-9

// Fitted is a rule fitted to a budget, ready to be replayed.
type Fitted struct {
	// Scheme pays as the table does; its Name is the one given to New.
	Scheme backtest.Scheme
	// Fit is the fitted table and Recheck its menu re-check.
	Fit     *budget.Fit
	Recheck *budget.Recheck
	// Notes say how forecasts are recorded (the report floor), for the
	// report under the results.
	Notes []string
	// Warning, when set, says the fitted table failed its re-check, so the
	// table command would refuse to export it.
	Warning string
}

// New fits rule r to budget b on menu m and re-checks the fitted table.
// recordFloor says that forecasts below b.ReportFloor are recorded as the
// menu records its items (true when the menu was built from the step and
// the report floor, false for a menu read from a file). A fit error is
// returned as budget.FitRule returned it.
func New(ctx context.Context, name string, r *bregman.Rule, m *budget.Menu, b design.Budget, recordFloor bool) (*Fitted, error) {
	fit, err := budget.FitRule(r, m, b)
	if err != nil {
		return nil, err
	}
	out := &Fitted{Fit: fit, Scheme: backtest.Scheme{Name: name, Rule: r, Pay: fit, OnMenu: MenuSet(m.Reports), Low: fit.MinPay, High: fit.MaxPay}}
	rc, err := fit.Recheck(ctx, budget.RecheckSettings{})
	if err != nil {
		return nil, err
	}
	out.Recheck = rc
	if !rc.Passed {
		out.Warning = fmt.Sprintf("the table this rule fits to fails its re-check (smallest incentive margin %s): after scaling and rounding some menu items are not the strict best report for a forecaster who believes them, so the table command would refuse to export it; see scorewright table", table.FormatNumber(rc.MinMargin))
	}
	if c := fit.Clamp; c > 0 {
		out.Scheme.Adjust = func(dst, p []float64) []float64 { return budget.ClampReport(dst, p, c) }
	}
	if f := b.ReportFloor; f > 0 && recordFloor {
		// The menu gives no outcome less than the floor; a forecast that
		// did is recorded as the menu would record it.
		out.Scheme.Record = func(dst, p []float64) []float64 { return budget.FloorReport(dst, p, f) }
		out.Notes = append(out.Notes, fmt.Sprintf("forecasts giving an outcome less than the report floor %s are recorded as the menu records its items: raised to %s, the difference taken from the largest entry", table.FormatNumber(f), table.FormatNumber(f)))
	}
	return out, nil
}

// MenuSet returns a membership test for the menu's reports. It is called
// once per distinct forecast (the backtest caches the rest), so a map
// keyed by the report rounded to MenuTolerance is quick enough.
func MenuSet(reports [][]float64) func(p []float64) bool {
	type key [formula.MaxOutcomes]int64
	set := make(map[key]bool, len(reports))
	keyOf := func(p []float64) key {
		var k key
		for i, x := range p {
			k[i] = int64(math.Round(x / MenuTolerance))
		}
		return k
	}
	for _, r := range reports {
		set[keyOf(r)] = true
	}
	return func(p []float64) bool { return set[keyOf(p)] }
}

// PayFormula says how pay follows from effort, e.g. "pay = 10 - 5·effort,
// rounded to multiples of 0.5, nearest, halves away from zero".
func PayFormula(fit *budget.Fit) string {
	f := fmt.Sprintf("pay = %s - %s·effort", table.FormatNumber(fit.A), table.FormatNumber(fit.B))
	if fit.Unit == 0 {
		return f + ", not rounded"
	}
	return f + ", rounded " + fit.RoundingDesc()
}

// FitStep is the grid a rule is fitted on when there is no report menu:
// A and B come from the efforts on it (every report in steps of FitStep),
// then every forecast is paid by the formula at the forecast itself.
func FitStep(n int) float64 {
	switch {
	case n <= 4:
		return 0.05
	case n <= 6:
		return 0.1
	}
	return 0.25
}

// Formula fits rule r to budget b without a report menu: A and B are
// fitted on the grid of FitStep, and every forecast is paid A - B·effort
// at the forecast as written (rounded to the budget's unit, if any), never
// moved to a menu item; clamp, if positive, pays as if each probability
// were at least clamp, as the table command does. Payments beyond the budget (a forecast between
// grid points can reach past the grid's extremes) are counted by the
// backtest, not hidden. There is no table, so nothing is re-checked.
func Formula(name string, r *bregman.Rule, b design.Budget, clamp float64) (*Fitted, error) {
	n := r.Outcomes()
	step := FitStep(n)
	m, err := budget.StepMenu(n, step, b.ReportFloor)
	if err != nil {
		return nil, err
	}
	m.Clamp = clamp
	fit, err := budget.FitRule(r, m, b)
	if err != nil {
		return nil, err
	}
	out := &Fitted{Fit: fit, Scheme: backtest.Scheme{Name: name, Rule: r, Pay: fit, Low: b.Floor, High: fit.Cap}}
	if c := fit.Clamp; c > 0 {
		out.Scheme.Adjust = func(dst, p []float64) []float64 { return budget.ClampReport(dst, p, c) }
	}
	out.Notes = append(out.Notes, fmt.Sprintf("no report menu was given: every forecast is paid by the exact formula at the forecast as written (A and B fitted to the budget on reports in steps of %s)", table.FormatNumber(step)))
	return out, nil
}
