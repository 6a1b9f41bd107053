package formula

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Formulas whose min, max or abs is undecided on many boxes, carried
// through the operations that keep the min/max form.
var pieceFormulas = []string{
	"min(1 - sum(p^2), -sum(p*ln(p)) - 0.1)",
	"2 - sum(p^2) - 0.3*abs(p1 - p2) + exp(min(p1, p2))",
	"-max(p1, p2)^2 + sqrt(min(p1 + 0.1, p2 + 0.2)) / (1 + p1)",
	"min(max(p1, p2) - p3, 0.2) - 3*max(p2 - 0.4, p1^2)",
}

// TestPiecesContainPoints: where a box's enclosure is piecewise, the
// program at every sampled point equals the min (or max) of its pieces,
// so it lies between the smallest lower and the smallest upper bound (the
// largest, for a max); and the branch that is active at the point — one
// whose value enclosure holds the program's value — holds the machine's
// gradient and Hessian there (Moore 1966, Ch. 3, applied branch by branch).
func TestPiecesContainPoints(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	seen := 0
	for _, src := range pieceFormulas {
		for _, n := range []int{3, 4} {
			prog, err := CompileString(src, Scope{Outcomes: n})
			if err != nil {
				t.Fatal(err)
			}
			m, e := prog.NewMachine(), prog.NewEncloser()
			var enc Enclosure
			g, h := make([]float64, n), make([]float64, n*n)
			for range 400 {
				box, sample := randomSimplexBox(r, n)
				e.Enclose(&enc, box, 2)
				if enc.Undefined || !enc.Piecewise {
					continue
				}
				seen++
				lo, hi := math.Inf(1), math.Inf(1)
				if enc.Max {
					lo, hi = math.Inf(-1), math.Inf(-1)
				}
				for _, pc := range enc.Pieces {
					if enc.Max {
						lo, hi = math.Max(lo, pc.Value.Lo), math.Max(hi, pc.Value.Hi)
					} else {
						lo, hi = math.Min(lo, pc.Value.Lo), math.Min(hi, pc.Value.Hi)
					}
				}
				for range 5 {
					p := sample()
					v := m.Hessian(h, g, p)
					s := 1e-9 * (1 + math.Abs(v))
					if v < lo-s || v > hi+s {
						t.Fatalf("%q n=%d box %v: value %g at %v outside [%g, %g] of the pieces", src, n, box, v, p, lo, hi)
					}
					if !onFace(p) && !activeHolds(enc.Pieces, v, g, h) {
						t.Fatalf("%q n=%d box %v: no piece holds the value %g and derivatives at %v", src, n, box, v, p)
					}
				}
			}
		}
	}
	if seen < 50 {
		t.Fatalf("only %d piecewise boxes: the test does not exercise the pieces", seen)
	}
}

// activeHolds reports whether some piece encloses value v, gradient g and
// Hessian h together.
func activeHolds(pieces []Piece, v float64, g, h []float64) bool {
	for _, pc := range pieces {
		ok := near(pc.Value, v)
		for k := range g {
			ok = ok && near(pc.Grad[k], g[k])
		}
		for k := range h {
			ok = ok && near(pc.Hess[k], h[k])
		}
		if ok {
			return true
		}
	}
	return false
}

// TestSeparable: which programs are sums of one-variable terms (derived
// by hand from each formula's form).
func TestSeparable(t *testing.T) {
	for src, want := range map[string]bool{
		"1 - sum(p^3)":                        true,
		"-sum(p*ln(p))":                       true,
		"sum(w*p*(1-p))":                      true,
		"-sum(p*expm1(0.5*ln(p))) / 0.5 + p1": true,
		"-sqrt(sum(p^2))":                     false,
		"csum(c*(1-c))":                       false,
		"p1*p2":                               false,
		"3*p1^2 - p2/(1 + p3)":                false,
		"min(p1, 0.5) + exp(p2)":              true,
		"if(p1 < 0.5, p2, p3)":                false,
	} {
		prog, err := CompileString(src, Scope{Outcomes: 3, Ordered: true, Weights: []float64{1, 2, 3}})
		if err != nil {
			t.Fatal(err)
		}
		if got := prog.Separable(); got != want {
			t.Errorf("%q: separable %v, want %v", src, got, want)
		}
	}
}
