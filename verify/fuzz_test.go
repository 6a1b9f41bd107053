package verify

import (
	"context"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/payout"
)

// FuzzVerify runs any formula that compiles through CheckRule (as a
// generator) and Audit (as a payout) on tiny grids. Nothing may panic, the
// verdict must be one of the three, and it must agree with the checks:
// improper exactly when concavity, properness, nonnegativity or affinity
// failed (audit: properness).
func FuzzVerify(f *testing.F) {
	for _, s := range []string{
		"-sum(p*ln(p))", "1 - sum(p^2)", "sum(p^2)", "p[y]", "ln(max(p[y], 0.01))",
		"sqrt(p1 - 0.3)*0 + p1*(1-p1)", "1 - sum(p^2) + 0/p1", "max(p1*(1-p1), 0.2)",
		"if(p1 < 0.5, p1*(1-p1), p1*(1-p1) + 0.1)", "1e-12*sum(p^2)", "1e12 + 1e-3*p[y]",
		"0/0", "ln(p1*p2)", "-sum(p*ln(p - 0.001))", "2*p1 + p2", "sqrt(p[y] - 0.2)",
	} {
		f.Add(s, uint8(2))
		f.Add(s, uint8(3))
	}
	f.Fuzz(func(t *testing.T, src string, nb uint8) {
		n := 2 + int(nb%3)
		s := Settings{Resolution: 5, Workers: 1, Samples: 20}
		ctx := context.Background()
		if g, err := bregman.NewFormula(src, bregman.Options{Outcomes: n}); err == nil {
			rep, err := CheckRule(ctx, &bregman.Rule{Gen: g}, s)
			if err != nil {
				t.Fatalf("%q: %v", src, err)
			}
			failed := false
			for _, c := range rep.Checks {
				if !c.Passed && c.Name != NameBoundedness {
					failed = true
				}
			}
			agreeVerdict(t, src, rep.Verdict, failed)
		}
		if p, err := payout.New(src, payout.Options{Outcomes: n}); err == nil {
			a, err := Audit(ctx, p, nil, s)
			if err != nil {
				t.Fatalf("%q: %v", src, err)
			}
			failed := !a.Check(NameProperness).Passed
			agreeVerdict(t, src, a.Verdict, failed)
		}
	})
}

func agreeVerdict(t *testing.T, src string, v Verdict, failed bool) {
	t.Helper()
	switch v {
	case StrictlyProper, Proper:
		if failed {
			t.Fatalf("%q: verdict %s with a failed check", src, v)
		}
	case Improper:
		if !failed {
			t.Fatalf("%q: verdict improper with every check passed", src)
		}
	default:
		t.Fatalf("%q: verdict %q", src, v)
	}
}
