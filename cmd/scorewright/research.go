package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"scorewright/contract/cost"
	"scorewright/contract/research"
	"scorewright/contract/research/optimum"
	"scorewright/contract/research/study"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/verify"
)

const researchUsage = "--outcomes N|labels [RULE] BUDGET [--base-rate q1,...] [--model dirichlet|signal|history] [--kappa K | --accuracy A | --confusion ROWS | --history FILE] [--compare NAMES] [--forecasts N] [--cost C] [--grid K] [--mix S] [--out FILE.toml [--write-mix] [--force]] [--json]\n\nRULE (optional; the known rules are compared either way): " + outcomeRuleUsage + "\nBUDGET: " + budgetUsage

// researchFlags are the options of the research command beyond RULE and
// BUDGET.
type researchFlags struct {
	baseRate, model, confusion, history, compare, out string
	kappa, accuracy, cost, mix, stepsKappa            float64
	forecasts, grid, maxSteps                         int
	noOptimum, writeMix, force, asJSON                bool
}

func addResearchFlags(fs *flag.FlagSet) *researchFlags {
	r := &researchFlags{}
	fs.StringVar(&r.baseRate, "base-rate", "", "the buyer's base rate q0, the belief before research (default: the design's contract base rate, else the budget's reference belief, else uniform)")
	fs.StringVar(&r.model, "model", "dirichlet", "research model: dirichlet (beta for n = 2) with --kappa, signal with --accuracy or --confusion, or history with --history")
	floatVar(fs, &r.kappa, "kappa", 10, "dirichlet: concentration of the posterior around the base rate (research worth kappa past cases)")
	floatVar(fs, &r.accuracy, "accuracy", 0, "signal: the chance the signal names the true outcome (the others share the rest)")
	fs.StringVar(&r.confusion, "confusion", "", "signal: chance of each signal given each outcome, rows per outcome separated by ';' (e.g. '0.8,0.2;0.3,0.7')")
	fs.StringVar(&r.history, "history", "", "history: a forecast-history CSV whose forecasts stand for the posteriors")
	fs.StringVar(&r.compare, "compare", "", "known rules to compare, comma-separated preset names, or none (default: every generator preset that fits)")
	intVar(fs, &r.forecasts, "forecasts", 0, "forecasts per season, for the season totals (default: the design's contract, else 1)")
	floatVar(fs, &r.cost, "cost", -1, "n = 2: price of one observation; turns on step-by-step research")
	intVar(fs, &r.maxSteps, "max-steps", 0, "step by step: the most observations a forecaster may buy (default 1000)")
	floatVar(fs, &r.stepsKappa, "steps-kappa", 2, "step by step, signal and history models: concentration of the forecaster's Beta belief before observing")
	intVar(fs, &r.grid, "grid", 0, "the best rule's grid: step 1/K (default 100 for n = 2, 8 for n = 3)")
	floatVar(fs, &r.mix, "mix", 0.1, "share of the quadratic rule mixed into the best rule to make it strictly proper, in (0, 1)")
	fs.BoolVar(&r.noOptimum, "no-optimum", false, "skip the best bounded rule")
	fs.StringVar(&r.out, "out", "", "write the best rule as a design file (TOML)")
	fs.BoolVar(&r.writeMix, "write-mix", false, "with --out: write the strictly proper mix instead")
	fs.BoolVar(&r.force, "force", false, "replace an existing --out file")
	fs.BoolVar(&r.asJSON, "json", false, "print the comparison as JSON")
	return r
}

