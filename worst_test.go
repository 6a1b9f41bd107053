package scorewright

import (
	"testing"

	"scorewright/verify"
)

// A worst value within the slack of the check's comparisons is rounding,
// written 0; anything else keeps six significant digits (derived by hand
// from the slack max(tolerance × scale, rounding)).
func TestWorstText(t *testing.T) {
	g := verify.Grid{Tolerance: 1e-9, Scale: 2, Rounding: 1e-15}
	cases := []struct {
		v    float64
		g    verify.Grid
		want string
	}{
		{-3.05311e-16, g, "0"},                     // the quadratic rule's nonnegativity, summed in floats
		{2e-9, g, "0"},                             // exactly at the slack
		{2.1e-9, g, "2.1e-09"},                     // above it: a finding
		{0.18750000001, g, "0.1875"},               // six digits
		{-2, g, "-2"},                              // concavity's -H''
		{5e-13, verify.Grid{Rounding: 1e-12}, "0"}, // the rounding floor when the spread is 0
	}
	for _, c := range cases {
		if got := WorstText(c.v, c.g); got != c.want {
			t.Errorf("WorstText(%g) = %q, want %q", c.v, got, c.want)
		}
	}
}
