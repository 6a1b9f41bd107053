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
func budgetFit(fs *flag.FlagSet, menuFile string, clamp float64) fitFunc {
	return func(r *bregman.Rule, d *design.Design) (*money, error) {
		menu, err := tableMenu(fs, &tableFlags{menu: menuFile, clamp: clamp}, d)
		if err != nil {
			return nil, err
		}
		f, err := tablepay.New(context.Background(), "", r, menu, d.Budget, menuFile == "")
		if err != nil {
			return nil, fitError(err)
		}
		fit := f.Fit
		return &money{
			pay:      f.Scheme.Pay,
			onMenu:   f.Scheme.OnMenu,
			low:      f.Scheme.Low,
			high:     f.Scheme.High,
			formula:  tablepay.PayFormula(fit),
			menu:     fit.MenuDesc(),
			budget:   fit.BudgetDesc(),
			decimals: fit.Decimals(),
			adjust:   f.Scheme.Adjust,
			record:   f.Scheme.Record,
			notes:    f.Notes,
			warning:  f.Warning,
		}, nil
	}
}
