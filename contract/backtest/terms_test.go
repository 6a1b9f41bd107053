package backtest

import (
	"context"
	"math"
	"testing"

	"scorewright/contract/budget"
	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/generator/design"
)

// A scheme made from table terms pays a menu item exactly its table entry:
// the scheme's payer is the fit itself, so this checks the wiring, not the
// fit.
func TestTermsSchemePaysTheTable(t *testing.T) {
	r := bregmantest.Rule(t, "1 - sum(p^2)", bregman.Options{Outcomes: 2})
	menu, err := budget.StepMenu(2, 0.1, 0)
	if err != nil {
		t.Fatal(err)
	}
	terms, err := budget.TableTerms(context.Background(), r, menu, design.Budget{Floor: 0, Cap: 10, Step: 0.1, Unit: 0.01}, true)
	if err != nil {
		t.Fatal(err)
	}
	s := TermsScheme("A", terms)
	if s.Name != "A" || s.Rule != r || s.OnMenu == nil || s.Low != terms.Fit.MinPay || s.High != terms.Fit.MaxPay {
		t.Fatalf("scheme %+v", s)
	}
	sc, eff := r.NewScorer(), make([]float64, 2)
	for i, p := range menu.Reports {
		sc.Efforts(eff, p)
		for k := range p {
			if got, want := s.Pay.Pay(eff[k]), terms.Fit.Pays[i][k]; got != want || !s.OnMenu(p) {
				t.Fatalf("report %v outcome %d: paid %v, table says %v", p, k, got, want)
			}
		}
	}
	// Without a menu every forecast is on it, paid by the formula.
	ft, err := budget.FormulaTerms(r, design.Budget{Floor: 0, Cap: 10}, 0)
	if err != nil {
		t.Fatal(err)
	}
	if f := TermsScheme("B", ft); f.OnMenu != nil || f.Adjust != nil || f.Record != nil {
		t.Fatal("formula terms hold forecasts to no menu and change no report")
	}
}

// Without a menu but with a report floor, A and B are fitted on reports
// no lower than the floor, so a forecast below it is paid as those
// reports are: under the log rule with floor 0 and cap 10 and report floor
// 0.01, the forecast (0, 1) is recorded as (0.01, 0.99) and paid the
// floor 0 if outcome 1 happens (derived by hand: the fitted pay A - B·(-ln
// p_k) is smallest, at the budget's floor, at p_k = 0.01), not -Inf; its
// effort, and so the decomposition, is -ln 0.01 = 4.60517, not +Inf.
func TestFormulaTermsPayTheFlooredForecast(t *testing.T) {
	r := bregmantest.Rule(t, "-sum(p*ln(p))", bregman.Options{Outcomes: 2})
	ft, err := budget.FormulaTerms(r, design.Budget{Floor: 0, Cap: 10, ReportFloor: 0.01}, 0)
	if err != nil {
		t.Fatal(err)
	}
	s := TermsScheme("A", ft)
	if s.Record == nil {
		t.Fatal("formula terms with a report floor record forecasts as written")
	}
	p := s.Record(make([]float64, 2), []float64{0, 1})
	if math.Abs(p[0]-0.01) > 1e-15 || math.Abs(p[1]-0.99) > 1e-15 {
		t.Fatalf("forecast (0, 1) recorded as %v, want (0.01, 0.99)", p)
	}
	eff := make([]float64, 2)
	r.NewScorer().Efforts(eff, p)
	if math.Abs(eff[0]-math.Log(100)) > 1e-12 {
		t.Errorf("effort if 1: %v, want ln 100", eff[0])
	}
	if pay := s.Pay.Pay(eff[0]); math.Abs(pay) > 1e-9 {
		t.Errorf("pay if 1: %v, want the budget's floor 0", pay)
	}
}
