package pointcheck

import (
	"context"
	"errors"
	"testing"

	"scorewright/generator/point"
	"scorewright/verify"
)

// TestUndefinedIsNotProper: the checks skip grid values that are NaN and
// count them under boundedness, so a generator or payout undefined on
// part of the interval got a proper verdict beside a failed boundedness
// check. 0/0 is NaN everywhere (derived by hand). A generator not finite
// at an outcome is refused (TestDomainRefused); -x ln x on [0, 10] stays
// strictly proper, its infinite slope lying at the report x = 0 only.
func TestUndefinedIsNotProper(t *testing.T) {
	ctx := context.Background()
	for _, c := range []struct {
		src     string
		lo, hi  float64
		verdict verify.Verdict
	}{
		{"-x*ln(x)", 0, 10, verify.StrictlyProper},
	} {
		r, err := CheckGenerator(ctx, gen(t, c.src, c.lo, c.hi), verify.Settings{Resolution: 20})
		if err != nil {
			t.Fatal(err)
		}
		if r.Verdict != c.verdict {
			t.Errorf("check %q on [%g, %g]: verdict %s, want %s", c.src, c.lo, c.hi, r.Verdict, c.verdict)
		}
	}
	p, err := NewPayout("0/0", nil)
	if err != nil {
		t.Fatal(err)
	}
	r, err := AuditPayout(ctx, p, 0, 1, verify.Settings{Resolution: 20}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Verdict != verify.Improper {
		t.Errorf("audit 0/0: verdict %s, want improper", r.Verdict)
	}
}

// A generator not finite at an outcome of the interval makes every
// report's effort infinite (or undefined) there: qlike, ln x, on [0, 10]
// is -Inf at y = 0, so D(0, x) = +Inf for every x (Patton 2011: QLIKE needs
// a positive quantity); sqrt(x - 0.5) on [0, 1] is NaN below 0.5. Both are
// refused with a *point.DomainError naming the outcome, not given a
// verdict.
func TestDomainRefused(t *testing.T) {
	for _, c := range []struct {
		src    string
		lo, hi float64
	}{{"ln(x)", 0, 10}, {"sqrt(x - 0.5)", 0, 1}, {"b = -3\n-x^(b+2)/((b+1)*(b+2))", 0, 1}} {
		_, err := CheckGenerator(context.Background(), gen(t, c.src, c.lo, c.hi), verify.Settings{Resolution: 20})
		var de *point.DomainError
		if !errors.As(err, &de) || de.Y != 0 {
			t.Errorf("%q on [%g, %g]: error %v, want a domain error at y = 0", c.src, c.lo, c.hi, err)
		}
	}
}
