package verify

import (
	"context"
	"math"
	"testing"
)

// TestVerdictDoesNotDependOnUnits: a payment rule and its affine image
// pay' = A + B·pay (B > 0) are equally honest, so the verdict must not
// change when the rule is written in millionths or in millions, nor when a
// large constant is added. The tolerance is relative to the spread of the
// values, floored by what rounding can do at their size.
func TestVerdictDoesNotDependOnUnits(t *testing.T) {
	ctx := context.Background()
	audits := []struct {
		src  string
		n    int
		want Verdict
		gap  float64 // expected largest gap, when improper
	}{
		// Linear rule c·p_y, n = 2: belief q on outcome 1 reporting (1, 0)
		// expects c·q, honestly c·(q² + (1-q)²); the gap
		// c(q - q² - (1-q)²) = c(-2q² + 3q - 1) is largest at q = 3/4,
		// where it is c/8 (derived by hand).
		{"1e-12*p[y]", 2, Improper, 1e-12 / 8},
		{"1e-6*p[y]", 2, Improper, 1e-6 / 8},
		// Adding 1e6 does not change the gap 1e-3/8; rounding at 1e6 is
		// about 1e6·2^-52 ≈ 2e-10, far below it.
		{"1e6 + 1e-3*p[y]", 2, Improper, 1e-3 / 8},
		// The quadratic rule is strictly proper at any positive scale.
		{"1e-12*(1 - sum((p - hit)^2))", 3, StrictlyProper, 0},
		{"1e12*(1 - sum((p - hit)^2))", 3, StrictlyProper, 0},
	}
	for _, c := range audits {
		a, err := Audit(ctx, pay(t, c.src, c.n), nil, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if a.Verdict != c.want {
			t.Errorf("audit %q: verdict %s, want %s (%s)", c.src, a.Verdict, c.want, a.Grid)
			continue
		}
		// Relative 1e-5: sums at 1e6 round by about 1e-10 on a gap of 1e-4.
		if c.want == Improper && math.Abs(a.Gap.Max/c.gap-1) > 1e-5 {
			t.Errorf("audit %q: gap %g, want %g", c.src, a.Gap.Max, c.gap)
		}
	}
	checks := []struct {
		src  string
		want Verdict
	}{
		// sum(p^2) is convex: wrong orientation at every scale.
		{"1e-12*sum(p^2)", Improper},
		{"1e12 + 1e-3*sum(p^2)", Improper},
		{"1e-12*(1 - sum(p^2))", StrictlyProper},
		{"1e12*(1 - sum(p^2))", StrictlyProper},
	}
	for _, c := range checks {
		rep, err := CheckRule(ctx, rule(t, c.src, 3), Settings{Resolution: 30})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != c.want {
			t.Errorf("check %q: verdict %s, want %s (%s)", c.src, rep.Verdict, c.want, rep.Grid)
		}
	}
}
