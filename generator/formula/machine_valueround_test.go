package formula

import (
	"math"
	"math/big"
	"testing"
)

// The bound on the rounding of a value follows the terms that cancel:
// (1e8 - p1^2 - p2^2) - 1e8 is -0.5 at (0.5, 0.5) but is computed from
// terms of size 1e8, whose rounding (half an ulp of 1e8 is 7.45e-9) a
// bound scaled to |H| = 0.5 misses. The error itself is measured against
// the same expression in 200-bit arithmetic (math/big).
func TestValueRoundingFollowsCancellingTerms(t *testing.T) {
	prog, err := CompileString("(1e8 - p1^2 - p2^2) - 1e8", Scope{Outcomes: 2})
	if err != nil {
		t.Fatal(err)
	}
	m := prog.NewMachine()
	for _, x := range []float64{0.163, 0.5, 0.837, 0.999} {
		p := []float64{x, 1 - x}
		v := m.Value(p)
		exact := func() float64 {
			f := func(y float64) *big.Float { return new(big.Float).SetPrec(200).SetFloat64(y) }
			a, b := f(p[0]), f(p[1])
			s := f(1e8)
			s.Sub(s, new(big.Float).Mul(a, a))
			s.Sub(s, new(big.Float).Mul(b, b))
			s.Sub(s, f(1e8))
			r, _ := s.Float64()
			return r
		}()
		bound, ok := m.ValueRounding(p)
		if !ok {
			t.Fatalf("p = %v: no bound", p)
		}
		if e := math.Abs(v - exact); e > bound {
			t.Errorf("p = %v: error %g above the bound %g", p, e, bound)
		}
		// Where 1e8 - p1^2 rounds, the bound is about an ulp of 1e8, far
		// above what |H| alone would allow (ε·|H| ~ 1e-16); at 0.5 every
		// step is exact and the bound may be 0.
		if bound > 1e-6 || x != 0.5 && bound < 1e-9 {
			t.Errorf("p = %v: bound %g, want the rounding of terms of size 1e8 (1e-9 .. 1e-6)", p, bound)
		}
	}
	// Without cancellation the bound stays at the result's own rounding.
	plain, _ := CompileString("-p1^2 - p2^2", Scope{Outcomes: 2})
	if b, ok := plain.NewMachine().ValueRounding([]float64{0.3, 0.7}); !ok || b > 1e-15 {
		t.Errorf("-p1^2 - p2^2: bound %g (ok %v), want at most a few ulps of 0.58", b, ok)
	}
}
