package study

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"scorewright/contract/budget"
	"scorewright/contract/research"
	"scorewright/generator/design"
)

// Every generator preset for two outcomes is compared (log left out with
// the reason: no report floor), the best rule beats every bounded one,
// its mix loses (1 - 0.9)·(best - quadratic) of the gain (the mix is
// linear in G, derived by hand), and step-by-step research is reported.
func TestRun(t *testing.T) {
	p, err := research.Dirichlet([]float64{0.4, 0.6}, 8, research.Quadrature{})
	if err != nil {
		t.Fatal(err)
	}
	b := design.Budget{Floor: 5, Cap: 45, Step: 0.05}
	rep, err := Run(context.Background(), []string{"rain", "dry"}, b, Spec{Model: p, Forecasts: 52, Steps: true, Cost: 0.2, Optimum: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.LeftOut) != 1 || !strings.HasPrefix(rep.LeftOut[0], "log:") {
		t.Errorf("left out %v, want log only", rep.LeftOut)
	}
	o := rep.Optimum
	if o == nil {
		t.Fatal("no optimum")
	}
	var quad float64
	for _, r := range rep.Rows {
		if r.Gain.PerForecast > o.Row.Gain.PerForecast+1e-9 {
			t.Errorf("%s gains %v, above the best %v", r.Name, r.Gain.PerForecast, o.Row.Gain.PerForecast)
		}
		if r.Steps == nil || len(r.Curve) != len(rep.Beliefs) || r.Gain.Season.Forecasts != 52 {
			t.Errorf("%s: steps %v, curve %d points, season %d", r.Name, r.Steps, len(r.Curve), r.Gain.Season.Forecasts)
		}
		if r.Name == "quadratic" {
			quad = r.Gain.PerForecast
		}
	}
	if want := 0.1 * (o.Row.Gain.PerForecast - quad); math.Abs(o.MixCost-want) > 1e-9 {
		t.Errorf("mix cost %v, want %v", o.MixCost, want)
	}
	if !strings.Contains(o.Design.Title, "optimised for research") || o.Design.Budget.ReportFloor != 0 {
		t.Errorf("design %+v", o.Design)
	}
}

func TestRunErrors(t *testing.T) {
	p, _ := research.Dirichlet([]float64{0.4, 0.6}, 8, research.Quadrature{})
	labels := []string{"a", "b"}
	mp := 20.0
	if _, err := Run(context.Background(), labels, design.Budget{Floor: 0, MeanPay: &mp, Step: 0.1}, Spec{Model: p}); !errors.Is(err, ErrMeanPay) {
		t.Errorf("mean pay: %v", err)
	}
	if _, err := Run(context.Background(), labels, design.Budget{Floor: 0, Cap: 10}, Spec{Model: p}); !errors.Is(err, ErrNoStep) {
		t.Errorf("no step: %v", err)
	}
	if _, err := Run(context.Background(), []string{"a", "b", "c"}, design.Budget{Floor: 0, Cap: 10, Step: 0.1}, Spec{Model: p}); err == nil {
		t.Error("a model for 2 outcomes accepted for 3")
	}
}

// A menu in the Spec (a design's menu file) is what the rules are fitted
// on when the budget has no step. On the menu {(1/4, 3/4), (3/4, 1/4)} the
// quadratic loss sum_i (p_i - [i = k])^2 runs from 1/8 to 9/8, a spread
// of 1, so B = cap - floor = 40; on the step-1/2 menu (the vertices among
// its reports) it runs from 0 to 2 and B = 20 (derived by hand).
func TestRunOnTheSpecsMenu(t *testing.T) {
	p, err := research.Dirichlet([]float64{0.4, 0.6}, 8, research.Quadrature{})
	if err != nil {
		t.Fatal(err)
	}
	labels := []string{"rain", "dry"}
	menu := &budget.Menu{Reports: [][]float64{{0.25, 0.75}, {0.75, 0.25}}, Desc: "2 reports listed in m.csv (the design's menu file)"}
	b := design.Budget{Floor: 5, Cap: 45}
	rep, err := Run(context.Background(), labels, b, Spec{Model: p, Compare: []string{"quadratic"}, Menu: menu, Optimum: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Rows) != 1 || math.Abs(rep.Rows[0].Fit.B-40) > 1e-9 {
		t.Fatalf("rows %+v, want the quadratic with B = 40", rep.Rows)
	}
	if rep.MenuFile != menu.Desc || rep.Optimum == nil {
		t.Errorf("menu %q, optimum %v", rep.MenuFile, rep.Optimum)
	}
	b.Step = 0.5
	step, err := Run(context.Background(), labels, b, Spec{Model: p, Compare: []string{"quadratic"}})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(step.Rows[0].Fit.B-20) > 1e-9 || step.MenuFile != "" {
		t.Errorf("step menu: B = %v, menu %q; want 20 and none", step.Rows[0].Fit.B, step.MenuFile)
	}
	// The gain is B·E[D(q, q0)] (no clamp): twice the B, twice the gain.
	if g, h := rep.Rows[0].Gain.PerForecast, step.Rows[0].Gain.PerForecast; math.Abs(g-2*h) > 1e-9*g {
		t.Errorf("gain %v on the menu, %v on the step menu; want twice", g, h)
	}
}
