package verify

import (
	"context"
	"math"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/internal/simplex"
)

// Zero outcome weights. H = 1 - Σ w_i p_i² with w >= 0 is concave, so the
// rule is proper (Savage 1971); its divergence is D(q, p) = Σ w_i (q_i -
// p_i)² (the Bregman divergence of a quadratic, derived by hand). With one
// zero weight, D = 0 forces q_i = p_i on the other n - 1 outcomes, hence
// on all (both sum to 1): strictly proper. With two zero weights, moving
// mass between those two outcomes leaves D = 0: proper, not strict, and
// the witness must be such a move. Brute force over a grid confirms both
// from the closed form, beside the tool's verdict.
func TestZeroWeights(t *testing.T) {
	cases := []struct {
		w      []float64
		strict bool
	}{
		{[]float64{0, 1, 1}, true},
		{[]float64{1, 2, 0}, true},
		{[]float64{0, 0, 1}, false},
	}
	g, err := simplex.Full(3, 20)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		// Brute force: is there a pair q != p with D(q, p) = 0?
		tie := false
		for i := 0; i < g.Len() && !tie; i++ {
			for j := 0; j < g.Len(); j++ {
				q, p := g.Point(i), g.Point(j)
				var d float64
				for k := range q {
					d += c.w[k] * (q[k] - p[k]) * (q[k] - p[k])
				}
				if i != j && d < 1e-15 {
					tie = true
					break
				}
			}
		}
		if tie == c.strict {
			t.Fatalf("weights %v: brute force finds a tie %v, the derivation says strict %v", c.w, tie, c.strict)
		}
		r := bregmantest.Rule(t, "1 - sum(w*p^2)", bregman.Options{Outcomes: 3, Weights: c.w})
		rep, err := CheckRule(context.Background(), r, Settings{Resolution: 60})
		if err != nil {
			t.Fatal(err)
		}
		want := Proper
		if c.strict {
			want = StrictlyProper
		}
		if rep.Verdict != want {
			t.Errorf("weights %v: verdict %s, want %s", c.w, rep.Verdict, want)
			continue
		}
		if c.strict {
			continue
		}
		prop := rep.Check(NameProperness)
		q, p := prop.MarginBelief, prop.MarginReport
		if q == nil || p == nil {
			t.Errorf("weights %v: proper, not strict, without a witness", c.w)
			continue
		}
		var d float64
		for k := range q {
			d += c.w[k] * (q[k] - p[k]) * (q[k] - p[k])
		}
		if d > 1e-12 || near(q, p, 1e-12) {
			t.Errorf("weights %v: witness %v / %v is no tie (D = %g)", c.w, q, p, d)
		}
	}
}

// The boundedness headline is the largest payment anywhere on the grid,
// boundary reports included: the quadratic rule's effort (1 - p_y)^2 +
// sum_{k != y} p_k^2 is largest, 2, at a vertex for another outcome, and
// the linear payout 10 p_y pays 10 at a vertex (both derived by hand);
// the interior alone would say 1.9406 and 8.5.
func TestBoundednessHeadlineIsTheLargestAnywhere(t *testing.T) {
	rep, err := CheckRule(t.Context(), rule(t, "1 - sum(p^2)", 3), Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	if c := rep.Check(NameBoundedness); c == nil || math.Abs(c.Worst-2) > 1e-12 || !(c.Interior.Worst < c.Worst) {
		t.Errorf("quadratic rule: boundedness %+v, want worst 2", c)
	}
	ar, err := Audit(t.Context(), pay(t, "10*p[y]", 4), nil, Settings{Resolution: 20})
	if err != nil {
		t.Fatal(err)
	}
	if c := ar.Check(NameBoundedness); c == nil || c.Worst != 10 {
		t.Errorf("linear payout: boundedness %+v, want worst 10", c)
	}
}
