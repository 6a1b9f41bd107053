package backtest

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"

	"scorewright/generator/bregman"
)

func rule(t testing.TB, src string, n int, ordered bool) *bregman.Rule {
	t.Helper()
	f, err := bregman.NewFormula(src, bregman.Options{Outcomes: n, Ordered: ordered})
	if err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	return &bregman.Rule{Gen: f, Ordered: ordered}
}

// murphySample is a small binary history: forecast f of the event, how
// many times it was given, and how many of those times the event happened.
var murphySample = []struct {
	f            float64
	times, event int
}{{0.2, 5, 1}, {0.6, 5, 4}, {0.9, 10, 8}}

func murphyTally(t *testing.T, r *bregman.Rule) *Result {
	t.Helper()
	tl, err := NewTally([]Scheme{{Name: "q", Rule: r, Pay: Affine{A: 0, B: 1}}}, TallyOptions{})
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
	return tl.Result()
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
		tl, err := NewTally([]Scheme{{Name: c.name, Rule: r, Pay: Affine{B: 1}}}, TallyOptions{})
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
		d := tl.Result().Forecasters[0].Decomposition[0]
		if got := d.Identity(); math.Abs(got-mean) > 1e-12 {
			t.Errorf("%s: UNC - RES + REL = %.15g, mean effort %.15g", c.name, got, mean)
		}
		if d.Reliability < 0 || d.Resolution < 0 {
			t.Errorf("%s: negative divergence term: %+v", c.name, d)
		}
	}
}

// When the distinct forecasts outgrow the bound the bins coarsen to a
// grid; every forecast stays in exactly one bin, so counts and outcome
// frequencies still add up, and the remainder is what closes the identity.
func TestCoarsening(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 2, false)
	tl, err := NewTally([]Scheme{{Name: "q", Rule: r, Pay: Affine{B: 1}}}, TallyOptions{MaxBins: 16, Grid: 10})
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
	fc := tl.Result().Forecasters[0]
	if fc.Binning.Grid == 0 || fc.Binning.Grid > 10 || len(fc.Bins) > 16 {
		t.Fatalf("binning %+v with %d bins, want a grid of at most 10 cells and at most 16 bins", fc.Binning, len(fc.Bins))
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
	// A calibrated forecaster on 10 cells: reliability is small but the
	// remainder is not zero, since bins now mix different forecasts.
	if d.WithinBin == 0 {
		t.Errorf("within-bin remainder is exactly 0 on a grid; expected the bins to mix forecasts")
	}
}

// Regrouping for a picture keeps every forecast and every hit, and the
// curve reads observed frequency against mean forecast. By hand for
// murphySample on cells of width 1 (forecasts rounded to 0 or 1): 0.2
// rounds to 0, 0.6 and 0.9 to 1, so the second point has 15 forecasts, mean forecast (5·0.6 + 10·0.9)/15
// = 0.8 and frequency (4 + 8)/15 = 0.8.
func TestRegroup(t *testing.T) {
	res := murphyTally(t, rule(t, "1 - sum(p^2)", 2, false))
	c := ReliabilityCurve("Alder", Regroup(res.Forecasters[0].Bins, 1), 0)
	want := []ReliabilityPoint{{0.2, 0.2, 5}, {0.8, 0.8, 15}}
	if len(c.Points) != len(want) {
		t.Fatalf("points %+v, want %+v", c.Points, want)
	}
	for i, w := range want {
		p := c.Points[i]
		if p.Count != w.Count || math.Abs(p.Forecast-w.Forecast) > 1e-12 || math.Abs(p.Observed-w.Observed) > 1e-12 {
			t.Errorf("point %d = %+v, want %+v", i, p, w)
		}
	}
}
