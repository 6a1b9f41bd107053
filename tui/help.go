package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/lipgloss"
)

// helpTitle heads the help overlay with the keys that close it (and only
// they do: q, listed below as quit, neither quits nor closes from here).
func helpTitle(k KeyMap) string {
	return "Keys — " + k.Leave.Help().Key + " or " + k.Help.Help().Key + " closes this help; " +
		k.Up.Help().Key + "/" + k.Down.Help().Key + " " + k.PageUp.Help().Key + "/" + k.PageDown.Help().Key + " scroll"
}

// helpText lays out every key of km in columns that fit width. It is
// generated from the key map's groups, so help and keys cannot drift.
func helpText(st Styles, km KeyMap, width int) string {
	row := func(b key.Binding) string {
		return st.Key.Render(fmt.Sprintf("%-16s", b.Help().Key)) + " " + b.Help().Desc
	}
	var blocks []string
	lines := 0
	for _, g := range km.groups() {
		rows := []string{st.Header.Render(g.title)}
		for _, b := range g.keys {
			rows = append(rows, row(b))
		}
		rows = append(rows, g.notes...)
		blocks = append(blocks, strings.Join(rows, "\n"))
		lines += len(rows) + 1
	}
	if width < 84 {
		return strings.Join(blocks, "\n\n")
	}
	// Two columns, split where the left one holds about half the lines.
	split, n := len(blocks), 0
	for i, b := range blocks {
		if n >= lines/2 {
			split = i
			break
		}
		n += strings.Count(b, "\n") + 2
	}
	l := strings.Join(blocks[:split], "\n\n")
	r := strings.Join(blocks[split:], "\n\n")
	cw := (width - 8) / 2
	return lipgloss.JoinHorizontal(lipgloss.Top, block(l, cw, strings.Count(l, "\n")+1), "  ", block(r, cw, strings.Count(r, "\n")+1))
}
