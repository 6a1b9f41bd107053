package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"scorewright/generator/design"
	"scorewright/generator/formula"
	"scorewright/internal/num"
	"scorewright/presets"
)

// errHelp means --help was asked for and printed.
var errHelp = errors.New("help shown")

// newFlags returns a flag set whose errors come back as one-line usage
// errors instead of being printed with the whole usage text.
func newFlags(name string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	return fs
}

// parseFlags parses args, printing help on --help and turning every other
// problem into a usage error. Positional arguments are refused unless the
// caller wants them.
func parseFlags(e *env, fs *flag.FlagSet, usage string, args []string, positional bool) error {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			fmt.Fprintf(e.stdout, "usage: scorewright %s %s\n", fs.Name(), usage)
			// A command without options (open) gets no empty heading.
			n := 0
			fs.VisitAll(func(*flag.Flag) { n++ })
			if n > 0 {
				fmt.Fprint(e.stdout, "\noptions:\n")
			}
			fs.VisitAll(func(f *flag.Flag) {
				arg, help := flag.UnquoteUsage(f)
				if arg != "" {
					arg = " " + arg
				}
				fmt.Fprintf(e.stdout, "  --%s%s\n        %s\n", f.Name, arg, help)
			})
			return errHelp
		}
		return usagef("%s", flagMessage(err))
	}
	if !positional && fs.NArg() > 0 {
		return usagef("unexpected argument %q (options start with --)", fs.Arg(0))
	}
	return nil
}

// paramFlag collects repeated --param name=value.
type paramFlag map[string]float64

func (p paramFlag) String() string { return fmt.Sprint(map[string]float64(p)) }

func (p paramFlag) Set(s string) error {
	name, val, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return fmt.Errorf("--param wants name=value, got %q", s)
	}
	v, err := num.ParseNumber(val)
	if err != nil {
		return fmt.Errorf("%s: %v", name, err)
	}
	p[name] = v
	return nil
}

// ruleFlags are the options that say which rule a command works on.
type ruleFlags struct {
	outcomes  string
	generator string
	preset    string
	params    paramFlag
	ordered   bool
	file      string
	weights   string
	emphasis  string
	interval  string
}

// outcomeRuleUsage is RULE for commands that take only rules over
// outcomes; ruleUsage adds point forecasts.
const (
	outcomeRuleUsage = "--outcomes N|label1,label2,... (--generator EXPR | --preset NAME | --emphasis EXPR) [--param name=value] [--ordered] [--weights w1,w2,...] | --design FILE"
	ruleUsage        = outcomeRuleUsage + " | --interval LO,HI (--generator EXPR | --preset NAME)"
)

func addRuleFlags(fs *flag.FlagSet) *ruleFlags {
	r := &ruleFlags{params: paramFlag{}}
	fs.StringVar(&r.outcomes, "outcomes", "", "outcome count or comma-separated labels")
	fs.StringVar(&r.generator, "generator", "", "concave generator formula in p1..pn (or in x with --interval)")
	fs.StringVar(&r.preset, "preset", "", "built-in rule name (see scorewright presets)")
	fs.Var(r.params, "param", "override a formula parameter, name=value (repeatable)")
	fs.BoolVar(&r.ordered, "ordered", false, "outcomes are ordered (allows csum)")
	fs.StringVar(&r.file, "design", "", "read the rule (and budget) from a design file")
	fs.StringVar(&r.weights, "weights", "", "outcome weights w1,w2,... (w inside sum)")
	fs.StringVar(&r.emphasis, "emphasis", "", "n = 2: design the rule from a weight w(c) >= 0 in c")
	fs.StringVar(&r.interval, "interval", "", "point forecasts of a mean on [LO, HI]")
	return r
}

