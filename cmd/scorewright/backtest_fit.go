package main

import (
	"context"
	"flag"
	"fmt"
	"math"

	"scorewright/generator/bregman"
	"scorewright/generator/budget"
	"scorewright/generator/design"
	"scorewright/generator/table"
)

// menuTolerance is how close a forecast must be to a menu item, entry by
// entry, to count as that item: far below any printed precision, far
// above the error of renormalising a row that summed to 1 within 1e-6.
const menuTolerance = 1e-9

// budgetFit returns the fitFunc the command uses: the payment table's own
// fit (generator/budget) on the menu the table command would build from
// the same flags, so that a forecast on the menu is paid exactly its table
// entry and one off the menu by the same formula, A - B·L then rounded.
func budgetFit(fs *flag.FlagSet, menuFile string, clamp float64) fitFunc {
	return func(r *bregman.Rule, d *design.Design) (*money, error) {
		menu, err := tableMenu(fs, &tableFlags{menu: menuFile, clamp: clamp}, d)
		if err != nil {
			return nil, err
		}
		fit, err := budget.FitRule(r, menu, d.Budget)
		if err != nil {
			return nil, fitError(err)
		}
		m := &money{
			pay:      fit,
			onMenu:   menuSet(menu.Reports),
			low:      fit.MinPay,
			high:     fit.MaxPay,
			formula:  payFormula(fit),
			menu:     fit.MenuDesc(),
			budget:   fit.BudgetDesc(),
			decimals: fit.Decimals(),
		}
		rc, err := fit.Recheck(context.Background(), budget.RecheckSettings{})
		if err != nil {
			return nil, err
		}
		if !rc.Passed {
			m.warning = fmt.Sprintf("the table this rule fits to fails its re-check (smallest incentive margin %s): after scaling and rounding some menu items are not the strict best report for a forecaster who believes them, so the table command would refuse to export it; see scorewright table", table.FormatNumber(rc.MinMargin))
		}
		if c := fit.Clamp; c > 0 {
			m.adjust = func(dst, p []float64) []float64 { return budget.ClampReport(dst, p, c) }
		}
		if f := d.Budget.ReportFloor; f > 0 && menuFile == "" {
			// The menu gives no outcome less than the floor; a forecast
			// that did is recorded as the menu would record it.
			m.record = func(dst, p []float64) []float64 { return budget.FloorReport(dst, p, f) }
			m.notes = append(m.notes, fmt.Sprintf("forecasts giving an outcome less than the report floor %s are recorded as the menu records its items: raised to %s, the difference taken from the largest entry", table.FormatNumber(f), table.FormatNumber(f)))
		}
		return m, nil
	}
}

// menuSet returns a membership test for the menu's reports. It is called
// once per distinct forecast (the backtest caches the rest), so a map
// keyed by the report rounded to menuTolerance is quick enough.
func menuSet(reports [][]float64) func(p []float64) bool {
	type key [12]int64
	set := make(map[key]bool, len(reports))
	keyOf := func(p []float64) key {
		var k key
		for i, x := range p {
			k[i] = int64(math.Round(x / menuTolerance))
		}
		return k
	}
	for _, r := range reports {
		set[keyOf(r)] = true
	}
	return func(p []float64) bool { return set[keyOf(p)] }
}

// payFormula says how pay follows from effort, e.g. "pay = 10 - 5·effort,
// rounded to multiples of 0.5, nearest, halves away from zero".
func payFormula(fit *budget.Fit) string {
	f := fmt.Sprintf("pay = %s - %s·effort", table.FormatNumber(fit.A), table.FormatNumber(fit.B))
	if fit.Unit == 0 {
		return f + ", not rounded"
	}
	return f + ", rounded " + fit.RoundingDesc()
}
