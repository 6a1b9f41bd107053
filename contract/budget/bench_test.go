package budget

import (
	"context"
	"fmt"
	"testing"

	"scorewright/generator/design"
)

// BenchmarkRecheck measures the re-check (every item against every other,
// then the belief cells on the default grid) at several menu sizes.
func BenchmarkRecheck(b *testing.B) {
	for _, c := range []struct {
		n    int
		step float64
	}{{2, 0.05}, {2, 0.01}, {3, 0.1}, {3, 0.05}, {4, 0.1}} {
		m := stepMenu(b, c.n, c.step, 0)
		f, err := FitRule(rule(b, "1 - sum(p^2)", c.n), m, design.Budget{Floor: 0, Cap: 100, Unit: 0.01})
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("n=%d/items=%d", c.n, len(m.Reports)), func(b *testing.B) {
			for b.Loop() {
				if _, err := f.Recheck(context.Background(), RecheckSettings{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkFitRule measures fitting, which includes the search of the
// truthful pay range over beliefs.
func BenchmarkFitRule(b *testing.B) {
	for _, n := range []int{2, 3} {
		m := stepMenu(b, n, 0.05, 0.01)
		r := rule(b, "-sum(p*ln(p))", n)
		b.Run(fmt.Sprintf("n=%d/items=%d", n, len(m.Reports)), func(b *testing.B) {
			for b.Loop() {
				if _, err := FitRule(r, m, design.Budget{Floor: 0, Cap: 50, Unit: 0.01, ReportFloor: 0.01}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
