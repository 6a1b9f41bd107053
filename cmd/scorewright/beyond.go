package main

import (
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/emphasis"
	"scorewright/generator/formula"
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

// ruleWarnings are remarks about a rule a user should see beside its
// numbers, such as an emphasis weight that makes the rule unbounded.
func ruleWarnings(r *bregman.Rule) []string {
	if g, ok := r.Gen.(*emphasis.Generator); ok {
		return g.Diagnostics().Warnings()
	}
	return nil
}
