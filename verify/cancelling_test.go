package verify

import (
	"context"
	"testing"
)

// A generator whose value is computed from large terms that cancel: H =
// (1e8 - p1^2 - p2^2) - 1e8 is the quadratic rule's -p1^2 - p2^2 (a
// constant never changes a Bregman rule), strictly concave (H” = -4,
// derived by hand), so strictly proper (Savage 1971). Its values are
// known only to about an ulp of 1e8 (7e-9 at worst), which the midpoint
// test once took for a convex kink ("7.45e-09 below the mean of its
// ends") and called the rule improper. Larger constants too: at 1e12 the
// values carry 1e-4 of rounding.
func TestCancellingConstantInTheValue(t *testing.T) {
	for _, src := range []string{
		"(1e8 - p1^2 - p2^2) - 1e8",
		"(1e12 - p1^2 - p2^2) - 1e12",
	} {
		rep, err := CheckRule(context.Background(), rule(t, src, 2), Settings{Resolution: 1000})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != StrictlyProper {
			t.Errorf("%s: verdict %s, want strictly proper (%+v)", src, rep.Verdict, rep.Checks)
		}
	}
	// The same over three outcomes, and a real kink of the same size
	// beside the constant still fails: an upward jump of 1e-3 at p1 =
	// 0.3137 (derived by hand: a concave function has no jumps).
	rep, err := CheckRule(context.Background(), rule(t, "(1e8 - sum(p^2)) - 1e8", 3), Settings{Resolution: 60})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != StrictlyProper {
		t.Errorf("n = 3: verdict %s, want strictly proper", rep.Verdict)
	}
	rep, err = CheckRule(context.Background(), rule(t, "(1e8 - sum(p^2)) - 1e8 + if(p1 < 0.3137, 0, 1e-3)", 2), Settings{Resolution: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Improper {
		t.Errorf("upward jump: verdict %s, want improper", rep.Verdict)
	}
}
