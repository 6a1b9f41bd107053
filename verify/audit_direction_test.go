package verify

import (
	"context"
	"testing"
)

// Where the best misreport goes over three outcomes, derived by hand on
// the grid of step 1/30 (496 beliefs):
//   - 10 p_y pays 10 max q at a vertex of a first-ranked outcome, a gain of
//     10 (max q - sum q^2) > 0 except where q is uniform on its support (3
//     vertices, 3 edge midpoints, the centre): 489 beliefs exaggerate;
//   - 10 - 5 sum((2 p - 1/3 - hit)^2) is the quadratic score of 2p - 1/3,
//     best at 2r - 1/3 = q, so r = (q + 1/3)/2, halfway to the uniform
//     forecast with the same outcomes first: all 495 beliefs but the
//     centre hedge;
//   - the quadratic score itself: no misreport gains, no direction.
func TestDirectionOverThreeOutcomes(t *testing.T) {
	for _, c := range []struct {
		pay                      string
		dir                      string
		exaggerate, hedge, flips int
	}{
		{"10*p[y]", Exaggerates, 489, 0, 0},
		{"10 - 5*sum((2*p - 1/3 - hit)^2)", Hedges, 0, 495, 0},
		{"10 - 5*sum((p - hit)^2)", "", 0, 0, 0},
	} {
		rep, err := Audit(context.Background(), pay(t, c.pay, 3), nil, Settings{Resolution: 30})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Direction != c.dir || rep.Exaggerate != c.exaggerate || rep.Hedge != c.hedge || rep.Flip != c.flips {
			t.Errorf("%s: %q, %d exaggerate, %d hedge, %d flip; want %q, %d, %d, %d", c.pay, rep.Direction, rep.Exaggerate, rep.Hedge, rep.Flip, c.dir, c.exaggerate, c.hedge, c.flips)
		}
	}
}

// A report flips when it ranks first only outcomes the belief does not;
// ties in first place count as shared (derived by hand).
func TestClassifyFlipsAndTies(t *testing.T) {
	for _, c := range []struct {
		q, r []float64
		want string
	}{
		{[]float64{0.5, 0.3, 0.2}, []float64{0.2, 0.6, 0.2}, Flips},
		{[]float64{0.4, 0.4, 0.2}, []float64{0, 1, 0}, Exaggerates},
		{[]float64{0.6, 0.2, 0.2}, []float64{0.4, 0.3, 0.3}, Hedges},
		{[]float64{0.7, 0.3}, []float64{0.5, 0.5}, Hedges},      // on 1/2: not the other side
		{[]float64{0.5, 0.5}, []float64{0.8, 0.2}, Exaggerates}, // from 1/2, as for two outcomes before
		{[]float64{0.6, 0.4}, []float64{0.3, 0.7}, Flips},
	} {
		if got := classify(c.q, c.r); got != c.want {
			t.Errorf("belief %v, report %v: %s, want %s", c.q, c.r, got, c.want)
		}
	}
}
