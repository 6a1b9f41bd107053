package formula

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// Hand-written value and gradient of the same generators, the yardstick
// for the compiled machine.
func handLog(grad, p []float64) float64 {
	var h float64
	for i, x := range p {
		l := math.Log(x)
		h -= x * l
		grad[i] = -l - 1
	}
	return h
}

func handQuadratic(grad, p []float64) float64 {
	h := 1.0
	for i, x := range p {
		h -= x * x
		grad[i] = -2 * x
	}
	return h
}

var sink float64

func benchPoint(n int) []float64 {
	rng := rand.New(rand.NewPCG(1, uint64(n)))
	p := make([]float64, n)
	var s float64
	for i := range p {
		p[i] = 0.1 + rng.Float64()
		s += p[i]
	}
	for i := range p {
		p[i] /= s
	}
	return p
}

// BenchmarkGradient compares compiled value+gradient with hand-written Go
// for the log and quadratic generators at n = 3 and n = 10.
func BenchmarkGradient(b *testing.B) {
	gens := []struct {
		name, src string
		hand      func(grad, p []float64) float64
	}{
		{"log", "-sum(p*ln(p))", handLog},
		{"quadratic", "1 - sum(p^2)", handQuadratic},
	}
	for _, g := range gens {
		for _, n := range []int{3, 10} {
			p := benchPoint(n)
			grad := make([]float64, n)
			prog, err := CompileString(g.src, Scope{Outcomes: n})
			if err != nil {
				b.Fatal(err)
			}
			m := prog.NewMachine()
			b.Run(fmt.Sprintf("%s/n=%d/compiled", g.name, n), func(b *testing.B) {
				for b.Loop() {
					sink += m.Gradient(grad, p)
				}
			})
			b.Run(fmt.Sprintf("%s/n=%d/hand", g.name, n), func(b *testing.B) {
				for b.Loop() {
					sink += g.hand(grad, p)
				}
			})
		}
	}
}

// BenchmarkHessian measures the forward-mode Hessian used by the
// concavity check.
func BenchmarkHessian(b *testing.B) {
	for _, n := range []int{3, 10} {
		p := benchPoint(n)
		prog, _ := CompileString("-sum(p*ln(p))", Scope{Outcomes: n})
		m := prog.NewMachine()
		grad := make([]float64, n)
		hess := make([]float64, n*n)
		b.Run(fmt.Sprintf("log/n=%d", n), func(b *testing.B) {
			for b.Loop() {
				sink += m.Hessian(hess, grad, p)
			}
		})
	}
}
