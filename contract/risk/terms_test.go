package risk

import (
	"errors"
	"math"
	"strings"
	"testing"

	"scorewright/contract/budget"
	"scorewright/generator/design"
)

func TestStepTerms(t *testing.T) {
	// Quadratic rule 1 - sum p^2 on the menu 0, 0.05, ..., 1 paid in
	// [0, 40]: L ranges over [0, 2] (the certain wrong report), so
	// B = 40/2 = 20 and A = 40 (derived by hand).
	f, err := budget.StepTerms(rule(t, "1 - sum(p^2)", 2), design.Budget{Floor: 0, Cap: 40, Step: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if c := TermsContract(f); math.Abs(c.A-40) > 1e-12 || math.Abs(c.B-20) > 1e-12 || c.MinPay != 0 || c.ReportFloor != 0 {
		t.Errorf("contract %+v, want A 40, B 20, MinPay 0", c)
	}
	if len(f.Menu().Reports) != 21 {
		t.Errorf("menu has %d items, want 21", len(f.Menu().Reports))
	}
	// Risk-neutral: the truthful report is best (the rule is proper).
	s, err := NewSolver(rule(t, "1 - sum(p^2)", 2), TermsContract(f), Utility{Kind: Linear}, 0)
	if err != nil {
		t.Fatal(err)
	}
	r, err := s.Best([]float64{0.7, 0.3})
	if err != nil || math.Abs(r.Report[0]-0.7) > 1e-6 {
		t.Errorf("linear utility at 0.7: %+v %v", r, err)
	}
}

func TestStepTermsErrors(t *testing.T) {
	log := rule(t, "-sum(p*ln(p))", 2)
	var me *budget.MenuError
	var ue *budget.UnboundedError
	for _, c := range []struct {
		name string
		b    design.Budget
		is   func(error) bool
	}{
		{"step 0.3 is not 1/K", design.Budget{Cap: 10, Step: 0.3, ReportFloor: 0.01}, func(err error) bool { return errors.As(err, &me) }},
		{"log without a report floor", design.Budget{Cap: 10, Step: 0.05}, func(err error) bool { return errors.As(err, &ue) && ue.AtZero }},
	} {
		if _, err := budget.StepTerms(log, c.b); !c.is(err) {
			t.Errorf("%s: error %v", c.name, err)
		}
	}
}

func TestCurveBeliefs(t *testing.T) {
	// n = 2: 0.01 .. 0.99, 99 beliefs; with a 5 % floor 0.05 .. 0.95.
	if b, _, _ := CurveBeliefs(2, 0); len(b) != 99 || b[0][0] != 0.01 {
		t.Errorf("n = 2: %d beliefs, first %v", len(b), b[0])
	}
	if b, _, _ := CurveBeliefs(2, 0.05); len(b) != 91 || b[0][0] != 0.05 {
		t.Errorf("n = 2, floor 0.05: %d beliefs, first %v", len(b), b[0])
	}
	// n = 3: 9 steps toward each of 3 outcomes; at step s toward k the
	// others are (1 - s/10)/3, below 0.05 only for s = 9 (1/30).
	b, to, _ := CurveBeliefs(3, 0)
	if len(b) != 27 || len(to) != 27 || to[26] != 2 {
		t.Errorf("n = 3: %d beliefs, toward %v", len(b), to)
	}
	if b, _, _ := CurveBeliefs(3, 0.05); len(b) != 24 {
		t.Errorf("n = 3, floor 0.05: %d beliefs, want 24", len(b))
	}
	if q := DefaultBelief(design.Budget{}, 4); q[3] != 0.25 {
		t.Errorf("uniform belief %v", q)
	}
}

// Without a step there is no menu: the quadratic rule on [0, 40] is fitted
// to the exact range of its efforts, [0, 2] (reached at the vertices, which
// the fitting grid holds), so B = 20 and A = 40 as on a menu, nothing is
// rounded, and there is no menu pick.
func TestStepTermsWithoutStep(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 3)
	f, err := budget.StepTerms(r, design.Budget{Floor: 0, Cap: 40, Unit: 1})
	if err != nil {
		t.Fatal(err)
	}
	if c := TermsContract(f); math.Abs(c.A-40) > 1e-12 || math.Abs(c.B-20) > 1e-12 || f.Menu() != nil || f.Fit.Unit != 0 {
		t.Errorf("contract %+v, menu %v, unit %v; want A 40, B 20, no menu, no rounding", c, f.Menu(), f.Fit.Unit)
	}
	s, err := NewSolver(r, TermsContract(f), Utility{Kind: CARA, Coef: 0.1}, 0)
	if err != nil {
		t.Fatal(err)
	}
	if pick := MenuPick(f, s, []float64{0.2, 0.3, 0.5}); pick != nil {
		t.Errorf("menu pick %v without a menu", pick)
	}
	if d := PayDesc(f); !strings.Contains(d, "no menu") || !strings.Contains(d, "exact formula") {
		t.Errorf("pay description %q does not say that the exact formula pays", d)
	}
}
