package pointcheck

import (
	"context"
	"math"
	"strings"
	"testing"

	"scorewright/verify"
)

// A term in the outcome alone changes no incentive, so it must not widen
// the slack: -(x - y)^2 + 1e10·y + 0.05·x has expected pay
// -(x - m)^2 + 0.05·x + terms without x, best at m + 0.025, a gap of
// 0.025^2 = 0.000625 (derived by hand). Measured across outcomes the pay
// spread was 1e10, the slack 10, and the audit said proper. Without the
// 0.05·x the payout is squared error plus an outcome term: strictly
// proper (Savage 1971).
func TestOutcomeTermLeavesThePaySpread(t *testing.T) {
	p, err := NewPayout("-(x - y)^2 + 1e10*y + 0.05*x", nil)
	if err != nil {
		t.Fatal(err)
	}
	r, err := AuditPayout(context.Background(), p, 0, 1, verify.Settings{Resolution: 40}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// The payments of size 1e10 are known to about 1e-5: the gap is right
	// to that, and its precision says so.
	if r.Verdict != verify.Improper || math.Abs(r.Gap.Max-0.000625) > 2e-5 {
		t.Errorf("verdict %s, gap %v, want improper with gap 0.000625", r.Verdict, r.Gap.Max)
	}
	if !strings.Contains(r.Gap.Precision, "significant digits of the gap are sure") {
		t.Errorf("precision %q claims more than the rounding of 1e10 allows", r.Gap.Precision)
	}
	p, _ = NewPayout("-(x - y)^2 + 1e10*y", nil)
	r, err = AuditPayout(context.Background(), p, 0, 1, verify.Settings{Resolution: 40}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Verdict != verify.StrictlyProper {
		t.Errorf("squared error plus 1e10·y: verdict %s, want strictly proper (%+v)", r.Verdict, r.Checks)
	}
}
