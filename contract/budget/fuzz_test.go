package budget

import (
	"strings"
	"testing"

	"scorewright/internal/num"
)

// FuzzReadMenu: a menu file is user input; whatever it holds, ReadMenu
// returns an error or a menu of probability vectors, and never panics.
func FuzzReadMenu(f *testing.F) {
	for _, s := range []string{"0.1\n0.5\n0.9\n", "# c\n0.2,0.8\n\n0.5,0.5\n", "\"0.1\n", "a,b\n", "0.5,0.5,0\n1,0\n", "NaN\n0.5\n", "1e309\n0\n"} {
		f.Add(s, 2)
		f.Add(s, 3)
	}
	f.Fuzz(func(t *testing.T, src string, n int) {
		if n < 2 || n > 12 {
			return
		}
		m, err := ReadMenu(strings.NewReader(src), "fuzz.csv", n)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz.csv") {
				t.Errorf("error does not name the file: %v", err)
			}
			return
		}
		for _, p := range m.Reports {
			if len(p) != n {
				t.Fatalf("report %v has %d entries", p, len(p))
			}
			if err := num.CheckDistribution(p, 1e-9); err != nil {
				t.Errorf("report %v: %v", p, err)
			}
		}
	})
}
