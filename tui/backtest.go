package tui

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/progress"
	"github.com/charmbracelet/bubbles/viewport"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright"
	"scorewright/contract/backtest"
	"scorewright/contract/backtest/history"
	"scorewright/generator/design"
	"scorewright/internal/numfmt"
	"scorewright/internal/pool"
	"scorewright/tui/reliability"
)

// shownSkipped is how many skipped rows the backtest view lists.
const shownSkipped = 3

// fewPerBin is the mean number of forecasts per bin below which the view
// warns that the decomposition rests on few outcomes, as the command does.
const fewPerBin = 5

// BacktestResult is what a finished backtest shows: the run, the rule's
// pay formula and budget, and the notes the command would print.
type BacktestResult struct {
	Path   string
	Labels []string
	Result *backtest.Result
	Pay    string // how pay follows from effort
	Menu   string
	Budget string
	Notes  []string
	// Curves are the PAV reliability curves with consistency bands (two
	// outcomes), made once in the background with the run.
	Curves  []backtest.Curve
	decimal int // currency decimals; -1 unrounded
}

// Messages of a backtest run, each wrapped in a btRunMsg with its run id.
type (
	// btStartedMsg: the file opened and its header fits the design.
	btStartedMsg  struct{ path string }
	btProgressMsg struct{ done float64 }
	btDoneMsg     struct {
		res *BacktestResult
		err error
		// file says the error is the history file's (it did not open or
		// its header does not fit), not the design's.
		file bool
	}
	btRunMsg struct {
		run uint64
		gen uint64
		msg tea.Msg
	}
)

// backtestCmd replays the history at path under design d, paid as its
// fitted table pays (Rule.FitMenu, as `scorewright
// backtest` pays), sending a start, progress and the result.
func backtestCmd(ctx context.Context, run, gen uint64, d *design.Design, path string) tea.Cmd {
	tag := func(m tea.Msg) tea.Msg { return btRunMsg{run: run, gen: gen, msg: m} }
	return runStream(ctx, func(send func(tea.Msg, bool)) {
		f, err := os.Open(path)
		if err != nil {
			send(tag(btDoneMsg{err: err, file: true}), true)
			return
		}
		defer f.Close()
		var size int64
		if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
			size = st.Size()
		}
		h, err := history.Open(bufio.NewReaderSize(f, 1<<16), history.FormatOf(path), d.Labels, history.Options{})
		if err != nil {
			send(tag(btDoneMsg{err: fmt.Errorf("%s: %w", filepath.Base(path), err), file: true}), true)
			return
		}
		send(tag(btStartedMsg{path: path}), true)
		res, err := replay(ctx, d, h, path, size, func(p pool.Step) { send(tag(btProgressMsg{done: p.Fraction()}), false) })
		send(tag(btDoneMsg{res: res, err: err}), true)
	})
}

