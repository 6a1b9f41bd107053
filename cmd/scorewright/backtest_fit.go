package main

import (
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

// fitBudget fits a rule to its design's budget the way the payment table
// does. The budget fitting lives in generator/budget.
func fitBudget(r *bregman.Rule, d *design.Design) (*money, error) {
	return nil, usagef("backtest needs the budget fitting of the payment table, which is not in this build yet")
}
