package main

import (
	"scorewright"
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
