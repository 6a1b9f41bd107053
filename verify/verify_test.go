package verify

import (
	"context"
	"errors"
	"math"
	"strings"
	"sync/atomic"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/generator/payout"
	"scorewright/internal/pool"
	"scorewright/presets"
)

func rule(t *testing.T, src string, n int) *bregman.Rule {
	return bregmantest.Rule(t, src, bregman.Options{Outcomes: n})
}

func pay(t *testing.T, src string, n int) *payout.Payout {
	t.Helper()
	p, err := payout.New(src, payout.Options{Outcomes: n})
	if err != nil {
		t.Fatalf("%q: %v", src, err)
	}
	return p
}

func near(a, b []float64, tol float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > tol {
			return false
		}
	}
	return true
}

// presetCandidates compiles the generator presets for n unordered,
// unweighted outcomes, as the command does (the power and pseudospherical
// rules as families with a fitted parameter).
func presetCandidates(t *testing.T, n int) []Candidate {
	t.Helper()
	var out []Candidate
	for _, r := range presets.Rules(n, false, nil) {
		out = append(out, Candidate(r))
	}
	if len(out) == 0 {
		t.Fatalf("no preset compiles for %d outcomes", n)
	}
	return out
}

func TestLinearPayoutIsImproper(t *testing.T) {
	// Derived by hand. pay(p, y) = p_y, so expected pay is <q, p>, which a
	// vertex maximises: the best report puts everything on the likeliest
	// outcome. The gap is max_k q_k - |q|^2.
	//   n = 2, q = (t, 1-t), t >= 1/2: gap = t - t^2 - (1-t)^2, maximal
	//   where 3 - 4t = 0, t = 3/4, gap = 3/4 - 9/16 - 1/16 = 1/8, report (1, 0).
	//   n = 3, top coordinate t and the rest split evenly (which minimises
	//   |q|^2): gap = t - t^2 - (1-t)^2/2, maximal at t = 2/3, gap = 1/6.
	// The default n = 2 grid (K = 1000) contains 3/4 = 750/1000.
	cases := []struct {
		n          int
		gap        float64
		belief     []float64
		best       []float64
		beliefTol  float64
		direction  string
		resolution int
	}{
		{n: 2, gap: 1.0 / 8, belief: []float64{0.75, 0.25}, best: []float64{1, 0}, beliefTol: 1e-4, direction: Exaggerates},
		{n: 3, gap: 1.0 / 6, belief: []float64{2.0 / 3, 1.0 / 6, 1.0 / 6}, best: []float64{1, 0, 0}, beliefTol: 1e-3, direction: Exaggerates, resolution: 60},
		// The default grid (K = 100): the grid's witness (0.67, 0.17,
		// 0.16) has the maximiser outside its cell, where sharpening once
		// stopped at the cell's corner with 0.1666625.
		{n: 3, gap: 1.0 / 6, belief: []float64{2.0 / 3, 1.0 / 6, 1.0 / 6}, best: []float64{1, 0, 0}, beliefTol: 1e-4, direction: Exaggerates},
	}
	for _, c := range cases {
		rep, err := Audit(context.Background(), pay(t, "p[y]", c.n), nil, Settings{Resolution: c.resolution})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != Improper {
			t.Errorf("n=%d: verdict %s, want improper", c.n, rep.Verdict)
		}
		if math.Abs(rep.Gap.Max-c.gap) > 1e-10*c.gap || !strings.Contains(rep.Gap.Precision, "9 significant digits") {
			t.Errorf("n=%d K=%d: gap %.12g, want %.12g (%s)", c.n, c.resolution, rep.Gap.Max, c.gap, rep.Gap.Precision)
		}
		if !near(rep.Gap.Belief, c.belief, c.beliefTol) || !near(rep.Gap.BestReport, c.best, 1e-6) {
			t.Errorf("n=%d: gap at belief %v with report %v, want %v and %v", c.n, rep.Gap.Belief, rep.Gap.BestReport, c.belief, c.best)
		}
		if rep.Direction != c.direction {
			t.Errorf("n=%d: direction %q, want %q", c.n, rep.Direction, c.direction)
		}
		if rep.Hedge != 0 || rep.Flip != 0 || rep.Exaggerate == 0 {
			t.Errorf("linear rule: %d exaggerate, %d hedge, %d flip; every improper belief should exaggerate", rep.Exaggerate, rep.Hedge, rep.Flip)
		}
		if c.n == 2 {
			// The grid witness itself is exact: belief 750/1000.
			var found bool
			for _, bg := range rep.Beliefs {
				if bg.Belief[0] == 0.75 {
					found = true
					if math.Abs(bg.Gap-0.125) > 1e-12 || !near(bg.BestReport, []float64{1, 0}, 1e-9) {
						t.Errorf("at grid belief 3/4: gap %g, report %v", bg.Gap, bg.BestReport)
					}
				}
			}
			if !found {
				t.Error("the default binary grid does not contain 3/4")
			}
		}
	}
}

