package budget_test

import (
	"bytes"
	"context"
	"fmt"
	"strings"

	"scorewright/contract/budget"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

// An orchard co-operative pays a contracted forecaster for frost-night
// forecasts with the quadratic rule, between 0 and 100 per forecast,
// reports in steps of 10 %, whole currency units.
func ExampleFitRule() {
	gen, _ := bregman.NewFormula("1 - sum(p^2)", bregman.Options{Outcomes: 2})
	rule := &bregman.Rule{Gen: gen, Labels: []string{"frost", "clear"}}
	menu, _ := budget.StepMenu(2, 0.1, 0)
	fit, err := budget.FitRule(rule, menu, design.Budget{Floor: 0, Cap: 100, Unit: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	rc, _ := fit.Recheck(context.Background(), budget.RecheckSettings{})
	fmt.Printf("A = %g, B = %g\n", fit.A, fit.B)
	fmt.Println("pay at 70 %:", fit.Pays[7])
	fmt.Println("re-check passed:", rc.Passed, "smallest margin:", rc.MinMargin)

	t := fit.Table(rc, budget.Info{Formula: "1 - sum(p^2)", Version: "example", Date: "2026-03-01"})
	var csv bytes.Buffer
	_ = t.Write(&csv, "csv") // or md, json, tex, svg, png, pdf
	lines := strings.Split(strings.TrimSpace(csv.String()), "\n")
	fmt.Println(lines[len(lines)-4])
	// Output:
	// A = 100, B = 50
	// pay at 70 %: [91 51]
	// re-check passed: true smallest margin: 1
	// 0.7,0.3,91,51
}
