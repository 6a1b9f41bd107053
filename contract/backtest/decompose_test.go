package backtest

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"

	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
)

func rule(t testing.TB, src string, n int, ordered bool) *bregman.Rule {
	return bregmantest.Rule(t, src, bregman.Options{Outcomes: n, Ordered: ordered})
}

// murphySample is a small binary history: forecast f of the event, how
// many times it was given, and how many of those times the event happened.
var murphySample = []struct {
	f            float64
	times, event int
}{{0.2, 5, 1}, {0.6, 5, 4}, {0.9, 10, 8}}

func murphyTally(t *testing.T, r *bregman.Rule) *Result {
	t.Helper()
	tl, err := NewTally([]Scheme{{Name: "q", Rule: r, Pay: Affine{A: 0, B: 1}}}, TallyOptions{Distinct: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range murphySample {
		p := []float64{s.f, 1 - s.f}
		for i := range s.times {
			y := 1
			if i < s.event {
				y = 0
			}
			tl.Add("Alder", i+1, y, p)
		}
	}
	return result(t, tl)
}

// The quadratic rule's terms are Murphy's (1973, "A new vector partition
// of the probability score", J. Appl. Meteor. 12:595-600) reliability,
// resolution and uncertainty.
//
// Derived by hand for murphySample (N = 20, 13 events, obar = 0.65), in
// the binary form BS = (1/N) sum (f - o)^2:
//
//	REL = (1/N) sum_k n_k (f_k - obar_k)^2
//	    = (5·(0.2-0.2)^2 + 5·(0.6-0.8)^2 + 10·(0.9-0.8)^2) / 20 = 0.3/20 = 0.015
//	RES = (1/N) sum_k n_k (obar_k - obar)^2
//	    = (5·0.45^2 + 5·0.15^2 + 10·0.15^2) / 20 = 1.35/20 = 0.0675
//	UNC = obar (1 - obar) = 0.65·0.35 = 0.2275
//	BS  = 0.015 - 0.0675 + 0.2275 = 0.175
//
// and directly: f = 0.2 gives 0.64 + 4·0.04 = 0.80, f = 0.6 gives
// 4·0.16 + 0.36 = 1.00, f = 0.9 gives 8·0.01 + 2·0.81 = 1.70; 3.50/20 =
// 0.175. The generator 1 - p1^2 - p2^2 scores the two-component vector,
// sum_i (p_i - o_i)^2 = 2 (f - o)^2 (Brier 1950's original form), so
// every term is twice Murphy's binary one.
func TestMurphyQuadratic(t *testing.T) {
	res := murphyTally(t, rule(t, "1 - sum(p^2)", 2, false))
	d := res.Forecasters[0].Decomposition[0]
	const tol = 1e-12
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"reliability", d.Reliability, 2 * 0.015},
		{"resolution", d.Resolution, 2 * 0.0675},
		{"uncertainty", d.Uncertainty, 2 * 0.2275},
		{"mean effort", d.MeanEffort, 2 * 0.175},
		{"within-bin", d.WithinBin, 0},
	} {
		if math.Abs(c.got-c.want) > tol {
			t.Errorf("%s = %.15g, want %.15g (Murphy 1973, by hand)", c.name, c.got, c.want)
		}
	}
	if g := res.Forecasters[0].Binning.Grid; g != 0 {
		t.Errorf("binning grid %d, want distinct forecasts", g)
	}
}

// For the log generator the terms are entropy and Kullback–Leibler
// divergences (Bröcker 2009, with the ignorance score), checked
// with gonum's stat.Entropy and stat.KullbackLeibler.
func TestLogAgainstGonum(t *testing.T) {
	res := murphyTally(t, rule(t, "-sum(p*ln(p))", 2, false))
	f := res.Forecasters[0]
	d := f.Decomposition[0]
	obar := []float64{0.65, 0.35}
	var rel, resol float64
	for _, b := range f.Bins {
		w := float64(b.Count) / 20
		rel += w * stat.KullbackLeibler(b.Observed, b.Forecast)
		resol += w * stat.KullbackLeibler(b.Observed, obar)
	}
	const tol = 1e-12
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"uncertainty", d.Uncertainty, stat.Entropy(obar)},
		{"resolution", d.Resolution, resol},
		{"reliability", d.Reliability, rel},
		{"identity", d.Identity(), d.MeanEffort},
	} {
		if math.Abs(c.got-c.want) > tol {
			t.Errorf("%s = %.15g, want %.15g (gonum stat)", c.name, c.got, c.want)
		}
	}
}

