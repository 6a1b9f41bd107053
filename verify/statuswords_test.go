package verify

import (
	"strings"
	"testing"

	"scorewright/internal/num"
)

// Notes never show the optimiser's status names (common practice: words
// a reader knows).
func TestStatusWordsArePlain(t *testing.T) {
	for _, s := range []num.NMStatus{num.NMConverged, num.NMBudget, num.NMNonFiniteStart, num.NMNegativeInfinity} {
		w := statusWords(s)
		if strings.ContainsAny(w, "ABCDEFGHIJKLMNOPQRSTUVWXYZ") {
			t.Errorf("%v reads %q", s, w)
		}
	}
	if statusWords(num.NMConverged) != "converged" || statusWords(num.NMNegativeInfinity) != "stopped without converging" {
		t.Error("wrong words")
	}
}

// optimiserWords are names a reader of a note should never meet: the
// optimiser's method and its status names.
func optimiserWords(t *testing.T, where, s string) {
	t.Helper()
	for _, w := range []string{"Nelder", "Convergence", "Failure", "EvaluationLimit", "IterationLimit", "NotTerminated", "status"} {
		if strings.Contains(s, w) {
			t.Errorf("%s says %q: %s", where, w, s)
		}
	}
}

// The notes of a check whose witness is sharpened, and of an audit whose
// payout is fitted to a family's parameter, say what the search found in
// plain words (common practice: words a reader knows).
func TestNotesNameNoOptimiser(t *testing.T) {
	// Derived by hand: H'' = 2 - 48(p - 1/2)² > 0 near 1/2, so the rule is
	// improper and its worst case is sharpened off the grid.
	rep, err := CheckRule(t.Context(), rule(t, "p^2 - 4*(p-0.5)^4", 2), Settings{Resolution: 200})
	if err != nil {
		t.Fatal(err)
	}
	sharpened := false
	for _, c := range rep.Checks {
		optimiserWords(t, c.Name, c.Note)
		sharpened = sharpened || strings.Contains(c.Note, "local search")
	}
	if !sharpened {
		t.Error("no check says a local search looked between the grid points")
	}
	for _, n := range rep.Notes {
		optimiserWords(t, "a note", n)
	}
	// A power-family payout with g = 1.7 (derived by hand from
	// H = (1 - sum p^g)/(g - 1): pay_y = g/(g-1)·p_y^(g-1) - sum p^g up to
	// shift and scale), so the family's parameter is searched.
	ar, err := Audit(t.Context(), pay(t, "3 + 2*(1.7/0.7*p[y]^0.7 - sum(p^1.7))", 2), presetCandidates(t, 2), Settings{Resolution: 200})
	if err != nil {
		t.Fatal(err)
	}
	searched := false
	for _, f := range ar.Fits {
		optimiserWords(t, "fit to "+f.Preset, f.Status)
		searched = searched || strings.Contains(f.Status, "values tried")
	}
	if !searched {
		t.Error("no fit says how its parameter was searched")
	}
	for _, n := range ar.Notes {
		optimiserWords(t, "an audit note", n)
	}
}
