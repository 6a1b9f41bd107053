package main

import (
	"strings"
	"testing"
)

// audit names the outcomes it was given, as check does: in its head and
// in the range of payment per outcome. The payout 1 − (1 − p_y)² pays
// from 0 to 1 for either outcome (derived by hand).
func TestAuditPrintsOutcomeLabels(t *testing.T) {
	code, out, errs := runCmd(t, "audit", "--outcomes", "frost,clear", "--payout", "1 - (p[y]-1)^2", "--resolution", "40")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"over 2 outcomes (frost, clear)", "frost: [0, 1], clear: [0, 1]"} {
		if !strings.Contains(out, want) {
			t.Errorf("audit output lacks %q:\n%s", want, out)
		}
	}
}
