package verify

import (
	"context"
	"math"
	"testing"
)

// pay(r, y) = 10 + 10 (r_y - 1/2)|r_y - 1/2| over two outcomes: with t =
// q - 1/2 the expected pay is 10 + 20 t (r - 1/2)|r - 1/2|, increasing in
// r for t > 0, so the best report is exactly (1, 0) and the gap is
// 20 t (1/4 - t^2), largest at t = 1/sqrt(12): 5/(3 sqrt 3) = 0.9622504486
// (derived by hand). The sharpened witness must read (1, 0), not the
// (1, 2.75e-19) the squares map of the local search leaves, and the
// properness check must name the same report.
func TestSharpenedWitnessOnTheFace(t *testing.T) {
	a, err := Audit(context.Background(), pay(t, "10 + 10*(p[y] - 0.5)*abs(p[y]-0.5)", 2), nil, Settings{Resolution: 200})
	if err != nil {
		t.Fatal(err)
	}
	want := 5 / (3 * math.Sqrt(3))
	if math.Abs(a.Gap.Max-want) > 1e-9*want {
		t.Errorf("gap %.12g, want %.12g", a.Gap.Max, want)
	}
	r := a.Gap.BestReport
	if len(r) != 2 || r[0] != 1 || r[1] != 0 {
		t.Errorf("best report %v, want exactly (1, 0)", r)
	}
	if c := a.Check(NameProperness); c.Report != nil && (c.Report[0] != 1 || c.Report[1] != 0) {
		t.Errorf("properness witness report %v, want exactly (1, 0)", c.Report)
	}
	if math.Abs(a.Gap.Belief[0]-(0.5+1/math.Sqrt(12))) > 1e-6 {
		t.Errorf("gap belief %v, want %.9g", a.Gap.Belief, 0.5+1/math.Sqrt(12))
	}
}
