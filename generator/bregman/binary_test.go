package bregman

import (
	"math"
	"testing"
)

// TestBinaryWeightOfLinearIsPlusZero: h(p) = p is linear, so H” = 0 and
// the emphasis weight -H” is zero; it must be +0, which prints as "0",
// not -0, which prints as "-0" and reads as a negative weight.
func TestBinaryWeightOfLinearIsPlusZero(t *testing.T) {
	f, err := NewFormula("p1", Options{Outcomes: 2})
	if err != nil {
		t.Fatal(err)
	}
	_, dh, w := (&Rule{Gen: f}).NewScorer().Binary(0.5)
	// h(p) = p: h' = 1 (derived by hand: p1 = p, p2 = 1 - p).
	if dh != 1 || w != 0 || math.Signbit(w) {
		t.Errorf("h' = %g, weight %g (sign bit %v); want 1 and +0", dh, w, math.Signbit(w))
	}
}
