package lottery

import (
	"context"
	"math"
	"strings"
	"testing"

	"scorewright/contract/budget"
	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/generator/design"
)

// quadraticFit is the quadratic rule paying 75..150 in cents on a menu of
// the given step over two outcomes.
func quadraticFit(t *testing.T, step float64) (*budget.Fit, *budget.Recheck) {
	t.Helper()
	d := &design.Design{Version: 1, Labels: []string{"exceeds", "holds"}, Mode: design.ModeGenerator, Formula: "1 - sum(p^2)",
		Budget: design.Budget{Floor: 75, Cap: 150, Step: step, Unit: 0.01}}
	rule := bregmantest.Rule(t, d.Formula, bregman.Options{Outcomes: d.N()})
	rule.Labels = d.Labels
	m, err := budget.StepMenu(2, step, 0)
	if err != nil {
		t.Fatal(err)
	}
	f, err := budget.FitRule(rule, m, d.Budget)
	if err != nil {
		t.Fatal(err)
	}
	rc, err := f.Recheck(context.Background(), budget.RecheckSettings{})
	if err != nil {
		t.Fatal(err)
	}
	return f, rc
}

// bruteForcePasses re-checks a two-outcome chance table by brute force:
// the item at belief p must earn strictly more than every other item.
func bruteForcePasses(reports, vals [][]float64) bool {
	for i, p := range reports {
		own := p[0]*vals[i][0] + p[1]*vals[i][1]
		for j := range reports {
			if j != i && p[0]*vals[j][0]+p[1]*vals[j][1] >= own-1e-12 {
				return false
			}
		}
	}
	return true
}

// Chances become whole thousandths, and the re-check on them agrees with
// brute force: with menu step 0.1 the smallest money margin 0.75 is 0.01
// in chances of a prize of 75 and survives rounding to 1/1000; with step
// 0.02 it is 0.03/75 = 0.0004, below the rounding's half-step, and two
// rows tie or swap (derived by hand).
func TestDrawableChancesAreRechecked(t *testing.T) {
	for _, c := range []struct {
		step float64
		pass bool
	}{{0.1, true}, {0.02, false}} {
		f, rc := quadraticFit(t, c.step)
		tb := f.Table(rc, budget.Info{Version: "test", Date: "2027-01-01"})
		if _, err := ForFit(context.Background(), f, tb, 1000); err != nil {
			t.Fatal(err)
		}
		for _, row := range tb.Values {
			for _, v := range row {
				if r := v * 1000; math.Abs(r-math.Round(r)) > 1e-9 {
					t.Fatalf("step %v: chance %v is not a whole thousandth", c.step, v)
				}
			}
		}
		if got := bruteForcePasses(tb.Reports, tb.Values); got != c.pass {
			t.Fatalf("step %v: brute force says %v, want %v", c.step, got, c.pass)
		}
		if tb.Meta.Passed != c.pass {
			t.Errorf("step %v: the record says passed = %v, brute force %v", c.step, tb.Meta.Passed, c.pass)
		}
		if !c.pass && (len(tb.Meta.Warnings) == 0 || !strings.Contains(tb.Meta.Warnings[0], "FAILED")) {
			t.Errorf("step %v: no warning: %v", c.step, tb.Meta.Warnings)
		}
		if tb.Decimals != 3 || !strings.Contains(strings.Join(tb.Meta.Notes, " "), "whole number from 1 to 1000") {
			t.Errorf("step %v: decimals %d, notes %v", c.step, tb.Decimals, tb.Meta.Notes)
		}
	}
}

func TestDrawableRefusals(t *testing.T) {
	tb, lo, hi := logTable()
	if err := Drawable(tb, 1000); err == nil {
		t.Error("a money table was made drawable")
	}
	if err := Convert(tb, lo, hi); err != nil {
		t.Fatal(err)
	}
	if err := Drawable(tb, 300); err == nil {
		t.Error("300 draws accepted")
	}
}
