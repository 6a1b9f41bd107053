package verify

import (
	"context"
	"math"
	"strings"
	"testing"
)

// pay(r, y) = 10 + 10 (r_y - 1/2)|r_y - 1/2| over two outcomes: with t =
// q - 1/2 the expected pay is 10 + 20 t (r - 1/2)|r - 1/2|, increasing in
// r for t > 0, so the best report is exactly (1, 0) and the gap is
// 20 t (1/4 - t^2), largest at t = 1/sqrt(12): 5/(3 sqrt 3) = 0.9622504486
// (derived by hand). The sharpened witness must read (1, 0), not the
// (1, 2.75e-19) the squares map of the local search leaves, and the
// properness check must name the same report.
func TestSharpenedWitnessOnTheFace(t *testing.T) {
	a, err := Audit(context.Background(), pay(t, "10 + 10*(p[y] - 0.5)*abs(p[y]-0.5)", 2), nil, Settings{Resolution: 200})
	if err != nil {
		t.Fatal(err)
	}
	want := 5 / (3 * math.Sqrt(3))
	if math.Abs(a.Gap.Max-want) > 1e-9*want {
		t.Errorf("gap %.12g, want %.12g", a.Gap.Max, want)
	}
	r := a.Gap.BestReport
	if len(r) != 2 || r[0] != 1 || r[1] != 0 {
		t.Errorf("best report %v, want exactly (1, 0)", r)
	}
	if c := a.Check(NameProperness); c.Report != nil && (c.Report[0] != 1 || c.Report[1] != 0) {
		t.Errorf("properness witness report %v, want exactly (1, 0)", c.Report)
	}
	if math.Abs(a.Gap.Belief[0]-(0.5+1/math.Sqrt(12))) > 1e-6 {
		t.Errorf("gap belief %v, want %.9g", a.Gap.Belief, 0.5+1/math.Sqrt(12))
	}
}

