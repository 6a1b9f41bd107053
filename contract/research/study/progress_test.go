package study

import (
	"context"
	"strings"
	"testing"

	"scorewright/contract/research"
	"scorewright/generator/design"
	"scorewright/internal/pool"
	"scorewright/internal/pool/pooltest"
)

// A study tells its stages in order, each named, and ends with "done" at
// its total: one stage per compared rule, the linear program, the end.
func TestProgressStages(t *testing.T) {
	p, err := research.Dirichlet([]float64{0.4, 0.6}, 8, research.Quadrature{})
	if err != nil {
		t.Fatal(err)
	}
	var rec pooltest.Recorder
	b := design.Budget{Floor: 5, Cap: 45, Step: 0.05}
	spec := Spec{Model: p, Compare: []string{"quadratic", "spherical"}, Optimum: true, Progress: rec.Progress}
	if _, err := Run(context.Background(), []string{"rain", "dry"}, b, spec); err != nil {
		t.Fatal(err)
	}
	if err := rec.Check(pool.UnitStages); err != nil {
		t.Fatal(err)
	}
	var stages []string
	for _, s := range rec.Steps() {
		stages = append(stages, s.Stage)
	}
	want := "fitting and measuring quadratic|fitting and measuring spherical|solving the linear program for the best bounded rule|done"
	if got := strings.Join(stages, "|"); got != want {
		t.Errorf("stages %q, want %q", got, want)
	}
}
