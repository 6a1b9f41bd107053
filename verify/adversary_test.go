package verify

import (
	"context"
	"math"
	"strings"
	"testing"
)

// TestVerdictDoesNotDependOnUnits: a payment rule and its affine image
// pay' = A + B·pay (B > 0) are equally honest, so the verdict must not
// change when the rule is written in millionths or in millions, nor when a
// large constant is added. The tolerance is relative to the spread of the
// values, floored by what rounding can do at their size.
func TestVerdictDoesNotDependOnUnits(t *testing.T) {
	ctx := context.Background()
	audits := []struct {
		src  string
		n    int
		want Verdict
		gap  float64 // expected largest gap, when improper
	}{
		// Linear rule c·p_y, n = 2: belief q on outcome 1 reporting (1, 0)
		// expects c·q, honestly c·(q² + (1-q)²); the gap
		// c(q - q² - (1-q)²) = c(-2q² + 3q - 1) is largest at q = 3/4,
		// where it is c/8 (derived by hand).
		{"1e-12*p[y]", 2, Improper, 1e-12 / 8},
		{"1e-6*p[y]", 2, Improper, 1e-6 / 8},
		// Adding 1e6 does not change the gap 1e-3/8; rounding at 1e6 is
		// about 1e6·2^-52 ≈ 2e-10, far below it.
		{"1e6 + 1e-3*p[y]", 2, Improper, 1e-3 / 8},
		// The quadratic rule is strictly proper at any positive scale.
		{"1e-12*(1 - sum((p - hit)^2))", 3, StrictlyProper, 0},
		{"1e12*(1 - sum((p - hit)^2))", 3, StrictlyProper, 0},
	}
	for _, c := range audits {
		a, err := Audit(ctx, pay(t, c.src, c.n), nil, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if a.Verdict != c.want {
			t.Errorf("audit %q: verdict %s, want %s (%s)", c.src, a.Verdict, c.want, a.Grid)
			continue
		}
		// Relative 1e-5: sums at 1e6 round by about 1e-10 on a gap of 1e-4.
		if c.want == Improper && math.Abs(a.Gap.Max/c.gap-1) > 1e-5 {
			t.Errorf("audit %q: gap %g, want %g", c.src, a.Gap.Max, c.gap)
		}
	}
	checks := []struct {
		src  string
		want Verdict
	}{
		// sum(p^2) is convex: wrong orientation at every scale.
		{"1e-12*sum(p^2)", Improper},
		{"1e12 + 1e-3*sum(p^2)", Improper},
		{"1e-12*(1 - sum(p^2))", StrictlyProper},
		{"1e12*(1 - sum(p^2))", StrictlyProper},
	}
	for _, c := range checks {
		rep, err := CheckRule(ctx, rule(t, c.src, 3), Settings{Resolution: 30})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != c.want {
			t.Errorf("check %q: verdict %s, want %s (%s)", c.src, rep.Verdict, c.want, rep.Grid)
		}
	}
}

// TestUndefinedGeneratorIsNotConcave: sqrt(p - 0.3)·0 is NaN for p < 0.3
// (NaN·0 stays NaN), so H = p(1-p) + sqrt(p - 0.3)·0 is undefined on
// [0, 0.3). Its derivatives come out finite there (the structural zero
// drops the sqrt term), which once let concavity pass and the divergence
// check pass with a NaN "worst". Neither may pass where H is undefined.
func TestUndefinedGeneratorIsNotConcave(t *testing.T) {
	rep, err := CheckRule(context.Background(), rule(t, "p*(1-p) + sqrt(p - 0.3)*0", 2), Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Improper {
		t.Fatalf("verdict %s, want improper", rep.Verdict)
	}
	for _, c := range rep.Checks {
		switch c.Name {
		case NameConcavity, NameNonnegativity, NameProperness:
			if c.Passed {
				t.Errorf("%s passed (worst %g) on a generator undefined on [0, 0.3)", c.Name, c.Worst)
			}
			if c.Belief == nil || !(c.Belief[0] < 0.3) {
				t.Errorf("%s witness %v, want a belief with p1 < 0.3", c.Name, c.Belief)
			}
		}
	}
}

// TestUndefinedPayoutGapCoversDefinedBeliefs: sqrt(p[y] - 0.2) is NaN when
// the outcome's reported probability is below 0.2, so the honest expected
// pay is undefined at every belief with a coordinate below 0.2 (0·NaN is
// NaN). At resolution 100 the beliefs with every coordinate at least 0.2
// are the (i, j, k) >= 20 with i + j + k = 100: C(40 + 2, 2) = 861, so
// 5151 - 861 = 4290 are undefined (counted by hand). The largest gap must
// be a number over the defined ones, not +Inf or NaN.
func TestUndefinedPayoutGapCoversDefinedBeliefs(t *testing.T) {
	a, err := Audit(context.Background(), pay(t, "sqrt(p[y] - 0.2)", 3), nil, Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	if a.Verdict != Improper || a.Undefined != 4290 {
		t.Fatalf("verdict %s, undefined %d; want improper, 4290", a.Verdict, a.Undefined)
	}
	if math.IsNaN(a.Gap.Max) || math.IsInf(a.Gap.Max, 0) || !(a.Gap.Max > 0) {
		t.Errorf("largest gap %g, want a positive number", a.Gap.Max)
	}
	for _, v := range a.Gap.Belief {
		if v < 0.2-1e-12 {
			t.Errorf("gap belief %v has a coordinate below 0.2, where the payout is undefined", a.Gap.Belief)
		}
	}
	for _, c := range a.Checks {
		if c.Name == NameProperness && c.Passed {
			t.Errorf("properness passed")
		}
	}
}

// TestNonConcavityBetweenGridPoints: generators concave except in a region
// narrower than a grid step, placed so that every grid point misses it.
// The grid checks alone called these strictly proper; the random interior
// points of the concavity check must find the region, and sharpening must
// land in it with the curvature derived by hand.
func TestNonConcavityBetweenGridPoints(t *testing.T) {
	cases := []struct {
		src      string
		n, k     int
		peak     float64 // largest projected eigenvalue
		inRegion func([]float64) bool
	}{
		// n = 2, K = 1000: h = p(1-p) + a·exp(-(x/s)²), x = p - 0.5005
		// (midway between grid points), a = 1e-6, s = 1e-4. With u = x²/s²,
		// h'' = -2 + (a/s²)(4u - 2)e^(-u), largest at u = 3/2:
		// -2 + 100·4e^(-1.5) = 87.25; along the unit tangent (1, -1)/√2 the
		// curvature is h''/2 = 43.63, at p = 0.5005 - s√1.5 = 0.500378 (or
		// 0.500622). At the grid points (|x| >= 5s) the bump adds < 1e-9.
		{"p*(1-p) + 1e-6*exp(-((p - 0.5005)/1e-4)^2)", 2, 1000, 43.63,
			func(q []float64) bool { return math.Abs(math.Abs(q[0]-0.5005)-1.2247e-4) < 2e-5 }},
		// A thin band in the interior: H = 1 - Σp² - A·b(p1), b = u³,
		// u = max(0, w² - (p1 - c)²), c = 0.335, w = 0.002, A = 1e12; b is
		// zero (with its first two derivatives) off the band, which lies
		// between the grid lines p1 = 0.33 and 0.34 (K = 100) or 1/3 and
		// 11/30 (K = 30). -b'' = 6u² - 24u·t² (t = p1 - c) is largest at
		// t = 0: 6w⁴, so the Hessian is -2I + 6Aw⁴ e1e1ᵀ = -2I + 96 e1e1ᵀ,
		// and projected onto {Σv = 0} (where |proj e1|² = (n-1)/n) its
		// largest eigenvalue is -2 + 96(n-1)/n: 62 for n = 3, 70 for n = 4.
		{"1 - sum(p^2) - 1e12*max(0, 0.002^2 - (p1 - 0.335)^2)^3", 3, 100, 62,
			func(q []float64) bool { return math.Abs(q[0]-0.335) < 0.002 }},
		{"1 - sum(p^2) - 1e12*max(0, 0.002^2 - (p1 - 0.335)^2)^3", 4, 30, 70,
			func(q []float64) bool { return math.Abs(q[0]-0.335) < 0.002 }},
	}
	for _, c := range cases {
		rep, err := CheckRule(context.Background(), rule(t, c.src, c.n), Settings{Resolution: c.k})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != Improper {
			t.Errorf("n=%d %q: verdict %s, want improper", c.n, c.src, rep.Verdict)
			continue
		}
		conc := rep.Checks[0]
		if conc.Name != NameConcavity || conc.Passed || !c.inRegion(conc.Belief) {
			t.Errorf("n=%d: concavity passed=%v, witness %v outside the region", c.n, conc.Passed, conc.Belief)
		}
		// Sharpening climbs to the peak; 1 % covers where it stops.
		if math.Abs(conc.Worst/c.peak-1) > 0.01 {
			t.Errorf("n=%d: eigenvalue %g, want %g (derived by hand)", c.n, conc.Worst, c.peak)
		}
		if !strings.Contains(conc.Note, "between them") {
			t.Errorf("n=%d: the note does not say the violation lies between the grid points: %s", c.n, conc.Note)
		}
	}
}

// TestKinksAndJumps: the Hessian of a piecewise formula is that of one
// piece, so a convex kink or an upward jump passed the curvature test
// (the pair checks still failed properness, but the concavity check said
// "passed"). The midpoint test H((a+b)/2) >= (H(a) + H(b))/2 must fail
// them, and leave concave kinks alone.
func TestKinksAndJumps(t *testing.T) {
	cases := []struct {
		src     string
		n       int
		concave bool
		// near, when set, says whether the witness lies where it should.
		near func([]float64) bool
	}{
		// max(p(1-p), 0.2) has convex kinks where p(1-p) = 0.2, i.e.
		// p = (1 ± √0.2)/2 = 0.27639 and 0.72361 (derived by hand).
		{"max(p*(1-p), 0.2)", 2, false, func(q []float64) bool {
			return math.Abs(q[0]-0.27639) < 0.005 || math.Abs(q[0]-0.72361) < 0.005
		}},
		// A convex kink of slope change 0.02 at 0.5005, between grid
		// points. On the segment [c - ℓ/2, c + ℓ/2] the term 0.01|p - c|
		// puts the midpoint 0.01·ℓ/2 below the chord, while p(1-p) puts it
		// (ℓ/2)² above: a deficit 0.005ℓ - ℓ²/4 > 0 for ℓ < 0.02, so short
		// segments across the kink see it (derived by hand).
		{"p*(1-p) + 0.01*abs(p - 0.5005)", 2, false, func(q []float64) bool { return math.Abs(q[0]-0.5005) < 0.005 }},
		// An upward jump of 0.1 at p = 1/2.
		{"if(p < 0.5, p*(1-p), p*(1-p) + 0.1)", 2, false, func(q []float64) bool { return math.Abs(q[0]-0.5) < 0.005 }},
		// |p1 - p2| is convex (a norm), kinked on p1 = p2.
		{"abs(p1 - p2)", 3, false, nil},
		// Concave kinks: minima of affine or concave pieces.
		{"min(p*(1-p), 0.2)", 2, true, nil},
		{"-abs(p1 - p2)", 3, true, nil},
		{"min(p1, p2, p3)", 3, true, nil},
	}
	for _, c := range cases {
		rep, err := CheckRule(context.Background(), rule(t, c.src, c.n), Settings{Resolution: DefaultResolution(c.n)})
		if err != nil {
			t.Fatal(err)
		}
		conc := rep.Check(NameConcavity)
		if conc.Passed != c.concave {
			t.Errorf("%q: concavity passed=%v, want %v (%s)", c.src, conc.Passed, c.concave, conc.Note)
			continue
		}
		if c.concave && rep.Verdict != Proper {
			t.Errorf("%q: verdict %s, want proper (concave, with flat directions)", c.src, rep.Verdict)
		}
		if !c.concave && rep.Verdict != Improper {
			t.Errorf("%q: verdict %s, want improper", c.src, rep.Verdict)
		}
		if c.near != nil && !c.near(conc.Belief) {
			t.Errorf("%q: witness %v not at the kink", c.src, conc.Belief)
		}
	}
}

// TestClampedLogGapLocated: the log score clamped at c, ln(max(p_y, c)), is
// improper near the boundary, and the audit must find how much and where.
// Derived by hand: at a belief whose small coordinates are all at most c,
// the report that moves their mass onto the largest outcome pays ln c on
// them just as honesty does and more on the rest, so the gain is
// -Q ln Q with Q the mass left on the large outcome; it grows as Q falls,
// until a small coordinate reaches c. Moving δ more into a coordinate at c
// changes -Q ln Q by (ln Q + 1)δ and that coordinate's q_k ln(c/q_k) by
// -δ: a net ln(Q)·δ < 0, so honesty catches up. The largest gap, with one
// large outcome, is at q = (1 - (n-1)c, c, ..., c) with best report
// (1, 0, ..., 0): -(1 - c) ln(1 - c) = 0.0099498 for n = 2 and
// -(1 - 2c) ln(1 - 2c) = 0.0197987 for n = 3, c = 0.01.
func TestClampedLogGapLocated(t *testing.T) {
	const c = 0.01
	for _, n := range []int{2, 3} {
		a, err := Audit(context.Background(), pay(t, "ln(max(p[y], 0.01))", n), presetCandidates(t, n), Settings{})
		if err != nil {
			t.Fatal(err)
		}
		Q := 1 - float64(n-1)*c
		want := -Q * math.Log(Q)
		if a.Verdict != Improper || math.Abs(a.Gap.Max-want) > 1e-9 {
			t.Errorf("n=%d: verdict %s, gap %.9g; want improper, %.9g", n, a.Verdict, a.Gap.Max, want)
		}
		wantQ, wantP := make([]float64, n), make([]float64, n)
		wantQ[0], wantP[0] = Q, 1
		for k := 1; k < n; k++ {
			wantQ[k] = c
		}
		if !near(a.Gap.Belief, wantQ, 1e-6) || !near(a.Gap.BestReport, wantP, 1e-6) {
			t.Errorf("n=%d: gap at belief %v, best report %v; want %v, %v (or a permutation)", n, a.Gap.Belief, a.Gap.BestReport, wantQ, wantP)
		}
		if a.Identified != nil {
			t.Errorf("n=%d: clamped log identified as %q", n, a.Identified.Preset)
		}
	}
}

// TestJackpotBetweenGridPoints: a payout equal to the quadratic rule
// except on a thin band of reports between the grid points, where it pays
// 2 whatever happens. The grid stream never sees the band, so the audit
// called it strictly proper and identified it as the quadratic rule.
// Derived by hand: the quadratic rule 1 - Σ(p - hit)² has honest expected
// pay Σq², so a forecaster reporting into the band gains 2 - Σq². At
// n = 2 the largest gap over grid beliefs is at q = (1/2, 1/2): 1.5. At
// n = 3 (band 0.333 < p1 < 0.337, between the grid lines 0.33 and 0.34 at
// K = 100) it is at the grid beliefs nearest uniform, e.g. (0.33, 0.33,
// 0.34): 2 - 0.3334 = 1.6666 (a little more, up to 2 - 1/3, if sharpening
// moves the belief within its cell).
func TestJackpotBetweenGridPoints(t *testing.T) {
	cases := []struct {
		src    string
		n      int
		gap    float64
		inBand func([]float64) bool
	}{
		{"if(abs(p1 - 0.5005) < 0.0002, 2, 1 - sum((p - hit)^2))", 2, 1.5,
			func(r []float64) bool { return math.Abs(r[0]-0.5005) < 0.0002 }},
		{"if(abs(p1 - 0.335) < 0.002, 2, 1 - sum((p - hit)^2))", 3, 2 - 0.3334,
			func(r []float64) bool { return math.Abs(r[0]-0.335) < 0.002 }},
	}
	for _, c := range cases {
		a, err := Audit(context.Background(), pay(t, c.src, c.n), presetCandidates(t, c.n), Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if a.Verdict != Improper || math.Abs(a.Gap.Max-c.gap) > 1e-3 || !c.inBand(a.Gap.BestReport) {
			t.Errorf("n=%d: verdict %s, gap %g at best report %v; want improper, %g, a report in the band", c.n, a.Verdict, a.Gap.Max, a.Gap.BestReport, c.gap)
		}
		if a.Identified != nil {
			t.Errorf("n=%d: an improper payout identified as %q", c.n, a.Identified.Preset)
		}
	}
}

// TestTinyHessianDoesNotPanic: the power generator (1 - Σp^g)/(g - 1) at
// g = 1e-300 has Hessian entries -g·p^(g-2) ≈ -1e-300/p², on which the
// eigensolver's own scaling panicked. In double precision p^g = 1 exactly
// (g·ln p is far below an ulp of 1), so H = 2 and every effort is 2 as
// computed; but its curvature, which the exact Hessian keeps, is
// negative, about -1e-300·(a few) (derived by hand): H is strictly
// concave, so the rule is strictly proper (Gneiting & Raftery 2007, Sec.
// 2), and the equal computed efforts are rounding, not a tie, which the
// properness note says.
func TestTinyHessianDoesNotPanic(t *testing.T) {
	r := rule(t, "g = 1e-300\n(1 - sum(p^g)) / (g - 1)", 3)
	rep, err := CheckRule(context.Background(), r, Settings{Resolution: 20})
	if err != nil {
		t.Fatal(err)
	}
	conc := rep.Check(NameConcavity)
	if rep.Verdict != StrictlyProper || !conc.Passed || !(conc.Worst < 0 && conc.Worst > -1e-297) {
		t.Errorf("verdict %s, concavity passed=%v worst %g; want strictly proper, passed, a tiny negative eigenvalue", rep.Verdict, conc.Passed, conc.Worst)
	}
	if note := rep.Check(NameProperness).Note; !strings.Contains(note, "rounding, not a tie") {
		t.Errorf("properness note %q does not say the equal efforts are rounding", note)
	}
}

// TestIdentifyHugeUnits: the fit of pay ≈ shift - scale·L summed squares
// of payments, which overflow for payouts in 1e300: 1e300·ln p_y (the log
// rule, scale 1e300, shift 0) and 1e308·(1 - Σ(p - hit)²) (the quadratic
// rule, scale and shift 1e308) went unidentified (by construction).
func TestIdentifyHugeUnits(t *testing.T) {
	cases := []struct {
		src, preset  string
		scale, shift float64
	}{
		{"1e300*ln(p[y])", "log", 1e300, 0},
		{"1e308*(1 - sum((p - hit)^2))", "quadratic", 1e308, 1e308},
	}
	for _, c := range cases {
		a, err := Audit(context.Background(), pay(t, c.src, 3), presetCandidates(t, 3), Settings{Resolution: 30})
		if err != nil {
			t.Fatal(err)
		}
		id := a.Identified
		if id == nil || id.Preset != c.preset || math.Abs(id.Scale/c.scale-1) > 1e-9 || math.Abs(id.Shift-c.shift) > 1e-9*c.scale {
			t.Errorf("%q: identified %+v, want %s with scale %g, shift %g", c.src, id, c.preset, c.scale, c.shift)
		}
	}
}

// TestVertexNonConcavitySeenByGrid: H = 1 - Σp² + 1e5·max(0, p1 - 0.995)³
// is not concave within 0.005 of the vertex (1, 0, 0). The vertex is a grid
// point, so the grid sees it and the check must not claim the violation
// lies only between grid points. Derived by hand: the added term's second
// derivative in p1 is 6e5·(p1 - 0.995), 3000 at the vertex, so the
// Hessian there is -2I + 3000·e1e1ᵀ with projected largest eigenvalue
// -2 + 3000·(2/3) = 1998.
func TestVertexNonConcavitySeenByGrid(t *testing.T) {
	rep, err := CheckRule(context.Background(), rule(t, "1 - sum(p^2) + 1e5*max(0, p1 - 0.995)^3", 3), Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	conc := rep.Check(NameConcavity)
	if conc.Passed || conc.Boundary.Passed || math.Abs(conc.Boundary.Worst-1998) > 1e-6 || !(conc.Belief[0] > 0.995) {
		t.Errorf("concavity passed=%v, boundary worst %g, witness %v; want failed, 1998 at the vertex", conc.Passed, conc.Boundary.Worst, conc.Belief)
	}
	if strings.Contains(conc.Note, "between them") {
		t.Errorf("note claims only off-grid points saw it: %s", conc.Note)
	}
}

// TestNarrowFlatPieceIsNotStrict: H = min(p(1-p), 0.25 - 1e-7) is flat on
// |p - 1/2| <= √1e-7 = 3.16e-4, which holds the single grid point 1/2 at
// K = 1000. There every report in the flat piece has effort 0.25 - 1e-7
// for both outcomes (zero gradient), so a forecaster believing 1/2 is
// indifferent among them: proper, not strictly (derived by hand). No two
// grid reports tie, which once made the verdict strictly-proper while the
// concavity check itself said "not strictly".
func TestNarrowFlatPieceIsNotStrict(t *testing.T) {
	rep, err := CheckRule(context.Background(), rule(t, "min(p*(1-p), 0.25 - 1e-7)", 2), Settings{Resolution: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Proper || rep.Check(NameConcavity).Strict {
		t.Errorf("verdict %s (concavity strict %v), want proper", rep.Verdict, rep.Check(NameConcavity).Strict)
	}
}

// TestJackpotOnAFace: the band of rewarded reports can lie on a face
// (reports ruling out outcome 3, with 0.33 < p1 < 0.34, strictly between
// the grid lines at K = 100), which no interior report reaches. As in
// TestJackpotBetweenGridPoints the gain is 2 - Σq², largest at the grid
// beliefs nearest uniform: 2 - 0.3334 (derived by hand).
func TestJackpotOnAFace(t *testing.T) {
	src := "if(p3 <= 0, if(abs(p1 - 0.335) < 0.005, 2, 1 - sum((p - hit)^2)), 1 - sum((p - hit)^2))"
	a, err := Audit(context.Background(), pay(t, src, 3), nil, Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	r := a.Gap.BestReport
	if a.Verdict != Improper || math.Abs(a.Gap.Max-(2-0.3334)) > 1e-3 || r[2] != 0 || !(math.Abs(r[0]-0.335) < 0.005) {
		t.Errorf("verdict %s, gap %g at report %v; want improper, %g, a report on the band of the face p3 = 0", a.Verdict, a.Gap.Max, r, 2-0.3334)
	}
}

// TestTiesOffGridAreNotGains: for the linear payout p_y a belief with two
// equal largest coordinates is indifferent along the whole edge between
// their vertices (expected pay q1·r1 + q2·r2 = q1 when q1 = q2), so random
// reports on that edge only tie with the vertex, a grid point; they must
// not be reported as gains off the grid (derived by hand).
func TestTiesOffGridAreNotGains(t *testing.T) {
	a, err := Audit(context.Background(), pay(t, "p[y]", 3), nil, Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	for _, note := range a.Notes {
		if strings.Contains(note, "between the grid points") {
			t.Errorf("linear payout: %s", note)
		}
	}
	// Its largest gap, max_k q_k - Σq², is 1/6 at (2/3, 1/6, 1/6)
	// (derived by hand; the grid's nearest is within 1e-3 of it).
	if math.Abs(a.Gap.Max-1.0/6) > 1e-3 {
		t.Errorf("gap %g, want 1/6", a.Gap.Max)
	}
}
