package tui

import (
	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
)

// keyRoute is one stage of routing a key: it reports whether the key was
// its own and the command that follows.
type keyRoute func(km tea.KeyMsg) (tea.Cmd, bool)

// key routes a key: questions that wait for an answer first, then ctrl+c,
// then open overlays, then the view that replaces the panes, then global
// shortcuts (a focused text input sees every printable key before them),
// then the focused pane.
func (m *Model) key(km tea.KeyMsg) tea.Cmd {
	k := m.keys
	switch {
	case m.tooSmall():
		return m.smallKey(km)
	case m.recOffer != nil:
		return m.recoveryKey(km)
	case m.leaving != nil:
		return m.leaveKey(km)
	case key.Matches(km, k.QuitHard):
		return m.leave(leaveQuit, km)
	case m.help:
		return m.helpKey(km)
	case m.dialog != nil:
		return m.dialogKey(km)
	}
	for _, route := range []keyRoute{m.backtestKey, m.termsKey, m.researchKey, m.riskKey, m.globalKey} {
		if cmd, ok := route(km); ok {
			return cmd
		}
	}
	if m.showBT || m.showRisk || m.research.Shown() {
		return nil
	}
	return m.routeToPane(km)
}

// helpKey scrolls or closes the help overlay: esc or the help key closes
// it, as its title says. q does neither: it is listed in the help as
// quit, so closing help with it would be one key meaning two things, and
// quitting from help would lose the screen the user was reading about.
func (m *Model) helpKey(km tea.KeyMsg) tea.Cmd {
	k := m.keys
	if key.Matches(km, k.Quit) {
		return nil
	}
	if key.Matches(km, k.Help) || key.Matches(km, k.Leave) {
		m.help = false
		return nil
	}
	var cmd tea.Cmd
	m.helpView, cmd = m.helpView.Update(km)
	return cmd
}

// dialogKey hands a key to the open file dialog.
func (m *Model) dialogKey(km tea.KeyMsg) tea.Cmd {
	d, cmd, act := m.dialog.Update(km)
	m.dialog = &d
	switch act {
	case actCancel:
		m.dialog = nil
		m.status = "cancelled"
		if d.busy {
			m.status = "cancelled: the file was not opened"
		}
		m.cancelDialogWork()
		if m.afterSave != nil {
			m.afterSave = nil
			m.status = "not saved; the design is still open"
		}
	case actSubmit:
		return tea.Batch(cmd, m.submitDialog())
	}
	return cmd
}

// backtestKey takes the backtest view's keys while it is shown; tab
// leaves it for the panes and goes on to move the focus.
func (m *Model) backtestKey(km tea.KeyMsg) (tea.Cmd, bool) {
	k := m.keys
	if !m.showBT {
		return nil, false
	}
	switch {
	case key.Matches(km, k.Leave), key.Matches(km, k.Backtest):
		m.showBT = false
		return m.requestPicture(), true
	case key.Matches(km, k.History):
		m.openDialog(dialogHistory)
		return nil, true
	case key.Matches(km, k.StopRun):
		if m.bt.Running() || m.btJob.running() {
			m.btJob.drop() // its late answers are dropped
			m.bt.stop()
			m.status = "backtest stopped"
		}
		return nil, true
	case key.Matches(km, k.Up), key.Matches(km, k.Down), key.Matches(km, k.PageUp), key.Matches(km, k.PageDown):
		m.bt = m.bt.Update(km)
		return nil, true
	case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
		m.showBT = false
	}
	return nil, false
}

// termsKey takes the terms view's keys while it is shown.
func (m *Model) termsKey(km tea.KeyMsg) (tea.Cmd, bool) {
	if !m.terms.Shown() {
		return nil, false
	}
	if key.Matches(km, m.keys.Terms) {
		m.terms.Close()
		return m.requestPicture(), true
	}
	handled, changed, cmd := m.terms.Update(km, m.d)
	switch {
	case changed:
		return tea.Batch(cmd, m.edited()), true
	case handled && !m.terms.Shown():
		return tea.Batch(cmd, m.requestPicture()), true
	}
	return cmd, handled
}

// researchKey takes the research view's keys while it is shown.
func (m *Model) researchKey(km tea.KeyMsg) (tea.Cmd, bool) {
	if !m.research.Shown() {
		return nil, false
	}
	handled, cmd := m.research.Update(m.ctx, km, m.d, m.gen, m.researchReady())
	if handled && !m.research.Shown() {
		return tea.Batch(cmd, m.requestPicture()), true
	}
	return cmd, handled
}

