package tui

import (
	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
)

// key routes a key: ctrl+c first, then open overlays, then a focused text
// input (which sees every printable key), then global shortcuts, then the
// focused pane.
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
	}
	if m.help {
		switch {
		case key.Matches(km, k.Help), key.Matches(km, k.Leave), key.Matches(km, k.Quit):
			m.help = false
		default:
			var cmd tea.Cmd
			m.helpView, cmd = m.helpView.Update(km)
			return cmd
		}
		return nil
	}
	if m.dialog != nil {
		d, cmd, act := m.dialog.Update(km)
		m.dialog = &d
		switch act {
		case actCancel:
			m.dialog = nil
			m.status = "cancelled"
			if m.afterSave != nil {
				m.afterSave = nil
				m.status = "not saved; the design is still open"
			}
		case actSubmit:
			return tea.Batch(cmd, m.submitDialog())
		}
		return cmd
	}
	if m.showBT {
		switch {
		case key.Matches(km, k.Leave), key.Matches(km, k.Backtest):
			m.showBT = false
			return m.requestPicture()
		case key.Matches(km, k.History):
			m.openDialog(dialogHistory)
			return nil
		case key.Matches(km, k.StopRun):
			if m.bt.Running() || m.cancelBt != nil {
				m.stopBacktest()
				m.btRun++ // its late answers are dropped
				m.bt.stop()
				m.status = "backtest stopped"
			}
			return nil
		case key.Matches(km, k.Up), key.Matches(km, k.Down), key.Matches(km, k.PageUp), key.Matches(km, k.PageDown):
			m.bt = m.bt.Update(km)
			return nil
		case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
			m.showBT = false
		}
	}
	if m.terms.Shown() {
		if key.Matches(km, k.Terms) {
			m.terms.Close()
			return m.requestPicture()
		}
		handled, changed, cmd := m.terms.Key(km, m.d)
		switch {
		case changed:
			return tea.Batch(cmd, m.edited())
		case handled && !m.terms.Shown():
			return tea.Batch(cmd, m.requestPicture())
		case handled:
			return cmd
		}
	}
	if m.research.Shown() {
		handled, cmd := m.research.Key(m.ctx, km, m.d, m.gen, m.researchReady())
		if handled {
			if !m.research.Shown() {
				return tea.Batch(cmd, m.requestPicture())
			}
			return cmd
		}
	}
	if m.showRisk {
		switch {
		case key.Matches(km, k.Leave), key.Matches(km, k.Risk):
			m.showRisk = false
			return m.requestPicture()
		case key.Matches(km, k.Up):
			m.risk.sel = (m.risk.sel + riskFieldCount - 1) % riskFieldCount
			return nil
		case key.Matches(km, k.Down):
			m.risk.sel = (m.risk.sel + 1) % riskFieldCount
			return nil
		case key.Matches(km, k.Less), key.Matches(km, k.More), key.Matches(km, k.LessFine), key.Matches(km, k.MoreFine):
			up := key.Matches(km, k.More) || key.Matches(km, k.MoreFine)
			fine := key.Matches(km, k.LessFine) || key.Matches(km, k.MoreFine)
			if riskStep(&m.riskIn, m.risk.sel, m.d, up, fine, m.riskCoefs) {
				if m.risk.sel == riskWealth {
					m.riskSet = true
				}
				return m.maybeRisk()
			}
			return nil
		case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
			m.showRisk = false
		}
	}
	typing := m.designPane.Typing() || m.budget.Typing()
	switch {
	case km.Type == tea.KeyF1 || (!typing && key.Matches(km, k.Help)):
		m.openHelp()
		return nil
	case key.Matches(km, k.NextPane), key.Matches(km, k.PrevPane):
		step := 1
		if key.Matches(km, k.PrevPane) {
			step = int(paneCount) - 1
		}
		m.setFocus((m.focus + pane(step)) % paneCount)
		m.layout()
		return m.requestPicture()
	case key.Matches(km, k.Save):
		m.openDialog(dialogSave)
		return nil
	case key.Matches(km, k.Open):
		return m.leave(leaveOpen, km)
	case key.Matches(km, k.Export):
		m.openDialog(dialogExport)
		return nil
	case key.Matches(km, k.Backtest):
		m.showRisk = false
		m.research.Close()
		m.terms.Close()
		return m.toggleBacktest()
	case key.Matches(km, k.Risk):
		m.research.Close()
		m.terms.Close()
		return m.toggleRisk()
	case key.Matches(km, k.Terms):
		m.stopTyping()
		m.showBT, m.showRisk = false, false
		m.research.Close()
		m.terms.Toggle()
		return nil
	case key.Matches(km, k.Research):
		m.stopTyping()
		m.terms.Close()
		m.showBT, m.showRisk = false, false
		return m.research.Toggle(m.ctx, m.d, m.gen, m.researchReady())
	case !typing && key.Matches(km, k.Demo):
		return m.leave(leaveDemo, km)
	case !typing && !m.designPane.Picking() && key.Matches(km, k.Quit):
		return m.leave(leaveQuit, km)
	}
	if m.showBT || m.showRisk || m.research.Shown() {
		return nil
	}
	return m.routeToPane(km)
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
		if key.Matches(km, m.keys.Rerun) {
			m.debouncedGen = m.gen
			m.checkGen = 0
			return m.maybeStart()
		}
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
