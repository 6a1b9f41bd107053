package budget

import (
	"context"
	"fmt"
	"math"

	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/formula"
	"scorewright/internal/numfmt"
	"scorewright/internal/simplex"
)

// Terms is a rule fitted to a budget together with the terms on which a
// forecast is paid under it: on a report menu (an item earns exactly its
// table entry, a forecast off the menu the same formula A - B·L, rounded)
// or, without a menu, by the formula at every forecast as written. It is
// the one shape of a fitted table that the backtest, the risk
// computations, the command line and the workbench share, so that they
// pay and describe a rule alike. Make it with TableTerms, FormulaTerms or
// StepTerms.
type Terms struct {
	// Fit is the fitted table; its Rule is the rule as given.
	Fit *Fit
	// Recheck is the menu re-check of the rounded table; nil when nothing
	// was re-checked (no menu, or a risk computation, which searches the
	// forecaster's best report itself).
	Recheck *Recheck
	// ByFormula is set when there is no report menu: every forecast is
	// paid by the formula at the forecast (Fit.Menu is then only the grid
	// the efforts' range was found on).
	ByFormula bool
	// Low and High are the payments the budget promises to stay within;
	// a backtest counts payments outside.
	Low, High float64
	// RecordFloor, when positive, says that forecasts giving an outcome
	// less are recorded as the menu records its items (FloorReport).
	RecordFloor float64
	// Notes say how forecasts are recorded and paid, for the report under
	// the results.
	Notes []string
	// Warning, when set, says the fitted table failed its re-check, so the
	// table command would refuse to export it.
	Warning string
}

// MenuTolerance is how close a forecast must be to a menu item, entry by
// entry, to count as that item: far below any printed precision, far
// above the error of renormalising a row that summed to 1 within 1e-6.
const MenuTolerance = 1e-9

