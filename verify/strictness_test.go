package verify

import (
	"context"
	"math"
	"strings"
	"testing"

	"scorewright/presets"
)

// Strictly proper needs H strictly concave, not a negative curvature
// everywhere (Gneiting & Raftery 2007, Sec. 2); proper-but-not-strict
// needs a witness, two different reports that tie.
//
//   - The power rule is strictly proper for every g > 1 (Gneiting &
//     Raftery 2007, Sec. 3). Near a vertex at g = 8 or 10 grid pairs differ
//     by 1e-16 (e.g. D((0.01, 0.99, 0), (0, 0.99, 0.01)) = (8·1e-16 -
//     1e-16)/7 + 1e-16/7 ≈ 1.1e-16, derived by hand), which rounding
//     cannot tell from 0: not a tie.
//   - H = -(p - 1/2)^4 (n = 2, p alone) has curvature -12(p - 1/2)^2,
//     zero at p = 1/2 only: strictly concave, so strictly proper.
//   - min(p(1-p), 0.2499999) is flat where p(1-p) >= 0.2499999, i.e. for
//     |p - 1/2| <= sqrt(1e-7) = 3.162e-4 (derived by hand), narrower than
//     the grid step 1e-3: proper, with a witness inside that piece.
func TestStrictnessNeedsAWitness(t *testing.T) {
	p, _ := presets.Lookup("power")
	for _, g := range []string{"8", "10"} {
		src := strings.Replace(p.Formula, "g = 3", "g = "+g, 1)
		rep, err := CheckRule(context.Background(), rule(t, src, 3), Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != StrictlyProper {
			t.Errorf("power g = %s: verdict %s, want %s (%s)", g, rep.Verdict, StrictlyProper, rep.Check(NameProperness).Note)
		}
	}
	rep, err := CheckRule(context.Background(), rule(t, "-(p - 0.5)^4", 2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != StrictlyProper {
		t.Errorf("-(p - 1/2)^4: verdict %s, want %s", rep.Verdict, StrictlyProper)
	}
	rep, err = CheckRule(context.Background(), rule(t, "min(p*(1-p), 0.2499999)", 2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	prop := rep.Check(NameProperness)
	if rep.Verdict != Proper || prop.MarginBelief == nil || prop.MarginReport == nil {
		t.Fatalf("min(p(1-p), 0.2499999): verdict %s, witness %v / %v; want proper with a witness", rep.Verdict, prop.MarginBelief, prop.MarginReport)
	}
	half := math.Sqrt(1e-7)
	for _, x := range [][]float64{prop.MarginBelief, prop.MarginReport} {
		if math.Abs(x[0]-0.5) > half {
			t.Errorf("witness point %v lies outside the flat piece |p - 1/2| <= %.4g", x, half)
		}
	}
	if prop.MarginBelief[0] == prop.MarginReport[0] {
		t.Errorf("witness is one report, not two: %v", prop.MarginBelief)
	}
}

// The same mistake in an audit: the power score with g = 8, S = g p_y^7 -
// (g-1) sum p^8 (Gneiting & Raftery 2007, Sec. 3), strictly proper for
// g > 1, was called proper on the strength of grid pairs near a vertex
// whose expected pays differ by 1e-16: rounding, not a tie. The flat
// payout of TestFlatPieceIsProperNotStrict keeps its confirmed tie.
func TestAuditStrictnessNeedsAWitness(t *testing.T) {
	a, err := Audit(context.Background(), pay(t, "8*p[y]^7 - 7*sum(p^8)", 3), nil, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if a.Verdict != StrictlyProper {
		t.Errorf("power-8 score: verdict %s, want %s (%s)", a.Verdict, StrictlyProper, a.Check(NameProperness).Note)
	}
}
