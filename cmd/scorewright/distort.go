package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"

	"scorewright"
	"scorewright/contract/budget"
	"scorewright/contract/risk"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/textcol"
)

const distortUsage = "RULE BUDGET (without --step, or a menu file in the design's budget, every report is paid by the exact formula) --utility crra:R|cara:A|linear [--wealth W] [--belief q1,q2,...] [--json]\n\nRULE: " + outcomeRuleUsage + "\nBUDGET: " + budgetUsage

type distortPoint struct {
	Belief []num.Float `json:"belief"`
	Report []num.Float `json:"report"`
	// Size is max_k |report_k - belief_k| in probability points.
	Size num.Float `json:"points"`
}

type distortJSON struct {
	Utility     string      `json:"utility"`
	Wealth      float64     `json:"wealth"`
	A           num.Float   `json:"A"`
	B           num.Float   `json:"B"`
	Belief      []num.Float `json:"belief"`
	Report      []num.Float `json:"report"`
	Size        num.Float   `json:"points"`
	MenuReport  []num.Float `json:"menu_report"`
	ExpectedPay num.Float   `json:"expected_pay"`
	TruthfulPay num.Float   `json:"truthful_pay"`
	Status      string      `json:"status"`
	// Pay says how pay follows from effort, and whether a menu holds it.
	Pay   string         `json:"pay"`
	Curve []distortPoint `json:"curve"`
	// Failed lists the beliefs whose best report was not found (each also
	// on its own line in the text report); the command then exits 1.
	Failed  []distortFailure `json:"failed,omitempty"`
	Largest distortPoint     `json:"largest"`
	// Along names the curve's beliefs: "event probability" (n = 2) or
	// segments from the uniform belief toward each outcome.
	Along string   `json:"along"`
	Notes []string `json:"notes"`
}

func runDistort(e *env, args []string) error {
	fs := newFlags("distort")
	rf := addRuleFlags(fs)
	bf := addBudgetFlags(fs)
	utility := fs.String("utility", "", "the forecaster's utility of money: crra:R (relative risk aversion R), cara:A (absolute risk aversion A) or linear")
	// distort takes rules over outcomes only; say so where --interval is listed.
	fs.Lookup("interval").Usage = "not taken by distort (it works on rules over outcomes)"
	wealth := floatFlag(fs, "wealth", 0, "initial wealth W (default 0); utility is of W + pay, so CRRA needs W plus the smallest payment above 0")
	belief := fs.String("belief", "", "the forecaster's belief q1,q2,... (default: the budget's reference belief, else uniform)")
	asJSON := fs.Bool("json", false, "print the best report, the menu pick and the distortion curve as JSON")
	if err := parseFlags(e, fs, distortUsage, args, false); err != nil {
		return err
	}
	if *utility == "" {
		return usagef("--utility is required: crra:R, cara:A or linear")
	}
	u, err := risk.ParseUtility(*utility)
	if err != nil {
		return usagef("--utility: %v", err)
	}
	if math.IsNaN(*wealth) || math.IsInf(*wealth, 0) {
		return usagef("--wealth %g is not a finite number", *wealth)
	}
	d, rule, fitted, err := distortTerms(e.stderr, fs, rf, bf)
	if err != nil {
		return err
	}
	n := d.N()
	solver, err := rule.Distort(fitted, u, *wealth)
	if err != nil {
		return usagef("%v", err)
	}
	q, err := distortBelief(*belief, d, n)
	if err != nil {
		return err
	}
	best, bestErr := solver.Best(q)
	pick := solver.MenuPick(q)

	curve, _, along, err := solver.Curve(context.Background(), nil)
	if err != nil {
		return err
	}
	out := distortResult(u, *wealth, fitted, solver.PayLine(), q, best, bestErr, pick, curve, along)
	if *asJSON {
		if err := writeJSON(e.stdout, out); err != nil {
			return err
		}
	} else if err := printDistort(e, u, *wealth, out.Pay, q, best, pick, curve, along, out); err != nil {
		return err
	}
	if len(out.Failed) > 0 {
		return errFailed
	}
	return nil
}

// distortTerms opens the design of the flags, a rule over outcomes, and
// fits it to its budget as a risk computation does (Rule.FitSteps),
// wording the errors in the command's flags.
func distortTerms(notes io.Writer, fs *flag.FlagSet, rf *ruleFlags, bf *budgetFlags) (*design.Design, *scorewright.Rule, *budget.Terms, error) {
	d, err := rf.design(notes)
	if err != nil {
		return nil, nil, nil, err
	}
	r, err := openRule(d)
	if err != nil {
		return nil, nil, nil, err
	}
	if r.OnInterval() {
		return nil, nil, nil, usagef("distort works on rules over outcomes; it does not take point-forecast designs")
	}
	if err := bf.apply(fs, d); err != nil {
		return nil, nil, nil, err
	}
	if _, err := r.OverOutcomes(); err != nil {
		return nil, nil, nil, usagef("%v", err)
	}
	fitted, err := r.FitSteps(d.Budget)
	var ue *budget.UnboundedError
	var me *budget.MenuError
	switch {
	case errors.As(err, &me):
		return nil, nil, nil, usagef("%v", me.Err)
	case errors.As(err, &ue) && ue.AtZero:
		// distort has no --clamp: a clamped rule has kinks, and its best
		// report sits on them; the report floor is the one way out.
		return nil, nil, nil, usagef("the rule's effort is %v at report %s when %q happens: the rule is unbounded where a report gives an outcome probability 0; give --report-floor P (e.g. 0.01) so that every report gives each outcome at least P",
			ue.Effort, num.Format(ue.Report), ue.Label)
	case err != nil:
		return nil, nil, nil, fitError(err)
	}
	return d, r, fitted, nil
}

