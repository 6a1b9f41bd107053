package backtest

import (
	"context"
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