func TestMisreportDirection(t *testing.T) {
	// Each case derived by hand for n = 2, x the reported and q the
	// believed probability of outcome 1.
	cases := []struct {
		src, want string
	}{
		// q x^2 + (1-q)(1-x)^2 is convex in x, so a vertex is best: the
		// report goes to certainty, away from 1/2.
		{"p[y]^2", Exaggerates},
		// 2 p_y - sum p^2 has expected pay |q|^2 - 2 (x - q)^2; the extra
		// -(x - 1/2)^2 moves the maximum to x = (2q + 1/2)/3, toward 1/2.
		{"2*p[y] - sum(p^2) - (p1 - 0.5)^2", Hedges},
		// q (1 - x) + (1 - q) x has slope 1 - 2q < 0 for q > 1/2, so x = 0:
		// the other side of 1/2.
		{"1 - p[y]", Flips},
	}
	for _, c := range cases {
		rep, err := Audit(context.Background(), pay(t, c.src, 2), nil, Settings{Resolution: 200})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != Improper || rep.Direction != c.want {
			t.Errorf("%s: verdict %s, direction %q (%d exaggerate, %d hedge, %d flip); want improper, %s", c.src, rep.Verdict, rep.Direction, rep.Exaggerate, rep.Hedge, rep.Flip, c.want)
		}
	}
	// The hedging payout's best report at q = 0.8 is (2·0.8 + 0.5)/3 = 0.7.
	rep, err := Audit(context.Background(), pay(t, "2*p[y] - sum(p^2) - (p1 - 0.5)^2", 2), nil, Settings{Resolution: 200})
	if err != nil {
		t.Fatal(err)
	}
	for _, bg := range rep.Beliefs {
		if bg.Belief[0] == 0.8 && math.Abs(bg.BestReport[0]-0.7) > 1e-6 {
			t.Errorf("at q = 0.8 the best report is %v, want 0.7", bg.BestReport)
		}
	}
}

