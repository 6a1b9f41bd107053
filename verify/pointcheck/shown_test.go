package pointcheck

import (
	"context"
	"math"
	"testing"

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
			if !c.Passed || c.Shown() != 0 {
				t.Errorf("%s: passed %v, shown %g (worst %g, slack %g); want passed and 0", c.Name, c.Passed, c.Shown(), c.Worst, c.Slack)
			}
		case "concavity":
			if want := -1 / (4 * math.Pow(10, 1.5)); math.Abs(c.Shown()-want) > 1e-9 {
				t.Errorf("concavity shown %g, want %g", c.Shown(), want)
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
		if (c.Name == "concavity" || c.Name == "nonnegativity") && (c.Passed || c.Shown() == 0) {
			t.Errorf("x^3: %s passed %v shown %g; want a failure with its amount", c.Name, c.Passed, c.Shown())
		}
	}
}
