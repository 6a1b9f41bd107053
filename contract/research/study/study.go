// Package study runs a whole research comparison for a design, the way
// `scorewright research` and the workbench's research view show it: the
// design's rule and the known rules, each fitted to the same floor and cap
// on the same menu, what research is worth under each (contract/research),
// the research each buys one observation at a time (contract/research/
// steps, n = 2) and the best bounded rule for research with its strictly
// proper mix (contract/research/optimum, n = 2 and 3). The command and the
// view share it so that both show the same numbers for the same inputs.
package study

import (
	"context"
	"errors"
	"fmt"
	"strings"

	"scorewright/contract/budget"
	"scorewright/contract/research"
	"scorewright/contract/research/optimum"
	"scorewright/contract/research/steps"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/pool"
	"scorewright/presets"
)

// Spec is what to compare and how.
type Spec struct {
	// Model is the research model (its Prior is the base rate).
	Model *research.Posterior
	// Rule is the design's own rule (nil: only the known rules), named
	// RuleName.
	Rule     *bregman.Rule
	RuleName string
	// Compare names the presets to compare; nil means every generator
	// preset that fits the outcomes.
	Compare []string
	// Forecasts is the number of forecasts per season (default 1).
	Forecasts int
	// Menu, when set, is the report menu the rules are fitted on: a
	// design's menu file (scorewright.DesignMenu, with the budget's
	// clamp), the menu its table is made on. Nil: the budget's step menu.
	Menu *budget.Menu
	// Cost is the price of one observation for step-by-step research
	// (n = 2); Steps turns that part on. StepsKappa is the concentration of
	// the forecaster's Beta belief before the observations when the model
	// is not a Dirichlet one (default 2).
	Steps      bool
	Cost       float64
	MaxSteps   int
	StepsKappa float64
	// Optimum turns on the best bounded rule (n = 2, 3) on Grid (0: the
	// default), with Mix the share of the quadratic rule in its strictly
	// proper variant (default 0.1).
	Optimum bool
	Grid    int
	Mix     float64
	// Progress, when set, is told each stage as it starts: Stage names
	// it, Done is the stages finished of Total (pool.UnitStages); the
	// last, "done", has Done = Total and Last.
	Progress pool.Progress
}

// Row is one compared rule.
type Row struct {
	Name string
	Fit  *budget.Fit
	Gain research.Gain
	// Steps is the step-by-step research under the rule (nil when not
	// asked or n > 2).
	Steps *steps.Result
	// Curve is the gain against belief for n = 2: Curve[i] is what the
	// posterior with event probability Beliefs[i] is worth (GainAt).
	Curve []float64
}

// Optimum is the best bounded rule and its strictly proper mix.
type Optimum struct {
	Result *optimum.Result
	// Design is the optimum as a formula design on the study's budget;
	// MixDesign the mix with share Mix of the quadratic rule.
	Design, MixDesign *design.Design
	Mix               float64
	// Row and MixRow are the two fitted and measured like every rule.
	Row, MixRow Row
	// MixCost is what the strictness costs in research gain per forecast.
	MixCost float64
}

// Report is a study's result.
type Report struct {
	Labels []string
	Prior  []float64
	Model  string
	Budget design.Budget
	// MenuFile describes the Spec's menu the rules were fitted on
	// (Menu.Desc); empty when they were fitted on the budget's step menu.
	MenuFile string
	Rows     []Row
	LeftOut  []string
	Optimum  *Optimum
	// Beliefs are the event probabilities of the curves (n = 2).
	Beliefs []float64
	// StepsPrior is the Beta belief step-by-step research starts from.
	StepsPrior [2]float64
	Notes      []string
}

// ErrMeanPay says the budget is a mean-pay one; rules are compared at one
// floor and cap.
var ErrMeanPay = errors.New("study: rules are compared at the same floor and cap; the budget gives a target mean payment instead of a cap")

// ErrNoStep says the budget has no report menu step, and the Spec no
// menu, to fit the rules on.
var ErrNoStep = errors.New("study: the budget has no report menu step")

// RuleError says the design's own rule does not fit the budget.
type RuleError struct {
	Name string
	Err  error
}

func (e *RuleError) Error() string { return e.Name + ": " + e.Err.Error() }

// Unwrap returns the fit's error.
func (e *RuleError) Unwrap() error { return e.Err }

