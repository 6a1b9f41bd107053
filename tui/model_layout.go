package tui

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/lipgloss"
)

func (m *Model) tooSmall() bool { return m.width < MinWidth || m.height < MinHeight }

// layout gives every pane its size. Below 120×40 the right column stacks
// the picture over whichever of checks and budget was focused last; from
// 120×40 all four panes show.
func (m *Model) layout() {
	if m.tooSmall() {
		return
	}
	m.layoutBacktest()
	bh := m.height - 2
	if m.large() {
		lw := m.width * 45 / 100
		rw := m.width - lw
		top := bh * 60 / 100
		m.designPane.SetSize(lw, top)
		m.budget.SetSize(lw, bh-top)
		m.picture.SetSize(rw, top)
		m.checks.SetSize(rw, bh-top)
		return
	}
	lw := m.width / 2
	rw := m.width - lw
	// Half each, whichever pane has the focus: the picture keeps a
	// readable height at 80×24, and the layout does not jump on tab (the
	// lower panes scroll).
	top := bh / 2
	m.designPane.SetSize(lw, bh)
	m.picture.SetSize(rw, top)
	m.checks.SetSize(rw, bh-top)
	m.budget.SetSize(rw, bh-top)
}

func (m *Model) large() bool { return m.width >= 120 && m.height >= 40 }

// View draws the screen.
func (m *Model) View() string {
	if m.quitting {
		return ""
	}
	if m.width == 0 {
		return "starting…"
	}
	if m.tooSmall() {
		msg := fmt.Sprintf("The workbench needs a terminal of at least %d×%d;\nthis one is %d×%d. Enlarge it, or press q to quit.", MinWidth, MinHeight, m.width, m.height)
		if m.leaving != nil || m.recOffer != nil {
			msg += "\nA question about unsaved edits waits; enlarge the terminal to answer it."
		}
		return lipgloss.Place(m.width, m.height, lipgloss.Center, lipgloss.Center, msg)
	}
	header := m.headerLine()
	var body string
	if m.terms.Shown() {
		body = m.terms.View(m.d)
	} else if m.research.Shown() {
		body = m.research.View(m.d)
	} else if m.showBT {
		body = m.bt.View()
	} else if m.showRisk {
		body = m.risk.View(m.d, m.riskIn)
	} else if m.large() {
		left := lipgloss.JoinVertical(lipgloss.Left, m.designPane.View(m.d), m.budget.View(m.d))
		right := lipgloss.JoinVertical(lipgloss.Left, m.picture.View(), m.checks.View())
		body = lipgloss.JoinHorizontal(lipgloss.Top, left, right)
	} else {
		lower := m.checks.View()
		if m.lower == paneBudget {
			lower = m.budget.View(m.d)
		}
		right := lipgloss.JoinVertical(lipgloss.Left, m.picture.View(), lower)
		body = lipgloss.JoinHorizontal(lipgloss.Top, m.designPane.View(m.d), right)
	}
	screen := header + "\n" + body + "\n" + m.footerLine()
	switch {
	case m.help:
		box := m.st.Dialog.Render(m.st.Header.Render("Keys — esc or ? to close, ↑/↓ pgup/pgdn to scroll") + "\n" + m.helpView.View())
		screen = lipgloss.Place(m.width, m.height, lipgloss.Center, lipgloss.Center, box)
	case m.recOffer != nil:
		screen = overlay(screen, m.recoveryView(), m.width, m.height)
	case m.leaving != nil:
		screen = overlay(screen, m.leaveView(), m.width, m.height)
	case m.dialog != nil:
		box := m.dialog.View(m.width)
		screen = overlay(screen, box, m.width, m.height)
	}
	return block(screen, m.width, m.height)
}

