package verify

import (
	"context"
	"math"
	"strings"
	"testing"

	"scorewright/presets"
)

// A generator that is constant or affine on the simplex gives a rule
// under which every report ties: proper, not strictly (Gneiting &
// Raftery 2007, Sec. 2). Written so that its terms cancel inside the
// formula, its computed Hessian is rounding noise of size ε/p² or ε/p³,
// far above a flat tolerance near the boundary; the verdict must allow
// for the size of those terms, not only for the size of the result.
// Closed forms, derived by hand:
//
//   - sum(p*(1/p - 1)) = Σ(1 - p_k) = n - 1;
//   - p*exp(-ln(p)) = 1 (n = 2, p alone);
//   - the power preset at g = 0: -Σ p·expm1(-ln p) / (-1) = Σ(1 - p_k) = n - 1.
//
// Every report's expected effort is then the constant, so the check is
// also confirmed by brute force: the grid's largest honesty gap and
// smallest divergence must be 0 within the slack the grid states.
func TestCancellingConstantsAreProperNotStrict(t *testing.T) {
	p, err := presets.Lookup("power")
	if err != nil {
		t.Fatal(err)
	}
	power0 := strings.Replace(p.Formula, "g = 3", "g = 0", 1)
	cases := []struct {
		src string
		n   int
	}{
		{"sum(p*(1/p - 1))", 2},
		{"sum(p*(1/p - 1))", 3},
		{"p*exp(-ln(p))", 2},
		{power0, 2},
		{power0, 3},
	}
	for _, c := range cases {
		r := rule(t, c.src, c.n)
		rep, err := CheckRule(context.Background(), r, Settings{Resolution: 200})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != Proper {
			t.Errorf("%s (n = %d): verdict %s, want %s (concavity: %s; properness: %s)", c.src, c.n, rep.Verdict, Proper,
				rep.Check(NameConcavity).Note, rep.Check(NameProperness).Note)
			continue
		}
		// Brute force over reports: every effort is the constant n - 1.
		sc := r.NewScorer()
		eff := make([]float64, c.n)
		q := make([]float64, c.n)
		for i := 1; i < 20; i++ {
			q[0] = float64(i) / 20
			for k := 1; k < c.n; k++ {
				q[k] = (1 - q[0]) / float64(c.n-1)
			}
			sc.Efforts(eff, q)
			for k, e := range eff {
				if math.Abs(e-float64(c.n-1)) > 1e-12 {
					t.Errorf("%s: effort %d at %v is %g, want %d", c.src, k+1, q, e, c.n-1)
				}
			}
		}
	}
}

// Allowing for the rounding of cancelling terms must not hide a genuine
// improperness. H = sum(p*(1/p - 1)) + 1e-6·p1² is the constant 1 plus a
// convex bump of size 1e-6 (n = 2): its divergence is D(q, p) =
// -1e-6·(q1 - p1)² (derived by hand; a Bregman divergence of a convex
// quadratic), most negative, -1e-6, at q = (1, 0), p = (0, 1). A strictly
// proper rule written the same way, sum(p*(1/p - 1)) - 1e-6·p1², must
// stay strictly proper: its divergence is +1e-6·(q1 - p1)² > 0.
func TestTinyImpropernessStillCaught(t *testing.T) {
	rep, err := CheckRule(context.Background(), rule(t, "sum(p*(1/p - 1)) + 1e-6*p1^2", 2), Settings{Resolution: 200})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Improper {
		t.Fatalf("convex bump of 1e-6: verdict %s, want %s", rep.Verdict, Improper)
	}
	// Over grid pairs at K = 200 the most negative is at least as far
	// apart as (0.995, 0.005) and (0, 1): -1e-6·0.995² or beyond.
	if nn := rep.Check(NameNonnegativity); !(nn.Worst <= -1e-6*0.995*0.995*(1-1e-9) && nn.Worst >= -1e-6*(1+1e-9)) {
		t.Errorf("smallest divergence %g, want in [-1e-6, -1e-6·0.995²]", nn.Worst)
	}
	rep, err = CheckRule(context.Background(), rule(t, "sum(p*(1/p - 1)) - 1e-6*p1^2", 2), Settings{Resolution: 200})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != StrictlyProper {
		t.Errorf("concave bump of 1e-6: verdict %s, want %s (%s)", rep.Verdict, StrictlyProper, rep.Check(NameProperness).Note)
	}
}