// Run fits every rule to b (labels name the outcomes) and measures it.
func Run(ctx context.Context, labels []string, b design.Budget, s Spec) (*Report, error) {
	n := len(labels)
	if s.Model == nil || s.Model.Outcomes() != n {
		return nil, fmt.Errorf("study: the research model is for %d outcomes, the design has %d", outcomes(s.Model), n)
	}
	if b.MeanPay != nil {
		return nil, ErrMeanPay
	}
	menu, err := studyMenu(n, b, s)
	if err != nil {
		return nil, err
	}
	if s.Forecasts <= 0 {
		s.Forecasts = 1
	}
	if s.Mix == 0 {
		s.Mix = 0.1
	}
	rep := &Report{Labels: labels, Prior: s.Model.Prior, Model: s.Model.Describe, Budget: b}
	if s.Menu != nil {
		rep.MenuFile = s.Menu.Desc
	}
	named, left := candidates(labels, s)
	rep.LeftOut = left
	total := len(named) + 2
	stage := func(what string, i int) {
		if s.Progress != nil {
			s.Progress(pool.Step{Done: float64(i), Total: float64(total), Unit: pool.UnitStages, Stage: what, Last: i == total})
		}
	}
	if n == 2 {
		for i := 0; i <= 100; i++ {
			rep.Beliefs = append(rep.Beliefs, float64(i)/100)
		}
	}
	for i, nr := range named {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		stage("fitting and measuring "+nr.Name, i)
		fit, err := budget.FitRule(nr.Rule, menu, b)
		if err != nil && i == 0 && s.Rule != nil {
			// The design's own rule is the point of the study: its
			// failure to fit is the caller's to report.
			return nil, &RuleError{Name: nr.Name, Err: err}
		}
		if err != nil {
			var ue *budget.UnboundedError
			if errors.As(err, &ue) {
				rep.LeftOut = append(rep.LeftOut, nr.Name+": unbounded where a report gives an outcome probability 0; a report floor brings it in")
				continue
			}
			rep.LeftOut = append(rep.LeftOut, nr.Name+": "+err.Error())
			continue
		}
		row, err := measure(ctx, rep, nr.Name, fit, s)
		if err != nil {
			return nil, err
		}
		rep.Rows = append(rep.Rows, row)
	}
	if s.Steps && n == 2 {
		a, bb := stepsPrior(s)
		rep.StepsPrior = [2]float64{a, bb}
	}
	if s.Optimum && (n == 2 || n == 3) {
		stage("solving the linear program for the best bounded rule", len(named))
		if err := addOptimum(ctx, rep, labels, b, s); err != nil {
			return nil, err
		}
	}
	stage("done", total)
	rep.Notes = notes(rep, s, b)
	return rep, nil
}

func outcomes(p *research.Posterior) int {
	if p == nil {
		return 0
	}
	return p.Outcomes()
}

// candidates are the design's rule and the presets asked for, compiled for
// these outcomes; names asked for that do not fit are left out with why.
func candidates(labels []string, s Spec) ([]presets.NamedRule, []string) {
	n := len(labels)
	var out []presets.NamedRule
	var left []string
	if s.Rule != nil {
		name := s.RuleName
		if name == "" {
			name = "design"
		}
		out = append(out, presets.NamedRule{Name: name, Rule: s.Rule})
	}
	all := presets.Rules(n, false, nil)
	if s.Compare == nil {
		return append(out, all...), left
	}
	for _, name := range s.Compare {
		found := false
		for _, r := range all {
			if r.Name == name {
				out, found = append(out, r), true
			}
		}
		if !found {
			left = append(left, name+": not a generator preset for "+fmt.Sprint(n)+" unordered outcomes without weights")
		}
	}
	return out, left
}

