package study

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

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
