package point

import (
	"context"
	"math"
	"testing"
)

// A shift of the interval cannot change a cent. Squared error on
// [s, s + 1] with a menu of tenths pays, derived by hand,
// 50 - 50·(x - y)^2 = 50 - (i - j)^2/2 for report s + i/10 and outcome
// s + j/10 (the largest effort, 1, at the corners): whole and half
// units, never near a rounding boundary of cents.
func TestShiftCannotChangeACent(t *testing.T) {
	for _, s := range []float64{0, 1e6, -1e6, 1e9, 123456.789} {
		g, err := New("-x^2", s, s+1, Options{})
		if err != nil {
			t.Fatal(err)
		}
		tb, err := g.BuildTable(context.Background(), TableSpec{Floor: 0, Cap: 50, Step: 0.1, Unit: 0.01})
		if err != nil {
			t.Fatal(err)
		}
		for i := range tb.Reports {
			for j := range tb.Outcomes {
				want := 50 - float64((i-j)*(i-j))/2
				if got := tb.Pay[i][j]; math.Abs(got-want) > 1e-9 {
					t.Fatalf("shift %g: report %d outcome %d pays %.2f, want %.2f", s, i, j, got, want)
				}
			}
		}
	}
}

// The divergence far from 0 keeps its digits: D(y, x) = (y - x)^2 exactly
// for squared error, and for phi = -x^4 it is (y - x)^2 (3x^2 + 2xy + y^2),
// derived by hand, at a location where the direct form cancels numbers
// near 1e24.
func TestDivergenceFarFromZero(t *testing.T) {
	cases := []struct {
		src  string
		d    func(y, x float64) float64
		x, y float64
	}{
		{"-x^2", func(y, x float64) float64 { return (y - x) * (y - x) }, 1e6 + 0.1, 1e6},
		{"-x^2", func(y, x float64) float64 { return (y - x) * (y - x) }, 1e9 + 0.5, 1e9 + 0.25},
		{"-x^4", func(y, x float64) float64 { return (y - x) * (y - x) * (3*x*x + 2*x*y + y*y) }, 1e6 + 0.1, 1e6},
	}
	for _, c := range cases {
		g, err := New(c.src, c.y-10, c.x+10, Options{})
		if err != nil {
			t.Fatal(err)
		}
		got, want := g.NewEvaluator().Divergence(c.y, c.x), c.d(c.y, c.x)
		if math.Abs(got-want) > 1e-9*want {
			t.Errorf("%s: D(%v, %v) = %.15g, want %.15g", c.src, c.y, c.x, got, want)
		}
	}
}

// Column labels have as many digits as make them distinct.
func TestLabelsDistinct(t *testing.T) {
	cases := []struct {
		vals []float64
		want []string
	}{
		{[]float64{1e6, 1e6 + 0.1, 1e6 + 0.2}, []string{"1000000", "1000000.1", "1000000.2"}},
		{[]float64{0, 0.1, 0.2, 0.30000000000000004}, []string{"0", "0.1", "0.2", "0.3"}},
		{[]float64{10, 12.5, 15}, []string{"10", "12.5", "15"}},
		{[]float64{0, 1.0 / 3, 2.0 / 3, 1}, []string{"0", "0.333333", "0.666667", "1"}},
		{[]float64{1e20, 1e20 + 1e5}, []string{"1e+20", "1.000000000000001e+20"}},
	}
	for _, c := range cases {
		got := distinct(c.vals)
		for i := range got {
			if got[i] != c.want[i] {
				t.Errorf("distinct(%v) = %q, want %q", c.vals, got, c.want)
				break
			}
		}
	}
}
