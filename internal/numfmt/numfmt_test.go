package numfmt

import (
	"math"
	"testing"
)

// The cases are the noise a person saw in exports (1.3447999999999998,
// 3.15e-17) and sums of amounts in cents; expected strings derived by hand.
func TestReadable(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{1.3447999999999998, "1.3448"}, {0.1 + 0.2, "0.3"}, {143.25000000000003, "143.25"},
		{150, "150"}, {-0.0, "0"}, {1e-7, "1e-07"}, {2.5e15, "2.5e+15"}, {math.NaN(), "NaN"}, {math.Inf(-1), "-Inf"},
	} {
		if got := Readable(c.v); got != c.want {
			t.Errorf("Readable(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}

func TestFixedSmallDecimals(t *testing.T) {
	if got := Fixed(-0.0001, 2); got != "0.00" {
		t.Errorf("Fixed(-0.0001, 2) = %q", got)
	}
	if got := Small(3.15e-17, 150, 1e-12); got != "0" {
		t.Errorf("Small noise = %q", got)
	}
	if got := Small(0.03, 150, 1e-12); got != "0.03" {
		t.Errorf("Small margin = %q", got)
	}
	if d := Decimals([]float64{0, 0.1, 0.12, 1}, 9); d != 2 {
		t.Errorf("Decimals = %d, want 2", d)
	}
	if d := Decimals([]float64{1.0 / 3}, 9); d != 9 {
		t.Errorf("Decimals(1/3) = %d, want the cap 9", d)
	}
	if v := Clean(143.25000000000003); v != 143.25 {
		t.Errorf("Clean = %v", v)
	}
}

// Each kind keeps its digits and drops binary noise; expected strings
// derived by hand.
func TestKinds(t *testing.T) {
	for _, c := range []struct{ got, want string }{
		{Amount(143.25000000000003, 2), "143.25"}, {Amount(150, 2), "150.00"}, {Amount(1.0/3, -1), "0.333333"},
		{Pay(8.638813559322034), "8.63881"}, {Effort(-2.0 / 3), "-0.666667"}, {Effort(0.1 + 0.2), "0.3"},
		{Probability(0.30000000000000004), "0.3"}, {Margin(0.024999999999999998), "0.025"}, {Margin(1.0 / 60), "0.0166667"},
		{Significant(0.21874999999999997, 4), Significant(0.21875, 4)}, {Margin(0.21874999999999997), "0.21875"},
		{Points(9.5238), "9.52"}, {Statistic(8.638813559322034, 1), "8.639"}, {Statistic(3.15e-17, 0.25), "0"}, {Statistic(0.0339002, 0.3848), "0.0339"},
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
}

// A column of margins shares one count of decimals (derived by hand).
func TestMarginColumn(t *testing.T) {
	got := MarginColumn([]float64{1.6, 1.475, 1.65, 0.024999999999999998})
	want := []string{"1.600", "1.475", "1.650", "0.025"}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("MarginColumn[%d] = %q, want %q", i, got[i], want[i])
		}
	}
}
