package verify

import (
	"context"
	"math"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/emphasis"
)

// Rules whose gradient is infinite, or no supergradient, on the boundary
// get the verdict of their mathematics once the boundary efforts are the
// limits from the interior.
//
//   - The log rule written with p alone (n = 2) is strictly proper (Good
//     1952); its formal effort at (1, 0) was Inf - Inf = NaN.
//   - sqrt(p1*p2) over three outcomes is concave (a geometric mean) and
//     linear along every ray p1/p2 = const (homogeneous of degree 1), so
//     it is proper but not strictly (Gneiting & Raftery 2007, Sec. 2:
//     strictness fails exactly where H is affine on a segment). The
//     witness must be a real tie: two reports on one ray, which the test
//     confirms by recomputing both expected efforts from the closed form
//     L(p, ·) = (sqrt(p2/p1)/2, sqrt(p1/p2)/2, 0), derived by hand.
func TestBoundaryLimitVerdicts(t *testing.T) {
	rep, err := CheckRule(context.Background(), rule(t, "-p*ln(p) - (1-p)*ln(1-p)", 2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != StrictlyProper {
		t.Errorf("log rule in p alone: verdict %s, want %s\n%+v", rep.Verdict, StrictlyProper, rep.Checks)
	}
	rep, err = CheckRule(context.Background(), rule(t, "sqrt(p1*p2)", 3), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Proper {
		t.Fatalf("sqrt(p1*p2): verdict %s, want %s", rep.Verdict, Proper)
	}
	prop := rep.Check(NameProperness)
	q, p := prop.MarginBelief, prop.MarginReport
	if q == nil || p == nil || near(q, p, 1e-9) {
		t.Fatalf("sqrt(p1*p2): no tie witness of two different reports (belief %v, report %v)", q, p)
	}
	closed := func(r []float64) []float64 {
		return []float64{math.Sqrt(r[1]/r[0]) / 2, math.Sqrt(r[0]/r[1]) / 2, 0}
	}
	if a, b := bregman.Dot(q, closed(q)), bregman.Dot(q, closed(p)); math.Abs(a-b) > 1e-12 {
		t.Errorf("witness belief %v, report %v: expected efforts %v and %v differ; not a tie", q, p, a, b)
	}
}

// Every weight w >= 0 gives a proper rule (Schervish 1989). The step
// weight [c >= 0.3] is 0 below 0.3, so H is affine on [0, 0.3]: proper,
// not strictly, and every tie lies there (derived by hand: both efforts
// are constant for reports below 0.3).
func TestStepWeightIsProper(t *testing.T) {
	g, err := emphasis.New("if(c < 0.3, 0, 1)", emphasis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := CheckRule(context.Background(), &bregman.Rule{Gen: g}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Proper {
		t.Fatalf("verdict %s, want %s", rep.Verdict, Proper)
	}
	prop := rep.Check(NameProperness)
	if q, p := prop.MarginBelief, prop.MarginReport; q == nil || p == nil || q[0] > 0.3 || p[0] > 0.3 || q[0] == p[0] {
		t.Errorf("tie witness belief %v, report %v: want two different reports at or below 0.3", q, p)
	}
}

// An emphasis weight written with terms that cancel, (1e12 + c) - 1e12, is
// w = c >= 0, positive on (0, 1): strictly proper (Schervish 1989). Its
// computed values are a staircase of steps 1.2e-4 (an ulp of 1e12), which
// the midpoint test took for convex kinks until the efforts' bounds
// allowed for the weight's own rounding.
func TestNoisyWeightIsStrictlyProper(t *testing.T) {
	g, err := emphasis.New("(1e12 + c) - 1e12", emphasis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := CheckRule(context.Background(), &bregman.Rule{Gen: g}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != StrictlyProper {
		t.Fatalf("verdict %s, want %s (%+v)", rep.Verdict, StrictlyProper, rep.Checks)
	}
}
