package pointcheck

import (
	"context"
	"testing"
)

// TestUndefinedIsNotProper: the checks skip grid values that are NaN and
// count them under boundedness, so a generator or payout undefined on
// part of the interval got a proper verdict beside a failed boundedness
// check. sqrt(x - 0.5) is NaN for every report x < 0.5 (inside [0, 1]),
// and 0/0 is NaN everywhere (derived by hand); ln x on [0, 10] stays
// strictly proper, its NaN (∞ - ∞) lying at the end x = 0 only.
func TestUndefinedIsNotProper(t *testing.T) {
	ctx := context.Background()
	for _, c := range []struct {
		src     string
		lo, hi  float64
		verdict string
	}{
		{"sqrt(x - 0.5)", 0, 1, Improper},
		{"ln(x)", 0, 10, StrictlyProper},
	} {
		r, err := CheckGenerator(ctx, gen(t, c.src, c.lo, c.hi), Settings{Resolution: 20})
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
	r, err := AuditPayout(ctx, p, 0, 1, Settings{Resolution: 20}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Verdict != Improper {
		t.Errorf("audit 0/0: verdict %s, want improper", r.Verdict)
	}
}