func runResearch(e *env, args []string) error {
	fs := newFlags("research")
	rf := addRuleFlags(fs)
	bf := addBudgetFlags(fs)
	xf := addResearchFlags(fs)
	fs.Lookup("interval").Usage = "not taken by research (it works on rules over outcomes)"
	if err := parseFlags(e, fs, researchUsage, args, false); err != nil {
		return err
	}
	d, rule, name, err := researchDesign(rf, e.stderr)
	if err != nil {
		return err
	}
	if err := bf.apply(fs, d); err != nil {
		return err
	}
	forecastsSet := false
	fs.Visit(func(f *flag.Flag) { forecastsSet = forecastsSet || f.Name == "forecasts" })
	if !forecastsSet {
		xf.forecasts = max(d.Contract.Forecasts, 1)
	}
	spec, err := xf.spec(d)
	if err != nil {
		return err
	}
	spec.Rule, spec.RuleName = rule, name
	stepSet := false
	fs.Visit(func(f *flag.Flag) { stepSet = stepSet || f.Name == "step" })
	if d.Budget.Menu != "" && !stepSet {
		// The design's menu file is the menu its table is made on and the
		// contract pays: the rules are compared on it, as table --design
		// fits on it, unless --step asks for a step menu instead.
		if spec.Menu, err = tableMenu(fs, &tableFlags{}, d); err != nil {
			return err
		}
	}
	rep, err := study.Run(context.Background(), d.Labels, d.Budget, spec)
	var re *study.RuleError
	switch {
	case errors.Is(err, study.ErrMeanPay):
		return usagef("rules are compared at the same floor and cap: give --cap C instead of --mean-pay")
	case errors.Is(err, study.ErrNoStep):
		return usagef("the report menu is missing: give --step S (e.g. 0.05; 1/K for a simplex grid when n > 2), or name a menu file in the design's budget")
	case errors.As(err, &re):
		return fitError(re.Err)
	case err != nil:
		return usagef("%v", err)
	}
	verdicts, failed, err := checkOptimum(rep)
	if err != nil {
		return err
	}
	if xf.out != "" {
		if err := writeOptimum(rep, xf); err != nil {
			return err
		}
	}
	if xf.asJSON {
		err = writeJSON(e.stdout, researchJSONOf(rep, verdicts, xf.out))
	} else {
		err = printResearch(e, rep, verdicts, xf.out)
	}
	if err != nil {
		return err
	}
	if failed {
		return errFailed
	}
	return nil
}

// researchDesign builds the design: with a rule source the usual RULE
// flags, else only the outcomes (the known rules are compared alone).
func researchDesign(rf *ruleFlags, notes io.Writer) (*design.Design, *bregman.Rule, string, error) {
	if rf.file == "" && rf.generator == "" && rf.preset == "" && rf.emphasis == "" {
		if rf.interval != "" {
			return nil, nil, "", usagef("research works on rules over outcomes; it does not take --interval")
		}
		if rf.outcomes == "" {
			return nil, nil, "", usagef("--outcomes is required (a count such as 2, or labels such as frost,clear)")
		}
		labels, err := design.ParseOutcomes(rf.outcomes)
		if err != nil {
			return nil, nil, "", usagef("--outcomes: %v", err)
		}
		return &design.Design{Version: design.SchemaVersion, Mode: design.ModeGenerator, Labels: labels}, nil, "", nil
	}
	d, err := rf.design(notes)
	if err != nil {
		return nil, nil, "", err
	}
	r, err := openRule(d)
	if err != nil {
		return nil, nil, "", err
	}
	rule, err := r.OverOutcomes()
	if err != nil {
		return nil, nil, "", usagef("research works on rules over outcomes; the design is in %s mode", r.Mode())
	}
	name := "design"
	if d.Preset != "" {
		name = d.Preset + " (the design's)"
	}
	return d, rule, name, nil
}

// spec turns the research flags into a study spec, with the model built.
func (x *researchFlags) spec(d *design.Design) (study.Spec, error) {
	n := d.N()
	// The base rate the annex's cost is priced at: the contract's, else
	// the budget's reference belief, else uniform.
	q0 := cost.SeasonOf(d).BaseRate
	if x.baseRate != "" {
		var err error
		if q0, err = num.ParseDistribution(x.baseRate, n); err != nil {
			return study.Spec{}, usagef("--base-rate: %v", err)
		}
	}
	model, err := x.buildModel(d.Labels, q0)
	if err != nil {
		return study.Spec{}, err
	}
	s := study.Spec{Model: model, Forecasts: x.forecasts, Grid: x.grid, Mix: x.mix, Optimum: !x.noOptimum,
		MaxSteps: x.maxSteps, StepsKappa: x.stepsKappa}
	if x.forecasts < 1 {
		return s, usagef("--forecasts %d: give a whole number of forecasts per season, at least 1", x.forecasts)
	}
	if !(x.mix > 0 && x.mix < 1) {
		return s, usagef("--mix %g: the share of the quadratic rule must lie strictly between 0 and 1", x.mix)
	}
	if x.grid != 0 && (n == 2 || n == 3) && (x.grid < 2 || x.grid > optimum.MaxGrid(n)) {
		return s, usagef("--grid %d: give 2..%d for %d outcomes", x.grid, optimum.MaxGrid(n), n)
	}
	if x.cost != -1 {
		if !(x.cost >= 0) {
			return s, usagef("--cost %g: the price of an observation must be at least 0", x.cost)
		}
		if n != 2 {
			return s, usagef("--cost: step-by-step research is modelled for one yes/no question (2 outcomes), not %d", n)
		}
		s.Steps, s.Cost = true, x.cost
	}
	if x.maxSteps != 0 && (x.maxSteps < 1 || x.maxSteps > 5000) {
		return s, usagef("--max-steps %d: give 1..5000", x.maxSteps)
	}
	if !(x.stepsKappa > 0) {
		return s, usagef("--steps-kappa %g must be positive", x.stepsKappa)
	}
	switch strings.TrimSpace(x.compare) {
	case "":
	case "none":
		s.Compare = []string{}
	default:
		for _, c := range strings.Split(x.compare, ",") {
			s.Compare = append(s.Compare, strings.TrimSpace(c))
		}
	}
	return s, nil
}

