package tui

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/verify/certify"
)

// The checks pane lists one line per check, then an entry for the verdict
// and the report's notes; ↑/↓ choose an entry (the list scrolls to keep
// it in view), enter opens its full text, wrapped to the pane, where
// ↑/↓ and pgup/pgdn scroll, ←/→ go to the previous or next entry and esc
// goes back. So nothing the pane cuts short is out of reach.

// checksKey handles a key of the checks pane: run again, or the pane's
// own keys.
func (m *Model) checksKey(km tea.KeyMsg) tea.Cmd {
	if key.Matches(km, m.keys.Rerun) && !m.checks.detail {
		m.debouncedGen = m.gen
		m.checkJob.gen = 0
		return m.maybeStart()
	}
	m.checks, _ = m.checks.Update(km)
	return nil
}

// entries is the number of selectable entries of r: its checks and the
// notes entry.
func entries(r *CheckReport) int { return len(r.Rows) + 1 }

// Update handles a key of the checks pane; handled says it used it.
func (p ChecksPane) Update(km tea.KeyMsg) (ChecksPane, bool) {
	k, r := p.keys, p.report
	if r == nil {
		return p, false
	}
	n := entries(r)
	if p.detail {
		switch {
		case key.Matches(km, k.Leave), key.Matches(km, k.Edit):
			p.detail = false
		case key.Matches(km, k.Up):
			p.scroll = max(0, p.scroll-1)
		case key.Matches(km, k.Down):
			p.scroll = min(p.scroll+1, p.maxScroll())
		case key.Matches(km, k.PageUp):
			p.scroll = max(0, p.scroll-p.room())
		case key.Matches(km, k.PageDown):
			p.scroll = min(p.scroll+p.room(), p.maxScroll())
		case key.Matches(km, k.Less):
			p.sel, p.scroll = (p.sel+n-1)%n, 0
		case key.Matches(km, k.More):
			p.sel, p.scroll = (p.sel+1)%n, 0
		default:
			return p, false
		}
		return p, true
	}
	switch {
	case key.Matches(km, k.Up):
		p.sel = max(0, p.sel-1)
	case key.Matches(km, k.Down):
		p.sel = min(n-1, p.sel+1)
	case key.Matches(km, k.Edit):
		p.detail, p.scroll = true, 0
	default:
		return p, false
	}
	return p, true
}

// room is the number of body lines the pane shows.
func (p ChecksPane) room() int { return max(1, p.h-2) }

// checkLine is a check's line in the list.
func (p ChecksPane) checkLine(c CheckRow) string {
	st := p.st
	mark := st.Pass.Render("✓")
	if !c.Passed {
		mark = st.Fail.Render("✗")
	}
	line := fmt.Sprintf("%s %-13s worst %s", mark, c.Name, numfmt.Effort(c.Worst))
	switch {
	case c.Belief != nil && c.Report != nil:
		b, r, ok := num.Witness(c.Belief, c.Report, !c.Passed)
		line += " at q=" + b
		if ok {
			line += " p=" + r
		}
	case c.Belief != nil:
		line += " at q=" + num.Format(c.Belief)
	case c.Report != nil:
		line += " p=" + num.Format(c.Report)
	}
	return line
}

// rowLines are the list's lines under the verdict, in room lines: every
// check (with its note when all fit), the notes entry and the notes, or a
// window of them that holds the selected entry.
func (p ChecksPane) rowLines(r *CheckReport, room int) []string {
	st := p.st
	notes := room >= 2*len(r.Rows)+len(r.Notes)+2
	var lines []string
	var at []int // at[i] is the first line of entry i
	sel := func(i int, l string) string {
		if p.focused && i == p.sel {
			return st.Selected.Render("›") + l
		}
		return " " + l
	}
	for i, c := range r.Rows {
		at = append(at, len(lines))
		lines = append(lines, sel(i, p.checkLine(c)))
		if c.Note != "" && notes {
			lines = append(lines, st.Dim.Render("    "+c.Note))
		}
	}
	at = append(at, len(lines))
	lines = append(lines, sel(len(r.Rows), st.Label.Render(fmt.Sprintf("verdict and notes (%d)", len(r.Notes)))+st.Dim.Render(" enter: full text")))
	for _, n := range r.Notes {
		lines = append(lines, st.Dim.Render("  "+n))
	}
	lines = append(lines, st.Dim.Render(shortKindLine(r)))
	if len(lines) <= room {
		return lines
	}
	// Scroll so that the selected entry's line is in view, with a line
	// saying how much is below.
	room = max(1, room-1)
	first := min(max(0, at[min(p.sel, len(at)-1)]-room/2), len(lines)-room)
	out := append([]string(nil), lines[first:first+room]...)
	more := fmt.Sprintf("↓ %d more (↑/↓, enter: full text)", len(lines)-first-room)
	if first+room == len(lines) {
		more = fmt.Sprintf("↑ %d above (↑/↓, enter: full text)", first)
	}
	return append(out, st.Dim.Render(more))
}