// replay fits d to its budget and runs the history through it.
func replay(ctx context.Context, d *design.Design, h *history.Reader, path string, size int64, progress pool.Progress) (*BacktestResult, error) {
	r, err := outcomesRule(d)
	if err != nil {
		return nil, fmt.Errorf("a backtest replays a rule over outcomes: %w", err)
	}
	// The table's own menu (a menu file, else the step) and clamp: the
	// backtest pays as the table does, and as `scorewright backtest
	// --design` pays.
	fitted, err := r.FitTable(ctx)
	if errors.Is(err, scorewright.ErrNoMenu) {
		return nil, errors.New("set a report menu step (Step) or a menu file (Menu) in the budget: the backtest pays as the table does")
	}
	if err != nil {
		return nil, err
	}
	opt := backtest.Options{Size: size}
	if size > 0 {
		opt.Progress = progress
	}
	res, err := scorewright.Backtest(ctx, h, []backtest.Scheme{scorewright.Scheme("A", fitted)}, opt)
	if err != nil {
		return nil, err
	}
	// The view shows only the detailed forecasters, which the Result
	// holds; the temporary file of a large history can go now.
	res.Close()
	if res.Rows == 0 {
		msg := fmt.Sprintf("%s has no valid forecasts", filepath.Base(path))
		if res.SkippedCount > 0 {
			msg += fmt.Sprintf(" (%d rows skipped; the first, line %d: %s)", res.SkippedCount, res.Skipped[0].Line, res.Skipped[0].Why)
		}
		return nil, errors.New(msg)
	}
	fit := fitted.Fit
	out := &BacktestResult{Path: path, Labels: append([]string(nil), d.Labels...), Result: res, Pay: fitted.PayFormula(),
		Menu: fit.MenuDesc(), Budget: fit.BudgetDesc(), Notes: fitted.Notes, decimal: fit.Decimals()}
	if len(d.Labels) == 2 {
		out.Curves = scorewright.ReliabilityCurves(res)
	}
	if fitted.Warning != "" {
		out.Notes = append(out.Notes, fitted.Warning)
	}
	if m := res.All[0]; m.OffMenu > 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("%d of %d forecasts are off the report menu; they are paid by the formula", m.OffMenu, m.Count))
	}
	if mp := d.Budget.MeanPay; mp != nil {
		n := res.All[0].Count
		out.Notes = append(out.Notes, fmt.Sprintf("the budget aims at %s per forecast from a truthful forecaster at its reference belief, %s for %d forecasts; paid %s",
			out.cash(*mp), out.cash(*mp*float64(n)), n, out.cash(res.All[0].Total)))
	}
	var thin []string
	for _, f := range res.Forecasters {
		if len(f.Bins) > 0 && f.Count < fewPerBin*len(f.Bins) {
			thin = append(thin, fmt.Sprintf("%s (%d forecasts in %d bins)", f.Name, f.Count, len(f.Bins)))
		}
	}
	if len(thin) > 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("fewer than %d forecasts per bin on average for %s: resolution and reliability rest on few outcomes each and read high (the split stays exact, the terms are noisy)",
			fewPerBin, strings.Join(thin, ", ")))
	}
	if m := res.All[0]; m.NonFinite > 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("%d payments are not finite (first on line %d); totals include them", m.NonFinite, m.FirstNonFinite))
	}
	return out, nil
}

// BacktestView shows a backtest: progress while it runs, then the
// reliability picture (n = 2), pay per forecaster with the decomposition,
// and the skipped rows. It replaces the four panes while it is open.
type BacktestView struct {
	st      Styles
	keys    KeyMap
	w, h    int
	path    string // the history loaded ("" none)
	bar     progress.Model
	running bool
	done    float64
	res     *BacktestResult
	err     error
	stale   bool // the result is for an earlier design
	stopped bool // the user stopped the run
	vp      viewport.Model
	text    string // the text under the picture, laid out for w
	picture string // the reliability picture, drawn for w when the result or size changes
}

// NewBacktestView returns an empty backtest view.
func NewBacktestView(st Styles, keys KeyMap) BacktestView {
	bar := progress.New(progress.WithFillCharacters('█', '░'), progress.WithoutPercentage(), progress.WithSolidFill(barColour))
	vp := viewport.New(10, 3)
	vp.KeyMap = viewport.KeyMap{Up: keys.Up, Down: keys.Down, PageUp: keys.PageUp, PageDown: keys.PageDown}
	return BacktestView{st: st, keys: keys, bar: bar, vp: vp}
}

// SetSize sets the outer size of the view.
func (v *BacktestView) SetSize(w, h int) {
	v.w, v.h = w, h
	v.bar.Width = max(10, min(40, w-30))
	v.relayout()
}

// KeyHelp lists the view's keys.
func (v BacktestView) KeyHelp() []key.Binding {
	k := v.keys
	return []key.Binding{key.NewBinding(key.WithKeys(k.Leave.Keys()...), key.WithHelp("esc", "close")),
		key.NewBinding(key.WithKeys(k.History.Keys()...), key.WithHelp("l", "load history")),
		key.NewBinding(key.WithKeys(k.StopRun.Keys()...), key.WithHelp("x", "stop")),
		key.NewBinding(key.WithKeys(k.PageDown.Keys()...), key.WithHelp("pgup/pgdn", "scroll"))}
}

