package scorewright_test

import (
	"context"
	"fmt"

	"scorewright"
	"scorewright/generator/design"
	"scorewright/verify"
)

// A design is opened once; the Rule does the engine work whatever the
// design's mode. Here the quadratic rule over two outcomes is checked on
// a coarse grid and fitted to a budget of 0 to 10 on a menu of reports in
// steps of 0.25.
func ExampleOpen() {
	d := &design.Design{Version: design.SchemaVersion, Mode: design.ModeGenerator,
		Labels: []string{"frost", "clear"}, Formula: "1 - sum(p^2)",
		Budget: design.Budget{Floor: 0, Cap: 10, Step: 0.25}}
	r, err := scorewright.Open(d)
	if err != nil {
		fmt.Println(err)
		return
	}
	found, err := r.Check(context.Background(), verify.Settings{Resolution: 20})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Statement())
	fmt.Println("verdict:", found.Rule.Verdict, "failed:", found.Failed())
	t, err := r.Table(context.Background(), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	lo, hi := t.Bounds()
	fmt.Printf("table re-check passed: %v; payments in [%g, %g]\n", t.Passed(), lo, hi)
	// Output:
	// generator H = 1 - sum(p^2)
	// verdict: strictly-proper failed: false
	// table re-check passed: true; payments in [0, 10]
}

// A payout someone hands in is audited, not checked: the linear payout
// p[y] rewards exaggeration, and the audit says so.
func ExampleRule_Audit() {
	d := &design.Design{Version: design.SchemaVersion, Mode: design.ModePayout,
		Labels: []string{"yes", "no"}, Formula: "p[y]"}
	r, err := scorewright.Open(d)
	if err != nil {
		fmt.Println(err)
		return
	}
	found, err := r.Audit(context.Background(), verify.Settings{Resolution: 20})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("verdict:", found.Audit.Verdict)
	// Output:
	// verdict: improper
}

// A formula that does not compile is refused at Open, naming which
// formula and where.
func ExampleFormulaError() {
	d := &design.Design{Version: design.SchemaVersion, Mode: design.ModeGenerator,
		Labels: []string{"yes", "no"}, Formula: "1 - sum(q^2)"}
	_, err := scorewright.Open(d)
	fmt.Println(err)
	// Output:
	// generator formula 1:9: unknown name "q"; known here: p, i, w, p1..p2, n, pi, e
}
