package tui

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
)

// headerLine is the top line: the program, the design's title (and file),
// whether it has unsaved edits, the view shown, and the verdict with its
// kind, so the state of the design reads from any view.
func (m *Model) headerLine() string {
	st := m.st
	sep := st.Dim.Render(" ▏ ")
	left := st.Key.Render("scorewright") + sep
	right := m.verdictWords()
	if v := m.viewName(); v != "" {
		right = st.Selected.Render(v) + st.Dim.Render(" (esc: back)") + sep + right
	}
	title := m.d.Title
	if title == "" {
		title = "untitled design"
	}
	where := "not saved yet"
	if m.path != "" {
		where = filepath.Base(m.path)
	}
	if m.Unsaved() {
		where += ", edited"
	}
	room := m.width - lipgloss.Width(left) - lipgloss.Width(right) - 1
	name := st.Header.Render(title) + st.Dim.Render(" ("+where+")")
	if lipgloss.Width(name) > room { // too narrow for the file: a star marks unsaved edits
		star := ""
		if m.Unsaved() {
			star = " *"
		}
		name = st.Header.Render(ansi.Truncate(title, max(0, room-len(star)), "…")) + st.Dim.Render(star)
	}
	name = ansi.Truncate(name, max(0, room), "…")
	gap := m.width - lipgloss.Width(left) - lipgloss.Width(name) - lipgloss.Width(right)
	return left + name + strings.Repeat(" ", max(1, gap)) + right
}

// viewName names the view that replaces the panes ("" when the panes show).
func (m *Model) viewName() string {
	switch {
	case m.terms.Shown():
		return "terms"
	case m.research.Shown():
		return "research"
	case m.showBT:
		return "backtest"
	case m.showRisk:
		return "risk"
	}
	return ""
}

// verdictWords is the header's verdict: what the checks found and of which
// kind, certified (the interval certificate proved it) or grid evidence.
func (m *Model) verdictWords() string {
	st, c := m.st, &m.checks
	switch {
	case !c.available:
		return st.Dim.Render("no checks in this build")
	case c.blocked != "":
		return st.Fail.Render("✗ ") + st.Dim.Render("not checked: "+c.blocked)
	case c.running:
		pct := 0.0
		if c.total > 0 {
			pct = 100 * c.done / c.total
		}
		return st.Dim.Render(fmt.Sprintf("checking %.0f%%", pct))
	case c.waiting || c.stale:
		return st.Dim.Render("checking shortly")
	case c.err != nil:
		return st.Fail.Render("✗ the checks failed to run")
	case c.report == nil:
		return st.Dim.Render("not checked yet")
	}
	r := c.report
	// The verdict that stands over the grid's and the certificate's, as the
	// command's verdict line says it (CheckReport.Standing): a proof of
	// impropriety heads the screen even where the grid missed it.
	verdict, kind := r.Final(), r.Kind()
	if c.proving {
		kind += ", proof running"
	}
	words := strings.ReplaceAll(verdict, "-", " ")
	if strings.Contains(verdict, "improper") || !allPassed(r) {
		return st.Fail.Render("✗ "+words) + st.Dim.Render(", "+kind)
	}
	return st.Pass.Render("✓ "+words) + st.Dim.Render(", "+kind)
}

// footerLine is the status message, or the keys that matter where the
// focus is: each key in its own colour followed by what it does, with wide
// gaps between, and a plain "? all keys" always first so the rest can be
// found when they do not fit.
func (m *Model) footerLine() string {
	if m.status != "" {
		return m.st.Dim.Render(m.status)
	}
	return keyLine(m.st, m.footerKeys(), m.width)
}

// keyLine lays out bindings as "key does-this" pairs that fit width.
func keyLine(st Styles, keys []key.Binding, width int) string {
	var b strings.Builder
	used := 0
	for i, k := range keys {
		item := st.Key.Render(k.Help().Key) + " " + k.Help().Desc
		w := lipgloss.Width(item)
		if i > 0 {
			w += 3
		}
		if used+w > width {
			if used+2 <= width {
				b.WriteString(" " + st.Dim.Render("…"))
			}
			break
		}
		if i > 0 {
			b.WriteString("   ")
		}
		b.WriteString(item)
		used += w
	}
	return b.String()
}

// footerKeys are the footer's keys for where the focus is.
func (m *Model) footerKeys() []key.Binding {
	k := m.keys
	as := func(b key.Binding, keyText, desc string) key.Binding {
		return key.NewBinding(key.WithKeys(b.Keys()...), key.WithHelp(keyText, desc))
	}
	if m.designPane.Typing() || m.budget.Typing() {
		// While typing only keys that are not text reach the workbench;
		// of the help keys that is the function key.
		f1 := strings.ToUpper(k.Help.Keys()[len(k.Help.Keys())-1])
		return []key.Binding{as(k.Help, f1, "all keys"), as(k.Leave, k.Leave.Help().Key, "stop typing"), as(k.NextPane, k.NextPane.Help().Key, "next pane"), as(k.Save, k.Save.Help().Key, "save"), k.QuitHard}
	}
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
	keys := []key.Binding{as(k.Help, k.Help.Keys()[0], "all keys"), as(k.NextPane, k.NextPane.Help().Key, "next pane"), k.Quit}
	for _, b := range pane {
		switch {
		case b.Help() == k.Up.Help() && !m.showRisk && !m.research.Shown():
			keys = append(keys, as(b, k.Up.Help().Key+k.Down.Help().Key, "choose"))
		case b.Help() == k.Down.Help():
		default:
			keys = append(keys, b)
		}
	}
	return append(keys, as(k.Save, k.Save.Help().Key, "save"), as(k.Export, k.Export.Help().Key, "export"))
}
