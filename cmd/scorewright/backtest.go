package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"scorewright"
	"strconv"
	"strings"

	"scorewright/contract/backtest"
	"scorewright/contract/backtest/figure"
	"scorewright/contract/backtest/history"
	"scorewright/contract/budget"
	"scorewright/generator/design"
	"scorewright/tui/reliability"
)

const backtestUsage = ruleUsage + " " + budgetUsage + " [--menu FILE] [--clamp P] --history FILE.csv [--strict] [--tolerance T]" +
	" [--versus-preset NAME | --versus-generator EXPR | --versus-design FILE] [--versus-param name=value]" +
	" [--sheet NAME] [--bin-width W] [--pay-out FILE.csv] [--forecasters-out FILE.csv] [--by-question] [--figure FILE.svg|png|pdf] [--chart] [--all-curves] [--force] [--progress] [--json]"

// payHook, when set, replaces each rule's pay after the budget fit; tests
// pay an explicit A - B·effort with it, so the command can be tested apart
// from the table's budget fitting.
type payHook func(d *design.Design, s *backtest.Scheme)

func runBacktest(e *env, args []string) error { return backtestWith(e, args, nil) }

// backtestScheme is one rule of a backtest with the terms it is paid on.
type backtestScheme struct {
	id   string // "A", "B"
	name string // preset name or "generator"
	d    *design.Design
	// statement is the rule's formula in one line, with its parameters.
	statement string
	rule      *scorewright.Rule
	// terms are the fitted table's; scheme pays as they do (or as the
	// test hook says).
	terms  *budget.Terms
	scheme backtest.Scheme
}

// backtestFlags are the command's own flags, besides the rule's and the
// budget's.
type backtestFlags struct {
	rule                             *ruleFlags
	budget                           *budgetFlags
	history, sheet, forecastersOut   *string
	vsPreset, vsGen, vsDesign, menu  *string
	payOut, figPath                  *string
	binWidth, tol, clamp             *float64
	strict, byQuestion, chart, force *bool
	progress, asJSON, allCurves      *bool
	vsParams                         paramFlag
}

func addBacktestFlags(fs *flag.FlagSet) *backtestFlags {
	f := &backtestFlags{rule: addRuleFlags(fs), budget: addBudgetFlags(fs), vsParams: paramFlag{}}
	f.history = fs.String("history", "", "forecast history: .csv, .jsonl (JSON lines) or .xlsx; columns forecaster, question, outcome, optional date, one probability per outcome ('-' reads CSV from stdin)")
	f.sheet = fs.String("sheet", "", "XLSX history: the sheet to read (default: the first)")
	f.binWidth = fs.Float64("bin-width", 1.0/backtest.DefaultGrid, "width of the bins of the rule's own decomposition, 1/K for a whole K")
	f.forecastersOut = fs.String("forecasters-out", "", "write every forecaster's line (totals, ranks, decomposition) to this CSV file; the report lists only the top and bottom ones when there are many")
	f.strict = fs.Bool("strict", false, "stop at the first bad row (exit 2) instead of skipping it")
	f.tol = floatFlag(fs, "tolerance", history.DefaultTolerance, "how far from 1 a row's probabilities may sum")
	f.vsPreset = fs.String("versus-preset", "", "second rule to compare with: a preset name")
	f.vsGen = fs.String("versus-generator", "", "second rule to compare with: a generator formula")
	f.vsDesign = fs.String("versus-design", "", "second rule to compare with: a design file (with its own budget, if it has one; else the first rule's)")
	fs.Var(f.vsParams, "versus-param", "parameter of the second rule's formula, name=value (repeatable)")
	f.menu = fs.String("menu", "", "read the report menu from a CSV file, as the table command does (instead of --step)")
	f.clamp = floatFlag(fs, "clamp", 0, "pay every report as if each probability were at least P, as the table command does")
	f.payOut = fs.String("pay-out", "", "write every forecast's pay under each rule to this CSV file")
	f.byQuestion = fs.Bool("by-question", false, "also total the pay per question (memory grows with the number of questions)")
	f.figPath = fs.String("figure", "", "n = 2: write the reliability picture to FILE.svg, .png or .pdf")
	f.chart = fs.Bool("chart", false, "n = 2: print the reliability picture as a text chart")
	f.allCurves = fs.Bool("all-curves", false, "n = 2: the JSON and --figure carry every forecaster's reliability curve, not only the listed ones")
	f.force = fs.Bool("force", false, "replace existing --pay-out and --figure files")
	f.progress = fs.Bool("progress", false, "show a progress line on stderr even when it is not a terminal")
	f.asJSON = fs.Bool("json", false, "print JSON")
	return f
}

