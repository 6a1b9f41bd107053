package tui

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"scorewright"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright/contract/cost"
	"scorewright/contract/research"
	"scorewright/contract/research/study"
	"scorewright/generator/design"
	"scorewright/internal/pool"
)

// researchField is one adjustable input of the research view, in ↑/↓
// order.
type researchField int

const (
	researchModel researchField = iota
	researchStrength
	researchBase
	researchSeason
	researchCost
	researchFieldCount
)

// ResearchInputs are what the research view's keys adjust.
type ResearchInputs struct {
	// Kind is the research model: "" (a Dirichlet posterior), "signal"
	// (one signal of stated accuracy) or "history" (the spread of the
	// forecasts in History, the history the backtest view loaded); Kappa
	// and Accuracy are the first two's strengths.
	Kind     string
	History  string
	Kappa    float64
	Accuracy float64
	// Base is the base rate's event probability for n = 2 (0: the
	// design's reference belief, else uniform); n > 2 always use those.
	Base float64
	// Forecasts per season; Cost per observation (n = 2; 0: off).
	Forecasts int
	Cost      float64
}

var (
	researchKappas    = []float64{0.5, 1, 2, 3, 5, 7, 10, 15, 20, 30, 50, 75, 100, 150, 200}
	researchForecasts = []int{1, 10, 20, 50, 100, 200, 500, 1000, 5000}
	// researchCosts are the observation prices as shares of the budget's
	// range cap - floor.
	researchCosts = []float64{0, 0.0005, 0.001, 0.002, 0.005, 0.01, 0.02, 0.05}
)

// defaultResearchInputs starts at the contract's forecasts a season when
// the design states them (what its season costs), else at 100.
func defaultResearchInputs(d *design.Design) ResearchInputs {
	in := ResearchInputs{Kappa: 10, Accuracy: 0.75, Forecasts: 100}
	if d != nil && d.Contract.Forecasts > 0 {
		in.Forecasts = d.Contract.Forecasts
	}
	return in
}

// baseRate is the base rate the inputs give for design d.
func (in ResearchInputs) baseRate(d *design.Design) []float64 {
	n := d.N()
	if n == 2 && in.Base > 0 {
		return []float64{in.Base, 1 - in.Base}
	}
	// The base rate the annex's cost is priced at, as the command's
	// research takes it: the contract's, else the budget's reference
	// belief, else uniform.
	return cost.SeasonOf(d).BaseRate
}

// baseRateFrom says where the design's base rate comes from, briefly,
// for the inputs line; "" when the inputs give their own.
func (in ResearchInputs) baseRateFrom(d *design.Design) string {
	n := d.N()
	switch {
	case n == 2 && in.Base > 0:
		return ""
	case len(d.Contract.BaseRate) == n:
		return " (the buyer's)"
	case len(d.Budget.Reference) == n:
		return " (the budget's reference)"
	}
	return " (uniform)"
}

// Messages of a research run, each wrapped with its run id.
type (
	researchProgressMsg struct {
		stage       string
		done, total int
	}
	researchDoneMsg struct {
		rep *study.Report
		err error
	}
	researchRunMsg struct {
		run uint64
		msg tea.Msg
	}
)

// researchCmd runs the study of design d with the inputs in the
// background, as `scorewright research` runs it (contract/research/study).
func researchCmd(ctx context.Context, run uint64, d *design.Design, in ResearchInputs) tea.Cmd {
	tag := func(m tea.Msg) tea.Msg { return researchRunMsg{run: run, msg: m} }
	return runStream(ctx, func(send func(tea.Msg, bool)) {
		rep, err := researchRun(ctx, d, in, func(p pool.Step) {
			send(tag(researchProgressMsg{p.Stage, int(p.Done), int(p.Total)}), false)
		})
		send(tag(researchDoneMsg{rep: rep, err: err}), true)
	})
}

