package verify

import (
	"context"
	"math"
	"strings"
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

// A term that depends on the outcome alone changes no comparison (an
// affine a·p in H adds a_k to every effort for outcome k; a payout's
// c·y adds c·y to every payment for y), but measured across outcomes it
// made the scale of the tolerance 1e10 and the slack 10: the convex
// 1e10·p1 + p1^2 passed as strictly proper. Verdicts derived by hand:
// the entropy plus an affine term is strictly proper (Good 1952; a
// Bregman rule ignores affine terms), p1^2 is convex (improper), and the
// payout 2·p[y] - sum(p^2) + 1e10·y + 0.3·p1 has the honesty gap
// 0.5·4·0.075^2 = 0.01125 (its expected pay has curvature -4 and its
// best report is q1 + 0.075).
func TestOutcomeOnlyTermsLeaveTheScale(t *testing.T) {
	cases := []struct {
		src  string
		want Verdict
	}{
		{"1e10*p1 + p1^2", Improper},
		{"1e10*p1 - p1*ln(p1) - p2*ln(p2)", StrictlyProper},
		{"1e10*p1 - p1*ln(p1) - p2*ln(p2) + max(0, 0.5*(p1 - 0.4))", Improper},
	}
	for _, c := range cases {
		rep, err := CheckRule(context.Background(), rule(t, c.src, 2), Settings{Resolution: 1000})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != c.want {
			t.Errorf("%s: verdict %s, want %s (slack %g)", c.src, rep.Verdict, c.want, rep.Grid.Slack())
		}
	}
	rep, err := Audit(context.Background(), pay(t, "2*p[y] - sum(p^2) + 1e10*y + 0.3*p1", 2), nil, Settings{Resolution: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Improper || math.Abs(rep.Gap.Max-0.01125) > 1e-4 {
		t.Errorf("payout with 1e10·y: verdict %s, gap %+v, want improper with gap 0.01125", rep.Verdict, rep.Gap)
	}
	// Payments of size 1e10 are known to about 1e-5: the gap cannot have
	// 9 sure digits, and the precision says so.
	if !strings.Contains(rep.Gap.Precision, "significant digits of the gap are sure") {
		t.Errorf("payout with 1e10·y: precision %q claims more than rounding allows", rep.Gap.Precision)
	}
}

// The slack of a comparison follows the rounding of its own two rows, not
// the worst row's: p1·(1e12/p1 - 1) - 1e12 is -p1 (affine, changing
// nothing), but its gradient sums terms of size 1e12/p1, whose rounding
// near p1 = 0.001 is about 10. With one global slack that hid a convex
// kink of slope jump 1 at p1 = 0.5 (a concave H has none, derived by
// hand: the gap there is about 1/16), whose rows carry only about 1e-3 of
// rounding; without the kink the rule is the quadratic one, strictly
// proper (Brier 1950).
func TestSlackComparisonByComparison(t *testing.T) {
	const noisy = "-p1^2 - p2^2 + p1*(1e12/p1 - 1) - 1e12"
	for _, c := range []struct {
		src  string
		want Verdict
	}{
		{noisy, StrictlyProper},
		{noisy + " + max(0, p1 - 0.5)", Improper},
	} {
		rep, err := CheckRule(context.Background(), rule(t, c.src, 2), Settings{Resolution: 1000})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != c.want {
			t.Errorf("%s: verdict %s, want %s (slack %g)", c.src, rep.Verdict, c.want, rep.Grid.Slack())
		}
	}
}
