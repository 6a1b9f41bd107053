package verify

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

func TestScanDoesNotAllocate(t *testing.T) {
	rows := make([]float64, 12*1000)
	for i := range rows {
		rows[i] = float64(i % 7)
	}
	q := []float64{0.2, 0.3, 0.5}
	for n := 2; n <= 12; n++ {
		qn := make([]float64, n)
		for k := range qn {
			qn[k] = 1 / float64(n)
		}
		allocs := testing.AllocsPerRun(20, func() { scan(qn, rows[:n*(len(rows)/n)], n) })
		if allocs != 0 {
			t.Errorf("n=%d: %v allocations per scan", n, allocs)
		}
	}
	if a := testing.AllocsPerRun(20, func() { scanSupport(q, rows, 3) }); a != 0 {
		t.Errorf("scanSupport: %v allocations", a)
	}
}

func TestScanMatchesNaive(t *testing.T) {
	// The unrolled kernels against the obvious loop, with a length that is
	// not a multiple of four, ties and infinities.
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 2; n <= 13; n++ { // 13: the loop for an n without a kernel
		for _, G := range []int{1, 3, 4, 7, 1003} {
			rows := make([]float64, n*G)
			for i := range rows {
				rows[i] = float64(rng.IntN(50)) / 7
				if rng.IntN(40) == 0 {
					rows[i] = math.Inf(1)
				}
			}
			q := make([]float64, n)
			for k := range q {
				q[k] = rng.Float64() + 0.01
			}
			got := scan(q, rows, n)
			want := best{math.Inf(1), math.Inf(1), -1, -1}
			for j := 0; j < G; j++ {
				var phi float64
				for k := range q {
					phi += q[k] * rows[j*n+k]
				}
				switch {
				case phi < want.m1:
					want = best{phi, want.m1, int32(j), want.arg}
				case phi < want.m2:
					want.m2, want.arg2 = phi, int32(j)
				}
			}
			if got != want {
				t.Errorf("n=%d G=%d: scan %+v, naive %+v", n, G, got, want)
			}
		}
	}
}

func TestSafeRowsMatchSupportScan(t *testing.T) {
	// Boundary beliefs against a menu with infinite efforts (the log rule,
	// -ln 0 = +Inf): the substituted rows must give exactly the winners and
	// values of the scan that skips the belief's zero coordinates.
	for _, n := range []int{2, 3, 4, 6} {
		g, err := simplex.Full(n, 12)
		if err != nil {
			t.Fatal(err)
		}
		sc := rule(t, "-sum(p*ln(p))", n).NewScorer()
		m := newMenu(n, g.Len())
		for j := 0; j < g.Len(); j++ {
			sc.Efforts(m.rows[j*n:(j+1)*n], g.Point(j))
		}
		m.seal()
		if m.safe == nil {
			t.Fatal("no substituted rows for a menu with infinities")
		}
		bs, err := stream(context.Background(), g, m, 2, pool.NewMeter(nil, 0))
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i < g.Len(); i++ {
			if !g.Boundary[i] {
				continue
			}
			want := scanSupport(g.Point(i), m.rows, n)
			if bs[i] != want {
				t.Fatalf("n=%d belief %v: stream %+v, support scan %+v", n, g.Point(i), bs[i], want)
			}
		}
	}
}
