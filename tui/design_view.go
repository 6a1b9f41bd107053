package tui

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"scorewright/generator/design"
	"scorewright/generator/formula"
	"scorewright/presets"
)

// View draws the pane for design d.
func (p DesignPane) View(d *design.Design) string {
	st := p.st
	iw := max(4, p.w-2)
	var lines []string
	mark := func(row int, label, value string) string {
		m := "  "
		ls := st.Label
		if p.focused && p.sel == row && p.edit == editNone {
			m, ls = st.Selected.Render("› "), st.Selected
		}
		return m + ls.Render(fmt.Sprintf("%-9s", label)) + " " + value
	}
	switch {
	case onInterval(d) && p.edit == editLabels:
		lines = append(lines, mark(0, "Interval", "lo, hi:"), "  "+p.ti.View())
	case onInterval(d):
		iv := "not set"
		if len(d.Interval) == 2 {
			iv = fmt.Sprintf("[%g, %g]  (point forecast of a mean)", d.Interval[0], d.Interval[1])
		}
		lines = append(lines, mark(0, "Interval", iv))
	case p.edit == editLabels:
		lines = append(lines, mark(0, "Outcomes", "labels, comma-separated:"), "  "+p.ti.View())
	default:
		lines = append(lines, mark(0, "Outcomes", fmt.Sprintf("%s  (%d)", strings.Join(d.Labels, ", "), d.N())))
	}
	order := "unordered"
	if d.Ordered {
		order = "ordered (csum allowed)"
	}
	if onInterval(d) {
		order = st.Dim.Render("— (a number on the interval)")
	}
	lines = append(lines, mark(1, "Order", order))
	lines = append(lines, mark(2, "Mode", modeLine(d.Mode)))
	hint := ""
	if p.edit == editFormula {
		hint = st.Dim.Render("editing — esc to stop")
	} else if p.focused && p.sel == int(rowFormula) {
		hint = st.Dim.Render("enter to edit")
	}
	lines = append(lines, mark(3, "Formula", hint))
	if p.edit == editPreset {
		// The picker takes the formula's place while it is open.
		lines = append(lines, "  "+p.st.Label.Render("Choose a preset"))
		lines = append(lines, p.pickerLines(d)...)
	} else {
		lines = append(lines, strings.Split(p.ta.View(), "\n")...)
		lines = append(lines, p.errorLines(iw)...)
	}
	if len(p.params) > 0 {
		lines = append(lines, "  "+st.Label.Render("Parameters")+st.Dim.Render("  ←/→ step 0.1, shift 0.01"))
		for i, pv := range p.params {
			row := int(rowParams) + i
			val := strconv.FormatFloat(pv.Value, 'g', 6, 64)
			if p.edit == editParam && p.sel == row {
				lines = append(lines, mark(row, "  "+pv.Name, p.ti.View()))
				continue
			}
			lines = append(lines, mark(row, "  "+pv.Name, "= "+val))
		}
	}
	preset := d.Preset
	if preset == "" {
		preset = st.Dim.Render("none (own formula)")
	}
	lines = append(lines, mark(p.presetRow(), "Preset", preset))
	if p.note != "" {
		lines = append(lines, st.Dim.Render("  "+p.note))
	}
	title := "Design"
	if d.Title != "" {
		title += " · " + d.Title
	}
	return paneFrame(st, title, p.focused, p.w, p.h, strings.Join(lines, "\n"))
}

// modeLine is what the mode row says about a mode: its title and hint
// (generator/design) with the keys that change it.
func modeLine(m design.Mode) string {
	switch title, hint := m.Title(); {
	case title == "":
		return string(m) + " (not computed by this build)"
	case hint != "":
		return title + " (" + hint + "; ←/→)"
	default:
		return title + " (←/→)"
	}
}

// errorLines shows the compile error under the formula, with a caret at
// its column.
func (p DesignPane) errorLines(iw int) []string {
	if p.err == nil {
		if p.compiles {
			out := []string{p.st.Pass.Render("  ✓ compiles")}
			for _, w := range p.warnings {
				out = append(out, strings.Split(p.st.Dim.Width(max(10, iw-2)).PaddingLeft(2).Render("! "+w), "\n")...)
			}
			return out
		}
		return []string{""}
	}
	var fe *formula.Error
	if errors.As(p.err, &fe) {
		out := strings.Split(p.st.Error.Width(max(10, iw-2)).PaddingLeft(2).Render("✗ "+fe.Error()), "\n")
		for _, l := range strings.Split(fe.Caret(), "\n") {
			out = append(out, p.st.Error.Render("    "+l))
		}
		return out
	}
	return strings.Split(p.st.Error.Width(max(10, iw-2)).PaddingLeft(2).Render("✗ "+p.err.Error()), "\n")
}

func (p DesignPane) pickerLines(d *design.Design) []string {
	all := presets.All()
	tail := []string{p.st.Dim.Render("    ↑/↓ choose, enter apply, esc close")}
	if p.confirm == p.pick+1 {
		q := kindQuestion(all[p.pick], d) + " " + p.keys.Edit.Help().Key + " again takes it, " + p.keys.Leave.Help().Key + " keeps the design as it is."
		tail = strings.Split(p.st.Error.Width(max(10, p.w-6)).PaddingLeft(4).Render(q), "\n")
	}
	// A window of presets around the pick when the pane is short: five
	// rows above the picker, the question or hint, and two below it.
	rows := min(len(all), max(3, p.h-2-5-len(tail)-2))
	first := min(max(0, p.pick-rows/2), len(all)-rows)
	var out []string
	for i := first; i < first+rows; i++ {
		ps := all[i]
		m := "    "
		name := fmt.Sprintf("%-18s", ps.Name)
		if i == p.pick {
			m, name = p.st.Selected.Render("  ▸ "), p.st.Selected.Render(name)
		}
		desc := ps.Title
		switch {
		case presetUnavailable(ps, d) != "":
			desc = p.st.Dim.Render("(" + presetUnavailable(ps, d) + ")")
		case kindQuestion(ps, d) != "" && ps.Kind == presets.KindPoint:
			desc = "[point] " + desc
		case kindQuestion(ps, d) != "":
			desc = "[outcomes] " + desc
		}
		out = append(out, m+name+" "+desc)
	}
	return append(out, tail...)
}
