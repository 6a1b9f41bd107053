package main

import (
	"scorewright"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

// openRule opens a design for the engine (package scorewright); a formula
// that does not compile is a usage error naming which formula it is.
func openRule(d *design.Design) (*scorewright.Rule, error) {
	r, err := scorewright.Open(d)
	if err != nil {
		return nil, usagef("%v", err)
	}
	return r, nil
}

// categoricalRule opens a design and returns its rule over outcomes: a
// generator formula, or (n = 2) an emphasis weight integrated twice.
func categoricalRule(d *design.Design) (*bregman.Rule, error) {
	r, err := openRule(d)
	if err != nil {
		return nil, err
	}
	rule, err := r.OverOutcomes()
	if err != nil {
		return nil, usagef("%v", err)
	}
	return rule, nil
}
