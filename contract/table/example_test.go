package table_test

import (
	"context"
	"fmt"
	"os"

	"scorewright/contract/budget"
	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

// A table is the menu of reports with what each pays under every
// outcome, and the record that says how it was made; every format
// (table.Formats) writes the same cells and the same record. Here the
// quadratic rule fitted to 0..100 on reports in steps of 25 %, whole
// units: pay = 100 - 50·effort, so a report of 75 % frost earns
// 100 - 50·(0.25² + 0.25²) = 93.75, rounded 94, if frost comes (derived
// by hand).
func ExampleTable_Write() {
	gen, err := bregman.NewFormula("1 - sum(p^2)", bregman.Options{Outcomes: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	rule := &bregman.Rule{Gen: gen, Labels: []string{"frost", "clear"}}
	menu, err := budget.StepMenu(2, 0.25, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fit, err := budget.FitRule(rule, menu, design.Budget{Floor: 0, Cap: 100, Unit: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	rc, err := fit.Recheck(context.Background(), budget.RecheckSettings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	var t *table.Table = fit.Table(rc, budget.Info{Formula: "1 - sum(p^2)", Preset: "quadratic", Version: "example", Date: "2031-03-01"})
	if err := t.Write(os.Stdout, "md"); err != nil {
		fmt.Println(err)
	}
	// Output:
	// # Payment table
	//
	// | report frost | report clear | pay if frost | pay if clear |
	// |---:|---:|---:|---:|
	// | 0 | 1 | 0 | 100 |
	// | 0.25 | 0.75 | 44 | 94 |
	// | 0.5 | 0.5 | 75 | 75 |
	// | 0.75 | 0.25 | 94 | 44 |
	// | 1 | 0 | 100 | 0 |
	//
	// - **formula:** `1 - sum(p^2)`
	// - **preset:** quadratic
	// - **outcomes:** frost, clear
	// - **menu:** probability of "frost" in steps of 0.25 from 0 to 1 (5 reports)
	// - **payment:** pay(p, k) = A - B·L(p, k), where L(p, k) is the rule's effort for report p when outcome k happens, rounded as stated
	// - **A:** 100
	// - **B:** 50
	// - **budget:** payments span \[0, 100\] over the menu and every outcome (before rounding)
	// - **rounding:** to multiples of 1, nearest, halves away from zero
	// - **re-check:** passed: each of the 5 menu items is the strict best report for a forecaster whose belief is that item, after scaling and rounding (smallest margin 6 at item (0, 1) against (0.25, 0.75)); each compared with every other item, tie tolerance 1e-07
	// - **smallest margin:** 6
	// - **verdict kind:** grid evidence
	// - **note:** expected pay of a truthful forecaster under the exact rule, A - B·H(q) before rounding and menu, ranges from 75 (belief (0.5, 0.5)) to 100 (belief (0, 1)), over beliefs on a simplex grid of step 1/1000 (1001 points), the uniform belief and the menu items; a grid search: evidence, not proof
	// - **note:** buyer's worst case per forecast: 100 (the largest payment in the table); the smallest is 0
	// - **note:** expected pay per forecast on this table, for a forecaster who picks the best menu item for the belief, ranges from 75 (belief (0.38, 0.62)) to 100 (belief (0, 1)), exactly (expected pay is linear in the belief)
	// - **note:** 4 of 1001 grid beliefs sit where two menu items tie for the best report (cell boundaries)
	// - **tool:** scorewright example
	// - **date:** 2031-03-01
	// - **caution:** scorewright checks mathematics, not law.
	// - **caution:** Payment schemes (lottery-style payments especially) can be regulated, for example as gambling, wages or prizes.
	// - **caution:** Have any contract that uses this table reviewed by qualified counsel.
}
