package verify

import (
	"context"
	"math"
	"testing"

	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// TestOffGridBestIsTheScan: the pruned block walk the audit's off-grid
// pass uses gives, at every grid belief and for caps at, below and above a
// pay, the value and the report of the plain scan over every random
// report (when that is above the cap; none for an infinite cap), on
// payouts with ties (linear, a step), kinks, singular faces (the scan
// itself then runs) and smooth ones, at n = 2 to 12.
func TestOffGridBestIsTheScan(t *testing.T) {
	srcs := []string{
		"10 - 5*sum((p - hit)^2)",
		"p[y]",
		"if(p1 > 0.5, 1, 0)",
		"sqrt(p[y]) - abs(p1 - 0.4)",
		"ln(p[y])",
		"2*p[y] - sum(p^2) + 3*max(p1, 0.3)",
	}
	res := map[int]int{2: 200, 3: 16, 4: 8, 5: 6, 6: 4}
	for n := 2; n <= 12; n++ {
		g, err := simplex.Full(n, max(res[n], 2))
		if err != nil {
			t.Fatal(err)
		}
		R := 3000
		reps := randomInterior(n, R, 5, 0x7e90)
		onFaces(reps, n, 5)
		for _, src := range srcs {
			ev := pay(t, src, n).NewEvaluator()
			pays := make([]float64, R*n)
			for j := 0; j < R; j++ {
				ev.Pays(pays[j*n:(j+1)*n], reps[j*n:(j+1)*n])
			}
			// the honest pay, and values around it, as the cap
			h := make([]float64, g.Len())
			for i := range h {
				for k, x := range g.Point(i) {
					h[i] += x * pays[(i%R)*n+k]
				}
				h[i] += []float64{0, -1, 1e-3, math.Inf(-1), math.NaN()}[i%5]
			}
			m := newMenu(n, g.Len()) // the beliefs' blocks: any menu's tree
			m.seal()
			got, err := offGridBests(context.Background(), g, newReportTree(g, m), reps, pays, h, 2, pool.NewMeter(nil, 0))
			if err != nil {
				t.Fatal(err)
			}
			for i, f := range got {
				wv, wa := offGridScan(g.Point(i), pays, n)
				if !(wv > h[i]) || math.IsInf(h[i], 0) || h[i] != h[i] {
					wv, wa = math.Inf(-1), -1
				}
				if f.arg != wa || f.pay != wv && !(math.IsInf(f.pay, -1) && math.IsInf(wv, -1)) {
					t.Fatalf("n=%d %s belief %v cap %v: walk (%v, %d), scan (%v, %d)", n, src, g.Point(i), h[i], f.pay, f.arg, wv, wa)
				}
			}
		}
	}
}
