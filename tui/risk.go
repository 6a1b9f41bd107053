package tui

import (
	"context"
	"errors"
	"fmt"
	"math"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/progress"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright"
	"scorewright/contract/budget"
	"scorewright/contract/risk"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/pool"
)

// riskField is one adjustable input of the risk view, in ↑/↓ order.
type riskField int

const (
	riskFamily riskField = iota
	riskCoef
	riskWealth
	riskBelief
	riskFieldCount
)

// RiskInputs are what the risk view's keys adjust: the forecaster's
// utility of money, initial wealth and the belief shown in detail.
type RiskInputs struct {
	// Kind is risk.CRRA or risk.CARA; Coef its coefficient (0 linear).
	Kind risk.Kind
	Coef float64
	// Wealth is the initial wealth; utility is of Wealth + pay.
	Wealth float64
	// Belief is the belief shown in detail (nil: the budget's reference
	// belief, else uniform).
	Belief []float64
}

// Utility is the inputs' utility.
func (in RiskInputs) Utility() risk.Utility { return risk.Utility{Kind: in.Kind, Coef: in.Coef} }

// RiskResult is what a finished risk run shows.
type RiskResult struct {
	Inputs RiskInputs
	Labels []string
	// Pay says how pay follows from effort and where it was fitted.
	Pay string
	// Chosen is the best report for the chosen belief (nil when the search
	// could not settle it: ChosenErr says why); MenuPick the menu item a
	// forecaster held to the rounded table picks (nil without a menu).
	Chosen    *risk.Result
	ChosenErr error
	MenuPick  []float64
	// Curve is the distortion over Beliefs; Toward names each belief's
	// direction for n > 2 (the outcome index it heads for).
	Curve  *risk.Curve
	Toward []int
	Along  string
}

// Messages of a risk run, each wrapped in a riskRunMsg with its run id.
type (
	riskProgressMsg struct{ done, total float64 }
	riskDoneMsg     struct {
		res *RiskResult
		err error
	}
	riskRunMsg struct {
		run uint64
		msg tea.Msg
	}
)

// riskCmd computes, for design d and the inputs, the chosen belief's best
// report and the distortion curve, fitted as `scorewright distort` fits
// (Rule.FitSteps, Rule.Distort).
func riskCmd(ctx context.Context, run uint64, d *design.Design, in RiskInputs) tea.Cmd {
	tag := func(m tea.Msg) tea.Msg { return riskRunMsg{run: run, msg: m} }
	return runStream(ctx, func(send func(tea.Msg, bool)) {
		res, err := riskRun(ctx, d, in, func(p pool.Step) { send(tag(riskProgressMsg{p.Done, p.Total}), false) })
		send(tag(riskDoneMsg{res: res, err: err}), true)
	})
}

// riskRun is the work of riskCmd.
func riskRun(ctx context.Context, d *design.Design, in RiskInputs, progress pool.Progress) (*RiskResult, error) {
	rule, err := outcomesRule(d)
	var needs *scorewright.NeedsOutcomesError
	if errors.As(err, &needs) {
		return nil, fmt.Errorf("the risk view works on rules over outcomes (generator or emphasis designs); this is a %s design", modeName(d))
	} else if err != nil {
		return nil, err
	}
	fitted, err := rule.FitSteps(d.Budget)
	var ue *budget.UnboundedError
	switch {
	case errors.As(err, &ue) && ue.AtZero:
		return nil, fmt.Errorf("the rule's effort is %v at report %s when %q happens: it is unbounded where a report gives an outcome probability 0; give the design a report floor (R.floor in the budget pane, e.g. 0.01)", ue.Effort, num.Format(ue.Report), ue.Label)
	case err != nil:
		return nil, err
	}
	if minPay := scorewright.SmallestPay(fitted); in.Kind == risk.CRRA && in.Coef >= 1 && !(in.Wealth+minPay > 0) {
		return nil, fmt.Errorf("CRRA utility needs positive final wealth: initial wealth %g plus the smallest payment %g is not positive; raise the wealth", in.Wealth, minPay)
	}
	solver, err := rule.Distort(fitted, in.Utility(), in.Wealth)
	if err != nil {
		return nil, err
	}
	q := in.Belief
	if q == nil {
		q = scorewright.DefaultBelief(d.Budget, d.N())
	}
	// A belief the search cannot settle is shown on its own line; it
	// never takes the rest of the view with it.
	chosen, chosenErr := solver.Best(q)
	out := &RiskResult{Inputs: in, Labels: append([]string(nil), d.Labels...), Chosen: chosen, ChosenErr: chosenErr,
		MenuPick: solver.MenuPick(q), Pay: solver.PayLine()}
	if out.Curve, out.Toward, out.Along, err = solver.Curve(ctx, progress); err != nil {
		return nil, err
	}
	return out, nil
}

