package tui

import (
	"strings"

	"github.com/charmbracelet/x/ansi"
)

// paneFrame draws a framed pane of outer size w×h with its title in the
// top edge, cutting or padding the body to fit.
func paneFrame(st Styles, title string, focused bool, w, h int, body string) string {
	if w < 4 || h < 3 {
		return ""
	}
	bs, ts := st.Border, st.Title
	if focused {
		bs, ts = st.BorderFocus, st.TitleFocus
	}
	iw, ih := w-2, h-2
	t := ansi.Truncate(" "+title+" ", max(0, iw-2), "…")
	var b strings.Builder
	b.WriteString(bs.Render("╭─") + ts.Render(t) + bs.Render(strings.Repeat("─", max(0, iw-1-ansi.StringWidth(t)))+"╮") + "\n")
	lines := strings.Split(body, "\n")
	for i := 0; i < ih; i++ {
		l := ""
		if i < len(lines) {
			l = lines[i]
		}
		b.WriteString(bs.Render("│") + fit(l, iw) + bs.Render("│") + "\n")
	}
	b.WriteString(bs.Render("╰" + strings.Repeat("─", iw) + "╯"))
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
