package scorewright_test

import (
	"context"
	"fmt"
	"strings"

	"scorewright"
	"scorewright/contract/backtest"
	"scorewright/contract/backtest/history"
	"scorewright/contract/risk"
	"scorewright/generator/design"
)

// frostRule is the quadratic rule over a frost night, budget 0 to 100
// per forecast, reports in steps of 10 % paid in whole units.
func frostRule() *scorewright.Rule {
	d := &design.Design{Version: design.SchemaVersion, Mode: design.ModeGenerator,
		Labels: []string{"frost", "clear"}, Preset: "quadratic", Formula: "1 - sum(p^2)",
		Budget: design.Budget{Floor: 0, Cap: 100, Step: 0.1, Unit: 1}}
	r, err := scorewright.Open(d)
	if err != nil {
		panic(err)
	}
	return r
}

// FitFormula pays every forecast by the formula at the report as written.
// The quadratic rule's effort runs from 0 (certain and right) to 2
// (certain and wrong), so a budget of 0 to 100 is pay = 100 - 50·effort
// (derived by hand).
func ExampleRule_FitFormula() {
	r := frostRule()
	t, err := r.FitFormula(r.Design().Budget, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("pay = %g - %g·effort, by formula: %v, within [%g, %g]\n", t.Fit.A, t.Fit.B, t.ByFormula, t.Low, t.High)
	// Output:
	// pay = 100 - 50·effort, by formula: true, within [0, 100]
}

// FitMenu fits the same rule on the menu of reports the budget's step
// makes, as the payment table is fitted; at a report of 70 % frost the
// table pays 100 - 50·(0.3² + 0.3²) = 91 if frost comes (derived by hand).
func ExampleRule_FitMenu() {
	r := frostRule()
	b := r.Design().Budget
	m, err := scorewright.StepMenu(2, b)
	if err != nil {
		fmt.Println(err)
		return
	}
	t, err := r.FitMenu(context.Background(), m, b, false)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("menu:", len(t.Menu().Reports), "reports; by formula:", t.ByFormula)
	fmt.Println("at 70 % frost:", t.Fit.Pays[7])
	fmt.Println("re-check passed:", t.Recheck.Passed)
	// Output:
	// menu: 11 reports; by formula: false
	// at 70 % frost: [91 51]
	// re-check passed: true
}

// A backtest replays a history of forecasts under fitted terms. Two
// forecasters, two nights: Alder said 70 % frost both times, Birch 50 %;
// the first night had frost, the second not. Alder earns 91 + 51 = 142,
// Birch 75 + 75 = 150 (derived by hand from pay = 100 - 50·effort).
func ExampleBacktest() {
	r := frostRule()
	b := r.Design().Budget
	t, err := r.FitFormula(b, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	csv := "forecaster,question,outcome,frost,clear\n" +
		"Alder,night 1,frost,0.7,0.3\n" +
		"Birch,night 1,frost,0.5,0.5\n" +
		"Alder,night 2,clear,0.7,0.3\n" +
		"Birch,night 2,clear,0.5,0.5\n"
	h, err := history.NewReader(strings.NewReader(csv), r.Design().Labels, history.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := scorewright.Backtest(context.Background(), h, []backtest.Scheme{scorewright.Scheme("quadratic", t)}, backtest.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer res.Close()
	for _, f := range res.Forecasters {
		fmt.Printf("%s: %d forecasts, total %g, rank %d\n", f.Name, f.Count, f.Money[0].Total, f.Rank[0])
	}
	// Output:
	// Alder: 2 forecasts, total 142, rank 2
	// Birch: 2 forecasts, total 150, rank 1
}

// A forecaster averse to risk (constant relative risk aversion 2, on a
// wealth of 50 plus the pay) who believes 80 % frost does best to report
// less than 80 %: the rule pays for honesty only to a forecaster who
// values money linearly. FitSteps fits the rule as the risk computation
// does, on the step's menu. The best report maximises
// 0.8·u(150 - 100·(1-r)²) + 0.2·u(150 - 100·r²) with u(w) = -1/w: a brute
// force over r in steps of 1e-6 gives 0.684514 (derived by hand), and of
// the menu's reports 0.7 is the one the forecaster picks.
func ExampleRule_Distort() {
	r := frostRule()
	t, err := r.FitSteps(r.Design().Budget)
	if err != nil {
		fmt.Println(err)
		return
	}
	u, err := risk.ParseUtility("crra:2")
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := r.Distort(t, u, 50)
	if err != nil {
		fmt.Println(err)
		return
	}
	best, err := d.Best([]float64{0.8, 0.2})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("believes 80 %%, reports %.4f; distortion %.2f points\n", best.Report[0], best.Size)
	fmt.Println("on a menu, reports", d.MenuPick([]float64{0.8, 0.2}))
	// Output:
	// believes 80 %, reports 0.6845; distortion 11.55 points
	// on a menu, reports [0.7 0.3]
}
