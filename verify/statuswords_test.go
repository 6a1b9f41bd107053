package verify

import (
	"strings"
	"testing"

	"gonum.org/v1/gonum/optimize"
)

// Notes never show the optimiser's status names (common practice: words
// a reader knows).
func TestStatusWordsArePlain(t *testing.T) {
	for _, s := range []optimize.Status{optimize.NotTerminated, optimize.Success, optimize.FunctionConvergence, optimize.Failure,
		optimize.FunctionEvaluationLimit, optimize.IterationLimit, optimize.MethodConverge, optimize.FunctionThreshold} {
		w := statusWords(s)
		if strings.Contains(w, s.String()) || strings.ContainsAny(w, "ABCDEFGHIJKLMNOPQRSTUVWXYZ") {
			t.Errorf("%v reads %q", s, w)
		}
	}
	if statusWords(optimize.FunctionConvergence) != "converged" || statusWords(optimize.Failure) != "stopped without converging" {
		t.Error("wrong words")
	}
}
