package verify_test

import (
	"context"
	"fmt"

	"scorewright/generator/bregman"
	"scorewright/generator/payout"
	"scorewright/verify"
)

// A rule from a generator: the quadratic (Brier) rule over three outcomes.
func ExampleCheckRule() {
	f, err := bregman.NewFormula("1 - sum(p^2)", bregman.Options{Outcomes: 3})
	if err != nil {
		fmt.Println(err)
		return
	}
	rep, err := verify.CheckRule(context.Background(), &bregman.Rule{Gen: f}, verify.Settings{Resolution: 40})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(rep.Verdict, rep.Grid.Points, "points")
	for _, c := range rep.Checks {
		fmt.Println(c.Name, c.Passed)
	}
	// Output:
	// strictly-proper 861 points
	// concavity true
	// properness true
	// nonnegativity true
	// affinity true
	// boundedness true
}

// The linear payout pays the reported probability of what happened; a
// forecaster who believes 3/4 gains 1/8 by reporting certainty.
func ExampleAudit() {
	p, err := payout.New("p[y]", payout.Options{Outcomes: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	rep, err := verify.Audit(context.Background(), p, nil, verify.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(rep.Verdict, rep.Direction)
	fmt.Printf("gap %.6f at belief %.3f, best report %.3f\n", rep.Gap.Max, rep.Gap.Belief, rep.Gap.BestReport)
	// Output:
	// improper exaggerates
	// gap 0.125000 at belief [0.750 0.250], best report [1.000 0.000]
}
