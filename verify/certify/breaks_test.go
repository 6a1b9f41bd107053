package certify

import (
	"context"
	"testing"
	"time"

	"scorewright/generator/formula"
	"scorewright/verify"
)

// Generators over two outcomes with an if breaking inside (0, 1), which
// the box-by-box search left undecided at the break. Verdicts derived by
// hand (p = p1, concavity of a function of one variable; Savage 1971 for
// concave = proper):
//   - -(p-0.5)^2 below 0.5, -2(p-0.5)^2 above: both pieces strictly
//     concave, value 0 and slope 0 on both sides (C1): strictly proper;
//   - the same at 0.7 with -p^2 around the if, and at 0.3137 with the
//     entropy around it (near the faces its curvature is infinite);
//   - p below 0.5, 1-p above (min(p, 1-p)): a concave kink, flat pieces:
//     proper, not strictly;
//   - -p^2 below 0.5, its tangent 0.25 - p above: C1, flat above: proper;
//   - slopes 0.1 then 0.2 at 0.5: the slope rises, a convex kink:
//     improper;
//   - an upward jump of 1e-9 at 0.3: no concave function jumps: improper.
func TestCertifyAtTheFormulasBreaks(t *testing.T) {
	cases := []struct {
		src  string
		want verify.Verdict
	}{
		{"if(p < 0.5, -(p-0.5)^2, -2*(p-0.5)^2)", verify.StrictlyProper},
		{"if(p > 0.7, -3*(p-0.7)^2, -(p-0.7)^2) - p^2", verify.StrictlyProper},
		{"if(p < 0.3137, -(p-0.3137)^2, -5*(p-0.3137)^2) - p*ln(p) - (1-p)*ln(1-p)", verify.StrictlyProper},
		{"if(p < 0.5, p, 1-p)", verify.Proper},
		{"if(p < 0.5, -p^2, 0.25 - p)", verify.Proper},
		{"if(p < 0.5, -(p-0.5)^2 + 0.1*(p-0.5), -2*(p-0.5)^2 + 0.2*(p-0.5))", verify.Improper},
		{"if(p < 0.3, -p^2 - (1-p)^2, -p^2 - (1-p)^2 + 1e-9)", verify.Improper},
	}
	for _, c := range cases {
		res := certifyFormula(t, c.src, 2, Settings{})
		if res.Verdict != c.want || res.Kind != Certified {
			t.Errorf("%s: %s %s, want certified %s (%s)", c.src, res.Kind, res.Verdict, c.want, res.Statement())
		}
	}
}

// The same for point generators on an interval (Savage 1971: concave phi
// is proper; verdicts derived by hand): C1 joins of strictly concave
// pieces (at 0.5, and at 3 where -x^2 continues as -9 - 6(x-3) -
// 2(x-3)^2) are strictly proper; -x^2 continued by its tangent 0.25 - x
// is proper, strictly concave on [0, 0.5] only (a tenth of [0, 5]); a
// slope rising from -0.9 to -0.8 at 0.5 is improper.
func TestPointCertificateAtTheBreaks(t *testing.T) {
	cases := []struct {
		src  string
		want verify.Verdict
	}{
		{"if(x < 0.5, -(x-0.5)^2, -2*(x-0.5)^2)", verify.StrictlyProper},
		{"if(x < 3, -x^2, -9 - 6*(x-3) - 2*(x-3)^2)", verify.StrictlyProper},
		{"if(x < 0.5, -x^2, 0.25 - x)", verify.Proper},
		{"if(x < 0.5, -(x-0.5)^2 + 0.1*x, -2*(x-0.5)^2 + 0.2*x)", verify.Improper},
	}
	for _, c := range cases {
		prog, err := formula.CompileString(c.src, formula.Scope{Vars: []string{"x"}})
		if err != nil {
			t.Fatal(err)
		}
		res, err := Point(context.Background(), prog, 0, 5, Settings{Deadline: 10 * time.Second})
		if err != nil {
			t.Fatal(err)
		}
		if res.Verdict != c.want {
			t.Errorf("%s: %s, want %s (%s)", c.src, res.Verdict, c.want, res.Statement())
		}
	}
}