// pay(r, y) = r_y^2 over three outcomes: a vertex report e_1 earns q_1 and
// the honest report sum q_k^3, and for a fixed q_1 the sum is smallest at
// q_2 = q_3, so the gap is max_x x - x^3 - (1-x)^3/4, at the root of
// 1 - 3x^2 + 3(1-x)^2/4 (x = 0.6094757, gap 0.368189833; derived by hand,
// maximised by golden section). A first search simplex wider than the
// witness's cell stopped at 0.368189762 while claiming 9 digits.
func TestSharpenedGapNineDigitsSquaredPayout(t *testing.T) {
	a, err := Audit(context.Background(), pay(t, "p[y]^2", 3), nil, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	f := func(x float64) float64 { return x - x*x*x - (1-x)*(1-x)*(1-x)/4 }
	lo, hi := 0.4, 0.9
	for i := 0; i < 200; i++ {
		m1, m2 := lo+(hi-lo)/3, hi-(hi-lo)/3
		if f(m1) < f(m2) {
			lo = m1
		} else {
			hi = m2
		}
	}
	want := f(lo)
	if math.Abs(a.Gap.Max-want) > 5e-10*want {
		t.Errorf("gap %.12g, want %.12g (%s)", a.Gap.Max, want, a.Gap.Precision)
	}
	if b := a.Gap.Belief; math.Abs(b[1]-b[2]) > 1e-6 || math.Abs(b[0]-lo) > 1e-6 {
		t.Errorf("gap belief %v, want (%.7f, %.7f, %.7f)", b, lo, (1-lo)/2, (1-lo)/2)
	}
}

// pay(r, y) = -|1 - r_y| over two outcomes: a report r for outcome 1
// expects -q(1-r) - (1-q)r, largest at r = 1 for q > 1/2, against the
// honest -2q(1-q): the gap (1-q)(2q-1) is 1/8 at q = 3/4 (derived by
// hand). The grid's own witness is exact; the per-belief refinement must
// not swap it for the (1, 5.8e-17) its squares map reaches.
func TestRefinedReportOnTheFace(t *testing.T) {
	a, err := Audit(context.Background(), pay(t, "-abs(1-p[y])", 2), nil, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(a.Gap.Max-0.125) > 1e-12 {
		t.Errorf("gap %.12g, want 0.125", a.Gap.Max)
	}
	if r := a.Gap.BestReport; r[0] != 1 || r[1] != 0 {
		t.Errorf("best report %v, want exactly (1, 0)", r)
	}
	for _, bg := range a.Beliefs {
		if r := bg.BestReport; bg.Gap > 1e-9 && bg.Belief[0] > 0.5 && (r[0] != 1 || r[1] != 0) {
			t.Fatalf("belief %v: best report %v, want exactly (1, 0)", bg.Belief, r)
		}
	}
}

// H = p1 (1 - p1) over three outcomes depends on p1 alone, so it is affine
// along every segment that keeps p1 fixed: (0.88, 0.06, 0.06) and
// (0.88, 0.12, 0) tie exactly (derived by hand). The tie's note must say
// the difference is 0, not print the -8.3e-17 rounding leaves.
func TestTieNoteReadsZero(t *testing.T) {
	rep, err := CheckRule(context.Background(), rule(t, "p1*(1-p1)", 3), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	c := rep.Check(NameProperness)
	if !c.Passed || c.Strict {
		t.Fatalf("properness passed %v strict %v; want proper, not strict", c.Passed, c.Strict)
	}
	if c.MarginBelief[0] != c.MarginReport[0] {
		t.Errorf("tie witness %v / %v changes p1; H is not affine there", c.MarginBelief, c.MarginReport)
	}
	if !strings.Contains(c.Note, "difference 0 up to rounding") || strings.Contains(c.Note, "e-1") {
		t.Errorf("note %q", c.Note)
	}
}

// H = 1 - sum(p^3) + 0.9 p1^2 over three outcomes is improper (its second derivative in p1
// is 1.8 - 6 p1 > 0 near p1 = 0). The check's sharpened witness lies on the
// face p2 = 0 for the belief and p1 = 0 for the report; it must read with
// exact zeros there, not the 1e-16 the squares map leaves, and its amount
// must be -D(q, p) = H(q) - H(p) - grad H(p)·(q - p), computed here from
// the formula by hand, and no smaller than the best report on that face
// for the same belief, found by brute force over 10^5 reports.
func TestSharpenedCheckWitnessOnTheFace(t *testing.T) {
	rep, err := CheckRule(context.Background(), rule(t, "1 - sum(p^3) + 0.9*p1^2", 3), Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	c := rep.Check(NameProperness)
	if c == nil || c.Passed || !c.Sharpened {
		t.Fatalf("properness: %+v", c)
	}
	q, p := c.Belief, c.Report
	zeros := 0
	for _, x := range append(append([]float64{}, q...), p...) {
		if x != 0 && x < 1e-9 {
			t.Fatalf("witness q %v, p %v has a coordinate that is zero but for noise", q, p)
		}
		if x == 0 {
			zeros++
		}
	}
	if zeros == 0 {
		t.Fatalf("witness q %v, p %v is not on a face", q, p)
	}
	H := func(x []float64) float64 { return 1 - x[0]*x[0]*x[0] - x[1]*x[1]*x[1] - x[2]*x[2]*x[2] + 0.9*x[0]*x[0] }
	negD := func(q, p []float64) float64 {
		g := []float64{-3*p[0]*p[0] + 1.8*p[0], -3 * p[1] * p[1], -3 * p[2] * p[2]}
		v := H(q) - H(p)
		for k := range q {
			v -= g[k] * (q[k] - p[k])
		}
		return v
	}
	if want := negD(q, p); math.Abs(c.Worst-want) > 1e-9*want {
		t.Errorf("worst %.12g at q %v, p %v; the formula gives %.12g", c.Worst, q, p, want)
	}
	brute := 0.0
	for i := 1; i < 100000; i++ {
		a := float64(i) / 100000
		brute = math.Max(brute, negD(q, []float64{0, a, 1 - a}))
	}
	if brute > c.Worst*(1+1e-9) {
		t.Errorf("worst %.12g, but a report on the face gains %.12g", c.Worst, brute)
	}
}
