package main

import (
	"context"
	"flag"

	"scorewright"
	"scorewright/contract/budget"
	"scorewright/generator/design"
)

// backtestTerms fits rule r the way the payment table is fitted
// (Rule.FitMenu, whose terms the workbench shares) on the menu the
// table command would build from the same flags, so that a forecast on the
// menu is paid exactly its table entry and one off the menu by the same
// formula, A - B·L then rounded. With neither --step nor --menu every
// forecast is paid by the formula at the forecast as written
// (Rule.FitFormula).
func backtestTerms(fs *flag.FlagSet, menuFile string, clamp float64, r *scorewright.Rule, d *design.Design) (*budget.Terms, error) {
	stepSet := false
	fs.Visit(func(f *flag.Flag) { stepSet = stepSet || f.Name == "step" })
	if clamp == 0 {
		clamp = d.Budget.Clamp // the design's clamp, unless the flag gives one
	}
	if menuFile == "" && !stepSet && d.Budget.Step == 0 && d.Budget.Menu == "" {
		t, err := r.FitFormula(d.Budget, clamp)
		if err != nil {
			return nil, fitError(err)
		}
		return t, nil
	}
	menu, err := tableMenu(fs, &tableFlags{menu: menuFile, clamp: clamp}, d)
	if err != nil {
		return nil, err
	}
	// Forecasts are recorded at the report floor only on a menu built from
	// the step, not on one read from a file (the flag's or the design's).
	fromStep := menuFile == "" && (stepSet || d.Budget.Menu == "")
	t, err := r.FitMenu(context.Background(), menu, d.Budget, fromStep)
	if err != nil {
		return nil, fitError(err)
	}
	return t, nil
}