// riskKey takes the risk view's keys while it is shown: ↑/↓ choose an
// input, ←/→ step it (a change reruns the view).
func (m *Model) riskKey(km tea.KeyMsg) (tea.Cmd, bool) {
	k := m.keys
	if !m.showRisk {
		return nil, false
	}
	defer m.refreshRisk()
	switch {
	case key.Matches(km, k.Leave), key.Matches(km, k.Risk):
		m.showRisk = false
		return m.requestPicture(), true
	case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
		m.showRisk = false
		return nil, false
	}
	handled, changed := m.risk.Update(km, m.d)
	if changed {
		return m.maybeRisk(), true
	}
	return nil, handled
}

// globalKey takes the keys that work from any pane and view. Printable
// ones (?, q) only while nothing is being typed.
func (m *Model) globalKey(km tea.KeyMsg) (tea.Cmd, bool) {
	k := m.keys
	typing := m.designPane.Typing() || m.budget.Typing()
	switch {
	case km.Type == tea.KeyF1 || (!typing && key.Matches(km, k.Help)):
		m.openHelp()
		return nil, true
	case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
		step := 1
		if key.Matches(km, k.PrevPane) {
			step = int(paneCount) - 1
		}
		m.setFocus((m.focus + pane(step)) % paneCount)
		m.layout()
		return m.requestPicture(), true
	case key.Matches(km, k.Save):
		m.openDialog(dialogSave)
		return nil, true
	case key.Matches(km, k.Open):
		return m.leave(leaveOpen, km), true
	case key.Matches(km, k.Export):
		m.openDialog(dialogExport)
		return nil, true
	case !typing && key.Matches(km, k.Demo):
		return m.leave(leaveDemo, km), true
	case key.Matches(km, k.New):
		return m.leave(leaveNew, km), true
	case !typing && !m.designPane.Picking() && key.Matches(km, k.Quit):
		return m.leave(leaveQuit, km), true
	}
	return m.viewSwitchKey(km)
}

// viewSwitchKey opens or closes the views that replace the panes; at most
// one shows at a time.
func (m *Model) viewSwitchKey(km tea.KeyMsg) (tea.Cmd, bool) {
	k := m.keys
	switch {
	case key.Matches(km, k.Backtest):
		m.showRisk = false
		m.research.Close()
		m.terms.Close()
		return m.toggleBacktest(), true
	case key.Matches(km, k.Risk):
		m.research.Close()
		m.terms.Close()
		return m.toggleRisk(), true
	case key.Matches(km, k.Terms):
		m.stopTyping()
		m.showBT, m.showRisk = false, false
		m.research.Close()
		m.terms.Toggle()
		return nil, true
	case key.Matches(km, k.Research):
		m.stopTyping()
		m.terms.Close()
		m.showBT, m.showRisk = false, false
		return m.research.Toggle(m.ctx, m.d, m.gen, m.researchReady()), true
	}
	return nil, false
}

func (m *Model) routeToPane(km tea.KeyMsg) tea.Cmd {
	switch m.focus {
	case paneDesign:
		if m.designPane.Picking() && key.Matches(km, m.keys.Edit) && !m.designPane.AsksFirst(m.d) && handWritten(m.d) && m.Unsaved() {
			return m.leave(leavePreset, km)
		}
		return m.designKey(km)
	case panePicture:
		p, changed := m.picture.Update(km)
		m.picture = p
		if changed {
			return m.requestPicture()
		}
	case paneChecks:
		return m.checksKey(km)
	case paneBudget:
		return m.budgetKey(km)
	}
	return nil
}

// designKey hands a key to the design pane.
func (m *Model) designKey(km tea.KeyMsg) tea.Cmd {
	p, cmd, changed := m.designPane.Update(km, m.d)
	m.designPane = p
	return m.paneDone(cmd, changed)
}

// smallKey is the one key a screen too small to draw on takes: quit (which
// asks first when edits are unsaved). A question that waits cannot be
// read, so it is not answered from here, except by ctrl+c, which leaves
// the edits in the recovery file.
func (m *Model) smallKey(km tea.KeyMsg) tea.Cmd {
	k := m.keys
	switch {
	case m.leaving != nil || m.recOffer != nil:
		if key.Matches(km, k.QuitHard) {
			return m.quit()
		}
	case key.Matches(km, k.Quit), key.Matches(km, k.QuitHard):
		return m.leave(leaveQuit, km)
	}
	return nil
}
