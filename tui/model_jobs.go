package tui

import (
	"time"

	tea "github.com/charmbracelet/bubbletea"
)

func (m *Model) debounce() tea.Cmd {
	gen := m.gen
	return tea.Tick(m.set.debounce(), func(time.Time) tea.Msg { return debounceMsg{gen: gen} })
}

// wanted reports whether the stream carrying msg is still current.
func (m *Model) wanted(msg tea.Msg) bool {
	switch r := msg.(type) {
	case checkRunMsg:
		return m.checkJob.current(r.run)
	case certRunMsg:
		return m.certJob.current(r.run)
	case btRunMsg:
		return m.btJob.current(r.run)
	case riskRunMsg:
		return m.riskJob.current(r.run)
	case researchRunMsg:
		return m.research.job.current(r.run)
	case fitProgressMsg:
		return r.gen == m.gen
	case proposeProgressMsg:
		return r.run == m.budget.prop.run
	}
	return false
}

// maybeStart starts the checks and the budget fit once the current
// generation is compiled and its debounce has passed.
func (m *Model) maybeStart() tea.Cmd {
	if m.compGen != m.gen || m.debouncedGen != m.gen {
		return nil
	}
	bt := tea.Batch(m.maybeBacktest(), m.maybeRisk(), m.research.Maybe(m.ctx, m.d, m.gen, m.researchReady()))
	if m.checkJob.gen == m.gen {
		return bt
	}
	if !m.comp.ok() {
		m.checks.block("the formula does not compile")
		return nil
	}
	m.checkJob.gen = m.gen
	var cmds []tea.Cmd
	if m.set.Checker != nil {
		ctx, run := m.checkJob.start(m.ctx, m.gen)
		m.certJob.drop() // a run again: the certificate follows the new grid
		m.checks.started()
		cmds = append(cmds, tagRun(run, checkCmd(ctx, m.gen, cloneDesign(m.d), m.set, m.set.Checker)))
	}
	if m.set.Fitter != nil && m.fitGen != m.gen {
		ctx, _ := m.fitJob.start(m.ctx, m.gen)
		m.budget.fitting()
		cmds = append(cmds, fitCmd(ctx, m.gen, cloneDesign(m.d), m.set.Fitter))
	}
	return tea.Batch(append(cmds, bt)...)
}

// checkRunMsg stamps a check message with the run that sent it, so that
// answers from a run that was replaced (same design, run again) are
// dropped too.
type checkRunMsg struct {
	run uint64
	msg tea.Msg
}

// tagRun wraps every message of a check stream in a checkRunMsg.
func tagRun(run uint64, cmd tea.Cmd) tea.Cmd {
	return func() tea.Msg { return retag(run, cmd()) }
}

func retag(run uint64, msg tea.Msg) tea.Msg {
	s, ok := msg.(streamMsg)
	if !ok {
		return checkRunMsg{run: run, msg: msg}
	}
	next := s.next
	return streamMsg{msg: checkRunMsg{run: run, msg: s.msg}, next: func() tea.Msg { return retag(run, next()) }}
}

func (m *Model) payFunc() func(float64) float64 {
	if m.budget.table != nil && !m.budget.stale {
		return m.budget.table.Pay
	}
	return nil
}

func (m *Model) requestPicture() tea.Cmd {
	if !m.comp.ok() || m.compGen != m.gen || m.width == 0 {
		return nil
	}
	ctx, _ := m.picJob.start(m.ctx, m.gen)
	return m.picture.request(ctx, m.gen, m.comp, m.payFunc())
}
