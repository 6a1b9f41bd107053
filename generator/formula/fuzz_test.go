package formula

import (
	"math"
	"strings"
	"testing"
)

// FuzzParse feeds arbitrary text through the parser and, when it parses,
// the compiler and all three evaluation modes. Nothing may panic, and a
// parsed tree printed back must parse to the same tree. The seed corpus is
// in testdata/fuzz/FuzzParse. Compiled values must match the tree-walking
// reference evaluator of reference_test.go.
func FuzzParse(f *testing.F) {
	for _, s := range []string{
		"-sum(p*ln(p))", "1 - sum(p^2)", "csum(c*(1-c))", "g = 1.5\n(1 - sum(p^g)) / (g - 1)",
		"10 - 5*sum((p - hit)^2)", "ln(max(p[y], 0.01))", "if(p1 < 0.5, p1, 1 - p1)",
	} {
		f.Add(s)
	}
	scopes := []Scope{
		{Outcomes: 2},
		{Outcomes: 3, Ordered: true},
		{Outcomes: 3, Payout: true, Outcome: 2, Ordered: true},
		{Vars: []string{"x"}},
	}
	f.Fuzz(func(t *testing.T, src string) {
		file, err := Parse(src)
		if err != nil {
			if _, ok := err.(*Error); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			_ = err.(*Error).Caret()
			return
		}
		printed := String(file.Expr)
		again, err := Parse(printed)
		if err != nil && strings.Contains(err.Error(), "nested too deeply") {
			// The fully parenthesised form nests deeper than the source;
			// the depth guard is a resource limit, not a grammar rule.
			return
		}
		if err != nil {
			t.Fatalf("printed form %q of %q does not parse: %v", printed, src, err)
		}
		if p2 := String(again.Expr); p2 != printed {
			t.Fatalf("round trip changed %q to %q", printed, p2)
		}
		for _, sc := range scopes {
			prog, err := Compile(file, sc)
			if err != nil {
				continue
			}
			m := prog.NewMachine()
			nv := prog.NumVars()
			vars := make([]float64, nv)
			for i := range vars {
				vars[i] = 1 / float64(nv)
			}
			grad := make([]float64, nv)
			hess := make([]float64, nv*nv)
			v := m.Value(vars)
			if want, ok := refFile(file, sc, vars); !ok || !agree(v, want) {
				t.Fatalf("%q in %+v: machine %v, tree-walking reference %v (ok %v)", src, sc, v, want, ok)
			}
			v2 := m.Gradient(grad, vars)
			v3 := m.Hessian(hess, grad, vars)
			if !sameFloat(v, v2) || !sameFloat(v, v3) {
				t.Fatalf("%q: value %v, with gradient %v, with Hessian %v", src, v, v2, v3)
			}
		}
	})
}

func sameFloat(a, b float64) bool {
	return a == b || math.IsNaN(a) && math.IsNaN(b)
}
