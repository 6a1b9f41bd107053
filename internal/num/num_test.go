package num

import "testing"

// TestParseDistributionKeepsDecimals: 0.6 + 0.3 + 0.1 is 0.9999999999999999
// in binary; the entries must come back as typed, not divided by that
// sum. Entries that sum to 1 only within the tolerance are renormalised.
func TestParseDistributionKeepsDecimals(t *testing.T) {
	v, err := ParseDistribution("0.6,0.3,0.1", 3)
	if err != nil || v[0] != 0.6 || v[1] != 0.3 || v[2] != 0.1 {
		t.Errorf("got %v, %v", v, err)
	}
	w, err := ParseDistribution("0.3333333,0.3333333,0.3333333", 3)
	if err != nil {
		t.Fatal(err)
	}
	if s := w[0] + w[1] + w[2]; s < 1-1e-15 || s > 1+1e-15 {
		t.Errorf("renormalised entries sum to %v", s)
	}
	// For n = 2 one number is the first outcome's probability; the other
	// is the decimal complement 0.3, not the float 1 - 0.7.
	for _, c := range []struct {
		in   string
		want float64
	}{{"0.7", 0.3}, {"0.05", 0.95}, {"0.123456", 0.876544}, {"1", 0}, {"0", 1}} {
		if b, err := ParseDistribution(c.in, 2); err != nil || b[1] != c.want {
			t.Errorf("%s: %v, %v; want second entry %v", c.in, b, err, c.want)
		}
	}
}

// A witness's belief and report are printed with the digits that tell
// them apart, and two equal vectors are reported as such.
func TestFormatApart(t *testing.T) {
	a, b, ok := FormatApart([]float64{0.5, 0.5}, []float64{0.5 - 1e-7, 0.5 + 1e-7})
	if !ok || a != "(0.5, 0.5)" || b != "(0.4999999, 0.5000001)" {
		t.Errorf("apart: %q %q %v", a, b, ok)
	}
	if a, b, ok := FormatApart([]float64{0.25, 0.75}, []float64{1, 0}); !ok || a != "(0.25, 0.75)" || b != "(1, 0)" {
		t.Errorf("six digits suffice: %q %q %v", a, b, ok)
	}
	if _, _, ok := FormatApart([]float64{0.3, 0.7}, []float64{0.3, 0.7}); ok {
		t.Error("equal vectors told apart")
	}
}

// A failed check whose worst place is a belief with itself as the report
// (the divergence D(q, q) of -6e-16 that rounding leaves) names no report,
// and the belief reads with six digits: 0.94, not the 17-digit
// 0.93999999999999995 the search for telling-apart digits ends on.
func TestWitnessSamePointReadsShort(t *testing.T) {
	q := []float64{0.94, 0.05, 0.01}
	b, _, named := Witness(q, q, true)
	if named || b != "(0.94, 0.05, 0.01)" {
		t.Errorf("Witness(q, q) = %q named %v, want (0.94, 0.05, 0.01) not named", b, named)
	}
	b, r, named := Witness(q, []float64{0.94, 0.05, 0.010000000001}, true)
	if !named || b == r {
		t.Errorf("distinct points read %q and %q (named %v), want two readings", b, r, named)
	}
}
