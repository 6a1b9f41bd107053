package num

import "testing"

// Money sums are compensated: ten million payments of 0.1 add to exactly
// what 0.1·1e7 rounds to, where a plain float sum drifts.
func TestCompensatedSum(t *testing.T) {
	var s Sum
	var plain float64
	for range 10_000_000 {
		s.Add(0.1)
		plain += 0.1
	}
	if got := s.Value(); got != 1e6 {
		t.Errorf("compensated sum %.17g, want 1e6 (plain sum gives %.17g)", got, plain)
	}
}
