// Package bregmantest builds rules for the tests of the packages that
// compute with them (contract, verify), so that each need not write its
// own helper.
package bregmantest

import (
	"testing"

	"scorewright/generator/bregman"
)

// Rule compiles generator src under opt into a rule over opt.Outcomes
// outcomes named "1".."n" (ordered as opt says), failing t when it does
// not compile.
func Rule(t testing.TB, src string, opt bregman.Options) *bregman.Rule {
	t.Helper()
	f, err := bregman.NewFormula(src, opt)
	if err != nil {
		t.Fatalf("%q: %v", src, err)
	}
	return &bregman.Rule{Gen: f, Ordered: opt.Ordered}
}
