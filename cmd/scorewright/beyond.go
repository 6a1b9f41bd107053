package main

import (
	"math"

	"scorewright/generator/bregman"
	"scorewright/generator/budget"
	"scorewright/generator/design"
	"scorewright/generator/emphasis"
	"scorewright/generator/formula"
	"scorewright/generator/lottery"
	"scorewright/generator/table"
)

// emphasisRule integrates an emphasis-mode design's weight into a binary
// rule. A weight that is negative or not finite somewhere on the check
// grid is refused, naming where; an unbounded rule is built, and its
// warnings are available through ruleWarnings.
func emphasisRule(d *design.Design) (*bregman.Rule, error) {
	g, err := emphasis.New(d.Formula, emphasis.Options{Params: d.Params})
	if _, ok := err.(*formula.Error); ok {
		return nil, formulaError("emphasis", err)
	} else if err != nil {
		return nil, usagef("%v", err)
	}
	if err := g.Diagnostics().Problem(); err != nil {
		return nil, usagef("%v", err)
	}
	return &bregman.Rule{Gen: g, Labels: d.Labels}, nil
}

// lotteryTable turns a fitted money table into chances of winning a
// prize of cap - floor, with the bounds taken wide enough to hold every
// rounded payment.
func lotteryTable(tb *table.Table, fit *budget.Fit) error {
	lo, hi := math.Min(fit.Floor, fit.MinPay), math.Max(fit.Cap, fit.MaxPay)
	if err := lottery.Convert(tb, lo, hi); err != nil {
		return usagef("--lottery: %v", err)
	}
	return nil
}

// ruleWarnings are remarks about a rule a user should see beside its
// numbers, such as an emphasis weight that makes the rule unbounded.
func ruleWarnings(r *bregman.Rule) []string {
	if g, ok := r.Gen.(*emphasis.Generator); ok {
		return g.Diagnostics().Warnings()
	}
	return nil
}