func (m *Model) headerLine() string {
	left := m.st.Header.Render("scorewright")
	where := "demo"
	if m.path != "" {
		where = filepath.Base(m.path)
	}
	what := fmt.Sprintf("%d outcomes", m.d.N())
	if onInterval(m.d) && len(m.d.Interval) == 2 {
		what = fmt.Sprintf("a mean on [%g, %g]", m.d.Interval[0], m.d.Interval[1])
	}
	mid := m.st.Dim.Render(fmt.Sprintf(" · %s · %s · %s", where, what, m.d.Mode))
	var tabs []string
	for p, name := range []string{"design", "picture", "checks", "budget"} {
		if pane(p) == m.focus && !m.showBT && !m.showRisk && !m.research.Shown() && !m.terms.Shown() {
			tabs = append(tabs, m.st.Selected.Render("["+name+"]"))
		} else {
			tabs = append(tabs, m.st.Dim.Render(" "+name+" "))
		}
	}
	if m.showBT {
		tabs = []string{m.st.Selected.Render("[backtest]"), m.st.Dim.Render(" esc: back to the panes")}
	}
	if m.showRisk {
		tabs = []string{m.st.Selected.Render("[risk]"), m.st.Dim.Render(" esc: back to the panes")}
	}
	if m.research.Shown() {
		tabs = []string{m.st.Selected.Render("[research]"), m.st.Dim.Render(" esc: back to the panes")}
	}
	if m.terms.Shown() {
		tabs = []string{m.st.Selected.Render("[terms]"), m.st.Dim.Render(" esc: back to the panes")}
	}
	right := strings.Join(tabs, "")
	gap := m.width - lipgloss.Width(left) - lipgloss.Width(mid) - lipgloss.Width(right)
	return left + mid + strings.Repeat(" ", max(1, gap)) + right
}

// footerLine is the status message, or the keys of the focused pane.
func (m *Model) footerLine() string {
	if m.status != "" {
		return m.st.Dim.Render(m.status)
	}
	k := m.keys
	as := func(b key.Binding, keyText, desc string) key.Binding {
		return key.NewBinding(key.WithKeys(b.Keys()...), key.WithHelp(keyText, desc))
	}
	var keys []key.Binding
	if m.designPane.Typing() || m.budget.Typing() {
		// While typing only keys that are not text reach the workbench;
		// of the help keys that is the function key.
		f1 := strings.ToUpper(k.Help.Keys()[len(k.Help.Keys())-1])
		keys = []key.Binding{as(k.Leave, k.Leave.Help().Key, "stop typing"), as(k.NextPane, k.NextPane.Help().Key, "pane"), as(k.Help, f1, "keys"), as(k.Save, k.Save.Help().Key, "save"), k.QuitHard}
	} else {
		var pane []key.Binding
		switch {
		case m.terms.Shown():
			pane = m.terms.KeyHelp()
		case m.research.Shown():
			pane = m.research.KeyHelp()
		case m.showBT:
			pane = m.bt.KeyHelp()
		case m.showRisk:
			pane = m.risk.KeyHelp()
		case m.focus == paneDesign:
			pane = m.designPane.KeyHelp()
		case m.focus == panePicture:
			pane = m.picture.KeyHelp()
		case m.focus == paneChecks:
			pane = m.checks.KeyHelp()
		case m.focus == paneBudget:
			pane = m.budget.KeyHelp()
		}
		keys = []key.Binding{as(k.Help, k.Help.Keys()[0], "keys"), as(k.NextPane, k.NextPane.Help().Key, "pane"), k.Quit}
		for _, b := range pane {
			switch {
			case b.Help() == k.Up.Help() && !m.showRisk && !m.research.Shown():
				keys = append(keys, as(b, k.Up.Help().Key+"/"+k.Down.Help().Key, "select"))
			case b.Help() == k.Down.Help():
			default:
				keys = append(keys, b)
			}
		}
		keys = append(keys, as(k.Save, k.Save.Help().Key, "save"), as(k.Export, k.Export.Help().Key, "export"))
	}
	h := help.New()
	h.Width = m.width
	h.Styles.ShortKey, h.Styles.ShortDesc, h.Styles.ShortSeparator, h.Styles.Ellipsis = m.st.Key, m.st.Dim, m.st.Dim, m.st.Dim
	return h.ShortHelpView(keys)
}

// overlay centres box over screen.
func overlay(screen, box string, w, h int) string {
	lines := strings.Split(block(screen, w, h), "\n")
	bl := strings.Split(box, "\n")
	bw := lipgloss.Width(box)
	top := max(0, (h-len(bl))/2)
	left := max(0, (w-bw)/2)
	for i, l := range bl {
		if top+i >= len(lines) {
			break
		}
		row := lines[top+i]
		lines[top+i] = cutLeft(row, left) + l + cutRight(row, left+lipgloss.Width(l), w)
	}
	return strings.Join(lines, "\n")
}