// With finitely many forecast values and bins = distinct forecasts the
// identity mean effort = UNC - RES + REL is exact for every Bregman
// generator (Bröcker 2009; the derivation is in the package comment).
// The mean effort here is computed straight from L(p, y), not by the tally.
func TestIdentityExact(t *testing.T) {
	cases := []struct {
		name, src string
		n         int
		ordered   bool
	}{
		{"quadratic n=3", "1 - sum(p^2)", 3, false},
		{"log n=3", "-sum(p*ln(p))", 3, false},
		{"spherical n=4", "-sqrt(sum(p^2))", 4, false},
		{"power g=3 n=3", "(1 - sum(p^3)) / 2", 3, false},
		{"ranked n=3", "csum(c*(1-c))", 3, true},
	}
	for _, c := range cases {
		r := rule(t, c.src, c.n, c.ordered)
		rng := rand.New(rand.NewPCG(7, 11))
		// Eight distinct forecasts on a 1/10 grid, each strictly inside the
		// simplex, reused at random.
		menu := make([][]float64, 8)
		for i := range menu {
			p := make([]float64, c.n)
			left := 10 - c.n
			for k := range p {
				p[k] = 1
			}
			for ; left > 0; left-- {
				p[rng.IntN(c.n)]++
			}
			for k := range p {
				p[k] /= 10
			}
			menu[i] = p
		}
		tl, err := NewTally([]Scheme{{Name: c.name, Rule: r, Pay: Affine{B: 1}}}, TallyOptions{Distinct: true})
		if err != nil {
			t.Fatal(err)
		}
		s := r.NewScorer()
		eff := make([]float64, c.n)
		var mean float64
		const N = 500
		for i := range N {
			p := menu[rng.IntN(len(menu))]
			y := rng.IntN(c.n)
			tl.Add("A", i+1, y, p)
			s.Efforts(eff, p)
			mean += eff[y] / N
		}
		d := result(t, tl).Forecasters[0].Decomposition[0]
		if got := d.Identity(); math.Abs(got-mean) > 1e-12 {
			t.Errorf("%s: UNC - RES + REL = %.15g, mean effort %.15g", c.name, got, mean)
		}
		if d.Reliability < 0 || d.Resolution < 0 {
			t.Errorf("%s: negative divergence term: %+v", c.name, d)
		}
	}
}

// Bins of width 0.1 on continuous forecasts: every forecast stays in
// exactly one of at most ten bins, counts and outcome frequencies add up,
// and the remainder is what closes the identity.
func TestWidthBins(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 2, false)
	tl, err := NewTally([]Scheme{{Name: "q", Rule: r, Pay: Affine{B: 1}}}, TallyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	events := 0
	const N = 2000
	for i := range N {
		f := rng.Float64()
		y := 1
		if rng.Float64() < f {
			y, events = 0, events+1
		}
		tl.Add("A", i+1, y, []float64{f, 1 - f})
	}
	fc := result(t, tl).Forecasters[0]
	if fc.Binning.Grid != DefaultGrid || len(fc.Bins) > DefaultGrid {
		t.Fatalf("binning %+v with %d bins, want cells of width 1/%d", fc.Binning, len(fc.Bins), DefaultGrid)
	}
	var count int
	var hits float64
	for _, b := range fc.Bins {
		count += b.Count
		hits += b.Observed[0] * float64(b.Count)
	}
	if count != N || math.Abs(hits-float64(events)) > 1e-9 {
		t.Errorf("bins hold %d forecasts and %g events, want %d and %d", count, hits, N, events)
	}
	d := fc.Decomposition[0]
	if math.Abs(d.Identity()+d.WithinBin-d.MeanEffort) > 1e-12 {
		t.Errorf("terms %+v do not add up", d)
	}
	if d.WithinBin == 0 {
		t.Errorf("within-bin remainder is exactly 0 on a grid; expected the bins to mix forecasts")
	}
	// CORP sees every forecast: its score is the mean effort itself.
	c := fc.CORP[0][0]
	if c.Count != N || math.Abs(c.Score-d.MeanEffort) > 1e-12 || math.Abs(c.Identity()-c.Score) > 1e-12 {
		t.Errorf("CORP %+v, mean effort %.17g", c, d.MeanEffort)
	}
}

// CORP of murphySample under the quadratic rule, derived by hand: the
// event frequencies 0.2, 0.8, 0.8 already rise with the forecasts, so
// PAV leaves them and CORP agrees with Murphy's terms (above), doubled
// by the two-component form: MCB = 2·0.015, DSC = 2·0.0675, UNC =
// 2·0.2275; the curve is 0.2, 0.8, 0.8.
func TestCORPByHand(t *testing.T) {
	res := murphyTally(t, rule(t, "1 - sum(p^2)", 2, false))
	f := res.Forecasters[0]
	c := f.CORP[0][0]
	for _, x := range []struct {
		name      string
		got, want float64
	}{{"MCB", c.Miscalibration, 0.03}, {"DSC", c.Discrimination, 0.135}, {"UNC", c.Uncertainty, 0.455}, {"score", c.Score, 0.35}} {
		if math.Abs(x.got-x.want) > 1e-12 {
			t.Errorf("%s = %.17g, want %g", x.name, x.got, x.want)
		}
	}
	curve := PAVCurve("Alder", f.Events[0], false)
	want := []ReliabilityPoint{{Forecast: 0.2, Observed: 0.2, Count: 5}, {Forecast: 0.6, Observed: 0.8, Count: 5}, {Forecast: 0.9, Observed: 0.8, Count: 10}}
	for i, w := range want {
		p := curve.Points[i]
		if p.Count != w.Count || math.Abs(p.Forecast-w.Forecast) > 1e-12 || math.Abs(p.Observed-w.Observed) > 1e-12 {
			t.Errorf("point %d = %+v, want %+v", i, p, w)
		}
	}
}

