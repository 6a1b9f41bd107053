package tui

import (
	"strings"

	"github.com/charmbracelet/x/ansi"
)

// Tables on screen are laid out by display width (ansi.StringWidth), not
// by rune or byte count as text/tabwriter and fmt's %-*s do: outcome
// labels and forecaster names are the user's, and a wide (CJK, emoji) or
// combining character would otherwise push every later column out of line.

// padRight pads s with spaces to display width w (s is never cut).
func padRight(s string, w int) string {
	return s + strings.Repeat(" ", max(0, w-ansi.StringWidth(s)))
}

// padLeft right-aligns s in display width w (s is never cut).
func padLeft(s string, w int) string {
	return strings.Repeat(" ", max(0, w-ansi.StringWidth(s))) + s
}

// columnWidths is the display width of the widest cell of each column.
func columnWidths(rows [][]string) []int {
	var w []int
	for _, r := range rows {
		for i, c := range r {
			if i == len(w) {
				w = append(w, 0)
			}
			w[i] = max(w[i], ansi.StringWidth(c))
		}
	}
	return w
}

// rightTable lays rows out as right-aligned columns, each as wide as its
// widest cell plus two spaces before it, one line per row each ended by a
// newline: the layout of a right-aligning tabwriter with padding 2, by
// display width.
func rightTable(rows [][]string) string {
	w := columnWidths(rows)
	var b strings.Builder
	for _, r := range rows {
		for i, c := range r {
			b.WriteString(padLeft(c, w[i]+2))
		}
		b.WriteByte('\n')
	}
	return b.String()
}
