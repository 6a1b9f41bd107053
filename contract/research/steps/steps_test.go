package steps

import (
	"context"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

// quadratic is the quadratic rule's truthful pay on [0, 100] for n = 2:
// G(μ) = 100 - 50·2μ(1 - μ).
func quadratic(mu float64) float64 { return 100 - 100*mu*(1-mu) }

// The mean absolute deviation against gonum's Beta density integrated by
// gonum's quadrature (an independent computation).
func TestBetaMAD(t *testing.T) {
	for _, c := range [][2]float64{{1, 1}, {2, 5}, {30, 12}, {0.7, 3}} {
		d := distuv.Beta{Alpha: c[0], Beta: c[1]}
		m := d.Mean()
		f := func(x float64) float64 { return math.Abs(x-m) * d.Prob(x) }
		want := quad.Fixed(f, 0, m, 2000, nil, 0) + quad.Fixed(f, m, 1, 2000, nil, 0)
		if got := betaMAD(c[0], c[1]); math.Abs(got-want) > 1e-6 {
			t.Errorf("Beta%v: MAD %.10g, quadrature %.10g", c, got, want)
		}
	}
}

// bruteForce enumerates every deterministic stopping policy on the states
// (t, k), t < T, and evaluates each by walking all observation paths: an
// independent computation of the best value, and that policy's expected
// steps and error.
func bruteForce(G func(float64) float64, a, b, cost float64, T int) (value, steps, err float64) {
	type state struct{ t, k int }
	var states []state
	for t := 0; t < T; t++ {
		for k := 0; k <= t; k++ {
			states = append(states, state{t, k})
		}
	}
	value = math.Inf(-1)
	for mask := 0; mask < 1<<len(states); mask++ {
		stopAt := func(t, k int) bool {
			if t == T {
				return true
			}
			return mask&(1<<(t*(t+1)/2+k)) != 0
		}
		var v, st, er float64
		var walk func(t, k int, p float64)
		walk = func(t, k int, p float64) {
			m := (a + float64(k)) / (a + b + float64(t))
			if stopAt(t, k) {
				v += p * (G(m) - cost*float64(t))
				st += p * float64(t)
				er += p * betaMAD(a+float64(k), b+float64(t-k))
				return
			}
			walk(t+1, k+1, p*m)
			walk(t+1, k, p*(1-m))
		}
		walk(0, 0, 1)
		if v > value+1e-12 {
			value, steps, err = v, st, er
		}
	}
	return value, steps, err
}

func TestAgainstBruteForce(t *testing.T) {
	vshape := func(mu float64) float64 { return math.Max(100*mu, 42.857142857142854*(1-mu)) }
	for _, c := range []struct {
		name       string
		G          func(float64) float64
		a, b, cost float64
	}{
		{"quadratic", quadratic, 1, 1, 2}, {"quadratic", quadratic, 3, 7, 0.5}, {"quadratic", quadratic, 1, 1, 9},
		{"quadratic", quadratic, 0.5, 0.5, 1.2}, {"quadratic", quadratic, 1, 1, 0.8},
		{"v-shaped", vshape, 3, 7, 1}, {"v-shaped", vshape, 0.6, 1.4, 3},
	} {
		const T = 4
		r, err := Solve(context.Background(), c.G, c.a, c.b, Settings{Cost: c.cost, MaxSteps: T})
		if err != nil {
			t.Fatal(err)
		}
		v, st, er := bruteForce(c.G, c.a, c.b, c.cost, T)
		if math.Abs(r.Value-v) > 1e-9 || math.Abs(r.Steps-st) > 1e-9 || math.Abs(r.Error-er) > 1e-9 {
			t.Errorf("%s Beta(%g, %g) cost %g: DP value %.10g steps %.6g error %.6g; brute force %.10g %.6g %.6g",
				c.name, c.a, c.b, c.cost, r.Value, r.Steps, r.Error, v, st, er)
		}
		if math.Abs(r.Value-(r.Pay-r.Spent)) > 1e-9 {
			t.Errorf("value %g is not pay %g minus cost %g", r.Value, r.Pay, r.Spent)
		}
	}
}

// A rule that pays the same whatever the report buys no research; a cost
// of zero under a strictly proper rule buys observations to the cap.
func TestExtremes(t *testing.T) {
	r, err := Solve(context.Background(), func(float64) float64 { return 50 }, 2, 3, Settings{Cost: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	if r.Buys || r.Steps != 0 || math.Abs(r.Error-betaMAD(2, 3)) > 1e-15 {
		t.Errorf("flat rule: %+v", r)
	}
	r, err = Solve(context.Background(), quadratic, 2, 3, Settings{Cost: 0, MaxSteps: 50})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Steps-50) > 1e-9 || math.Abs(r.AtCap-1) > 1e-12 || !(r.Error < r.Before) {
		t.Errorf("free research: %+v", r)
	}
	if _, err := Solve(context.Background(), quadratic, 0, 3, Settings{}); err == nil {
		t.Error("Beta(0, 3) accepted")
	}
	if _, err := Solve(context.Background(), quadratic, 1, 3, Settings{Cost: -1}); err == nil {
		t.Error("negative cost accepted")
	}
}

// BenchmarkSolve times the dynamic program at the default cap of 1000
// observations and at 5000, under the quadratic rule.
func BenchmarkSolve(b *testing.B) {
	for _, T := range []int{1000, 5000} {
		b.Run(fmt.Sprintf("steps=%d", T), func(b *testing.B) {
			for b.Loop() {
				if _, err := Solve(context.Background(), quadratic, 3, 7, Settings{Cost: 0.01, MaxSteps: T}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
