package corp

import (
	"math"
	"math/rand/v2"
	"testing"
)

// logLoss is the logarithmic score of a yes/no forecast, −ln of the
// probability given to what happened, written out here independently of
// the rules the program builds.
func logLoss(x float64) (float64, float64) { return -math.Log(x), -math.Log(1 - x) }

// sphericalLoss is the negated spherical score, another proper rule.
func sphericalLoss(x float64) (float64, float64) {
	norm := math.Hypot(x, 1-x)
	return -x / norm, -(1 - x) / norm
}

func groups(xs []float64, counts, hits []int) []Group {
	g := make([]Group, len(xs))
	for i := range xs {
		g[i] = Group{X: xs[i], Count: counts[i], Hits: hits[i]}
	}
	return g
}

// PAV on small sequences, derived by hand: a violator is pooled with the
// block before it, and pooling goes on backwards while the order is broken.
func TestPAVByHand(t *testing.T) {
	cases := []struct {
		name         string
		counts, hits []int
		want         []float64
	}{
		{"one violator", []int{1, 1, 1}, []int{1, 0, 1}, []float64{0.5, 0.5, 1}},
		{"all pooled", []int{2, 2, 1}, []int{2, 1, 0}, []float64{0.6, 0.6, 0.6}},
		{"already increasing", []int{4, 2, 3}, []int{1, 1, 3}, []float64{0.25, 0.5, 1}},
		{"alternating", []int{1, 1, 1, 1}, []int{0, 1, 0, 1}, []float64{0, 0.5, 0.5, 1}},
		// 3/4, then 0/2 pools to 3/6 = 1/2; then 1/1 stays; then 0/3 pools
		// with 1/1 to 1/4, below 1/2, so all pool: 4/10.
		{"backwards pooling", []int{4, 2, 1, 3}, []int{3, 0, 1, 0}, []float64{0.4, 0.4, 0.4, 0.4}},
		{"ties pool or not alike", []int{2, 2}, []int{1, 1}, []float64{0.5, 0.5}},
	}
	for _, c := range cases {
		xs := make([]float64, len(c.counts))
		for i := range xs {
			xs[i] = 0.1 * float64(i+1)
		}
		got := PAV(groups(xs, c.counts, c.hits))
		for i := range got {
			if math.Abs(got[i]-c.want[i]) > 1e-15 {
				t.Errorf("%s: PAV = %v, want %v", c.name, got, c.want)
				break
			}
		}
	}
}

// A whole decomposition under the squared error, derived by hand:
// forecasts 0.2 (event), 0.4 (no event), 0.9 (event). Scores 0.64, 0.16,
// 0.01, mean 0.27. PAV gives 0.5, 0.5, 1: scores 0.25, 0.25, 0, mean 1/6.
// Base rate 2/3: UNC = r(1 − r) = 2/9. MCB = 0.27 − 1/6, DSC = 2/9 − 1/6.
func TestDecomposeByHand(t *testing.T) {
	g := groups([]float64{0.2, 0.4, 0.9}, []int{1, 1, 1}, []int{1, 0, 1})
	d := Decompose(g, SquaredError)
	want := Decomposition{Count: 3, BaseRate: 2.0 / 3, Score: 0.27, Miscalibration: 0.27 - 1.0/6, Discrimination: 2.0/9 - 1.0/6, Uncertainty: 2.0 / 9}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"base rate", d.BaseRate, want.BaseRate}, {"score", d.Score, want.Score}, {"MCB", d.Miscalibration, want.Miscalibration},
		{"DSC", d.Discrimination, want.Discrimination}, {"UNC", d.Uncertainty, want.Uncertainty},
	} {
		if math.Abs(c.got-c.want) > 1e-15 {
			t.Errorf("%s = %.17g, want %.17g", c.name, c.got, c.want)
		}
	}
	if d.Count != 3 {
		t.Errorf("count %d, want 3", d.Count)
	}
}

// The uncertainty term is the score of the base rate, derived by hand:
// for the squared error r(1 − r)² + (1 − r)r² = r(1 − r); for the log
// score the binary entropy −r ln r − (1 − r) ln(1 − r).
func TestUncertaintyIsBaseRateScore(t *testing.T) {
	g := groups([]float64{0.05, 0.3, 0.3001, 0.8}, []int{7, 5, 1, 7}, []int{1, 2, 1, 4})
	r := 8.0 / 20
	if d := Decompose(g, SquaredError); math.Abs(d.Uncertainty-r*(1-r)) > 1e-15 {
		t.Errorf("squared error UNC = %.17g, want r(1-r) = %.17g", d.Uncertainty, r*(1-r))
	}
	want := -r*math.Log(r) - (1-r)*math.Log(1-r)
	if d := Decompose(g, logLoss); math.Abs(d.Uncertainty-want) > 1e-15 {
		t.Errorf("log UNC = %.17g, want binary entropy %.17g", d.Uncertainty, want)
	}
}

// randomGroups draws n forecasts with continuous probabilities (every
// group one case, as model output gives) or on a menu of m values.
func randomGroups(rng *rand.Rand, n, menu int) []Group {
	raw := make([]Group, n)
	for i := range raw {
		x := rng.Float64()
		if menu > 0 {
			x = math.Round(x*float64(menu)) / float64(menu)
		}
		chance := math.Min(1, math.Max(0, x+0.3*(rng.Float64()-0.5)))
		hit := 0
		if rng.Float64() < chance {
			hit = 1
		}
		raw[i] = Group{X: math.Min(0.999, math.Max(0.001, x)), Count: 1, Hits: hit}
	}
	g, err := Sorted(raw)
	if err != nil {
		panic(err)
	}
	return g
}