// design builds the design the flags describe. A design file supplies
// everything; flags given beside it override its parameters. Notes on
// what was changed in the file's design (a preset name dropped) go to
// notes.
func (r *ruleFlags) design(notes io.Writer) (*design.Design, error) {
	var d *design.Design
	var err error
	if r.file != "" {
		d, err = r.fileDesign(notes)
	} else {
		d, err = r.flagDesign()
	}
	if err != nil {
		return nil, err
	}
	if err := r.override(d); err != nil {
		return nil, err
	}
	if d.Preset != "" && d.Formula == "" {
		if err := presets.Apply(d); err != nil {
			return nil, usagef("%v", err)
		}
	}
	if d.Weights == nil && d.Preset != "" {
		if p, err := presets.Lookup(d.Preset); err == nil && p.Weighted && p.Kind == presets.KindGenerator {
			return nil, usagef("preset %q needs --weights w1,...,w%d", d.Preset, d.N())
		}
	}
	if err := d.Validate(); err != nil {
		return nil, usagef("%v", err)
	}
	if err := weightsUsed(d); err != nil {
		return nil, err
	}
	return d, nil
}

// fileDesign reads --design, which gives the whole rule.
func (r *ruleFlags) fileDesign(notes io.Writer) (*design.Design, error) {
	if r.generator != "" || r.preset != "" || r.emphasis != "" || r.outcomes != "" {
		return nil, usagef("--design gives the whole rule; do not combine it with --outcomes, --generator, --preset or --emphasis")
	}
	d, err := design.Load(r.file)
	if err != nil {
		return nil, usagef("%v", err)
	}
	// A preset name over a formula of the design's own is dropped: the
	// record must name the rule that is computed. The user is told, as
	// the name is in their file.
	if note := presets.Settle(d); note != "" {
		fmt.Fprintf(notes, "scorewright: note: %s: %s\n", r.file, note)
	}
	return d, nil
}

// flagDesign builds the design from exactly one of --generator, --preset
// and --emphasis, on --interval or over --outcomes.
func (r *ruleFlags) flagDesign() (*design.Design, error) {
	d := &design.Design{Version: design.SchemaVersion, Mode: design.ModeGenerator, Ordered: r.ordered}
	sources := 0
	for _, s := range []string{r.generator, r.preset, r.emphasis} {
		if s != "" {
			sources++
		}
	}
	if sources != 1 {
		return nil, usagef("give exactly one of --generator, --preset or --emphasis")
	}
	if r.interval != "" {
		if r.emphasis != "" {
			return nil, usagef("--interval needs --generator EXPR in x or --preset NAME of a point-forecast preset")
		}
		iv, err := num.ParseVector(r.interval)
		if err != nil || len(iv) != 2 || !(iv[0] < iv[1]) {
			return nil, usagef("--interval wants LO,HI with LO < HI, got %q", r.interval)
		}
		d.Mode, d.Interval, d.Formula = design.ModePoint, iv, r.generator
		if err := applyPointPreset(d, r.preset); err != nil {
			return nil, err
		}
		return d, nil
	}
	if r.outcomes == "" {
		return nil, usagef("--outcomes is required (a count such as 3, or labels such as frost,clear)")
	}
	labels, err := design.ParseOutcomes(r.outcomes)
	if err != nil {
		return nil, usagef("--outcomes: %v", err)
	}
	d.Labels = labels
	switch {
	case r.preset != "":
		d.Preset = r.preset
		if err := presets.Apply(d); err != nil {
			return nil, usagef("--preset: %v", err)
		}
	case r.emphasis != "":
		if len(labels) != 2 {
			return nil, usagef("--emphasis designs rules for 2 outcomes, not %d", len(labels))
		}
		d.Mode, d.Formula = design.ModeEmphasis, r.emphasis
	default:
		d.Formula = r.generator
	}
	return d, nil
}

// override applies --ordered, --param and --weights over the design.
func (r *ruleFlags) override(d *design.Design) error {
	if r.ordered {
		d.Ordered = true
	}
	if len(r.params) > 0 {
		if d.Params == nil {
			d.Params = map[string]float64{}
		}
		for k, v := range r.params {
			d.Params[k] = v
		}
	}
	if r.weights != "" {
		w, err := num.ParseVector(r.weights)
		if err != nil {
			return usagef("--weights: %v", err)
		}
		d.Weights = w
	}
	return nil
}