// Result is the last finished result, or nil.
func (v BacktestView) Result() *BacktestResult { return v.res }

// Running reports whether a backtest is being read.
func (v BacktestView) Running() bool { return v.running }

func (v *BacktestView) started(path string) {
	v.path, v.running, v.done, v.stopped, v.err = path, true, 0, false, nil
	v.relayout()
}

func (v *BacktestView) progressed(done float64) { v.done = done }

func (v *BacktestView) finished(r *BacktestResult, err error) {
	v.running, v.err = false, err
	if err == nil {
		v.res, v.stale = r, false
	}
	v.relayout()
}

// edited marks the result as being for an earlier design.
func (v *BacktestView) edited() {
	v.stale = v.res != nil
	v.running = false
}

func (v *BacktestView) stop() {
	v.running, v.stopped = false, true
}

func (v BacktestView) Update(km tea.KeyMsg) BacktestView {
	v.vp, _ = v.vp.Update(km)
	return v
}

// pictureSize is the size of the reliability picture inside the frame.
func (v BacktestView) pictureSize() (int, int) {
	iw, ih := max(0, v.w-2), max(0, v.h-2)
	return min(iw, 84), max(reliability.MinHeight, min(20, (ih-2)*45/100))
}

// hasPicture reports whether the result gets a reliability picture.
func (v BacktestView) hasPicture() bool { return v.res != nil && len(v.res.Labels) == 2 }

func (v *BacktestView) relayout() {
	iw, ih := max(4, v.w-2), max(1, v.h-2)
	v.vp.Width = iw
	top := 1 // the status line
	if v.hasPicture() {
		_, ph := v.pictureSize()
		top += ph
	}
	v.vp.Height = max(1, ih-top)
	v.text = v.resultText(iw)
	v.vp.SetContent(v.text)
	v.picture = ""
	if v.hasPicture() {
		pw, ph := v.pictureSize()
		ch := reliability.New(v.res.Labels[0], v.res.Curves)
		ch.Styles = reliability.Styles{Axis: v.st.Dim, Label: v.st.Label, Diagonal: v.st.Dim, Series: v.st.Series[:]}
		v.picture = ch.View(pw, ph)
	}
}

// resultText is the scrollable text: pay per forecaster, decomposition,
// skipped rows and notes.
func (v BacktestView) resultText(width int) string {
	r := v.res
	if r == nil {
		return ""
	}
	st := v.st
	res := r.Result
	var b strings.Builder
	wrap := st.Dim.Width(max(10, width))
	if len(r.Labels) != 2 {
		b.WriteString(wrap.Render(fmt.Sprintf("no reliability picture: it is drawn for 2 outcomes and this design has %d; totals and the decomposition follow", len(r.Labels))) + "\n")
	}
	b.WriteString(wrap.Render(r.Pay+"; "+r.Budget+"; "+r.Menu) + "\n")
	rows := [][]string{{"forecaster", "count", "total", "mean", "rank", "effort", "uncert.", "resol.", "reliab."}}
	for _, f := range res.Forecasters {
		d := f.Decomposition[0]
		s := math.Max(math.Abs(d.MeanEffort), math.Abs(d.Uncertainty))
		rows = append(rows, []string{f.Name, fmt.Sprint(f.Count), r.cash(f.Money[0].Total), numfmt.Statistic(f.Money[0].Mean, 0), fmt.Sprint(f.Rank[0]),
			numfmt.Statistic(d.MeanEffort, s), numfmt.Statistic(d.Uncertainty, s), numfmt.Statistic(d.Resolution, s), numfmt.Statistic(d.Reliability, s)})
	}
	all := res.All[0]
	rows = append(rows, []string{"all", fmt.Sprint(res.Rows), r.cash(all.Total), numfmt.Statistic(all.Mean, 0), "", numfmt.Statistic(all.MeanEffort, 0), "", "", ""})
	b.WriteString(rightTable(rows))
	b.WriteString(wrap.Render("total and mean pay per forecast; rank by mean pay, 1 best; effort is the mean effort = uncertainty - resolution + reliability; "+res.Forecasters[0].Binning.String()) + "\n")
	b.WriteString("\n" + corpTable(r))
	if res.SkippedCount > 0 {
		b.WriteString(fmt.Sprintf("\n%d rows skipped:\n", res.SkippedCount))
		for i, s := range res.Skipped {
			if i == shownSkipped {
				b.WriteString(st.Dim.Render(fmt.Sprintf("  … and %d more (scorewright backtest lists them)", res.SkippedCount-shownSkipped)) + "\n")
				break
			}
			b.WriteString(fmt.Sprintf("  %s: %s\n", (&history.RowError{Line: s.Line, EndLine: s.EndLine}).Where(), s.Why))
		}
	} else {
		b.WriteString("\nno rows skipped\n")
	}
	for _, n := range r.Notes {
		b.WriteString("\n" + st.Dim.Width(max(10, width)).Render("note: "+n))
	}
	return strings.TrimRight(b.String(), "\n")
}

