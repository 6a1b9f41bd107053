package tui

import (
	"strings"

	"github.com/charmbracelet/x/ansi"
)

// paneFrame draws a pane of outer size w×h as a bracket: a rule down its
// left side and along its bottom, the title on the first line with the
// pane's name in bold, and one blank column between the rule and the
// body. The neighbour's rule keeps panes apart on the right. The focused pane's bracket is heavy, the others'
// light and dashed, so focus reads without colour too. The body gets
// (w-2)×(h-2), as inside any frame of one cell.
func paneFrame(st Styles, title string, focused bool, w, h int, body string) string {
	if w < 4 || h < 3 {
		return ""
	}
	fs, ts := st.Border, st.Title
	top, side, corner, rule := "┌", "╎", "└", "╌"
	if focused {
		fs, ts = st.BorderFocus, st.TitleFocus
		top, side, corner, rule = "┏", "┃", "┗", "━"
	}
	iw, ih := w-2, h-2
	name, rest, cut := strings.Cut(title, " · ")
	head := ts.Render(name)
	if cut {
		head += " · " + rest
	}
	var b strings.Builder
	b.WriteString(fs.Render(top) + " " + fit(head, iw) + "\n")
	lines := strings.Split(body, "\n")
	for i := 0; i < ih; i++ {
		l := ""
		if i < len(lines) {
			l = lines[i]
		}
		b.WriteString(fs.Render(side) + " " + fit(l, iw) + "\n")
	}
	b.WriteString(fs.Render(corner + strings.Repeat(rule, iw+1)))
	return b.String()
}

// fit cuts or pads a line (which may hold escape codes) to width w.
func fit(s string, w int) string {
	s = strings.TrimRight(s, "\r")
	if ansi.StringWidth(s) > w {
		return ansi.Truncate(s, w, "…")
	}
	return s + strings.Repeat(" ", w-ansi.StringWidth(s))
}

// block cuts or pads a multi-line text to exactly w×h.
func block(s string, w, h int) string {
	lines := strings.Split(s, "\n")
	out := make([]string, h)
	for i := range out {
		l := ""
		if i < len(lines) {
			l = lines[i]
		}
		out[i] = fit(l, w)
	}
	return strings.Join(out, "\n")
}

// cutLeft keeps the first n columns of a line.
func cutLeft(s string, n int) string { return fit(ansi.Truncate(s, n, ""), n) }

// cutRight keeps the columns of a line from column from to w.
func cutRight(s string, from, w int) string {
	if from >= w {
		return ""
	}
	return ansi.Cut(s, from, w)
}
