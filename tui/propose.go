package tui

import (
	"context"
	"errors"
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"scorewright"
	"scorewright/contract/budget"
	"scorewright/generator/design"
	"scorewright/internal/numfmt"
	"scorewright/internal/pool"
)

// proposal is the budget pane's search for budgets the re-check passes
// with (budget.Propose), run in the background for one generation of the
// design and cancelled by any edit.
type proposal struct {
	run         uint64 // id of the latest search
	cancel      context.CancelFunc
	running     bool
	done, total float64
	props       []budget.Proposal
	err         error
}

// Messages of the proposal search, stamped with its run.
type (
	proposeProgressMsg struct {
		run         uint64
		done, total float64
	}
	proposeDoneMsg struct {
		run   uint64
		props []budget.Proposal
		err   error
	}
)

// stop cancels a running search and forgets what it found.
func (p *proposal) stop() {
	if p.cancel != nil {
		p.cancel()
		p.cancel = nil
	}
	p.run++ // answers of the old search are now stale
	p.running, p.props, p.err = false, nil, nil
}

// shown reports whether there is anything to show.
func (p *proposal) shown() bool { return p.running || p.props != nil || p.err != nil }

// proposeCmd searches for budgets that pass for design d (a private copy).
func proposeCmd(ctx context.Context, run uint64, d *design.Design) tea.Cmd {
	return runStream(ctx, func(send func(tea.Msg, bool)) {
		props, err := proposeFor(ctx, d, func(p pool.Step) {
			send(proposeProgressMsg{run: run, done: p.Done, total: p.Total}, false)
		})
		send(proposeDoneMsg{run: run, props: props, err: err}, true)
	})
}

// proposeFor opens the design and runs the search.
func proposeFor(ctx context.Context, d *design.Design, progress pool.Progress) ([]budget.Proposal, error) {
	r, err := scorewright.Open(d)
	if err != nil {
		return nil, err
	}
	return r.Propose(ctx, progress)
}

// budgetKey handles a key of the budget pane: the proposal keys, then the
// pane's own.
func (m *Model) budgetKey(km tea.KeyMsg) tea.Cmd {
	k, pr := m.keys, m.budget.prop
	if !m.budget.Typing() {
		switch {
		case key.Matches(km, k.Propose):
			pr.stop()
			ctx, cancel := context.WithCancel(m.ctx)
			pr.cancel, pr.running, pr.done, pr.total = cancel, true, 0, 0
			return proposeCmd(ctx, pr.run, cloneDesign(m.d))
		case pr.props != nil && (key.Matches(km, k.TakeFirst) || key.Matches(km, k.TakeSecond)):
			i := 0
			if key.Matches(km, k.TakeSecond) {
				i = 1
			}
			if i >= len(pr.props) {
				return nil
			}
			return m.takeProposal(pr.props[i])
		case pr.shown() && key.Matches(km, k.Leave):
			pr.stop()
			return nil
		}
	}
	p, cmd, changed := m.budget.Update(km, m.d)
	m.budget = p
	return m.paneDone(cmd, changed)
}

// paneDone is what follows a pane's key: its command, and a new
// generation when the design changed.
func (m *Model) paneDone(cmd tea.Cmd, changed bool) tea.Cmd {
	if changed {
		return tea.Batch(cmd, m.edited())
	}
	return cmd
}

// takeProposal puts a proposed budget into the design.
func (m *Model) takeProposal(p budget.Proposal) tea.Cmd {
	trial := cloneDesign(m.d)
	trial.Budget = p.Budget
	if err := trial.ValidateBudget(); err != nil {
		m.budget.note = err.Error()
		return nil
	}
	m.d.Budget = trial.Budget
	cmd := m.edited()
	m.status = "took the proposal: " + p.Describe()
	return cmd
}

// proposeMsg takes a message of the search; stale ones are dropped.
func (m *Model) proposeMsg(msg tea.Msg) {
	pr := m.budget.prop
	switch msg := msg.(type) {
	case proposeProgressMsg:
		if msg.run == pr.run {
			pr.done, pr.total = msg.done, msg.total
		}
	case proposeDoneMsg:
		if msg.run != pr.run || errors.Is(msg.err, context.Canceled) {
			return
		}
		pr.running, pr.props, pr.err = false, msg.props, msg.err
	}
}

// proposalLines are the search's lines in the pane: progress, the
// proposals numbered for the keys that take them, or why there are none;
// keys is the line naming the keys, shown where there is room.
func (p BudgetPane) proposalLines() (lines, keys []string) {
	st, pr, k := p.st, p.prop, p.keys
	switch {
	case pr.running:
		pct := 0.0
		if pr.total > 0 {
			pct = pr.done / pr.total
		}
		return []string{p.bar.ViewAs(pct) + fmt.Sprintf(" %3.0f%% searching", pct*100)}, nil
	case pr.err != nil:
		return strings.Split(st.Error.Width(max(10, p.w-2)).Render("no proposal: "+pr.err.Error()), "\n"), nil
	case pr.props == nil:
		return nil, nil
	}
	for i, q := range pr.props {
		lines = append(lines, st.Selected.Render(fmt.Sprintf("%d", i+1))+" "+shortProposal(q, p.w-4))
	}
	if nl := pr.props[0].NoLarger; nl != nil {
		// The table fails and only the unit moves: say that the cap
		// search found nothing, and where it looked.
		lines = append(lines, strings.Split(st.Error.Width(max(10, p.w-2)).Render(nl.Describe()), "\n")...)
	}
	var take []string
	for i := range pr.props {
		take = append(take, []key.Binding{k.TakeFirst, k.TakeSecond}[i].Help().Key)
	}
	return lines, []string{st.Dim.Render(strings.Join(take, " or ") + ": take it, " + k.Leave.Help().Key + ": drop")}
}

// shortProposal is a proposal in width w: what changes and that it is
// the coarsest unit or the smallest cap (or mean pay) the re-check passes
// with, then its margin where there is room.
func shortProposal(q budget.Proposal, w int) string {
	b := q.Budget
	what, long, short := "", "the smallest that passes", "smallest passing"
	switch q.Field {
	case "unit":
		what, long, short = fmt.Sprintf("unit %g", b.Unit), "the coarsest that passes", "coarsest passing"
	case "cap":
		what = fmt.Sprintf("cap %g", b.Cap)
	default:
		what = fmt.Sprintf("mean pay %g", *b.MeanPay)
	}
	margin := " (margin " + numfmt.Margin(q.MinMargin) + ")"
	for _, s := range []string{what + ", " + long + margin, what + ", " + long, what + ", " + short} {
		if ansi.StringWidth(s) <= w {
			return s
		}
	}
	return what + ", " + short
}
