package tui

import (
	"fmt"
	"strings"

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
			// q is not taken while the question waits: do not offer it.
			msg = fmt.Sprintf("The workbench needs a terminal of at least %d×%d;\nthis one is %d×%d. Enlarge it:", MinWidth, MinHeight, m.width, m.height) +
				"\na question about unsaved edits waits to be answered."
		}
		// Wrapped to the terminal, however narrow: a line cut at the edge
		// would drop the end of the sentence that says what to do.
		msg = lipgloss.NewStyle().Width(max(1, min(m.width, 60))).Align(lipgloss.Center).Render(msg)
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
		body = m.risk.View()
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
		box := m.st.Dialog.Render(m.st.Header.Render(helpTitle(m.keys)) + "\n" + m.helpView.View())
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
