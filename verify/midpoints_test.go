package verify

import (
	"math/rand/v2"
	"reflect"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/internal/simplex"
)

// TestMidpointsLazyRoundingIsExact: midpoints computes the rounding
// bounds only where the deficit is above T (the bounds are never
// negative) and a point's bound once; its finding is identical, field by
// field, to the eager form that bounds every value of every pair
// (midpointsEager, the test's own copy of the rule), on concave, kinked,
// cancelling and non-concave generators. The generators are invented
// here; the comparison is the check.
func TestMidpointsLazyRoundingIsExact(t *testing.T) {
	srcs := []struct {
		src string
		n   int
	}{
		{"1 - sum(p^2)", 3}, {"-sum(p*ln(p))", 3}, {"(1e8 - sum(p^2)) - 1e8", 3},
		{"(1e15 - sum(p^2)) - 1e15", 3}, {"sum(p^2)", 3}, {"min(p1, p2) + 1 - sum(p^2)", 3},
		{"-max(p1, p2, p3)", 3}, {"p1*p2 - 0.5*(p1 - p2)^2", 2}, {"sqrt(p1*p2) + 1e-9*p1^2", 2},
		{"1 - sum(p^2) + 0.3*abs(p1 - 0.3)", 4},
	}
	found, rounded := 0, 0
	for _, c := range srcs {
		r := rule(t, c.src, c.n)
		g, err := simplex.Full(c.n, map[int]int{2: 200, 3: 40, 4: 12}[c.n])
		if err != nil {
			t.Fatal(err)
		}
		for _, T := range []float64{0, 1e-12, 1e-9, 1e-6} {
			got := midpoints(g, r.NewScorer(), T, 7)
			want := midpointsEager(g, r.NewScorer(), T, 7, true)
			if !reflect.DeepEqual(got, want) {
				t.Errorf("%q T=%g: lazy %+v, eager %+v", c.src, T, got, want)
			}
			if got.found {
				found++
			}
			if bare := midpointsEager(g, r.NewScorer(), T, 7, false); bare.found != got.found {
				rounded++ // the rounding bounds decide this case
			}
		}
	}
	if found == 0 || rounded == 0 {
		t.Errorf("%d findings, %d decided by the rounding bounds: the cases do not reach both", found, rounded)
	}
}

// midpointsEager is midpoints as it was before the lazy bounds: every
// value of every pair bounded, or with bounded false none (slack T).
func midpointsEager(g *simplex.Grid, sc *bregman.Scorer, T float64, seed uint64, bounded bool) kink {
	n, G := g.N, g.Len()
	rng := rand.New(rand.NewPCG(seed, 0x3d1d))
	tests := min(G, 2000)
	a, b, m := make([]float64, n), make([]float64, n), make([]float64, n)
	var k kink
	for t := 0; t < tests; t++ {
		copy(a, g.Point(rng.IntN(G)))
		for pass := range 8 {
			if pass%2 == 0 {
				copy(b, g.Point(rng.IntN(G)))
			} else if !nearby(b, a, 3/float64(g.K), rng) {
				continue
			}
			var l2 float64
			for i := range m {
				m[i] = (a[i] + b[i]) / 2
				l2 += (b[i] - a[i]) * (b[i] - a[i])
			}
			if l2 == 0 {
				continue
			}
			k.tests++
			d := (sc.Entropy(a)+sc.Entropy(b))/2 - sc.Entropy(m)
			slack := T
			if bounded {
				slack += (sc.ValueRounding(a)+sc.ValueRounding(b))/2 + sc.ValueRounding(m)
			}
			if d > slack && (!k.found || d/l2 > k.deficit/k.l2) {
				k = kink{found: true, deficit: d, curvature: 8 * d / l2, l2: l2, mid: clone(m), a: clone(a), b: clone(b), tests: k.tests, onBoundary: onBoundary(m)}
			}
		}
	}
	return k
}