// modeName names a design's mode in words.
func modeName(d *design.Design) string {
	if d.Mode.Payout() {
		return "payout audit"
	}
	if d.Mode.OnInterval() {
		return "point-forecast"
	}
	return string(d.Mode)
}

// RiskView shows what a risk-averse or risk-seeking forecaster reports
// under the design's money payments: the inputs, the distortion curve
// (n = 2) or a table along the directions (n > 2), the chosen belief's
// best report and the note on lottery payments. It replaces the four
// panes while it is open.
type RiskView struct {
	st      Styles
	keys    KeyMap
	w, h    int
	sel     riskField
	bar     progress.Model
	running bool
	done    float64
	res     *RiskResult
	err     error
	stale   bool // the result is for earlier inputs or an earlier design
	// body is the view laid out by refresh, when a result, the size, the
	// inputs or the design changed; View only returns it.
	body string
	// in are the inputs shown; runFor those of the latest run. wealthSet
	// says the user stepped the wealth, so it no longer follows the
	// budget; coefs keeps each family's last coefficient.
	in, runFor RiskInputs
	wealthSet  bool
	coefs      map[risk.Kind]float64
}

// NewRiskView returns an empty risk view with the default inputs for d.
func NewRiskView(st Styles, keys KeyMap, d *design.Design) RiskView {
	bar := progress.New(progress.WithFillCharacters('█', '░'), progress.WithoutPercentage(), progress.WithSolidFill(barColour))
	return RiskView{st: st, keys: keys, bar: bar, in: defaultRiskInputs(d), coefs: map[risk.Kind]float64{}}
}

// Update takes the view's own keys: ↑/↓ choose an input, ←/→ step it (shift:
// a tenth). changed says the inputs changed, so a run is due.
func (v *RiskView) Update(km tea.KeyMsg, d *design.Design) (handled, changed bool) {
	moved, step, up, fine := fieldKey(v.keys, km, &v.sel, riskFieldCount)
	switch {
	case moved:
		return true, false
	case !step:
		return false, false
	case !riskStep(&v.in, v.sel, d, up, fine, v.coefs):
		return true, false
	}
	if v.sel == riskWealth {
		v.wealthSet = true
	}
	return true, true
}

// designChanged keeps the inputs fitting an edited design: the wealth
// follows the budget until the user steps it, and a belief for another
// number of outcomes is dropped.
func (v *RiskView) designChanged(d *design.Design) {
	if !v.wealthSet {
		v.in.Wealth = defaultRiskInputs(d).Wealth
	}
	if v.in.Belief != nil && len(v.in.Belief) != d.N() {
		v.in.Belief = nil
	}
}

// newDesign lets the wealth follow the budget of a design put in place of
// the old one, and drops the belief.
func (v *RiskView) newDesign() { v.wealthSet, v.in.Belief = false, nil }

// inputsChanged reports whether the inputs differ from the latest run's.
func (v RiskView) inputsChanged() bool { return !sameInputs(v.runFor, v.in) }

// SetSize sets the outer size of the view.
func (v *RiskView) SetSize(w, h int) {
	v.w, v.h = w, h
	v.bar.Width = max(10, min(30, w-40))
}

// KeyHelp lists the view's keys.
func (v RiskView) KeyHelp() []key.Binding {
	k := v.keys
	return []key.Binding{key.NewBinding(key.WithKeys(k.Leave.Keys()...), key.WithHelp("esc", "close")),
		key.NewBinding(key.WithKeys(k.Up.Keys()...), key.WithHelp("↑/↓", "input")),
		key.NewBinding(key.WithKeys(k.More.Keys()...), key.WithHelp("←/→", "step (shift: small)"))}
}

// Result is the last finished result, or nil.
func (v RiskView) Result() *RiskResult { return v.res }

// Running reports whether a risk run is in progress.
func (v RiskView) Running() bool { return v.running }

func (v *RiskView) started() {
	v.running, v.done, v.err, v.stale, v.runFor = true, 0, nil, v.res != nil, v.in
}