func TestPresetsStrictlyProper(t *testing.T) {
	// Every generator preset is strictly proper (Gneiting & Raftery 2007,
	// JASA 102:359-378, Sec. 3 for log, quadratic, spherical,
	// pseudospherical and power; Epstein 1969 for ranked probability).
	for _, p := range presets.All() {
		if p.Kind != presets.KindGenerator {
			continue
		}
		for _, n := range []int{2, 4} {
			opt := bregman.Options{Outcomes: n, Ordered: p.Ordered}
			if p.Weighted {
				opt.Weights = []float64{1, 2, 0.5, 3}[:n]
			}
			f, err := bregman.NewFormula(p.Formula, opt)
			if err != nil {
				t.Fatal(err)
			}
			rep, err := CheckRule(context.Background(), &bregman.Rule{Gen: f, Ordered: p.Ordered}, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if rep.Verdict != StrictlyProper || rep.Failed() {
				t.Errorf("%s, n=%d: verdict %s, failed %v", p.Name, n, rep.Verdict, rep.Failed())
			}
		}
		opt := bregman.Options{Outcomes: 3, Ordered: p.Ordered}
		if p.Weighted {
			opt.Weights = []float64{1, 2, 0.5}
		}
		f, err := bregman.NewFormula(p.Formula, opt)
		if err != nil {
			t.Fatal(err)
		}
		rep, err := CheckRule(context.Background(), &bregman.Rule{Gen: f, Ordered: p.Ordered}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != StrictlyProper || rep.Failed() {
			t.Errorf("%s: verdict %s, failed %v", p.Name, rep.Verdict, rep.Failed())
			for _, c := range rep.Checks {
				t.Logf("  %s %v %g %s", c.Name, c.Passed, c.Worst, c.Note)
			}
		}
		if rep.Grid.Resolution != DefaultResolution(3) || rep.Grid.Points != 5151 {
			t.Errorf("%s: grid %+v; want the default K = 100 with C(102, 2) = 5151 points", p.Name, rep.Grid)
		}
		conc := rep.Check(NameConcavity)
		if !conc.Strict {
			t.Errorf("%s: not strictly concave in the interior: %s", p.Name, conc.Note)
		}
		unbounded := strings.Contains(rep.Check(NameBoundedness).Note, "unbounded on the boundary")
		if unbounded != (p.Name == "log") {
			t.Errorf("%s: unbounded on the boundary = %v; only the log rule is", p.Name, unbounded)
		}
		if p.Name == "log" {
			// -ln p_k is +Inf exactly where the report gives the outcome
			// probability 0, and the verdict's notes say so.
			var said bool
			for _, n := range rep.Notes {
				said = said || strings.Contains(n, "unbounded on the boundary")
			}
			if !said {
				t.Errorf("log: the report's notes do not say the rule is unbounded on the boundary: %q", rep.Notes)
			}
			if !strings.Contains(conc.Note, "not finite at 300 boundary points") {
				t.Errorf("log: concavity note %q should count the 300 boundary points where -1/p_k is infinite", conc.Note)
			}
		}
	}
}

func TestPartlyConcaveBinaryFails(t *testing.T) {
	// Derived by hand. h(p) = p^2 - 4 (p - 1/2)^4 has
	// h''(p) = 2 - 48 (p - 1/2)^2, positive (not concave) exactly for
	// |p - 1/2| < 1/sqrt(24), i.e. p in (0.29588, 0.70412), and concave
	// outside. H depends on p1 only, so on the unit tangent (1, -1)/sqrt(2)
	// the projected Hessian is h''/2, largest (1) at p = 1/2.
	rep, err := CheckRule(context.Background(), rule(t, "p^2 - 4*(p - 0.5)^4", 2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Improper {
		t.Errorf("verdict %s, want improper", rep.Verdict)
	}
	c := rep.Check(NameConcavity)
	lo, hi := 0.5-1/math.Sqrt(24), 0.5+1/math.Sqrt(24)
	if c.Passed || c.Belief == nil || !(c.Belief[0] > lo && c.Belief[0] < hi) {
		t.Fatalf("concavity passed=%v witness %v; want a failure inside (%.5f, %.5f)", c.Passed, c.Belief, lo, hi)
	}
	if math.Abs(c.Worst-1) > 1e-6 || math.Abs(c.Belief[0]-0.5) > 1e-3 {
		t.Errorf("worst eigenvalue %g at %v; want 1 at p = 1/2", c.Worst, c.Belief)
	}
	// The pair checks find the same region: some belief prefers another
	// report, and the divergence goes negative.
	if rep.Check(NameProperness).Passed || rep.Check(NameNonnegativity).Passed {
		t.Error("properness and nonnegativity should fail for a generator that is not concave")
	}
}

func TestFlatPieceIsProperNotStrict(t *testing.T) {
	// Derived by hand. H = min(p1 p2, 0.16) is concave (a minimum of
	// concave functions) and constant where p1 p2 >= 0.16, i.e. for
	// p1 in [0.2, 0.8]; there the gradient is 0 and L(p, k) = 0.16 for
	// every outcome, so a belief in that range is indifferent between all
	// reports in it: proper, not strictly.
	rep, err := CheckRule(context.Background(), rule(t, "min(p1*p2, 0.16)", 2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Proper {
		t.Fatalf("verdict %s, want proper", rep.Verdict)
	}
	prop := rep.Check(NameProperness)
	if prop.Strict || prop.MarginBelief == nil || prop.MarginBelief[0] < 0.2-1e-9 || prop.MarginBelief[0] > 0.8+1e-9 {
		t.Errorf("strict=%v, tie at %v; want a tie inside [0.2, 0.8]", prop.Strict, prop.MarginBelief)
	}
	if rep.Check(NameConcavity).Strict {
		t.Error("a flat piece has zero curvature; concavity should not be strict")
	}
	// The same rule as a payout. Where p1 p2 < 0.16 the gradient is
	// (p2, p1) and L(p, 1) = p1 p2 + p2 - 2 p1 p2 = p2^2, L(p, 2) = p1^2,
	// i.e. L(p, y) = (1 - p_y)^2; elsewhere L = 0.16.
	a, err := Audit(context.Background(), pay(t, "-if(p1*p2 < 0.16, (1 - p[y])^2, 0.16)", 2), nil, Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	if a.Verdict != Proper {
		t.Errorf("flat payout: verdict %s, want proper", a.Verdict)
	}
}

func TestBoundaryReportedApart(t *testing.T) {
	// Derived by hand. Power rule g = 3: H = (1 - sum p^3)/2 has Hessian
	// diag(-3 p_k). At the vertex (0, 0, 1) the tangent direction
	// (1, -1, 0)/sqrt(2) gives -3 (p1 + p2)/2 = 0: curvature vanishes on
	// the boundary, while every interior point is strictly concave.
	// Points with some zero coordinate number C(K+2, 2) - C(K-1, 2) = 3K.
	const K = 40
	rep, err := CheckRule(context.Background(), rule(t, "(1 - sum(p^3))/2", 3), Settings{Resolution: K})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Grid.Boundary != 3*K || rep.Grid.Interior+rep.Grid.Boundary != rep.Grid.Points {
		t.Errorf("grid %+v: want %d boundary points", rep.Grid, 3*K)
	}
	c := rep.Check(NameConcavity)
	if !c.Strict || !(c.Interior.Worst < -1e-3) {
		t.Errorf("interior: strict=%v worst %g; want strictly negative", c.Strict, c.Interior.Worst)
	}
	if math.Abs(c.Boundary.Worst) > 1e-12 || int(c.Boundary.Count) != 3*K {
		t.Errorf("boundary: worst %g over %d points; want 0 over %d", c.Boundary.Worst, c.Boundary.Count, 3*K)
	}
	if rep.Verdict != StrictlyProper {
		t.Errorf("verdict %s", rep.Verdict)
	}
	// Log rule: no finite Hessian on the boundary at all, and infinite
	// effort at boundary reports only.
	rep, err = CheckRule(context.Background(), rule(t, "-sum(p*ln(p))", 3), Settings{Resolution: K})
	if err != nil {
		t.Fatal(err)
	}
	c = rep.Check(NameConcavity)
	if c.Boundary.Count != 0 || int(c.Interior.Count) != rep.Grid.Interior {
		t.Errorf("log concavity: %d boundary, %d interior points examined", c.Boundary.Count, c.Interior.Count)
	}
	b := rep.Check(NameBoundedness)
	if !b.Passed || !b.Interior.Passed || math.IsInf(b.Worst, 0) {
		t.Errorf("log boundedness: %+v", b)
	}
	// The largest finite interior effort is -ln(1/K).
	if math.Abs(b.Worst-math.Log(K)) > 1e-12 {
		t.Errorf("largest interior effort %g, want ln %d = %g", b.Worst, K, math.Log(K))
	}
}

func TestCancellation(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 3)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := CheckRule(ctx, r, Settings{}); !errors.Is(err, context.Canceled) {
		t.Errorf("pre-cancelled check: err %v", err)
	}
	if _, err := Audit(ctx, pay(t, "p[y]", 3), nil, Settings{}); !errors.Is(err, context.Canceled) {
		t.Errorf("pre-cancelled audit: err %v", err)
	}
	// A run of about 3×10^9 pairs, cancelled from its first progress
	// report, must stop with ctx.Err() long before it is done.
	ctx, cancel = context.WithCancel(context.Background())
	defer cancel()
	var last, total atomic.Int64
	_, err := CheckRule(ctx, r, Settings{Resolution: 330, MaxPoints: 1 << 20, Progress: func(p pool.Step) {
		last.Store(int64(p.Done))
		total.Store(int64(p.Total))
		cancel()
	}})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err %v, want context.Canceled", err)
	}
	if last.Load() >= total.Load() {
		t.Errorf("progress reached %d of %d before the cancellation took", last.Load(), total.Load())
	}
}

func TestProgressReachesTotal(t *testing.T) {
	var calls, done, total atomic.Int64
	_, err := CheckRule(context.Background(), rule(t, "1 - sum(p^2)", 2), Settings{Resolution: 200, Progress: func(p pool.Step) {
		calls.Add(1)
		done.Store(int64(p.Done))
		total.Store(int64(p.Total))
	}})
	if err != nil {
		t.Fatal(err)
	}
	if calls.Load() == 0 || done.Load() != total.Load() {
		t.Errorf("%d calls, last %d of %d", calls.Load(), done.Load(), total.Load())
	}
}

func TestSampledGridForManyOutcomes(t *testing.T) {
	// n = 8 at its default resolution is far beyond a full grid, so the
	// check samples and optimises over reports; the quadratic rule stays
	// strictly proper (Brier 1950) and the linear payout stays improper.
	rep, err := CheckRule(context.Background(), rule(t, "1 - sum(p^2)", 8), Settings{Samples: 400})
	if err != nil {
		t.Fatal(err)
	}
	if !rep.Grid.Sampled || rep.Grid.Points != 408 || rep.Verdict != StrictlyProper {
		t.Errorf("grid %+v verdict %s", rep.Grid, rep.Verdict)
	}
	a, err := Audit(context.Background(), pay(t, "p[y]", 8), nil, Settings{Samples: 400})
	if err != nil {
		t.Fatal(err)
	}
	if a.Verdict != Improper || !a.Grid.Sampled {
		t.Errorf("linear payout at n = 8: %s, sampled %v", a.Verdict, a.Grid.Sampled)
	}
}

func TestNaNIsReported(t *testing.T) {
	// ln(p1 - 0.5) is NaN for p1 < 1/2: the efforts there are undefined,
	// which boundedness must report rather than skip.
	rep, err := CheckRule(context.Background(), rule(t, "ln(p1 - 0.5) - p1", 2), Settings{Resolution: 100})
	if err != nil {
		t.Fatal(err)
	}
	b := rep.Check(NameBoundedness)
	if b.Passed || !strings.Contains(b.Note, "NaN") {
		t.Errorf("boundedness %v: %s", b.Passed, b.Note)
	}
	if !rep.Failed() {
		t.Error("a rule with undefined efforts should fail")
	}
}