// More distinct forecasts than the bound: they are grouped on a grid,
// the Result says so, and no forecast or event is lost.
func TestGroupingPastTheBound(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 3, false)
	tl, err := NewTally([]Scheme{{Name: "q", Rule: r, Pay: Affine{B: 1}}}, TallyOptions{MaxDistinct: 64})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	const N = 5000
	hits := make([]int, 3)
	for i := range N {
		a, b := rng.Float64(), rng.Float64()
		p := []float64{a / (1 + b + a), b / (1 + b + a), 1 / (1 + b + a)}
		y := rng.IntN(3)
		hits[y]++
		tl.Add([]string{"A", "B"}[i%2], i+1, y, p)
	}
	res := result(t, tl)
	if res.Grouping == "every distinct forecast kept exactly" {
		t.Fatalf("grouping %q after %d distinct forecasts with a bound of 64", res.Grouping, N)
	}
	for k := range 3 {
		var c, h int
		for _, f := range res.Forecasters {
			for _, g := range f.Events[k] {
				c += g.Count
				h += g.Hits
			}
		}
		if c != N || h != hits[k] {
			t.Errorf("event %d: %d forecasts, %d hits; want %d, %d", k, c, h, N, hits[k])
		}
	}
}

// On continuous forecasts (every forecast distinct, as model output is)
// CORP's score is the mean effort computed straight from L(p, y), the
// identity holds to 1e-12 and MCB, DSC >= 0, for two-outcome rules; for
// three outcomes each event's score is the mean squared error of its
// probability, computed directly.
func TestCORPOnContinuousForecasts(t *testing.T) {
	for _, c := range []struct{ name, src string }{
		{"quadratic", "1 - sum(p^2)"}, {"log", "-sum(p*ln(p))"}, {"spherical", "-sqrt(sum(p^2))"}, {"power g=3", "(1 - sum(p^3)) / 2"},
	} {
		r := rule(t, c.src, 2, false)
		tl, _ := NewTally([]Scheme{{Name: c.name, Rule: r, Pay: Affine{B: 1}}}, TallyOptions{})
		s := r.NewScorer()
		eff := make([]float64, 2)
		rng := rand.New(rand.NewPCG(5, 8))
		var mean float64
		const N = 3000
		for i := range N {
			x := 0.01 + 0.98*rng.Float64()
			y := 1
			if rng.Float64() < 0.2+0.6*x {
				y = 0
			}
			p := []float64{x, 1 - x}
			tl.Add("A", i+1, y, p)
			s.Efforts(eff, p)
			mean += eff[y] / N
		}
		d := result(t, tl).Forecasters[0].CORP[0][0]
		if math.Abs(d.Score-mean) > 1e-12 || math.Abs(d.Identity()-d.Score) > 1e-12 {
			t.Errorf("%s: score %.17g, MCB − DSC + UNC %.17g, direct mean %.17g", c.name, d.Score, d.Identity(), mean)
		}
		if d.Miscalibration < 0 || d.Discrimination < 0 {
			t.Errorf("%s: MCB %g, DSC %g", c.name, d.Miscalibration, d.Discrimination)
		}
	}
	r := rule(t, "-sum(p*ln(p))", 3, false)
	tl, _ := NewTally([]Scheme{{Name: "log", Rule: r, Pay: Affine{B: 1}}}, TallyOptions{})
	rng := rand.New(rand.NewPCG(9, 9))
	se := make([]float64, 3)
	const N = 2000
	for i := range N {
		a, b := rng.Float64(), rng.Float64()
		p := []float64{a / (1 + a + b), b / (1 + a + b), 1 / (1 + a + b)}
		y := rng.IntN(3)
		tl.Add("A", i+1, y, p)
		for k := range 3 {
			o := 0.0
			if k == y {
				o = 1
			}
			se[k] += (p[k] - o) * (p[k] - o) / N
		}
	}
	for k, d := range result(t, tl).Forecasters[0].CORP[0] {
		if math.Abs(d.Score-se[k]) > 1e-12 || math.Abs(d.Identity()-d.Score) > 1e-12 || d.Miscalibration < 0 || d.Discrimination < 0 {
			t.Errorf("event %d: %+v, direct squared error %.17g", k, d, se[k])
		}
	}
}

// result is tl.Result(), failing the test on an error.
func result(t testing.TB, tl *Tally) *Result {
	t.Helper()
	r, err := tl.Result()
	if err != nil {
		t.Fatal(err)
	}
	return r
}
