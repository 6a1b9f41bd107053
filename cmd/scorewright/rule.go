package main

import (
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/formula"
)

// categoricalRule builds the Bregman rule of a design over outcomes: a
// generator formula, or (n = 2) an emphasis weight integrated twice.
func categoricalRule(d *design.Design) (*bregman.Rule, error) {
	switch d.Mode {
	case design.ModeGenerator:
		r, err := d.Rule()
		return r, formulaError("generator", err)
	case design.ModeEmphasis:
		return emphasisRule(d)
	}
	return nil, usagef("this command needs a generator rule over outcomes, and the design is in %s mode", d.Mode)
}

// formulaError turns a formula error into a one-line usage error naming
// which formula it is in.
func formulaError(which string, err error) error {
	if err == nil {
		return nil
	}
	if fe, ok := err.(*formula.Error); ok {
		return usagef("%s formula %s", which, fe.Error())
	}
	return usagef("%s formula: %v", which, err)
}
