package table

import "testing"

// TestValueAxis: the figure's value axis names the kind once.
func TestValueAxis(t *testing.T) {
	for _, c := range []struct {
		kind      Kind
		name, out string
	}{
		{KindMoney, "pay", "pay"},
		{"chance of the prize", "chance", "chance of the prize"},
		{"points", "score", "score (points)"},
	} {
		if got := (&Table{Kind: c.kind, ValueName: c.name}).valueAxis(); got != c.out {
			t.Errorf("%q/%q: %q, want %q", c.kind, c.name, got, c.out)
		}
	}
}