// backtestWith runs the command; hook, when set, replaces the fitted pay.
func backtestWith(e *env, args []string, hook payHook) error {
	fs := newFlags("backtest")
	f := addBacktestFlags(fs)
	if err := parseFlags(e, fs, backtestUsage, args, false); err != nil {
		return err
	}
	if *f.history == "" {
		return usagef("--history FILE.csv is required")
	}
	if !(*f.tol > 0) || *f.tol >= 1 {
		return usagef("--tolerance %g: want a number in (0, 1)", *f.tol)
	}
	grid, err := binGrid(*f.binWidth)
	if err != nil {
		return err
	}
	schemes, err := f.schemes(e.stderr, fs, hook)
	if err != nil {
		return err
	}
	labels := schemes[0].d.Labels
	figFormat, err := f.checkOutputs(len(labels))
	if err != nil {
		return err
	}
	in, size, closeIn, err := openHistory(e, *f.history)
	if err != nil {
		return err
	}
	defer closeIn()
	format := history.FormatOf(*f.history)
	if *f.sheet != "" && format != history.XLSX {
		return usagef("--sheet is for an .xlsx history")
	}
	h, err := history.Open(in, format, labels, history.Options{Tolerance: *f.tol, Sheet: *f.sheet})
	if err != nil {
		return usagef("%s: %v", *f.history, err)
	}
	return f.run(e, h, size, schemes, grid, figFormat)
}

// schemes opens the first rule and the one it is compared with, if any,
// and fits each to its budget.
func (f *backtestFlags) schemes(notes io.Writer, fs *flag.FlagSet, hook payHook) ([]*backtestScheme, error) {
	d1, err := f.rule.design(notes)
	if err != nil {
		return nil, err
	}
	if err := f.budget.apply(fs, d1); err != nil {
		return nil, err
	}
	schemes := []*backtestScheme{{id: "A", d: d1}}
	vs := 0
	for _, s := range []string{*f.vsPreset, *f.vsGen, *f.vsDesign} {
		if s != "" {
			vs++
		}
	}
	switch {
	case vs > 1:
		return nil, usagef("give at most one of --versus-preset, --versus-generator and --versus-design")
	case vs == 0 && len(f.vsParams) > 0:
		return nil, usagef("--versus-param needs --versus-preset, --versus-generator or --versus-design")
	case vs == 1:
		d2, err := versusDesign(notes, d1, *f.vsPreset, *f.vsGen, *f.vsDesign, f.vsParams)
		if err != nil {
			return nil, err
		}
		schemes = append(schemes, &backtestScheme{id: "B", d: d2})
	}
	for _, s := range schemes {
		if err := s.open(fs, *f.menu, *f.clamp, hook); err != nil {
			return nil, err
		}
	}
	return schemes, nil
}

// open compiles the scheme's design and fits it to its budget.
func (s *backtestScheme) open(fs *flag.FlagSet, menuFile string, clamp float64, hook payHook) error {
	r, err := openRule(s.d)
	if err != nil {
		return err
	}
	if _, err = r.OverOutcomes(); err != nil {
		return usagef("%v", err)
	}
	s.rule, s.name, s.statement = r, ruleName(s.d, r), r.Statement()
	if s.terms, err = backtestTerms(fs, menuFile, clamp, s.rule, s.d); err != nil {
		return fmt.Errorf("rule %s (%s): %w", s.id, s.name, err)
	}
	s.scheme = scorewright.Scheme(s.id, s.terms)
	if hook != nil {
		hook(s.d, &s.scheme)
	}
	return nil
}

