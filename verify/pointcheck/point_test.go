package pointcheck

import (
	"context"
	"math"
	"testing"

	"scorewright/generator/point"
	"scorewright/presets"
	"scorewright/verify"
)

func gen(t *testing.T, src string, lo, hi float64) *point.Generator {
	t.Helper()
	g, err := point.New(src, lo, hi, point.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func check(r *Report, name string) verify.CheckResult {
	for _, c := range r.Checks {
		if c.Name == name {
			return c
		}
	}
	return verify.CheckResult{Name: "missing " + name}
}

func TestCheckGenerator(t *testing.T) {
	cases := []struct {
		src     string
		lo, hi  float64
		verdict verify.Verdict
		failing []string
	}{
		{"-x^2", 0, 500, verify.StrictlyProper, nil},
		{"ln(x)", 0.5, 20, verify.StrictlyProper, nil},
		{"a = 1\n-2*exp(a*x) / a^2", -2, 2, verify.StrictlyProper, nil},
		// phi'' = -12 x^2 vanishes at x = 0 only: phi is strictly concave,
		// so the rule is strictly proper (Gneiting & Raftery 2007, Sec. 2).
		{"-x^4", -1, 1, verify.StrictlyProper, nil},
		{"-x^4", 0, 1, verify.StrictlyProper, nil},
		// Patton's b = 1 member, -x^3/6: phi'' = -x, 0 at x = 0 only.
		{"-x^3/6", 0, 10, verify.StrictlyProper, nil},
		// An affine term never changes a Bregman rule (D is unchanged),
		// though it makes the cancelling terms 1e8 times larger.
		{"-x^2 + 1e8*x", 0, 1, verify.StrictlyProper, nil},
		// Affine phi: D = 0 for every pair, every report ties: proper.
		{"x", 0, 1, verify.Proper, nil},
		{"3*x+2", 0, 1, verify.Proper, nil},
		// Flat on [0, 1/2], strictly concave after: ties among reports
		// below 1/2 (derived by hand).
		{"if(x < 0.5, 0, -(x - 0.5)^2)", 0, 1, verify.Proper, nil},
		// Convex: every report but the mean does better.
		{"x^2", 0, 10, verify.Improper, []string{"concavity", "nonnegativity", "properness"}},
		// Concave up to 5, convex after.
		{"if(x < 5, -x^2, x^2 - 20*x + 50)", 0, 10, verify.Improper, []string{"concavity", "nonnegativity", "properness"}},
		// -x ln x (Patton's b = -1) has phi'(0) = +Inf: the report 0 has
		// infinite effort (a note, not a failure, as for the log rule), every outcome is
		// finite.
		{"-x*ln(x)", 0, 10, verify.StrictlyProper, nil},
		// sqrt(x) written so that its formal slope at 0 is 0·Inf = 0:
		// the slope there is the limit +Inf from the interior, and the
		// rule strictly concave (derived by hand: phi'' = -x^(-3/2)/4).
		// So is Patton's b = -1.5 member, 4 sqrt(x) up to an affine term.
		{"exp(0.5*ln(x))", 0, 10, verify.StrictlyProper, nil},
		{"exp(0.5*ln(10 - x))", 0, 10, verify.StrictlyProper, nil},
		{"b = -1.5\n-expm1((b + 2)*ln(x)) / ((b + 1)*(b + 2))", 0, 10, verify.StrictlyProper, nil},
	}
	for _, tc := range cases {
		r, err := CheckGenerator(context.Background(), gen(t, tc.src, tc.lo, tc.hi), verify.Settings{Resolution: 20})
		if err != nil {
			t.Fatal(err)
		}
		if r.Verdict != tc.verdict {
			t.Errorf("%q on [%g, %g]: verdict %s, want %s (%+v)", tc.src, tc.lo, tc.hi, r.Verdict, tc.verdict, r.Checks)
		}
		failing := map[string]bool{}
		for _, c := range r.Checks {
			if !c.Passed {
				failing[c.Name] = true
			}
		}
		for _, name := range tc.failing {
			if !failing[name] {
				t.Errorf("%q: check %s passed, want it to fail", tc.src, name)
			}
			delete(failing, name)
		}
		for name := range failing {
			t.Errorf("%q: check %s failed unexpectedly: %+v", tc.src, name, check(r, name))
		}
	}
}

func TestAuditPayout(t *testing.T) {
	sq, _ := point.New("-x^2", 0, 10, point.Options{})
	cands := []Candidate{{"squared-error", sq}}
	// A scaled squared-error payout is strictly proper and recognised.
	p, err := NewPayout("10 - 0.5*(x - y)^2", nil)
	if err != nil {
		t.Fatal(err)
	}
	r, err := AuditPayout(context.Background(), p, 0, 10, verify.Settings{Resolution: 20}, cands)
	if err != nil {
		t.Fatal(err)
	}
	if r.Verdict != verify.StrictlyProper || r.Failed() || r.Gap.Max > 1e-9 {
		t.Errorf("scaled squared error: %s gap %v %+v", r.Verdict, r.Gap.Max, r.Checks)
	}
	if r.Identified == nil || r.Identified.Preset != "squared-error" || math.Abs(r.Identified.Scale-0.5) > 1e-9 || math.Abs(r.Identified.Shift-10) > 1e-9 {
		t.Errorf("identified %+v", r.Identified)
	}

	// Absolute error elicits the median, not the mean. With outcomes 0 and
	// 10 weighted 0.75 and 0.25 the mean 2.5 pays 10 - 3.75 in expectation
	// and the median 0 pays 10 - 2.5 (derived by hand): a gap of at least
	// 1.25.
	p, _ = NewPayout("10 - abs(x - y)", nil)
	r, _ = AuditPayout(context.Background(), p, 0, 10, verify.Settings{Resolution: 20}, cands)
	if r.Verdict != verify.Improper || r.Gap.Max < 1.25-1e-9 || r.Identified != nil {
		t.Errorf("absolute error: %s gap %+v identified %+v", r.Verdict, r.Gap, r.Identified)
	}
	if check(r, "affinity").Passed {
		t.Error("absolute error passed the affinity check")
	}
	// Reward for closeness that is constant: every report ties (proper, not strict).
	p, _ = NewPayout("3 + 0*x + y", nil)
	r, _ = AuditPayout(context.Background(), p, 0, 10, verify.Settings{Resolution: 10}, nil)
	if r.Verdict != verify.Proper {
		t.Errorf("constant payout: %s", r.Verdict)
	}
	// A QLIKE-type reward -(y/x) - ln x equals -(y/x - ln(y/x) - 1) - ln y - 1
	// (derived by hand): the qlike effort plus a term in y alone.
	ql, _ := point.New("ln(x)", 0.5, 10, point.Options{})
	p, _ = NewPayout("-(y/x) - ln(x)", nil)
	r, _ = AuditPayout(context.Background(), p, 0.5, 10, verify.Settings{Resolution: 10}, []Candidate{{"squared-error", sq}, {"qlike", ql}})
	if r.Verdict != verify.StrictlyProper || r.Identified == nil || r.Identified.Preset != "qlike" || !r.Identified.OutcomeTerm || math.Abs(r.Identified.Scale-1) > 1e-9 {
		t.Errorf("qlike-type payout: %s %+v", r.Verdict, r.Identified)
	}
	// Undefined at x = 0: boundedness fails, the gap stays a number.
	r, _ = AuditPayout(context.Background(), p, 0, 10, verify.Settings{Resolution: 10}, nil)
	if check(r, "boundedness").Passed || math.IsNaN(r.Gap.Max) {
		t.Errorf("undefined at 0: %+v gap %v", check(r, "boundedness"), r.Gap.Max)
	}
	if _, err := NewPayout("x + q", nil); err == nil {
		t.Error("unknown name accepted")
	}
}

func TestCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := CheckGenerator(ctx, gen(t, "-x^2", 0, 1), verify.Settings{}); err == nil {
		t.Error("cancelled check ran")
	}
}

func BenchmarkCheckGenerator(b *testing.B) {
	g, _ := point.New("-x^2", 0, 500, point.Options{})
	for _, k := range []int{20, 40} {
		b.Run("K="+itoa(k), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := CheckGenerator(context.Background(), g, verify.Settings{Resolution: k}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func itoa(k int) string { return string(rune('0'+k/10)) + string(rune('0'+k%10)) }

// Every point preset is a concave generator on a positive interval, so
// the mean is the best report (Savage 1971; Gneiting 2011).
func TestPointPresets(t *testing.T) {
	n := 0
	for _, p := range presets.All() {
		if p.Kind != presets.KindPoint {
			continue
		}
		n++
		g, err := point.New(p.Formula, 0.5, 50, point.Options{})
		if err != nil {
			t.Fatalf("%s: %v", p.Name, err)
		}
		r, err := CheckGenerator(context.Background(), g, verify.Settings{Resolution: 10})
		if err != nil || r.Verdict != verify.StrictlyProper || r.Failed() {
			t.Errorf("%s: %v %s %+v", p.Name, err, r.Verdict, r.Checks)
		}
	}
	if n < 3 {
		t.Errorf("%d point presets; want squared error and at least two more", n)
	}
}