// researchRun is the work of researchCmd.
func researchRun(ctx context.Context, d *design.Design, in ResearchInputs, progress pool.Progress) (*study.Report, error) {
	rule, err := designRule(d)
	var needs *scorewright.NeedsOutcomesError
	if errors.As(err, &needs) {
		return nil, fmt.Errorf("the research view works on rules over outcomes (generator or emphasis designs); this is a %s design", modeName(d))
	} else if err != nil {
		return nil, err
	}
	q0 := in.baseRate(d)
	var model *research.Posterior
	switch in.Kind {
	case "history":
		if model, err = historyModel(in.History, d.Labels); err != nil {
			return nil, err
		}
	case "signal":
		c, err := research.Accuracy(d.N(), in.Accuracy)
		if err != nil {
			return nil, err
		}
		model, err = research.Signal(q0, c)
		if err != nil {
			return nil, err
		}
	default:
		if model, err = research.Dirichlet(q0, in.Kappa, research.Quadrature{}); err != nil {
			return nil, err
		}
	}
	name := "this design"
	if d.Preset != "" {
		name = d.Preset + " (design)"
	}
	b := d.Budget
	spec := study.Spec{Model: model, Rule: rule, RuleName: name, Forecasts: in.Forecasts, Optimum: true, Progress: progress}
	if b.Menu != "" {
		// The design's menu file is the menu its table is made on and the
		// contract pays, as the backtest pays on it: the rules are
		// compared on it too.
		r, err := outcomesRule(d)
		if err != nil {
			return nil, err
		}
		if spec.Menu, err = r.TableMenu(); err != nil {
			return nil, err
		}
	}
	if d.N() == 2 && in.Cost > 0 {
		spec.Steps, spec.Cost = true, in.Cost*(b.Cap-b.Floor)
	}
	rep, err := study.Run(ctx, d.Labels, b, spec)
	var re *study.RuleError
	switch {
	case errors.Is(err, study.ErrMeanPay):
		return nil, errors.New("rules are compared at one floor and cap: give the budget a cap instead of a mean pay")
	case errors.Is(err, study.ErrNoStep):
		return nil, errors.New("set a report menu step (Step) or a menu file (Menu) in the budget: the rules are fitted on the menu, as the table is")
	case errors.As(err, &re):
		return nil, fmt.Errorf("the design's rule does not fit the budget: %v", re.Err)
	}
	return rep, err
}

// ResearchRoom is the research view: what research is worth under the
// design's rule and the known rules at the design's floor and cap, and
// the best bounded rule for it. It owns its inputs, its runs (a run id,
// the design generation it is for, a cancel function) and its drawing;
// the root model opens it, forwards keys and run messages, and tells it
// when the design changed.
type ResearchRoom struct {
	st   Styles
	keys KeyMap
	w, h int

	shown bool
	in    ResearchInputs
	sel   researchField

	job     job // the latest study's run id and cancel (tui/job.go)
	forIn   ResearchInputs
	started bool

	running     bool
	stage       string
	done, total int
	res         *study.Report
	err         error
	stale       bool
}

// NewResearchRoom returns a closed research view.
func NewResearchRoom(st Styles, keys KeyMap, d *design.Design) *ResearchRoom {
	return &ResearchRoom{st: st, keys: keys, in: defaultResearchInputs(d)}
}

// Shown reports whether the view is open.
func (r *ResearchRoom) Shown() bool { return r.shown }

// Close closes the view (a running study goes on; its answer is kept).
func (r *ResearchRoom) Close() { r.shown = false }

// Result is the last finished study, or nil.
func (r *ResearchRoom) Result() *study.Report { return r.res }

// Running reports whether a study is in progress.
func (r *ResearchRoom) Running() bool { return r.running }

// Inputs are the view's current inputs.
func (r *ResearchRoom) Inputs() ResearchInputs { return r.in }

// SetSize gives the view its cells.
func (r *ResearchRoom) SetSize(w, h int) { r.w, r.h = w, h }

// KeyHelp lists the view's keys for the help line.
func (r *ResearchRoom) KeyHelp() []key.Binding {
	k := r.keys
	return []key.Binding{k.Up, k.Down, k.Less, k.More, k.LessFine, k.MoreFine, k.Leave}
}

// Toggle opens or closes the view; opening starts a study when the last
// one is not for this design and these inputs (ready: the design is
// compiled and debounced).
func (r *ResearchRoom) Toggle(ctx context.Context, d *design.Design, gen uint64, ready bool) tea.Cmd {
	if r.shown {
		r.shown = false
		return nil
	}
	r.shown = true
	return r.Maybe(ctx, d, gen, ready)
}

// SetHistory gives the view the forecast history the backtest view
// loaded, which the model input then offers as a third research model.
func (r *ResearchRoom) SetHistory(path string) { r.in.History = path }

// historyModel reads the spread of a history's forecasts for labels.
func historyModel(path string, labels []string) (*research.Posterior, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	p, _, err := research.History(f, labels)
	return p, err
}

