package verify

import (
	"context"
	"math"
	"strings"
	"sync"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/internal/simplex"
)

// countingGen wraps a generator and records every lattice point of
// resolution k at which the check asks for the gradient: each grid point
// is a belief and a report, and its efforts come from one gradient.
type countingGen struct {
	bregman.Generator
	k    int
	mu   sync.Mutex
	seen map[[3]int]bool
}

func (c *countingGen) NewEvaluator() bregman.Evaluator {
	return &countingEval{Evaluator: c.Generator.NewEvaluator(), gen: c}
}

type countingEval struct {
	bregman.Evaluator
	gen *countingGen
}

func (e *countingEval) Gradient(grad, p []float64) float64 {
	var key [3]int
	for i, v := range p {
		x := v * float64(e.gen.k)
		if math.Abs(x-math.Round(x)) > 1e-9 {
			return e.Evaluator.Gradient(grad, p) // off the lattice: an optimiser's point
		}
		key[i] = int(math.Round(x))
	}
	e.gen.mu.Lock()
	e.gen.seen[key] = true
	e.gen.mu.Unlock()
	return e.Evaluator.Gradient(grad, p)
}

// latticeCount counts the points of the resolution-k lattice over three
// outcomes, and those with every coordinate positive, by listing them.
func latticeCount(k int) (all, interior int) {
	for a := 0; a <= k; a++ {
		for b := 0; a+b <= k; b++ {
			all++
			if a > 0 && b > 0 && k-a-b > 0 {
				interior++
			}
		}
	}
	return all, interior
}

func TestFullGridAboveOldSamplingSwitch(t *testing.T) {
	// Resolution 225 at n = 3 has 25,651 points, above the 25,000 at which
	// the check used to switch to a sample of 3,000: by default it is now
	// the full grid, every point visited, and the verdict says so.
	const k = 225
	f, err := bregman.NewFormula("1 - sum(p^2)", bregman.Options{Outcomes: 3})
	if err != nil {
		t.Fatal(err)
	}
	gen := &countingGen{Generator: f, k: k, seen: map[[3]int]bool{}}
	rep, err := CheckRule(context.Background(), &bregman.Rule{Gen: gen}, Settings{Resolution: k})
	if err != nil {
		t.Fatal(err)
	}
	all, interior := latticeCount(k)
	if all <= 25000 {
		t.Fatalf("test grid too small: %d points", all)
	}
	g := rep.Grid
	if g.Sampled || g.Points != all || g.Interior != interior || g.Pairs != int64(all)*int64(all) || g.Lattice != int64(all) {
		t.Errorf("grid %+v, want full with %d points (%d interior)", g, all, interior)
	}
	if len(gen.seen) != all {
		t.Errorf("the check visited %d lattice points, the lattice has %d", len(gen.seen), all)
	}
	// Quadratic rule: strictly proper (Brier 1950).
	if rep.Verdict != StrictlyProper {
		t.Errorf("verdict %s", rep.Verdict)
	}
	if s := g.String(); !strings.HasPrefix(s, "full grid") || !strings.Contains(s, "25651 points") {
		t.Errorf("statement %q does not say full grid of 25651 points", s)
	}
	if p := rep.Check("properness"); p == nil || p.Interior.Count+p.Boundary.Count != int64(all) {
		t.Errorf("properness examined %+v beliefs, want %d", p, all)
	}
}

func TestSampledGridSaysWhyAndHowMany(t *testing.T) {
	// A limit below the lattice gives a sample, and the statement and a
	// note name the lattice, the limit and its reason.
	all, _ := latticeCount(40) // 861 points
	rep, err := CheckRule(context.Background(), rule(t, "1 - sum(p^2)", 3), Settings{Resolution: 40, MaxPoints: 500, Samples: 200})
	if err != nil {
		t.Fatal(err)
	}
	g := rep.Grid
	if !g.Sampled || g.Points != 203 || g.MaxPoints != 500 || g.Lattice != int64(all) {
		t.Fatalf("grid %+v", g)
	}
	if s := g.String(); !strings.Contains(s, "sampled grid (the full lattice is 861 points, above the limit of 500)") || !strings.Contains(s, "203 points") {
		t.Errorf("statement %q", s)
	}
	found := false
	for _, n := range rep.Notes {
		found = found || strings.Contains(n, "more than the limit of 500 (the limit asked for), so 200 random lattice points")
	}
	if !found {
		t.Errorf("no note on the sample and its reason: %q", rep.Notes)
	}
	// Without a limit the machine's memory sets it (it moves with the
	// memory available, so only its range is known) and the grid is full.
	rep, err = CheckRule(context.Background(), rule(t, "1 - sum(p^2)", 3), Settings{Resolution: 40})
	if err != nil || rep.Grid.Sampled || rep.Grid.Points != all || rep.Grid.MaxPoints < all || rep.Grid.MaxPoints > simplex.MaxFull {
		t.Errorf("default limit: %+v, %v", rep.Grid, err)
	}
}
