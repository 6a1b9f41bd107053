package budget

import (
	"context"
	"strings"
	"testing"

	"scorewright/generator/design"
)

// On-menu forecasts earn exactly their table entry, and the menu test
// knows the menu within MenuTolerance.
func TestTableTermsMenu(t *testing.T) {
	b := design.Budget{Floor: 0, Cap: 10, Step: 0.1, Unit: 0.01}
	r := rule(t, "1 - sum(p^2)", 2)
	menu, err := StepMenu(2, 0.1, 0)
	if err != nil {
		t.Fatal(err)
	}
	f, err := TableTerms(context.Background(), r, menu, b, true)
	if err != nil {
		t.Fatal(err)
	}
	if f.Warning != "" || !f.Recheck.Passed {
		t.Fatalf("warning %q passed %v", f.Warning, f.Recheck.Passed)
	}
	// The backtest scores forecasts with the rule as given, constant
	// terms included, as here.
	on := f.OnMenu()
	sc, eff := r.NewScorer(), make([]float64, 2)
	for i, p := range menu.Reports {
		if !on(p) {
			t.Fatalf("menu item %v not on the menu", p)
		}
		sc.Efforts(eff, p)
		for k := range p {
			if got, want := f.Fit.Pay(eff[k]), f.Fit.Pays[i][k]; got != want {
				t.Fatalf("report %v outcome %d: paid %v, table says %v", p, k, got, want)
			}
		}
	}
	if on([]float64{0.33, 0.67}) {
		t.Fatal("0.33 is not on a menu of tenths")
	}
	// The menu test tolerates renormalisation error (1e-12), not a real
	// difference (1e-6).
	if !on([]float64{0.3 + 1e-12, 0.7 - 1e-12}) || on([]float64{0.3 + 1e-6, 0.7 - 1e-6}) {
		t.Fatal("menu tolerance wrong")
	}
	if f.Record() != nil || f.Adjust() != nil {
		t.Fatal("no report floor and no clamp: nothing to record or adjust")
	}
}

func TestReportFloorIsRecorded(t *testing.T) {
	b := design.Budget{Floor: 0, Cap: 10, Step: 0.1, Unit: 0.5, ReportFloor: 0.05}
	r := rule(t, "1 - sum(p^2)", 2)
	menu, err := StepMenu(2, 0.1, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	for _, record := range []bool{true, false} {
		f, err := TableTerms(context.Background(), r, menu, b, record)
		if err != nil {
			t.Fatal(err)
		}
		if (f.Record() != nil) != record || (len(f.Notes) == 1) != record {
			t.Fatalf("record %v: Record set %v, notes %q", record, f.Record() != nil, f.Notes)
		}
		if record {
			got := f.Record()(make([]float64, 2), []float64{0, 1})
			if got[0] != 0.05 || got[1] != 0.95 || !strings.Contains(f.Notes[0], "0.05") {
				t.Fatalf("recorded %v, note %q", got, f.Notes[0])
			}
		}
	}
}

// Coarse rounding breaks the menu's incentives (the re-check fails with
// margin -0.1 for quadratic, cap 10, tenths, unit 0.5); the fitted scheme
// still pays, and says the table command would refuse the table.
func TestFailingRecheckWarns(t *testing.T) {
	b := design.Budget{Floor: 0, Cap: 10, Step: 0.1, Unit: 0.5}
	r := rule(t, "1 - sum(p^2)", 2)
	menu, _ := StepMenu(2, 0.1, 0)
	f, err := TableTerms(context.Background(), r, menu, b, true)
	if err != nil {
		t.Fatal(err)
	}
	if f.Recheck.Passed || !strings.Contains(f.Warning, "fails its re-check") {
		t.Fatalf("passed %v, warning %q", f.Recheck.Passed, f.Warning)
	}
}
