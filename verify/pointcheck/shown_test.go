package pointcheck

import (
	"context"
	"math"
	"testing"

	"scorewright/generator/point"
	"scorewright/verify"
)

// sqrt(x) on [0, 10] is strictly concave, so D(y, x) >= 0, Phi is affine
// in y and no report beats the mean (Savage 1971; Gneiting 2011): the true
// worst of those three checks is 0, and what the grid finds beyond 0 is
// the rounding of terms that cancel. It must read 0, not the -5.6e-17 or
// 4.4e-16 that read as a report beating the mean. Concavity's worst is
// phi”(10) = -1/(4 * 10^1.5) = -0.0079057 (derived by hand) and stays.
func TestShownWorstIsZeroWithinSlack(t *testing.T) {
	r, err := CheckGenerator(context.Background(), gen(t, "sqrt(x)", 0, 10), verify.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range r.Checks {
		switch c.Name {
		case "nonnegativity", "affinity", "properness":
			if !c.Passed || Shown(c) != 0 {
				t.Errorf("%s: passed %v, shown %g (worst %g, slack %g); want passed and 0", c.Name, c.Passed, Shown(c), c.Worst, c.Slack)
			}
		case "concavity":
			if want := -1 / (4 * math.Pow(10, 1.5)); math.Abs(Shown(c)-want) > 1e-9 {
				t.Errorf("concavity shown %g, want %g", Shown(c), want)
			}
		}
	}
	// A generator that is not concave keeps its finding: x^3 on [-1, 1]
	// has phi''(1) = 6 and D(y, x) < 0 (derived by hand).
	r, err = CheckGenerator(context.Background(), gen(t, "x^3", -1, 1), verify.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range r.Checks {
		if (c.Name == "concavity" || c.Name == "nonnegativity") && (c.Passed || Shown(c) == 0) {
			t.Errorf("x^3: %s passed %v shown %g; want a failure with its amount", c.Name, c.Passed, Shown(c))
		}
	}
}

// -(x - y)^2 on [0, 1] is the squared-error effort with scale 1 and no
// shift (derived by hand); the fitted shift, (gmin + gmax)/2 of values
// that are 0 up to rounding, must read 0, not 1.4e-17.
func TestIdentifiedShiftZero(t *testing.T) {
	sq, _ := point.New("-x^2", 0, 1, point.Options{})
	p, err := NewPayout("-(x-y)^2", nil)
	if err != nil {
		t.Fatal(err)
	}
	r, err := AuditPayout(context.Background(), p, 0, 1, verify.Settings{}, []Candidate{{"squared-error", sq}})
	if err != nil {
		t.Fatal(err)
	}
	if id := r.Identified; id == nil || id.Shift != 0 || math.Abs(id.Scale-1) > 1e-9 {
		t.Errorf("identified %+v, want squared-error, scale 1, shift exactly 0", id)
	}
}