// detailText is the full text of the selected entry, in plain lines.
func (p ChecksPane) detailText() []string {
	r := p.report
	full := func(v []float64) string {
		s := make([]string, len(v))
		for i, x := range v {
			s[i] = strconv.FormatFloat(x, 'g', 10, 64) // ten digits: the witness, not binary noise
		}
		return "(" + strings.Join(s, ", ") + ")"
	}
	if p.sel < len(r.Rows) {
		c := r.Rows[p.sel]
		verdict := "passed"
		if !c.Passed {
			verdict = "FAILED"
		}
		out := []string{fmt.Sprintf("Check %d of %d: %s — %s", p.sel+1, len(r.Rows), c.Name, verdict),
			"worst value found: " + numfmt.Effort(c.Worst)}
		if c.Belief != nil {
			out = append(out, "at belief q = "+full(c.Belief))
		}
		if c.Report != nil {
			out = append(out, "report p = "+full(c.Report))
		}
		if c.Note != "" {
			out = append(out, "what it measures: "+c.Note)
		}
		return append(out, gridLine(r), kindLine(r))
	}
	kind := r.Kind()
	if b := r.Standing().Basis; b != "" {
		kind += ": " + b
	}
	out := []string{"Verdict " + r.Final() + " (" + kind + ")"}
	if r.Final() != r.Verdict {
		out = append(out, "Grid verdict "+r.Verdict+" (grid evidence)")
	}
	if c := r.Certificate; c != nil {
		out = append(out, "Certificate "+c.Verdict+" ("+c.Kind+"): "+c.Statement)
	}
	out = append(out, gridLine(r))
	return append(append(out, r.Notes...), kindLine(r))
}

// shortKindLine is kindLine for the pane's list, where a line is narrow.
func shortKindLine(r *CheckReport) string {
	switch st := r.Standing(); {
	case st.Kind == certify.Certified && st.Basis != "":
		return "Proved by the certificate's witness; the grid missed it."
	case st.Kind == certify.Certified:
		return "Proved; the grid check agrees."
	}
	return "A grid check is evidence, not proof."
}

// kindLine closes the full text with what the verdict rests on.
func kindLine(r *CheckReport) string {
	switch st := r.Standing(); {
	case st.Kind == certify.Certified && st.Basis != "":
		return "The verdict rests on the certificate's witness, checked in interval arithmetic; the grid check, which samples, missed it."
	case st.Kind == certify.Certified:
		return "The verdict rests on the certificate's proof; the grid check, run in full before it, found nothing against it."
	}
	return "A grid check is evidence, not proof."
}

// detailLines is the selected entry's full text wrapped to the pane.
func (p ChecksPane) detailLines() []string {
	var lines []string
	for _, t := range p.detailText() {
		lines = append(lines, strings.Split(ansi.Wrap(t, max(10, p.w-2), ""), "\n")...)
	}
	return lines
}

// maxScroll is the last scroll position of the full text: its last line
// at the bottom of the pane.
func (p ChecksPane) maxScroll() int { return max(0, len(p.detailLines())-(p.room()-1)) }

// detailView is the full-text view: the entry's text wrapped to the pane,
// from the scroll position, under a line of keys.
func (p ChecksPane) detailView() []string {
	st, k := p.st, p.keys
	lines := p.detailLines()
	room := p.room() - 1
	scroll := min(p.scroll, p.maxScroll())
	head := st.Dim.Render(fmt.Sprintf("%s/%s scroll · %s/%s other · %s back", k.Up.Help().Key, k.Down.Help().Key, k.Less.Help().Key, k.More.Help().Key, k.Leave.Help().Key))
	end := min(len(lines), scroll+room)
	return append([]string{head}, lines[scroll:end]...)
}
