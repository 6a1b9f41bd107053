package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// TestAuditRejectsBadWeights: check refused negative, NaN and infinite
// weights (the design's rule) but audit took them and audited a payout
// under weights no contract can mean. A zero weight is a weight (the rule
// stays proper); all zero leaves no rule.
func TestAuditRejectsBadWeights(t *testing.T) {
	for _, w := range []string{"1,-2,3", "1,NaN,3", "1,Inf,3"} {
		code, out, errs := runCmd(t, "audit", "--outcomes", "3", "--weights", w, "--payout", "1 - sum(w*(p - hit)^2)", "--resolution", "10")
		if code != 2 || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, "--weights: entry 2") {
			t.Errorf("--weights %s: exit %d, stdout %q, stderr %q; want exit 2 naming entry 2", w, code, out, errs)
		}
	}
	code, out, errs := runCmd(t, "audit", "--outcomes", "3", "--weights", "0,0,0", "--payout", "1 - sum(w*(p - hit)^2)", "--resolution", "10")
	if code != 2 || out != "" || !strings.Contains(errs, "every entry is 0") {
		t.Errorf("--weights 0,0,0: exit %d, stdout %q, stderr %q; want exit 2", code, out, errs)
	}
	// One zero weight: expected pay 1 - Σ w_i((p_i - q_i)² + q_i(1 - q_i)),
	// so the loss from misreporting is Σ w_i (p_i - q_i)², zero only at
	// p = q when a single weight is 0 (derived by hand): strictly proper.
	code, out, errs = runCmd(t, "audit", "--outcomes", "3", "--weights", "1,0,3", "--payout", "1 - sum(w*(p - hit)^2)", "--resolution", "10")
	if code != 0 || !strings.Contains(out, "verdict: strictly-proper") {
		t.Errorf("--weights 1,0,3: exit %d, stdout %q, stderr %q; want strictly proper", code, out, errs)
	}
}

// TestAuditJSONUndefinedPayout: a payout that is NaN everywhere still
// gives the contract's JSON: gap.belief and gap.best_report are arrays
// (not null), gap.max is the string "NaN", and the count of beliefs where
// the payout is undefined is given; exit 1.
func TestAuditJSONUndefinedPayout(t *testing.T) {
	code, out, errs := runCmd(t, "audit", "--outcomes", "3", "--payout", "0/0", "--resolution", "10", "--json")
	if code != 1 {
		t.Fatalf("exit %d, stderr %q; want 1", code, errs)
	}
	var got struct {
		Verdict string `json:"verdict"`
		Gap     struct {
			Max        any   `json:"max"`
			Belief     []any `json:"belief"`
			BestReport []any `json:"best_report"`
		} `json:"gap"`
		Undefined int `json:"undefined_beliefs"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("JSON: %v\n%s", err, out)
	}
	var raw struct {
		Gap map[string]json.RawMessage `json:"gap"`
	}
	_ = json.Unmarshal([]byte(out), &raw)
	// Resolution 10 over 3 outcomes: C(12, 2) = 66 grid beliefs, all undefined.
	if got.Verdict != "improper" || got.Gap.Max != "NaN" || string(raw.Gap["belief"]) != "[]" || string(raw.Gap["best_report"]) != "[]" || got.Undefined != 66 {
		t.Errorf("verdict %q, gap %s, undefined %d", got.Verdict, out[strings.Index(out, `"gap"`):][:80], got.Undefined)
	}
}
