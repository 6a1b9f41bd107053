package tui

import (
	"context"
	"errors"

	tea "github.com/charmbracelet/bubbletea"
)

// toggleBacktest opens the backtest view (asking for a history first when
// none is loaded) or closes it.
func (m *Model) toggleBacktest() tea.Cmd {
	if m.showBT {
		m.showBT = false
		return m.requestPicture()
	}
	m.stopTyping()
	if m.history == "" {
		m.openDialog(dialogHistory)
		return nil
	}
	m.showBT = true
	return nil
}

// startBacktest replays the history at path under the current design,
// cancelling any run before it. The history becomes the loaded one when
// its header fits (btStartedMsg).
func (m *Model) startBacktest(path string) tea.Cmd {
	ctx, run := m.btJob.start(m.ctx, m.gen)
	return backtestCmd(ctx, run, m.gen, cloneDesign(m.d), path)
}

// maybeBacktest reruns the loaded history for a design that compiled and
// waited out its debounce.
func (m *Model) maybeBacktest() tea.Cmd {
	if m.history == "" || m.btJob.gen == m.gen || !m.comp.ok() {
		return nil
	}
	return m.startBacktest(m.history)
}

// backtestMsg takes a message of the current backtest run.
func (m *Model) backtestMsg(msg btRunMsg) tea.Cmd {
	if !m.btJob.current(msg.run) {
		return nil
	}
	fromDialog := m.dialog != nil && m.dialog.kind == dialogHistory
	switch inner := msg.msg.(type) {
	case btStartedMsg:
		m.history = inner.path
		m.research.SetHistory(inner.path)
		m.bt.started(inner.path)
		if fromDialog {
			m.dialog = nil
			m.showBT = true
			m.status = ""
		}
	case btProgressMsg:
		m.bt.progressed(inner.done)
	case btDoneMsg:
		if errors.Is(inner.err, context.Canceled) {
			return nil
		}
		m.btJob.finished()
		if inner.file && fromDialog {
			m.bt.running = false
			m.dialog.failed(fileError(inner.err))
			return nil
		}
		m.bt.finished(inner.res, inner.err)
	}
	return nil
}

// layoutBacktest sizes the backtest and risk views: the whole body.
func (m *Model) layoutBacktest() {
	m.bt.SetSize(m.width, m.height-2)
	m.risk.SetSize(m.width, m.height-2)
	m.refreshRisk()
	m.research.SetSize(m.width, m.height-2)
	m.terms.SetSize(m.width, m.height-2)
}

// researchReady says the design is compiled and its edits have settled,
// so a research study may start.
func (m *Model) researchReady() bool { return m.compGen == m.gen && m.debouncedGen == m.gen }

// toggleRisk opens the risk view, starting a run when its result is not
// for the current design and inputs, or closes it.
func (m *Model) toggleRisk() tea.Cmd {
	if m.showRisk {
		m.showRisk = false
		return m.requestPicture()
	}
	m.stopTyping()
	m.showBT, m.showRisk = false, true
	defer m.refreshRisk()
	return m.maybeRisk()
}

// refreshRisk lays the risk view out again after something it shows
// changed; while it is hidden nothing is drawn (opening it refreshes).
func (m *Model) refreshRisk() {
	if m.showRisk {
		m.risk.refresh(m.d)
	}
}

// maybeRisk starts a risk run when the view is open and its last run is
// not for the current design (compiled and debounced) and inputs.
func (m *Model) maybeRisk() tea.Cmd {
	if !m.showRisk || m.compGen != m.gen || m.debouncedGen != m.gen {
		return nil
	}
	if m.riskJob.gen == m.gen && !m.risk.inputsChanged() && (m.risk.Running() || m.risk.Result() != nil || m.risk.err != nil) {
		return nil
	}
	ctx, run := m.riskJob.start(m.ctx, m.gen)
	m.risk.started()
	m.refreshRisk()
	return riskCmd(ctx, run, cloneDesign(m.d), m.risk.in)
}

func sameInputs(a, b RiskInputs) bool {
	return a.Kind == b.Kind && a.Coef == b.Coef && a.Wealth == b.Wealth && (a.Belief == nil) == (b.Belief == nil) && sameVector(a.Belief, b.Belief)
}

// riskMsg takes a message of the current risk run.
func (m *Model) riskMsg(msg riskRunMsg) {
	if !m.riskJob.current(msg.run) {
		return
	}
	defer m.refreshRisk()
	switch inner := msg.msg.(type) {
	case riskProgressMsg:
		m.risk.progressed(inner.done, inner.total)
	case riskDoneMsg:
		if errors.Is(inner.err, context.Canceled) {
			return
		}
		m.riskJob.finished()
		m.risk.finished(inner.res, inner.err)
	}
}