func (x *researchFlags) buildModel(labels []string, q0 []float64) (*research.Posterior, error) {
	n := len(labels)
	switch x.model {
	case "dirichlet", "beta":
		if x.model == "beta" && n != 2 {
			return nil, usagef("--model beta is for 2 outcomes; use dirichlet for %d", n)
		}
		p, err := research.Dirichlet(q0, x.kappa, research.Quadrature{})
		if err != nil {
			return nil, usagef("--model %s: %s", x.model, strings.TrimPrefix(err.Error(), "research: "))
		}
		return p, nil
	case "signal":
		var c [][]float64
		var err error
		switch {
		case x.confusion != "" && x.accuracy != 0:
			return nil, usagef("give --accuracy or --confusion, not both")
		case x.confusion != "":
			if c, err = research.ParseConfusion(x.confusion); err != nil {
				return nil, usagef("--confusion: %v", err)
			}
		case x.accuracy != 0:
			if c, err = research.Accuracy(n, x.accuracy); err != nil {
				return nil, usagef("--accuracy: %s", strings.TrimPrefix(err.Error(), "research: "))
			}
		default:
			return nil, usagef("--model signal needs --accuracy A or --confusion ROWS")
		}
		p, err := research.Signal(q0, c)
		if err != nil {
			return nil, usagef("--model signal: %s", strings.TrimPrefix(err.Error(), "research: "))
		}
		return p, nil
	case "history":
		if x.history == "" {
			return nil, usagef("--model history needs --history FILE.csv")
		}
		if x.baseRate != "" {
			return nil, usagef("--model history takes the base rate to be the mean forecast of the file; do not give --base-rate")
		}
		f, err := os.Open(x.history)
		if err != nil {
			return nil, usagef("--history: %v", err)
		}
		defer f.Close()
		p, _, err := research.History(f, labels)
		if err != nil {
			return nil, usagef("--history %s: %s", x.history, strings.TrimPrefix(err.Error(), "research: "))
		}
		return p, nil
	}
	return nil, usagef("--model %q: give dirichlet (or beta for 2 outcomes), signal or history", x.model)
}

// checkOptimum checks the best rule and its mix with the grid checks every
// rule gets; an improper verdict is a failure (exit 1).
func checkOptimum(rep *study.Report) (map[string]string, bool, error) {
	out := map[string]string{}
	o := rep.Optimum
	if o == nil {
		return out, false, nil
	}
	failed := false
	for _, r := range []study.Row{o.Row, o.MixRow} {
		c, err := verify.CheckRule(context.Background(), r.Fit.Rule(), verify.Settings{})
		if err != nil {
			return nil, false, err
		}
		out[r.Name] = fmt.Sprintf("%s (%s)", c.Verdict, c.Grid)
		if c.Verdict == verify.Improper {
			failed = true
		}
		// The certificate is the construction itself: the interval
		// certificate (verify/certify) cannot decide the boxes that hold
		// a kink of max, but minus a maximum of affine functions is
		// concave everywhere, and adding a positive share of the strictly
		// concave quadratic generator makes it strictly concave.
		if r.Name == o.Row.Name {
			out[r.Name] += "; certified proper by construction: the generator is minus a maximum of affine functions, so concave on the whole simplex (Savage 1971; Gneiting & Raftery 2007, Theorem 1)"
		} else {
			out[r.Name] += "; certified strictly proper by construction: a concave generator plus a positive share of the strictly concave quadratic one 1 - sum(p^2)"
		}
	}
	return out, failed, nil
}

func writeOptimum(rep *study.Report, x *researchFlags) error {
	if rep.Optimum == nil {
		return usagef("--out: there is no best rule to write (%d outcomes, or research under this model is worth nothing)", len(rep.Labels))
	}
	d := rep.Optimum.Design
	if x.writeMix {
		d = rep.Optimum.MixDesign
	}
	if err := d.Save(x.out, x.force); err != nil {
		return usagef("--out: %v", err)
	}
	return nil
}
