package num

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/optimize"
)

// nmCase is a function to minimise, written so that both searches see the
// same values: a few shapes with a unique minimum, flat plateaus (ties
// between vertices), +Inf outside a region, NaN as data, -Inf.
type nmCase struct {
	name string
	f    func(x []float64) float64
}

func nmCases(rng *rand.Rand, dim int) []nmCase {
	c := make([]float64, dim)
	for k := range c {
		c[k] = rng.Float64()*2 - 1
	}
	quad := func(x []float64) float64 {
		var s float64
		for k, v := range x {
			s += float64(k+1) * (v - c[k]) * (v - c[k])
		}
		return s
	}
	return []nmCase{
		{"quadratic", quad},
		{"rosenbrock", func(x []float64) float64 {
			var s float64
			for k := 0; k+1 < len(x); k++ {
				s += 100*(x[k+1]-x[k]*x[k])*(x[k+1]-x[k]*x[k]) + (1-x[k])*(1-x[k])
			}
			return s + (x[0]-c[0])*(x[0]-c[0])
		}},
		{"plateaus", func(x []float64) float64 { return math.Floor(quad(x) * 8) }},
		{"wall", func(x []float64) float64 {
			if x[0] > c[0]+0.02 {
				return math.Inf(1)
			}
			return quad(x)
		}},
		{"nan-hole", func(x []float64) float64 {
			if math.Abs(x[0]-c[0]) < 0.01 {
				return math.NaN()
			}
			return quad(x)
		}},
		{"pit", func(x []float64) float64 {
			if quad(x) < 1e-3 {
				return math.Inf(-1)
			}
			return quad(x)
		}},
		{"abs", func(x []float64) float64 {
			var s float64
			for k, v := range x {
				s += math.Abs(v - c[k])
			}
			return s
		}},
	}
}

// gonumRun is the reference: gonum's Minimize with its NelderMead, as the
// engine called it, recording every point evaluated (NaN made +Inf, as
// the engine's callers do).
func gonumRun(f func([]float64) float64, x0 []float64, s NMSettings) ([][]float64, optimize.Status) {
	var pts [][]float64
	wrapped := func(x []float64) float64 {
		pts = append(pts, slices.Clone(x))
		v := f(x)
		if v != v {
			v = math.Inf(1)
		}
		return v
	}
	res, _ := optimize.Minimize(optimize.Problem{Func: wrapped}, slices.Clone(x0), &optimize.Settings{
		FuncEvaluations: s.Evals,
		Converger:       &optimize.FunctionConverge{Absolute: s.Absolute, Relative: s.Relative, Iterations: s.Iterations},
	}, &optimize.NelderMead{SimplexSize: s.Size})
	return pts, res.Status
}

// TestNelderMeadMatchesGonum holds the serial search to gonum's, the
// general-purpose library it replaces: the same points evaluated in the
// same order (bit for bit) and the same way of stopping, in dimensions 1
// to 4, on smooth, flat, walled, undefined and unbounded functions, with
// budgets that run out and tolerances that converge.
func TestNelderMeadMatchesGonum(t *testing.T) {
	want := map[optimize.Status]NMStatus{
		optimize.FunctionConvergence:      NMConverged,
		optimize.FunctionEvaluationLimit:  NMBudget,
		optimize.Failure:                  NMNonFiniteStart,
		optimize.FunctionNegativeInfinity: NMNegativeInfinity,
	}
	rng := rand.New(rand.NewPCG(7, 11))
	seen := map[NMStatus]int{}
	for dim := 1; dim <= 4; dim++ {
		for trial := 0; trial < 6; trial++ {
			for _, c := range nmCases(rng, dim) {
				x0 := make([]float64, dim)
				for k := range x0 {
					x0[k] = rng.Float64()*2 - 1
				}
				s := NMSettings{Evals: []int{1, 7, 60, 400, 0}[trial%5], Absolute: 1e-15, Relative: 1e-15, Iterations: []int{40, 5, 0}[trial%3], Size: []float64{0.05, 0.3, 1e-3}[trial%3]}
				if s.Evals == 0 && s.Iterations == 0 {
					s.Iterations = 10 // no limit at all would never stop
				}
				ref, refStatus := gonumRun(c.f, x0, s)
				var got [][]float64
				status, evals := NelderMeadMin(func(x []float64) float64 {
					got = append(got, slices.Clone(x))
					v := c.f(x)
					if v != v {
						v = math.Inf(1)
					}
					return v
				}, x0, s)
				seen[status]++
				ws, ok := want[refStatus]
				if !ok || ws != status || evals != len(got) {
					t.Fatalf("%s dim %d trial %d: status %v (%d evals), gonum %v", c.name, dim, trial, status, evals, refStatus)
				}
				if len(got) != len(ref) {
					t.Fatalf("%s dim %d trial %d: %d evaluations, gonum %d", c.name, dim, trial, len(got), len(ref))
				}
				for i := range got {
					if !slices.Equal(got[i], ref[i]) {
						t.Fatalf("%s dim %d trial %d: evaluation %d at %v, gonum at %v", c.name, dim, trial, i, got[i], ref[i])
					}
				}
			}
		}
	}
	for _, st := range []NMStatus{NMConverged, NMBudget, NMNonFiniteStart, NMNegativeInfinity} {
		if seen[st] == 0 {
			t.Errorf("no case ended with status %d: the comparison does not cover it", st)
		}
	}
}

// A quadratic bowl's minimum at (0.3, -0.2) (derived by hand) is found to
// the tolerance the convergence test allows.
func TestNelderMeadFindsMinimum(t *testing.T) {
	best, bestX := math.Inf(1), []float64(nil)
	f := func(x []float64) float64 {
		v := (x[0]-0.3)*(x[0]-0.3) + 2*(x[1]+0.2)*(x[1]+0.2)
		if v < best {
			best, bestX = v, slices.Clone(x)
		}
		return v
	}
	status, _ := NelderMeadMin(f, []float64{0.9, 0.9}, NMSettings{Evals: 2000, Absolute: 1e-15, Relative: 1e-15, Iterations: 40})
	if status != NMConverged || math.Abs(bestX[0]-0.3) > 1e-6 || math.Abs(bestX[1]+0.2) > 1e-6 {
		t.Fatalf("status %d, best %v at %v", status, best, bestX)
	}
}