// Edited tells the view the design changed: the running study is
// cancelled and its answers will be dropped, the shown one marked as for
// the previous design; the base rate goes back to the design's when the
// outcome count changed.
func (r *ResearchRoom) Edited(d *design.Design) {
	r.job.drop()
	r.running = false
	r.stale = r.res != nil
	if r.res != nil && len(r.res.Labels) != d.N() {
		r.in.Base = 0
	}
}

// Maybe starts a study when the view is open, the design is ready and
// the last study is not for this generation and these inputs.
func (r *ResearchRoom) Maybe(ctx context.Context, d *design.Design, gen uint64, ready bool) tea.Cmd {
	if !r.shown || !ready {
		return nil
	}
	if r.started && r.job.gen == gen && r.forIn == r.in {
		return nil
	}
	c, run := r.job.start(ctx, gen)
	r.started, r.forIn = true, r.in
	r.running, r.stage, r.done, r.total, r.err = true, "starting", 0, 0, nil
	r.stale = r.res != nil
	return researchCmd(c, run, cloneDesign(d), r.in)
}

// Msg takes a message of a study; those of an older run are dropped.
func (r *ResearchRoom) Msg(msg researchRunMsg) {
	if !r.job.current(msg.run) {
		return
	}
	switch inner := msg.msg.(type) {
	case researchProgressMsg:
		r.stage, r.done, r.total = inner.stage, inner.done, inner.total
	case researchDoneMsg:
		if errors.Is(inner.err, context.Canceled) {
			return
		}
		r.job.finished()
		r.running = false
		if inner.err != nil {
			r.err = inner.err
			return
		}
		r.res, r.err, r.stale = inner.rep, nil, false
	}
}

// Update handles a key while the view is open. handled false means the root
// should treat it (global keys).
func (r *ResearchRoom) Update(ctx context.Context, km tea.KeyMsg, d *design.Design, gen uint64, ready bool) (handled bool, cmd tea.Cmd) {
	k := r.keys
	switch {
	case key.Matches(km, k.Leave), key.Matches(km, k.Research):
		r.shown = false
		return true, nil
	case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
		r.shown = false
		return false, nil
	}
	moved, step, up, fine := fieldKey(k, km, &r.sel, researchFieldCount)
	switch {
	case moved:
		return true, nil
	case step && researchStep(&r.in, r.sel, d, up, fine):
		return true, r.Maybe(ctx, d, gen, ready)
	}
	return step, nil
}

// inputsLine shows the inputs, the selected one marked.
func (r *ResearchRoom) inputsLine(d *design.Design) []string {
	in := r.in
	model, strength := in.modelWords()
	base := "base rate " + formatBelief(in.baseRate(d)) + in.baseRateFrom(d)
	if in.Kind == "history" {
		base = "base rate: the mean forecast"
		if r := r.res; r != nil && len(r.Prior) == d.N() {
			base += " " + formatBelief(r.Prior)
		}
	}
	cost := "observations: off"
	if d.N() == 2 && in.Cost > 0 {
		cost = fmt.Sprintf("observation %.4g", in.Cost*(d.Budget.Cap-d.Budget.Floor))
	} else if d.N() != 2 {
		cost = "observations: n = 2 only"
	}
	items := []string{"model " + model, strength, base, fmt.Sprintf("%d a season", in.Forecasts), cost}
	for i, s := range items {
		if researchField(i) == r.sel {
			items[i] = r.st.Selected.Render("▸" + s)
		} else {
			items[i] = " " + s
		}
	}
	return wrapItems(items, max(10, r.w-2))
}

// modelWords name the research model and its strength, as the inputs
// line and the status line show them.
func (in ResearchInputs) modelWords() (model, strength string) {
	switch in.Kind {
	case "signal":
		return "signal", fmt.Sprintf("accuracy %g", in.Accuracy)
	case "history":
		return "history", filepath.Base(in.History)
	}
	return "Dirichlet", fmt.Sprintf("kappa %g", in.Kappa)
}

// wrapItems joins items with two spaces into lines no wider than w.
func wrapItems(items []string, w int) []string {
	var lines []string
	cur := ""
	for _, it := range items {
		if cur != "" && visibleWidth(cur)+2+visibleWidth(it) > w {
			lines = append(lines, cur)
			cur = ""
		}
		if cur != "" {
			cur += "  "
		}
		cur += it
	}
	return append(lines, cur)
}

func formatBelief(q []float64) string {
	parts := make([]string, len(q))
	for i, v := range q {
		parts[i] = fmt.Sprintf("%.3g", v)
	}
	return "(" + strings.Join(parts, ", ") + ")"
}
