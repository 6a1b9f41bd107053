package design

import (
	"strings"
	"testing"
)

// Weights may be 0 (a nonnegative combination of concave terms is still
// concave, so the rule stays proper; the checks decide strictness), but
// not negative, not NaN or infinite, and not all 0 (no rule is left).
func TestZeroWeightAcceptedOthersRefused(t *testing.T) {
	weighted := strings.Replace(goodDesign, `"1 - sum(p^2)"`, `"1 - sum(w*p^2)"`, 1)
	if _, err := Decode([]byte(weighted + "weights = [0, 2]\n")); err != nil {
		t.Errorf("a zero weight refused: %v", err)
	}
	for _, c := range []struct{ weights, want string }{
		{"[0, 0]", "weights: every entry is 0; at least one weight must be positive"},
		{"[-1, 2]", "weights: entry 1 is -1; weights must be nonnegative and finite"},
		{"[1, nan]", "weights: entry 2 is NaN"},
		{"[1, inf]", "weights: entry 2 is +Inf"},
	} {
		_, err := Decode([]byte(weighted + "weights = " + c.weights + "\n"))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("weights %s: %v, want %q", c.weights, err, c.want)
		}
	}
}