// TableTerms fits rule r to budget b on menu m and re-checks the fitted
// table: the terms of the payment table itself. recordFloor says that
// forecasts below b.ReportFloor are recorded as the menu records its items
// (true when the menu was built from the step and the report floor, false
// for a menu read from a file). A fit error is returned as FitRule
// returned it.
func TableTerms(ctx context.Context, r *bregman.Rule, m *Menu, b design.Budget, recordFloor bool) (*Terms, error) {
	fit, err := FitRule(r, m, b)
	if err != nil {
		return nil, err
	}
	t := &Terms{Fit: fit, Low: fit.MinPay, High: fit.MaxPay}
	if t.Recheck, err = fit.Recheck(ctx, RecheckSettings{}); err != nil {
		return nil, err
	}
	if !t.Recheck.Passed {
		t.Warning = fmt.Sprintf("the table this rule fits to fails its re-check (smallest incentive margin %s): after scaling and rounding some menu items are not the strict best report for a forecaster who believes them, so the table command would refuse to export it; see scorewright table", numfmt.Margin(t.Recheck.MinMargin))
	}
	if f := b.ReportFloor; f > 0 && recordFloor {
		// The menu gives no outcome less than the floor; a forecast that
		// did is recorded as the menu would record it.
		t.RecordFloor = f
		t.Notes = append(t.Notes, fmt.Sprintf("forecasts giving an outcome less than the report floor %s are recorded as the menu records its items: raised to %s, the difference taken from the largest entry", table.FormatNumber(f), table.FormatNumber(f)))
	}
	return t, nil
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

// FormulaTerms fits rule r to budget b without a report menu: A and B are
// fitted on the grid of FitStep, and every forecast is paid A - B·effort
// at the forecast as written (rounded to the budget's unit, if any), never
// moved to a menu item, but raised to the budget's report floor, if any,
// as the fit's reports were; clamp, if positive, pays as if each probability
// were at least clamp, as the table command does. Payments beyond the
// budget (a forecast between grid points can reach past the grid's
// extremes) are counted by the backtest, not hidden. There is no table,
// so nothing is re-checked.
func FormulaTerms(r *bregman.Rule, b design.Budget, clamp float64) (*Terms, error) {
	n := r.Outcomes()
	step := FitStep(n)
	m, err := StepMenu(n, step, b.ReportFloor)
	if err != nil {
		return nil, err
	}
	m.Clamp = clamp
	fit, err := FitRule(r, m, b)
	if err != nil {
		return nil, err
	}
	t := &Terms{Fit: fit, ByFormula: true, Low: b.Floor, High: fit.Cap,
		Notes: []string{fmt.Sprintf("no report menu was given: every forecast is paid by the exact formula at the forecast as written (A and B fitted to the budget on reports in steps of %s)", table.FormatNumber(step))}}
	if f := b.ReportFloor; f > 0 {
		// A and B were fitted on reports no lower than the floor: a
		// forecast below it is paid (and decomposed) as those reports
		// are, not at the -Inf the log rule gives a forecast of 0.
		t.RecordFloor = f
		t.Notes = append(t.Notes, fmt.Sprintf("forecasts giving an outcome less than the report floor %s are paid as the fit priced its reports: raised to %s, the difference taken from the largest entry", table.FormatNumber(f), table.FormatNumber(f)))
	}
	return t, nil
}

// MenuError is a step menu the budget's step and report floor cannot make.
type MenuError struct{ Err error }

func (e *MenuError) Error() string { return e.Err.Error() }

// Unwrap returns the menu's own error.
func (e *MenuError) Unwrap() error { return e.Err }

// StepTerms fits rule r to b on its step menu, or, when the budget has no
// step, over the finest simplex grid of at most MaxMenu reports with no
// rounding, every report then paid by the exact formula (ByFormula); b's
// clamp applies either way. The
// table is not re-checked. Errors: a *MenuError, or the fit's error as
// FitRule returned it (an *UnboundedError for a rule infinite where a
// report gives an outcome 0).
func StepTerms(r *bregman.Rule, b design.Budget) (*Terms, error) {
	n := r.Outcomes()
	exact := !(b.Step > 0)
	step := b.Step
	if exact {
		step = 1 / float64(simplex.Resolution(n, 1000, MaxMenu))
		b.Unit = 0
	}
	menu, err := StepMenu(n, step, b.ReportFloor)
	if err != nil {
		return nil, &MenuError{err}
	}
	// The budget's clamp, as the table applies it: without it a rule
	// infinite at 0 (the log rule) would be refused here although its
	// clamped table pays.
	menu.Clamp = b.Clamp
	fit, err := FitRule(r, menu, b)
	if err != nil {
		return nil, err
	}
	return &Terms{Fit: fit, ByFormula: exact, Low: fit.MinPay, High: fit.MaxPay}, nil
}

// Menu is the report menu forecasts are held to; nil when every forecast
// is paid by the formula.
func (t *Terms) Menu() *Menu {
	if t.ByFormula {
		return nil
	}
	return t.Fit.Menu
}

// OnMenu returns a membership test for the menu's reports (entry by entry
// within MenuTolerance), nil when there is no menu. It is meant to be
// called once per distinct forecast (the backtest caches the rest), so a
// map keyed by the report rounded to MenuTolerance is quick enough.
func (t *Terms) OnMenu() func(p []float64) bool {
	if t.ByFormula {
		return nil
	}
	type key [formula.MaxOutcomes]int64
	set := make(map[key]bool, len(t.Fit.Menu.Reports))
	keyOf := func(p []float64) key {
		var k key
		for i, x := range p {
			k[i] = int64(math.Round(x / MenuTolerance))
		}
		return k
	}
	for _, r := range t.Fit.Menu.Reports {
		set[keyOf(r)] = true
	}
	return func(p []float64) bool { return set[keyOf(p)] }
}

// Adjust is the report the terms pay for forecast p, written into dst
// (the menu's clamp); nil when forecasts are paid as written.
func (t *Terms) Adjust() func(dst, p []float64) []float64 {
	c := t.Fit.Clamp
	if !(c > 0) {
		return nil
	}
	return func(dst, p []float64) []float64 { return ClampReport(dst, p, c) }
}

// Record is the report the terms record for forecast p, written into dst
// (raised to the report floor); nil when forecasts are recorded as
// written.
func (t *Terms) Record() func(dst, p []float64) []float64 {
	f := t.RecordFloor
	if !(f > 0) {
		return nil
	}
	return func(dst, p []float64) []float64 { return FloorReport(dst, p, f) }
}

// PayFormula says how pay follows from effort, e.g. "pay = 10 - 5·effort,
// rounded to multiples of 0.5, nearest, halves away from zero".
func (t *Terms) PayFormula() string {
	fit := t.Fit
	f := fmt.Sprintf("pay = %s - %s·effort", table.FormatNumber(fit.A), table.FormatNumber(fit.B))
	if fit.Unit == 0 {
		return f + ", not rounded"
	}
	return f + ", rounded " + fit.RoundingDesc()
}

// MenuDesc describes the menu forecasts are held to, or says there is
// none.
// BudgetDesc states the budget the pay was fitted to: over the menu's
// reports, or, with no menu, over the grid A and B were fitted on (the
// pay is then the formula at each forecast, with no menu to span).
func (t *Terms) BudgetDesc() string {
	if !t.ByFormula {
		return t.Fit.BudgetDesc()
	}
	grid := "reports in steps of " + table.FormatNumber(FitStep(len(t.Fit.Menu.Reports[0])))
	if t.Fit.MeanPay != nil {
		return fmt.Sprintf("expected pay of a truthful forecaster at the reference belief %s is %s (before rounding); A and B were fitted on %s: the largest effort there pays the floor %s, the smallest %s",
			t.Fit.referenceText(), table.FormatNumber(*t.Fit.MeanPay), grid, table.FormatNumber(t.Fit.Floor), table.FormatNumber(t.Fit.Cap))
	}
	return fmt.Sprintf("payments span [%s, %s] over %s and every outcome, the grid A and B were fitted on (before rounding)", table.FormatNumber(t.Fit.Floor), table.FormatNumber(t.Fit.Cap), grid)
}

// MenuDesc describes the report menu, or says there is none.
func (t *Terms) MenuDesc() string {
	if t.ByFormula {
		return "none: reports are paid by the exact formula"
	}
	return t.Fit.MenuDesc()
}
