package optimum

import (
	"context"
	"fmt"
	"testing"

	"scorewright/contract/research"
)

// BenchmarkSolve times the program at the grid sizes a user would choose:
// n = 2 from a coarse 1/25 to the default 1/100 and a fine 1/1000; n = 3
// from 1/6 to 1/12 (the default is 1/8). Beta / Dirichlet posterior with
// kappa 10 around a fixed base rate.
func BenchmarkSolve(b *testing.B) {
	cases := []struct {
		q0    []float64
		grids []int
	}{
		{[]float64{0.3, 0.7}, []int{25, 100, 400, 1000}},
		{[]float64{0.2, 0.3, 0.5}, []int{6, 8, 10, 12}},
	}
	for _, c := range cases {
		p, err := research.Dirichlet(c.q0, 10, research.Quadrature{})
		if err != nil {
			b.Fatal(err)
		}
		for _, K := range c.grids {
			b.Run(fmt.Sprintf("n=%d/grid=%d", len(c.q0), K), func(b *testing.B) {
				for b.Loop() {
					if _, err := Solve(context.Background(), p, 0, 100, Settings{Grid: K}); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkBinaryGeneralForm is the reference for the n = 2 slope form:
// the same program with one convexity row per interior node, as n = 3 is
// solved.
func BenchmarkBinaryGeneralForm(b *testing.B) {
	p, err := research.Dirichlet([]float64{0.3, 0.7}, 10, research.Quadrature{})
	if err != nil {
		b.Fatal(err)
	}
	for _, K := range []int{25, 100} {
		m := binaryMesh(K, 0.3)
		obj, err := objective(m, p)
		if err != nil {
			b.Fatal(err)
		}
		rows, rhs, relax := constraints(m, K)
		b.Run(fmt.Sprintf("grid=%d", K), func(b *testing.B) {
			for b.Loop() {
				if _, err := solveLP(obj, rows, rhs, relax); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