// measure computes one rule's gain, curve and step-by-step research.
func measure(ctx context.Context, rep *Report, name string, fit *budget.Fit, s Spec) (Row, error) {
	gs, err := research.Gains(ctx, s.Model, []research.Rule{{Name: name, Fit: fit}}, s.Forecasts)
	if err != nil {
		return Row{}, err
	}
	row := Row{Name: name, Fit: fit, Gain: gs[0]}
	if len(rep.Beliefs) > 0 {
		v := research.NewValuer(fit, s.Model.Prior)
		for _, x := range rep.Beliefs {
			row.Curve = append(row.Curve, v.GainAt([]float64{x, 1 - x}))
		}
	}
	if s.Steps && len(rep.Labels) == 2 {
		v := research.NewValuer(fit, s.Model.Prior)
		a, b := stepsPrior(s)
		r, err := steps.Solve(ctx, func(mu float64) float64 { return v.Truthful([]float64{mu, 1 - mu}) }, a, b, steps.Settings{Cost: s.Cost, MaxSteps: s.MaxSteps})
		if err != nil {
			return Row{}, fmt.Errorf("step-by-step research under %s: %w", name, err)
		}
		row.Steps = r
	}
	return row, nil
}

// stepsPrior is the Beta belief step-by-step research starts from: the
// Dirichlet model's own, or StepsKappa (default 2) around the base rate.
func stepsPrior(s Spec) (a, b float64) {
	k := s.Model.Kappa
	if s.Model.Kind != "dirichlet" || k == 0 {
		k = s.StepsKappa
		if k == 0 {
			k = 2
		}
	}
	q := s.Model.Prior[0]
	return k * q, k * (1 - q)
}

func addOptimum(ctx context.Context, rep *Report, labels []string, b design.Budget, s Spec) error {
	r, err := optimum.Solve(ctx, s.Model, b.Floor, b.Cap, optimum.Settings{Grid: s.Grid})
	if errors.Is(err, optimum.ErrNoInformation) {
		rep.Notes = append(rep.Notes, "no best rule for research: "+strings.TrimPrefix(err.Error(), "optimum: "))
		return nil
	}
	if err != nil {
		return err
	}
	o := &Optimum{Result: r, Mix: s.Mix}
	// The best rule is bounded at every report and needs no report floor;
	// it is fitted on the step menu with the vertices plus a report inside
	// every cell of its grid, so that the fit sees every piece's payments
	// and keeps all of them in the budget (a menu that missed the piece
	// beyond its last item would stretch B until that piece paid past the
	// cap).
	ob := b
	ob.ReportFloor = 0
	full, err := optimumBase(len(labels), b, s.Menu)
	if err != nil {
		return err
	}
	omenu := &budget.Menu{Reports: append(append([][]float64(nil), full.Reports...), r.Centroids...),
		Desc: full.Desc + ", and a report inside each cell of the grid"}
	mk := func(src, title string) (*design.Design, Row, error) {
		d := &design.Design{Version: design.SchemaVersion, Title: title, Labels: labels, Mode: design.ModeGenerator, Formula: src, Budget: ob}
		gen, err := bregman.NewFormula(src, bregman.Options{Outcomes: len(labels)})
		if err != nil {
			return nil, Row{}, fmt.Errorf("study: the optimum's formula does not compile: %v", err)
		}
		rule := &bregman.Rule{Gen: gen, Labels: labels}
		fit, err := budget.FitRule(rule, omenu, ob)
		if err != nil {
			return nil, Row{}, err
		}
		row, err := measure(ctx, rep, title, fit, s)
		return d, row, err
	}
	model := fmt.Sprintf("optimised for research: %s; grid step 1/%d with the base rate as a node", r.Model, r.Grid)
	if o.Design, o.Row, err = mk(r.Formula(), "best bounded rule for research"); err != nil {
		return err
	}
	o.Row.Name = "best for research"
	o.Design.Title = "best bounded rule for research (" + model + ")"
	if o.MixDesign, o.MixRow, err = mk(r.Mix(s.Mix), "mix"); err != nil {
		return err
	}
	o.MixRow.Name = fmt.Sprintf("best + %g%% quadratic", 100*s.Mix)
	o.MixDesign.Title = fmt.Sprintf("best bounded rule for research mixed with %g %% of the quadratic rule, strictly proper (%s)", 100*s.Mix, model)
	o.MixCost = o.Row.Gain.PerForecast - o.MixRow.Gain.PerForecast
	rep.Optimum = o
	return nil
}

// studyMenu is the menu the rules are fitted on: the Spec's, else the
// budget's step menu (ErrNoStep with neither).
func studyMenu(n int, b design.Budget, s Spec) (*budget.Menu, error) {
	if s.Menu == nil && !(b.Step > 0) {
		return nil, ErrNoStep
	}
	if !(b.Cap > b.Floor) {
		return nil, fmt.Errorf("study: the cap %g must be above the floor %g", b.Cap, b.Floor)
	}
	if s.Menu != nil {
		return s.Menu, nil
	}
	return budget.StepMenu(n, b.Step, b.ReportFloor)
}