// The identity score = MCB − DSC + UNC holds to 1e-12 on random data, and
// MCB and DSC are not negative, for three proper rules.
func TestIdentityOnRandomData(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 2021))
	for trial := range 60 {
		g := randomGroups(rng, 1+rng.IntN(400), []int{0, 10, 20}[trial%3])
		for name, loss := range map[string]Loss{"squared": SquaredError, "log": logLoss, "spherical": sphericalLoss} {
			d := Decompose(g, loss)
			if e := math.Abs(d.Score - d.Identity()); e > 1e-12 {
				t.Fatalf("%s trial %d: score %.17g, MCB − DSC + UNC %.17g (off by %g)", name, trial, d.Score, d.Identity(), e)
			}
			if d.Miscalibration < -1e-12 || d.Discrimination < -1e-12 {
				t.Fatalf("%s trial %d: MCB %g, DSC %g, want both >= 0", name, trial, d.Miscalibration, d.Discrimination)
			}
		}
	}
}

// Forecasts that already are their own isotonic recalibration (each says
// the frequency that followed it, nondecreasing) have MCB = 0.
func TestIsotonicCalibratedHasNoMiscalibration(t *testing.T) {
	g := groups([]float64{0.125, 0.25, 0.5, 0.75}, []int{8, 4, 6, 12}, []int{1, 1, 3, 9})
	for name, loss := range map[string]Loss{"squared": SquaredError, "log": logLoss, "spherical": sphericalLoss} {
		if d := Decompose(g, loss); math.Abs(d.Miscalibration) > 1e-15 {
			t.Errorf("%s: MCB = %g, want 0", name, d.Miscalibration)
		}
	}
	// A constant forecast at the base rate discriminates nothing either.
	one := []Group{{X: 0.25, Count: 12, Hits: 3}}
	if d := Decompose(one, SquaredError); d.Miscalibration != 0 || d.Discrimination != 0 {
		t.Errorf("base-rate forecast: MCB %g, DSC %g, want 0 and 0", d.Miscalibration, d.Discrimination)
	}
}

// A log score of a forecast that ruled out what happened is infinite: the
// score and MCB say so, DSC and UNC stay finite.
func TestInfiniteScore(t *testing.T) {
	g := groups([]float64{0, 0.5}, []int{2, 2}, []int{1, 1})
	d := Decompose(g, logLoss)
	if !math.IsInf(d.Score, 1) || !math.IsInf(d.Miscalibration, 1) || math.IsInf(d.Discrimination, 0) || math.IsNaN(d.Uncertainty) {
		t.Errorf("got %+v, want score and MCB +Inf, DSC and UNC finite", d)
	}
	if d := Decompose(nil, SquaredError); !math.IsNaN(d.Score) {
		t.Errorf("no forecasts: %+v, want NaN", d)
	}
}

func TestSortedMergesAndRefuses(t *testing.T) {
	g, err := Sorted([]Group{{0.5, 2, 1}, {0.1, 1, 0}, {0.5, 3, 3}, {0.2, 0, 0}})
	if err != nil || len(g) != 2 || g[0] != (Group{0.1, 1, 0}) || g[1] != (Group{0.5, 5, 4}) {
		t.Errorf("Sorted = %v, %v", g, err)
	}
	for _, bad := range []Group{{1.5, 1, 0}, {math.NaN(), 1, 0}, {0.5, 1, 2}, {0.5, -1, 0}} {
		if _, err := Sorted([]Group{bad}); err == nil {
			t.Errorf("Sorted accepted %+v", bad)
		}
	}
}

// One group of 10,000 forecasts of 0.5: the recalibrated value is the hit
// frequency of a binomial, so the 90 % band is about 0.5 ± 1.645·√(0.25/n)
// (the normal approximation, common practice). The bands repeat exactly
// with the same seed.
func TestConsistencyBands(t *testing.T) {
	g := []Group{{X: 0.5, Count: 10000, Hits: 5000}}
	b := ConsistencyBands(g, BandOptions{Resamples: 2000})
	half := 1.645 * math.Sqrt(0.25/10000)
	if len(b) != 1 || math.Abs(b[0].Lo-(0.5-half)) > 0.25*half || math.Abs(b[0].Hi-(0.5+half)) > 0.25*half {
		t.Errorf("band %+v, want about [%.4f, %.4f]", b, 0.5-half, 0.5+half)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	many := randomGroups(rng, 1000, 0)
	x := ConsistencyBands(many, BandOptions{Points: 50})
	y := ConsistencyBands(many, BandOptions{Points: 50})
	if len(x) != 50 || x[0].X != many[0].X || x[49].X != many[len(many)-1].X {
		t.Fatalf("positions: %d points from %g to %g", len(x), x[0].X, x[len(x)-1].X)
	}
	for i := range x {
		if x[i] != y[i] {
			t.Fatalf("bands differ between runs at %d: %+v, %+v", i, x[i], y[i])
		}
		if !(x[i].Lo <= x[i].Hi) {
			t.Fatalf("band %d inverted: %+v", i, x[i])
		}
	}
}