// checkOutputs refuses, before any reading, a picture for other than two
// outcomes and output files that exist without --force; it returns the
// figure's format.
func (f *backtestFlags) checkOutputs(n int) (figFormat string, err error) {
	if (*f.figPath != "" || *f.chart || *f.allCurves) && n != 2 {
		return "", usagef("the reliability picture is for 2 outcomes; this rule has %d", n)
	}
	if *f.figPath != "" {
		if figFormat, err = figure.Format(*f.figPath); err != nil {
			return "", usagef("--figure: %v", err)
		}
		if err := refuseExisting(*f.figPath, *f.force); err != nil {
			return "", err
		}
	}
	if *f.forecastersOut != "" {
		if err := refuseExisting(*f.forecastersOut, *f.force); err != nil {
			return "", err
		}
	}
	return figFormat, nil
}

// run replays the history under the schemes, interrupted by ^C, then
// writes what was asked for.
func (f *backtestFlags) run(e *env, h *history.Reader, size int64, schemes []*backtestScheme, grid int, figFormat string) error {
	labels := schemes[0].d.Labels
	bs := make([]backtest.Scheme, len(schemes))
	for i, s := range schemes {
		bs[i] = s.scheme
	}
	opt := backtest.Options{Strict: *f.strict, Tally: backtest.TallyOptions{Grid: grid}, Size: size}
	if *f.progress || isTerminal(e.stderr) {
		opt.Progress = newProgressLine(e.progressOut(), size)
	}
	var out *payOutFile
	if *f.payOut != "" {
		var err error
		if out, err = createPayOut(*f.payOut, *f.force, labels, schemes); err != nil {
			return err
		}
		defer out.abort()
		opt.OnRow = out.write
	}
	var questions *questionTally
	if *f.byQuestion {
		questions = newQuestionTally(labels)
		opt.OnRow = bothRows(opt.OnRow, questions.add)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	res, err := scorewright.Backtest(ctx, h, bs, opt)
	if opt.Progress != nil {
		fmt.Fprintln(e.stderr)
	}
	if err := runError(*f.history, h, res, err); err != nil {
		return err
	}
	defer res.Close()
	return finishBacktest(e, h, schemes, res, backtestOutputs{history: *f.history, payOut: *f.payOut, out: out, forecastersOut: *f.forecastersOut,
		figPath: *f.figPath, figFormat: figFormat, force: *f.force, questions: questions, asJSON: *f.asJSON, chart: *f.chart, allCurves: *f.allCurves, event: labels[0]})
}

// bothRows calls first (when set), then second, for every row.
func bothRows(first, second func(*history.Row, []backtest.Paid) error) func(*history.Row, []backtest.Paid) error {
	if first == nil {
		return second
	}
	return func(row *history.Row, paid []backtest.Paid) error {
		if err := first(row, paid); err != nil {
			return err
		}
		return second(row, paid)
	}
}

// runError turns what backtest.Run returned into the command's error: a
// bad row under --strict, an interruption, a reading error, or a history
// with no valid forecast at all; nil when there is a result to report.
func runError(path string, h *history.Reader, res *backtest.Result, err error) error {
	if err != nil {
		var re *history.RowError
		if errors.As(err, &re) {
			return usagef("%s %s: %s (--strict stops at the first bad row)", path, re.Where(), re.Why)
		}
		if errors.Is(err, context.Canceled) {
			return usagef("interrupted; nothing was written")
		}
		return usagef("%s: %v", path, err)
	}
	if res.Rows == 0 {
		msg := fmt.Sprintf("%s has no valid forecasts", path)
		if res.SkippedCount > 0 {
			first := res.Skipped[0]
			msg += fmt.Sprintf(" (%s skipped; the first, %s: %s)", plural(res.SkippedCount, "row"), (&history.RowError{Line: first.Line, EndLine: first.EndLine, Unit: h.Unit()}).Where(), first.Why)
		}
		return usagef("%s", msg)
	}
	return nil
}

// backtestOutputs are the files and forms a finished backtest is written
// to.
type backtestOutputs struct {
	history, payOut, forecastersOut, figPath, figFormat, event string
	out                                                        *payOutFile
	questions                                                  *questionTally
	force, asJSON, chart, allCurves                            bool
}

// finishBacktest writes a finished backtest: the pay-out file, the
// forecasters file, the figure, then the report as text or JSON.
func finishBacktest(e *env, h *history.Reader, schemes []*backtestScheme, res *backtest.Result, o backtestOutputs) error {
	if o.out != nil {
		if err := o.out.commit(); err != nil {
			return err
		}
	}
	report := newBacktestReport(o.history, h, schemes, res)
	chartCurves := report.curves // the text chart draws the listed forecasters
	if o.allCurves && !res.Shown() {
		curves, err := scorewright.AllReliabilityCurves(res)
		if err != nil {
			return usagef("--all-curves: %v", err)
		}
		report.setCurves(curves)
		report.Notes = append(report.Notes, fmt.Sprintf("the reliability curves of all %d forecasters are in the JSON and the figure (--all-curves); the text lists %d", res.ForecasterCount, len(res.Forecasters)))
	}
	if o.forecastersOut != "" {
		if err := writeForecasters(o.forecastersOut, o.force, schemes, res); err != nil {
			return err
		}
		report.Notes = append(report.Notes, "every forecaster's line written to "+o.forecastersOut)
	} else if !res.Shown() {
		report.Notes = append(report.Notes, fmt.Sprintf("%d forecasters: listed are the %d best and %d worst by mean pay under rule A; --forecasters-out FILE.csv writes every one", res.ForecasterCount, backtest.DefaultShow, backtest.DefaultShow))
	}
	if o.questions != nil {
		var notes []string
		report.Questions, notes = o.questions.report()
		report.Notes = append(report.Notes, notes...)
	}
	if o.figPath != "" {
		if err := writeReliabilityFigure(o.figPath, o.figFormat, o.force, o.event, report.curves, report.Warnings); err != nil {
			return err
		}
		report.Notes = append(report.Notes, "reliability picture written to "+o.figPath)
	}
	if o.out != nil {
		report.Notes = append(report.Notes, "pay of every forecast written to "+o.payOut)
	}
	if o.asJSON {
		if err := writeJSON(e.stdout, report); err != nil {
			return err
		}
		return failedIfWarned(report)
	}
	if err := report.writeText(e.stdout); err != nil {
		return err
	}
	if o.chart {
		fmt.Fprintln(e.stdout)
		fmt.Fprintln(e.stdout, reliability.New(o.event, chartCurves).View(72, 22))
	}
	return failedIfWarned(report)
}

// failedIfWarned is errFailed when a rule's table fails its re-check:
// the backtest is reported in full, and the exit status says, as table's
// does, that the table is not fit to sign.
func failedIfWarned(r *backtestReport) error {
	if len(r.Warnings) > 0 {
		return errFailed
	}
	return nil
}

// versusDesign builds the second rule over the first rule's outcomes. A
// design file keeps its own budget when it states one (a cap or a mean
// pay); otherwise, and for a preset or generator, the second rule is fitted
// to the first rule's budget, so that the two are compared on equal money.
func versusDesign(notes io.Writer, d1 *design.Design, preset, gen, file string, params paramFlag) (*design.Design, error) {
	vr := &ruleFlags{preset: preset, generator: gen, file: file, params: params, ordered: d1.Ordered}
	if file == "" {
		vr.outcomes = strings.Join(d1.Labels, ",")
		if d1.Weights != nil {
			w := make([]string, len(d1.Weights))
			for i, x := range d1.Weights {
				w[i] = strconv.FormatFloat(x, 'g', -1, 64)
			}
			vr.weights = strings.Join(w, ",")
		}
	}
	d2, err := vr.design(notes)
	if err != nil {
		var ue *usageError
		if errors.As(err, &ue) {
			return nil, usagef("second rule: %s", ue.msg)
		}
		return nil, err
	}
	if file != "" && strings.Join(d2.Labels, "\x00") != strings.Join(d1.Labels, "\x00") {
		return nil, usagef("--versus-design %s has outcomes %s; the first rule has %s", file, strings.Join(d2.Labels, ", "), strings.Join(d1.Labels, ", "))
	}
	if file == "" || (d2.Budget.Cap == 0 && d2.Budget.MeanPay == nil) {
		d2.Budget = d1.Budget
		d2.Budget.Reference = append([]float64(nil), d1.Budget.Reference...)
	}
	return d2, nil
}

// ruleName is how a report names a rule: its preset, title or kind.
func ruleName(d *design.Design, r *scorewright.Rule) string {
	switch {
	case d.Preset != "":
		return d.Preset
	case d.Title != "":
		return d.Title
	}
	return r.Kind()
}
