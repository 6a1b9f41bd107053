package verify

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// naiveBest is the brute force the pruned stream answers to: every report,
// kept by (value, grid index), written without any of the kernels.
func naiveBest(q, rows []float64, n int, support bool) best {
	want := best{math.Inf(1), math.Inf(1), -1, -1}
	for j := 0; j*n < len(rows); j++ {
		var phi float64
		first := true
		for k := range q {
			if support && q[k] == 0 {
				continue
			}
			v := q[k] * rows[j*n+k]
			if first {
				phi, first = v, false
			} else {
				phi += v
			}
		}
		switch {
		case phi < want.m1:
			want = best{phi, want.m1, int32(j), want.arg}
		case phi < want.m2:
			want.m2, want.arg2 = phi, int32(j)
		}
	}
	return want
}

// menuOf fills a menu with the rule's efforts on the grid.
func menuOf(t *testing.T, src string, g *simplex.Grid) *menu {
	t.Helper()
	n := g.N
	sc := rule(t, src, n).NewScorer()
	m := newMenu(n, g.Len())
	for j := 0; j < g.Len(); j++ {
		sc.Efforts(m.rows[j*n:(j+1)*n], g.Point(j))
	}
	m.seal()
	return m
}

// prunedRules are generators of every kind the pruning must not change the
// answer for: strictly proper, proper but flat (ties everywhere), improper
// (convex pieces), kinked (abs, max), singular on the boundary (log,
// sqrt), undefined somewhere (NaN rows), and constant.
var prunedRules = []string{
	"1 - sum(p^2)",
	"-sum(p*ln(p))",
	"-sqrt(sum(p^2))",
	"sum(sqrt(p))",
	"0",
	"sum(p^2)",
	"-abs(p1 - 0.3) - sum(p^2)/10",
	"max(p1, p2)",
	"min(p1, 1 - p1) - sum(p^3)",
	"sum(p^2) - 3*p1^4",
	"ln(p1 - 0.2) - p2",
	"-sum(p*ln(p)) + 2*p1*p2",
	"p1*ln(p1) - sum(p^2)",
}

// TestPrunedStreamIsFullStream: on every rule above, at n = 2..6, full
// and sampled grids, the pruned stream returns the full stream's best,
// second best, both values and both reports, bit for bit, and both agree
// with the naive loop.
func TestPrunedStreamIsFullStream(t *testing.T) {
	res := map[int]int{2: 300, 3: 30, 4: 12, 5: 7, 6: 5}
	for n := 2; n <= 6; n++ {
		full, err := simplex.Full(n, res[n])
		if err != nil {
			t.Fatal(err)
		}
		sampled, err := simplex.Sample(n, 4*res[n], 1500, 7)
		if err != nil {
			t.Fatal(err)
		}
		for _, g := range []*simplex.Grid{full, sampled} {
			for _, src := range prunedRules {
				if n < 3 && src == "-sum(p*ln(p)) + 2*p1*p2" {
					continue
				}
				name := fmt.Sprintf("n=%d/sampled=%v/%s", n, g.Sampled, src)
				comparePruned(t, name, g, menuOf(t, src, g))
			}
		}
	}
}

// TestPrunedStreamRandomMenus: menus of random values with many exact ties,
// infinities of either sign and NaN, where no smoothness helps the bounds,
// at every n the engine takes.
func TestPrunedStreamRandomMenus(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for n := 2; n <= 12; n++ {
		g, err := simplex.Full(n, map[int]int{2: 200, 3: 20, 4: 9, 5: 6, 6: 5, 7: 4, 8: 4, 9: 3, 10: 3, 11: 3, 12: 3}[n])
		if err != nil {
			t.Fatal(err)
		}
		for trial := range 6 {
			m := newMenu(n, g.Len())
			for i := range m.rows {
				switch x := rng.IntN(200); {
				case trial%3 == 0 && x == 0:
					m.rows[i] = math.Inf(1)
				case trial%3 == 1 && x == 0:
					m.rows[i] = math.Inf(-1)
				case trial == 5 && x == 1:
					m.rows[i] = math.NaN()
				case trial < 2:
					m.rows[i] = float64(rng.IntN(6)) // heavy ties
				default:
					// smooth plus noise: the bounds are tight but not exact
					p := g.Point(i / n)
					m.rows[i] = -2*p[i%n] + 0.01*rng.Float64()
				}
			}
			m.seal()
			comparePruned(t, fmt.Sprintf("n=%d/trial=%d", n, trial), g, m)
		}
	}
}

func comparePruned(t *testing.T, name string, g *simplex.Grid, m *menu) {
	t.Helper()
	pr := pool.NewMeter(nil, 0)
	got, err := stream(context.Background(), g, m, 2, pr)
	if err != nil {
		t.Fatal(err)
	}
	want, err := streamFull(context.Background(), g, m, 2, pr)
	if err != nil {
		t.Fatal(err)
	}
	// The same walk with a plane model on every leaf, however wide (the
	// stream itself models only narrow leaves, which small grids lack).
	tr := newReportTree(g, m)
	tr.models = newLeafModels(tr, g.Coords)
	modelled, err := streamTree(context.Background(), tr, g, m, 2, pr, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		if !sameBest(got[i], want[i]) {
			t.Fatalf("%s: belief %v: pruned %+v, full %+v", name, g.Point(i), got[i], want[i])
		}
		if !sameBest(modelled[i], want[i]) {
			t.Fatalf("%s: belief %v: pruned with leaf models %+v, full %+v", name, g.Point(i), modelled[i], want[i])
		}
		if m.infinite && g.Boundary[i] {
			continue // the support scan is compared in TestSafeRowsMatchSupportScan
		}
		if nb := naiveBest(g.Point(i), m.rows, g.N, false); !sameBest(want[i], nb) {
			t.Fatalf("%s: belief %v: full %+v, naive %+v", name, g.Point(i), want[i], nb)
		}
	}
}

// sameBest compares bit for bit (NaN equal to NaN, -0 apart from +0).
func sameBest(a, b best) bool {
	return a.arg == b.arg && a.arg2 == b.arg2 &&
		math.Float64bits(a.m1) == math.Float64bits(b.m1) && math.Float64bits(a.m2) == math.Float64bits(b.m2)
}