// cash formats a payment with the table's currency decimals.
func (r *BacktestResult) cash(x float64) string {
	return numfmt.Amount(x, r.decimal)
}

// statusLine says where the view's content stands.
func (v BacktestView) statusLine() string {
	st := v.st
	name := filepath.Base(v.path)
	switch {
	case v.running:
		return v.bar.ViewAs(v.done) + fmt.Sprintf(" %3.0f%% reading %s", v.done*100, name) + st.Dim.Render("  x stops")
	case v.err != nil:
		return st.Error.Render("✗ " + strings.ReplaceAll(v.err.Error(), "\n", "; "))
	case v.res == nil && v.stopped:
		return st.Dim.Render("stopped; change the design or press " + v.keys.History.Help().Key + " to load a history")
	case v.res == nil:
		return st.Dim.Render("no history loaded: press " + v.keys.History.Help().Key + " and give a forecast-history CSV")
	}
	res := v.res.Result
	line := fmt.Sprintf("%s: %d forecasts, %d rows skipped", filepath.Base(v.res.Path), res.Rows, res.SkippedCount)
	switch {
	case v.stale && v.stopped:
		return line + st.Dim.Render(" (previous design; stopped — change the design to run again)")
	case v.stale:
		return line + st.Dim.Render(" (previous design; running again shortly)")
	}
	return line + st.Dim.Render(" (current design)")
}

// View draws the view from what relayout drew when the result or the
// size changed.
func (v BacktestView) View() string {
	st := v.st
	lines := []string{v.statusLine()}
	if v.picture != "" {
		lines = append(lines, strings.Split(v.picture, "\n")...)
	}
	lines = append(lines, v.vp.View())
	return paneFrame(st, "Backtest — what this rule would have paid", true, v.w, v.h, strings.Join(lines, "\n"))
}

// corpTable lists each forecaster's CORP decomposition: for two outcomes
// the rule's own effort on the first outcome, for more each outcome
// against the rest under the squared error.
func corpTable(r *BacktestResult) string {
	var b strings.Builder
	if len(r.Labels) == 2 {
		fmt.Fprintf(&b, "CORP (PAV recalibration, event %q): effort = MCB - DSC + UNC\n", r.Labels[0])
	} else {
		b.WriteString("CORP per outcome against the rest, squared error: score = MCB - DSC + UNC\n")
	}
	rows := [][]string{{"forecaster", "event", "score", "MCB", "DSC", "UNC"}}
	for _, f := range r.Result.Forecasters {
		for k, d := range f.CORP[0] {
			s := math.Max(math.Abs(d.Score), math.Abs(d.Uncertainty))
			rows = append(rows, []string{f.Name, r.Labels[k], numfmt.Statistic(d.Score, s), numfmt.Statistic(d.Miscalibration, s), numfmt.Statistic(d.Discrimination, s), numfmt.Statistic(d.Uncertainty, s)})
		}
	}
	b.WriteString(rightTable(rows))
	return b.String()
}
