package main

import (
	"context"
	"flag"

	"scorewright/contract/backtest/tablepay"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

// budgetFit returns the fitFunc the command uses: the payment table's own
// fit (contract/budget, through contract/backtest/tablepay, which the
// workbench shares) on the menu the table command would build from the
// same flags, so that a forecast on the menu is paid exactly its table
// entry and one off the menu by the same formula, A - B·L then rounded.
// With neither --step nor --menu every forecast is paid by the formula at
// the forecast as written (tablepay.Formula).
func budgetFit(fs *flag.FlagSet, menuFile string, clamp float64) fitFunc {
	return func(r *bregman.Rule, d *design.Design) (*money, error) {
		stepSet := false
		fs.Visit(func(f *flag.Flag) { stepSet = stepSet || f.Name == "step" })
		var f *tablepay.Fitted
		var err error
		menuDesc := ""
		if clamp == 0 {
			clamp = d.Budget.Clamp
		}
		if menuFile == "" && !stepSet && d.Budget.Step == 0 && d.Budget.Menu == "" {
			if f, err = tablepay.Formula("", r, d.Budget, clamp); err != nil {
				return nil, fitError(err)
			}
			menuDesc = "none: reports are paid by the exact formula"
		} else {
			menu, err := tableMenu(fs, &tableFlags{menu: menuFile, clamp: clamp}, d)
			if err != nil {
				return nil, err
			}
			if f, err = tablepay.New(context.Background(), "", r, menu, d.Budget, menuFile == "" && (stepSet || d.Budget.Menu == "")); err != nil {
				return nil, fitError(err)
			}
			menuDesc = f.Fit.MenuDesc()
		}
		fit := f.Fit
		return &money{
			pay:      f.Scheme.Pay,
			onMenu:   f.Scheme.OnMenu,
			low:      f.Scheme.Low,
			high:     f.Scheme.High,
			formula:  tablepay.PayFormula(fit),
			menu:     menuDesc,
			budget:   fit.BudgetDesc(),
			decimals: fit.Decimals(),
			adjust:   f.Scheme.Adjust,
			record:   f.Scheme.Record,
			notes:    f.Notes,
			warning:  f.Warning,
		}, nil
	}
}
