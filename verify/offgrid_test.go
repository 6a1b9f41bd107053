package verify

import (
	"math"
	"testing"

	"scorewright/internal/simplex"
)

// TestOffGridBestIsTheScan: the pruned walk the audit's off-grid pass now
// uses gives, at every grid belief and for caps at, below and above a pay,
// the value and the report of the plain scan over every random report
// (when that is above the cap), on payouts with ties (linear, a step),
// kinks, singular faces (the scan itself then runs) and smooth ones.
func TestOffGridBestIsTheScan(t *testing.T) {
	srcs := []string{
		"10 - 5*sum((p - hit)^2)",
		"p[y]",
		"if(p1 > 0.5, 1, 0)",
		"sqrt(p[y]) - abs(p1 - 0.4)",
		"ln(p[y])",
		"2*p[y] - sum(p^2) + 3*max(p1, 0.3)",
	}
	for n := 2; n <= 5; n++ {
		g, err := simplex.Full(n, map[int]int{2: 200, 3: 16, 4: 8, 5: 6}[n])
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
			bestOf := newOffGridBest(reps, pays, n)
			for i := 0; i < g.Len(); i++ {
				q := g.Point(i)
				// the honest pay, and values around it, as the cap
				var h float64
				for k, x := range q {
					h += x * pays[(i%R)*n+k]
				}
				h += []float64{0, -1, 1e-3, math.Inf(-1)}[i%4]
				v, a := bestOf(q, h)
				wv, wa := offGridScan(q, pays, n)
				if !(wv > h) {
					wv, wa = math.Inf(-1), -1
				}
				if a != wa || v != wv && !(math.IsInf(v, -1) && math.IsInf(wv, -1)) {
					t.Fatalf("n=%d %s belief %v: walk (%v, %d), scan (%v, %d)", n, src, q, v, a, wv, wa)
				}
			}
		}
	}
}