// weightsUsed refuses outcome weights that the formula never reads: the
// table would ignore them and the record would still list them.
func weightsUsed(d *design.Design) error {
	if d.Weights == nil {
		return nil
	}
	f, err := formula.Parse(d.Formula)
	if err != nil || f.Uses("w") {
		// A formula that does not parse is reported where it is compiled.
		return nil
	}
	what := "the formula"
	if d.Preset != "" {
		what = fmt.Sprintf("preset %q", d.Preset)
	}
	return usagef("--weights: %s does not use the outcome weights w, so they would change nothing; leave them out, or use a weighted preset or a formula with w inside sum", what)
}

// budgetFlags are the options that fit a rule to money.
type budgetFlags struct {
	floor, cap, meanPay, step, unit, reportFloor float64
	rounding, reference                          string
	set                                          map[string]bool
}

const budgetUsage = "--floor F (--cap C | --mean-pay M [--reference q1,...]) [--step S] [--unit U] [--rounding nearest|down|up] [--report-floor P]"

func addBudgetFlags(fs *flag.FlagSet) *budgetFlags {
	b := &budgetFlags{}
	floatVar(fs, &b.floor, "floor", 0, "smallest payment (default 0)")
	floatVar(fs, &b.cap, "cap", 0, "largest payment")
	floatVar(fs, &b.meanPay, "mean-pay", 0, "target expected payment of a truthful forecaster at the reference belief (instead of --cap)")
	fs.StringVar(&b.reference, "reference", "", "reference belief for --mean-pay (default uniform)")
	floatVar(fs, &b.step, "step", 0, "report menu step: n = 2 a probability step (e.g. 0.05); n > 2 1/K for a simplex grid; with --interval a step in the interval's units")
	floatVar(fs, &b.unit, "unit", 0, "currency rounding unit (0: no rounding)")
	fs.StringVar(&b.rounding, "rounding", "nearest", "rounding mode: nearest (the default; halves away from zero), down or up")
	floatVar(fs, &b.reportFloor, "report-floor", 0, "smallest probability a report may give an outcome (e.g. 0.01)")
	return b
}

// apply writes the budget flags that were given over the design's budget.
func (b *budgetFlags) apply(fs *flag.FlagSet, d *design.Design) error {
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	bd := &d.Budget
	if set["floor"] {
		bd.Floor = b.floor
	}
	if set["cap"] {
		bd.Cap = b.cap
		if !set["mean-pay"] {
			// --cap on the command line overrides a design file's
			// mean_pay rather than being silently outranked by it, and
			// its reference belief goes with it.
			bd.MeanPay = nil
			if !set["reference"] {
				bd.Reference = nil
			}
		}
	}
	if set["mean-pay"] {
		if set["cap"] {
			return usagef("give --cap or --mean-pay, not both")
		}
		m := b.meanPay
		bd.MeanPay = &m
	}
	if set["reference"] {
		q, err := num.ParseDistribution(b.reference, d.N())
		if err != nil {
			return usagef("--reference: %v", err)
		}
		bd.Reference = q
		if bd.MeanPay == nil {
			// Without a mean-pay target the fit never looks at it, and a
			// silently ignored base rate is a wrong table nobody notices.
			return usagef("--reference is the belief a --mean-pay target is set at; give --mean-pay M with it, or leave it out")
		}
	}
	if set["step"] {
		bd.Step = b.step
		bd.Menu = "" // the flag's step grid replaces the design's menu file
	}
	if set["unit"] {
		bd.Unit = b.unit
	}
	if set["rounding"] || bd.Rounding == "" {
		bd.Rounding = b.rounding
	}
	if set["report-floor"] {
		bd.ReportFloor = b.reportFloor
	}
	if err := d.ValidateBudget(); err != nil {
		return usagef("%v", err)
	}
	return nil
}

// writeJSON prints v as indented JSON.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
