package verify

import (
	"context"
	"math"
	"strings"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/internal/simplex"
)

// An ordered rule built from a strictly concave binary generator of each
// cumulative probability, H = Σ_k h(c_k) with h(c) = sqrt(c(1 - c)), is
// strictly proper: p -> (c_1, ..., c_{n-1}) is one-to-one and each term
// is a binary Bregman rule (the ranked-probability construction; Gneiting
// & Raftery 2007, Sec. 3.3 and Theorem 1). At a report with c_k ∈ {0, 1}
// the efforts are limits converging like sqrt(h), extrapolated with an
// error near 1e-9; the check must allow for that error instead of
// calling the rule improper. Beside it, the estimate is checked against
// the closed-form efforts L(a, k) = Σ_m [h(a_m) + h'(a_m)(y_m - a_m)]
// (a_m the report's cumulative, y_m = 1 for k <= m; a term with a_m ∈
// {0, 1} is 0 when y_m = a_m and +Inf otherwise, as h'(a)(y - a) -> 0 or
// +Inf; derived by hand) at every boundary report of a grid.
func TestBoundaryLimitErrorAllowed(t *testing.T) {
	const n, K = 4, 12
	r := bregmantest.Rule(t, "csum(sqrt(c*(1-c)))", bregman.Options{Outcomes: n, Ordered: true})
	rep, err := CheckRule(context.Background(), r, Settings{Resolution: 30})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != StrictlyProper {
		nn := rep.Check(NameNonnegativity)
		t.Fatalf("verdict %s, want %s (nonnegativity worst %g: %s)", rep.Verdict, StrictlyProper, nn.Worst, nn.Note)
	}
	if rep.Grid.Extrapolation <= 0 || !strings.Contains(rep.Grid.String(), "extrapolated limit") {
		t.Errorf("the tolerance text does not state the extrapolation's error: %s", rep.Grid)
	}
	h := func(c float64) float64 { return math.Sqrt(c * (1 - c)) }
	dh := func(c float64) float64 { return (1 - 2*c) / (2 * math.Sqrt(c*(1-c))) }
	g, err := simplex.Full(n, K)
	if err != nil {
		t.Fatal(err)
	}
	sc := r.NewScorer()
	eff := make([]float64, n)
	checked := 0
	for j := 0; j < g.Len(); j++ {
		if !g.Boundary[j] {
			continue
		}
		p := g.Point(j)
		sc.Efforts(eff, p)
		for k := 0; k < n; k++ {
			want, c := 0.0, 0.0
			for m := 0; m < n-1; m++ {
				c += p[m]
				y := 0.0
				if k <= m {
					y = 1
				}
				switch {
				case c < 1e-12 || c > 1-1e-12:
					if math.Abs(y-math.Round(c)) > 0.5 {
						want = math.Inf(1)
					}
				default:
					want += h(c) + dh(c)*(y-c)
				}
			}
			if math.IsInf(want, 1) {
				if !math.IsInf(eff[k], 1) {
					t.Errorf("report %v, outcome %d: effort %g, want +Inf", p, k+1, eff[k])
				}
				continue
			}
			checked++
			if e := math.Abs(eff[k] - want); e > sc.LimitError()+1e-12 {
				t.Errorf("report %v, outcome %d: effort %.12g, closed form %.12g: error %.3g above the estimate %.3g",
					p, k+1, eff[k], want, e, sc.LimitError())
			}
		}
	}
	if checked == 0 {
		t.Fatal("no finite boundary effort compared")
	}
}
