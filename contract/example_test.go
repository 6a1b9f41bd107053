package contract_test

import (
	"context"
	"fmt"

	"scorewright"
	"scorewright/generator/design"
)

// An orchard co-operative pays a forecaster for frost-night forecasts
// with the quadratic rule, between 0 and 100 per forecast, on reports in
// steps of 10 %, rounded to whole units, and re-checks the rounded table
// before anyone signs it. The table's two columns at a report of 70 %
// frost are what is paid if frost comes and if it does not.
func Example() {
	d := &design.Design{Version: design.SchemaVersion, Mode: design.ModeGenerator,
		Labels: []string{"frost", "clear"}, Preset: "quadratic", Formula: "1 - sum(p^2)",
		Budget: design.Budget{Floor: 0, Cap: 100, Step: 0.1, Unit: 1}}
	r, err := scorewright.Open(d)
	if err != nil {
		fmt.Println(err)
		return
	}
	t, err := r.Table(context.Background(), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("pay = %g - %g·effort\n", t.Fit.A, t.Fit.B)
	fmt.Println("at 70 % frost:", t.Fit.Pays[7])
	fmt.Println("re-check passed:", t.Passed())
	tb := r.Export(t, "example", "2031-03-01")
	fmt.Println("columns:", tb.Labels)
	// Output:
	// pay = 100 - 50·effort
	// at 70 % frost: [91 51]
	// re-check passed: true
	// columns: [frost clear]
}