// distortBelief is --belief read over n outcomes, or the budget's default
// belief; it may give no outcome less than the report floor.
func distortBelief(belief string, d *design.Design, n int) ([]float64, error) {
	q := scorewright.DefaultBelief(d.Budget, n)
	if belief != "" {
		var err error
		if q, err = num.ParseDistribution(belief, n); err != nil {
			return nil, usagef("--belief: %v", err)
		}
	}
	for _, v := range q {
		if v < d.Budget.ReportFloor {
			return nil, usagef("--belief %s gives an outcome less than the report floor %g", num.Format(q), d.Budget.ReportFloor)
		}
	}
	return q, nil
}

// distortResult gathers what distort reports, for JSON and text alike.
func distortResult(u risk.Utility, wealth float64, fitted *budget.Terms, pay string, q []float64, best *risk.Result, bestErr error, pick []float64, curve *risk.Curve, along string) distortJSON {
	out := distortJSON{Utility: u.String(), Wealth: wealth, A: num.Float(fitted.Fit.A), B: num.Float(fitted.Fit.B),
		Belief: num.Floats(q), MenuReport: num.Floats(pick), Pay: pay,
		Largest: distortPointOf(curve.Largest), Along: along}
	if bestErr == nil {
		out.Report, out.Size, out.Status = num.Floats(best.Report), num.Float(best.Size), best.Status
		out.ExpectedPay, out.TruthfulPay = num.Float(best.ExpectedPay), num.Float(best.TruthfulPay)
	} else {
		out.Failed = append(out.Failed, distortFailure{Belief: num.Floats(q), Why: bestErr.Error()})
	}
	for _, p := range curve.Points {
		out.Curve = append(out.Curve, distortPointOf(p))
	}
	for _, f := range curve.Failed {
		out.Failed = append(out.Failed, distortFailure{Belief: num.Floats(f.Belief), Why: f.Err.Error()})
	}
	if u.Kind == risk.CARA {
		out.Notes = append(out.Notes, "with CARA utility initial wealth does not change the report")
	}
	if fitted.ByFormula {
		out.Notes = append(out.Notes, "no menu (no --step): every report is paid by the exact formula A - B·effort, unrounded, so there is no menu pick")
	} else {
		out.Notes = append(out.Notes, "the best report is over all reports at the exact pay A - B·effort; a forecaster held to the menu picks the menu item whose rounded payments in the table give the largest expected utility (the menu pick)")
	}
	out.Notes = append(out.Notes,
		scorewright.LotteryRemedy("table --lottery"),
	)
	return out
}

// printDistort writes the text report of distort.
func printDistort(e *env, u risk.Utility, wealth float64, pay string, q []float64, best *risk.Result, pick []float64, curve *risk.Curve, along string, out distortJSON) error {
	fmt.Fprintf(e.stdout, "utility: %s of initial wealth %g plus pay\n", u, wealth)
	fmt.Fprintln(e.stdout, pay)
	if best != nil {
		menu := ""
		if pick != nil {
			menu = "; menu pick " + num.Format(pick)
		}
		fmt.Fprintf(e.stdout, "belief %s: best report %s, %s probability points away%s\n", num.Format(best.Belief), num.Format(best.Report), scorewright.PointsText(best.Size), menu)
		fmt.Fprintf(e.stdout, "expected pay %s against %s for the truthful report: what the forecaster gives up in expected pay for the risk they prefer\n", scorewright.PayText(best.ExpectedPay), scorewright.PayText(best.TruthfulPay))
	}
	if len(curve.Points) > 0 {
		fmt.Fprintf(e.stdout, "distortion curve over %d beliefs (%s): largest %s points, belief %s -> report %s\n", len(curve.Points), along, scorewright.PointsText(curve.Largest.Size), num.Format(curve.Largest.Belief), num.Format(curve.Largest.Report))
		tw := textcol.NewWriter(e.stdout, 0)
		fmt.Fprintln(tw, "  belief\treport\tpoints")
		every := max(1, len(curve.Points)/12)
		for i, p := range curve.Points {
			if i%every == 0 || i == len(curve.Points)-1 {
				fmt.Fprintf(tw, "  %s\t%s\t%s\n", num.Format(p.Belief), num.Format(p.Report), scorewright.PointsText(p.Size))
			}
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	for _, f := range out.Failed {
		fmt.Fprintf(e.stdout, "unsolved: belief %s: %s\n", num.Format(floatsOf(f.Belief)), f.Why)
	}
	for _, n := range out.Notes {
		fmt.Fprintln(e.stdout, "note:", n)
	}
	return nil
}

type distortFailure struct {
	Belief []num.Float `json:"belief"`
	Why    string      `json:"why"`
}

func distortPointOf(r risk.Result) distortPoint {
	return distortPoint{num.Floats(r.Belief), num.Floats(r.Report), num.Float(r.Size)}
}

func floatsOf(v []num.Float) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = float64(x)
	}
	return out
}