// edited marks the result as being for an earlier design.
func (v *RiskView) edited() {
	v.stale = v.res != nil
	v.running = false
}

func (v *RiskView) progressed(done, total float64) {
	if total > 0 {
		v.done = done / total
	}
}

func (v *RiskView) finished(r *RiskResult, err error) {
	v.running, v.err = false, err
	if err == nil {
		v.res, v.stale = r, false
	}
}

// riskSteps are the steps of the inputs, from the design's pay range:
// wealth in tenths of it, CARA's coefficient around 1/range (absolute
// risk aversion is per unit of money), CRRA's in halves.
type riskSteps struct{ wealth, cara, crra float64 }

// payRange is the spread of the design's payments as its budget states
// them (cap or mean pay minus floor; 1 when that is not positive).
func payRange(b design.Budget) float64 {
	top := b.Cap
	if b.MeanPay != nil {
		top = *b.MeanPay
	}
	if r := top - b.Floor; r > 0 && !math.IsInf(r, 0) {
		return r
	}
	return 1
}

func stepsFor(b design.Budget) riskSteps {
	r := payRange(b)
	return riskSteps{wealth: niceStep(r / 10), cara: niceStep(1 / (2 * r)), crra: 0.5}
}

// defaultRiskInputs are the inputs the view starts with for design d:
// CRRA 1 (log utility) and an initial wealth of one pay range, so that
// final wealth stays positive under any payment of the budget.
func defaultRiskInputs(d *design.Design) RiskInputs {
	return RiskInputs{Kind: risk.CRRA, Coef: 1, Wealth: payRange(d.Budget)}
}

// riskStep changes the selected input of in by one step (fine: a tenth)
// up or down; for the belief of n > 2 it moves through the curve's
// beliefs. It returns whether anything changed.
func riskStep(in *RiskInputs, f riskField, d *design.Design, up, fine bool, family map[risk.Kind]float64) bool {
	s := stepsFor(d.Budget)
	sign := 1.0
	if !up {
		sign = -1
	}
	tenth := 1.0
	if fine {
		tenth = 0.1
	}
	round := func(x, step float64) float64 { return math.Round(x/step*1e6) / 1e6 * step }
	switch f {
	case riskFamily:
		family[in.Kind] = in.Coef
		if in.Kind == risk.CRRA {
			in.Kind = risk.CARA
		} else {
			in.Kind = risk.CRRA
		}
		c, ok := family[in.Kind]
		if !ok {
			c = 2 * s.cara // about 1/range: CRRA 1 at a wealth of one range
		}
		in.Coef = c
	case riskCoef:
		st := s.crra
		if in.Kind == risk.CARA {
			st = s.cara
		}
		in.Coef = round(in.Coef+sign*st*tenth, st*tenth)
	case riskWealth:
		in.Wealth = round(in.Wealth+sign*s.wealth*tenth, s.wealth*tenth)
	case riskBelief:
		return stepBelief(in, d, up, fine)
	}
	return true
}

// stepBelief moves the chosen belief: for n = 2 the event probability by
// 0.05 (fine 0.01) inside the report floor; for n > 2 to the next or
// previous belief of the uniform one and the curve's.
func stepBelief(in *RiskInputs, d *design.Design, up, fine bool) bool {
	floor := math.Max(d.Budget.ReportFloor, 0.01)
	q := in.Belief
	if q == nil {
		q = scorewright.DefaultBelief(d.Budget, d.N())
	}
	if d.N() == 2 {
		st := 0.05
		if fine {
			st = 0.01
		}
		if !up {
			st = -st
		}
		x := math.Round((q[0]+st)*100) / 100
		x = math.Min(1-floor, math.Max(floor, x))
		if x == q[0] {
			return false
		}
		in.Belief = []float64{x, 1 - x}
		return true
	}
	beliefs, _, _ := risk.CurveBeliefs(d.N(), d.Budget.ReportFloor)
	list := append([][]float64{scorewright.DefaultBelief(d.Budget, d.N())}, beliefs...)
	at := 0
	for i, b := range list {
		if sameVector(b, q) {
			at = i
		}
	}
	if up {
		at = (at + 1) % len(list)
	} else {
		at = (at + len(list) - 1) % len(list)
	}
	in.Belief = list[at]
	return true
}

func sameVector(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12 {
			return false
		}
	}
	return true
}