// optimumBase is the menu the best rule's fit starts from: the step menu
// without a report floor, or the given menu's reports with the vertices
// added (the best rule's pieces reach them, and the fit must see them).
func optimumBase(n int, b design.Budget, m *budget.Menu) (*budget.Menu, error) {
	if m == nil {
		return budget.StepMenu(n, b.Step, 0)
	}
	reports := append([][]float64(nil), m.Reports...)
	for i := 0; i < n; i++ {
		v := make([]float64, n)
		v[i] = 1
		reports = append(reports, v)
	}
	return &budget.Menu{Reports: reports, Desc: m.Desc + " and the vertices"}, nil
}

func notes(rep *Report, s Spec, b design.Budget) []string {
	var out []string
	per := "1 forecast"
	if f := max(s.Forecasts, 1); f > 1 {
		per = fmt.Sprintf("%d forecasts", f)
	}
	out = append(out, "gain = E[G(q)] - G(q0), G(q) = A - B·H(q) the truthful expected pay by the formula (unrounded); equal to B·E[D(q, q0)] without a clamp; per season: "+per)
	if below := s.Model.BelowFloor(b.ReportFloor); below > 0 {
		out = append(out, fmt.Sprintf("%.3g %% of the posteriors give an outcome less than the report floor %g: those reports are off the menu, paid by the formula, and may pay outside [floor, cap]", 100*below, b.ReportFloor))
	}
	if o := rep.Optimum; o != nil {
		out = append(out, fmt.Sprintf("the best rule is grid evidence: best over G piecewise linear on a grid of step 1/%d (%d nodes, %d cells) with the base rate as a node, found by gonum's simplex method; payments over every report within [%g, %g]", o.Result.Grid, o.Result.Nodes, o.Result.Cells, b.Floor, b.Cap))
		if b.ReportFloor > 0 {
			out = append(out, fmt.Sprintf("the best rule pays within [%g, %g] at every report, so its design is written without the report floor %g", b.Floor, b.Cap, b.ReportFloor))
		}
		out = append(out, fmt.Sprintf("the best rule is proper but not strictly: reports on one side of its bends tie; mixing in %g %% of the quadratic rule makes it strictly proper and costs %.4g per forecast of research gain; a payment table of the best rule itself fails the menu re-check for those ties, so a contract should use the mix", 100*o.Mix, o.MixCost))
	}
	if len(rep.Labels) == 2 && s.Steps {
		out = append(out, fmt.Sprintf("step by step: each observation costs %g; the forecaster starts from Beta(%.4g, %.4g) about the true chance and stops when going on no longer pays (dynamic programming, at most %d observations); error = E|report - true chance|, the quantity the incentivization index of Neyman, Noarov & Weinberg (EC 2021) measures, here at this cost", s.Cost, rep.StepsPrior[0], rep.StepsPrior[1], maxSteps(s)))
	}
	if len(rep.Labels) > 2 && s.Steps {
		out = append(out, "step-by-step research is modelled for one yes/no question (n = 2) only")
	}
	if len(rep.Labels) > 3 && s.Optimum {
		out = append(out, "the best bounded rule is found for 2 or 3 outcomes only")
	}
	return out
}

func maxSteps(s Spec) int {
	if s.MaxSteps == 0 {
		return steps.DefaultMaxSteps
	}
	return s.MaxSteps
}

// Best returns the row with the largest gain per forecast (nil when none).
func (r *Report) Best() *Row {
	var best *Row
	for i := range r.Rows {
		if best == nil || r.Rows[i].Gain.PerForecast > best.Gain.PerForecast {
			best = &r.Rows[i]
		}
	}
	return best
}

// All lists the compared rows, then the optimum's two when present.
func (r *Report) All() []Row {
	out := append([]Row(nil), r.Rows...)
	if r.Optimum != nil {
		out = append(out, r.Optimum.Row, r.Optimum.MixRow)
	}
	return out
}

// FormatPrior writes the base rate.
func (r *Report) FormatPrior() string { return num.Format(r.Prior) }
