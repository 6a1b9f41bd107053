package formula

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestSeparableHessianIsDense: for separable programs the diagonal pass
// gives the dense pass's gradient and Hessian bit for bit (off-diagonal
// zeros included), at random interior points, on faces and vertices
// (where ln, sqrt and 1/x give infinities), and at a NaN select
// condition; for a program that is not separable the machine stays
// dense.
func TestSeparableHessianIsDense(t *testing.T) {
	srcs := []string{
		"1 - sum(p^2)",
		"-sum(p*ln(p))",
		"sum(sqrt(p))",
		"1 - sum(p^3) + 2*p1 - p2/3",
		"-sum(abs(p - 0.3)) - sum(exp(p))",
		"sum(if(p > 0.4, -p^2, -p^4/2))",
		"-sum(p^1.5) + ln(p1) - 3*log1p(p2)",
		"if(ln(p1 - 0.5) > -1, -p1^2, -p1) - sum(p^2)",
		"csum(c*(1-c)) - p1^2",
	}
	rng := rand.New(rand.NewPCG(9, 9))
	for _, n := range []int{2, 3, 5, 10} {
		for _, src := range srcs {
			prog, err := CompileString(src, Scope{Outcomes: n, Ordered: strings.Contains(src, "csum")})
			if err != nil {
				t.Fatalf("%s: %v", src, err)
			}
			sep := prog.Separable()
			fast, dense := prog.NewMachine(), prog.NewMachine()
			dense.secondOrder(false)
			for trial := range 60 {
				p := randomPoint(rng, n, trial)
				g1, h1 := make([]float64, n), make([]float64, n*n)
				g2, h2 := make([]float64, n), make([]float64, n*n)
				v1 := fast.Hessian(h1, g1, p)
				v2 := dense.Hessian(h2, g2, p)
				if !sameBits(append(append([]float64{v1}, g1...), h1...), append(append([]float64{v2}, g2...), h2...)) {
					t.Fatalf("n=%d %s (separable %v) at %v:\nfast  %v %v\ndense %v %v", n, src, sep, p, g1, h1, g2, h2)
				}
			}
			// Only the NaN select condition may send a separable program
			// back to the dense pass; nothing else may take the diagonal one.
			if fast.diag && !sep || sep && !fast.diag && !strings.Contains(src, "ln(p1 - 0.5)") {
				t.Errorf("n=%d %s: diagonal mode %v, separable %v", n, src, fast.diag, sep)
			}
		}
	}
}

// randomPoint draws a point of the simplex: interior, on a face, or a
// vertex, by trial.
func randomPoint(rng *rand.Rand, n, trial int) []float64 {
	p := make([]float64, n)
	var s float64
	for k := range p {
		p[k] = rng.ExpFloat64()
		if trial%3 == 1 && k == trial%n {
			p[k] = 0
		}
		s += p[k]
	}
	for k := range p {
		p[k] /= s
	}
	if trial%7 == 0 {
		clear(p)
		p[trial%n] = 1
	}
	return p
}

func sameBits(a, b []float64) bool {
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return len(a) == len(b)
}

// handLogHessian is the Hessian of -sum(p ln p) written by hand: the
// diagonal -1/p_k, zero elsewhere (derived by hand).
func handLogHessian(hess, grad, p []float64) float64 {
	n := len(p)
	clear(hess)
	var h float64
	for k, x := range p {
		l := math.Log(x)
		h -= x * l
		grad[k] = -l - 1
		hess[k*n+k] = -1 / x
	}
	return h
}

// BenchmarkHessianSeparable is the compiled Hessian of the separable log
// generator (diagonal pass) and of the same program forced dense, beside
// the hand-written one, at n = 3 and 10.
func BenchmarkHessianSeparable(b *testing.B) {
	for _, n := range []int{3, 10} {
		p := benchPoint(n)
		prog, _ := CompileString("-sum(p*ln(p))", Scope{Outcomes: n})
		grad, hess := make([]float64, n), make([]float64, n*n)
		for _, kind := range []string{"diagonal", "dense", "hand"} {
			m := prog.NewMachine()
			if kind == "dense" {
				m.secondOrder(false)
			}
			b.Run(fmt.Sprintf("log/n=%d/%s", n, kind), func(b *testing.B) {
				for b.Loop() {
					if kind == "hand" {
						sink += handLogHessian(hess, grad, p)
					} else {
						sink += m.Hessian(hess, grad, p)
					}
				}
			})
		}
	}
}
