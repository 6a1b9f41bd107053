package tui

import (
	"fmt"
	"reflect"
	"slices"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/progress"
	"github.com/charmbracelet/bubbles/viewport"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"

	"scorewright/generator/design"
	"scorewright/internal/numfmt"
)

// BudgetPane edits the budget and shows the payment table preview and the
// menu re-check.
type BudgetPane struct {
	st        Styles
	keys      KeyMap
	w, h      int
	focused   bool
	available bool
	sel       int
	typing    bool
	ti        valueInput
	vp        viewport.Model
	table     *TableView
	err       error
	stale     bool
	note      string
	// running is a fit in the background, done of total beliefs re-checked.
	running     bool
	done, total float64
	bar         progress.Model
	// prop is the search for a budget that passes (tui/propose.go); shared
	// by the copies of the pane.
	prop *proposal
}

// NewBudgetPane returns a budget pane; available says whether the build
// can fit budgets.
func NewBudgetPane(st Styles, keys KeyMap, available bool) BudgetPane {
	ti := newValueInput(st.Selected.Reverse(true))
	vp := viewport.New(10, 3)
	vp.KeyMap = viewport.KeyMap{PageDown: keys.PageDown, PageUp: keys.PageUp, Left: keys.TableLeft, Right: keys.TableRight}
	vp.SetHorizontalStep(8)
	return BudgetPane{st: st, keys: keys, available: available, ti: ti, vp: vp, bar: newBar(), prop: &proposal{}}
}

// SetSize sets the outer size of the pane.
func (p *BudgetPane) SetSize(w, h int) {
	p.w, p.h = w, h
	p.vp.Width = max(4, w-2)
	p.vp.Height = max(1, h-2-p.fieldRows(len(budgetFields()))-1)
	p.bar.Width = max(10, w-20)
	p.vp.SetContent(p.tableText())
	p.ti.Width = max(6, w-20)
}

// Focus marks the pane as the one keys go to.
func (p *BudgetPane) Focus() { p.focused = true }

// Blur ends typing and unmarks the pane.
func (p *BudgetPane) Blur() {
	p.focused, p.typing = false, false
	p.ti.Blur()
}

// Typing reports whether the value input has the keys.
func (p BudgetPane) Typing() bool { return p.typing }

// KeyHelp lists the pane's keys.
func (p BudgetPane) KeyHelp() []key.Binding {
	k := p.keys
	// The map's ←/→ and enter speak of the design pane (modes, presets);
	// here they step and edit the selected budget value.
	out := []key.Binding{k.Up, k.Down, relabel(k.Less, "step down"), relabel(k.More, "step up"), relabel(k.Edit, "edit"), k.Propose}
	if p.prop.props != nil {
		out = append(out, k.TakeFirst, k.TakeSecond)
	}
	return append(out, k.PageUp, k.PageDown, k.TableLeft, k.TableRight)
}

// setTable shows a fit result.
func (p *BudgetPane) setTable(t *TableView, err error) {
	p.table, p.err, p.stale, p.running = t, err, false, false
	p.vp.SetContent(p.tableText())
}

func (p *BudgetPane) edited() {
	p.stale, p.running = p.table != nil, false
	p.prop.stop()
}

// fitting marks a fit as begun; progressed moves its bar.
func (p *BudgetPane) fitting()                       { p.running, p.done, p.total = true, 0, 0 }
func (p *BudgetPane) progressed(done, total float64) { p.done, p.total = done, total }

// Update handles a key, editing d's budget in place.
func (p BudgetPane) Update(msg tea.Msg, d *design.Design) (BudgetPane, tea.Cmd, bool) {
	km, ok := msg.(tea.KeyMsg)
	if !ok {
		return p, nil, false
	}
	k := p.keys
	fields := fieldsFor(d)
	p.sel = min(p.sel, len(fields)-1)
	f := fields[p.sel]
	if p.typing {
		switch {
		case key.Matches(km, k.Leave):
			p.typing = false
			p.ti.Blur()
			p.note = "not changed"
			return p, nil, false
		case key.Matches(km, k.Edit):
			typed := p.ti.Value()
			changed := p.apply(d, f, func(t *design.Design) error { return f.parse(t, typed) })
			if p.note == "" || changed {
				p.typing = false
				p.ti.Blur()
			}
			return p, nil, changed
		}
		var cmd tea.Cmd
		p.ti, cmd = p.ti.Update(km)
		return p, cmd, false
	}
	switch {
	case key.Matches(km, k.Up):
		p.sel = max(0, p.sel-1)
	case key.Matches(km, k.Down):
		p.sel = min(len(fields)-1, p.sel+1)
	case key.Matches(km, k.Edit):
		if why := p.offNote(f, d); why != "" {
			p.note = why
			return p, nil, false
		}
		p.typing, p.note = true, ""
		edit := f.edit
		if edit == nil {
			edit = f.show
		}
		return p, p.ti.Start(edit(d)), false
	case key.Matches(km, k.Less), key.Matches(km, k.More), key.Matches(km, k.LessFine), key.Matches(km, k.MoreFine):
		if f.step == nil {
			p.note = f.label + ": " + errNoStep.Error()
			return p, nil, false
		}
		up := key.Matches(km, k.More) || key.Matches(km, k.MoreFine)
		fine := key.Matches(km, k.LessFine) || key.Matches(km, k.MoreFine)
		return p, nil, p.apply(d, f, func(t *design.Design) error { return f.step(t, up, fine) })
	case key.Matches(km, k.PageUp), key.Matches(km, k.PageDown), key.Matches(km, k.TableLeft), key.Matches(km, k.TableRight):
		var cmd tea.Cmd
		p.vp, cmd = p.vp.Update(km)
		return p, cmd, false
	}
	return p, nil, false
}

// offNote says why field f cannot be edited for d, or "".
func (p BudgetPane) offNote(f budgetField, d *design.Design) string {
	if f.off == nil {
		return ""
	}
	if why := f.off(d); why != "" {
		return f.label + ": " + why
	}
	return ""
}

// apply changes a field through change on a copy of d and keeps the copy
// if it stays valid, saying why not otherwise.
func (p *BudgetPane) apply(d *design.Design, f budgetField, change func(t *design.Design) error) bool {
	if why := p.offNote(f, d); why != "" {
		p.note = why
		return false
	}
	trial := d.Clone()
	if err := change(trial); err != nil {
		p.note = err.Error()
		return false
	}
	if err := validField(d, trial); err != nil {
		p.note = err.Error()
		return false
	}
	p.note = ""
	if reflect.DeepEqual(trial, d) {
		return false // the same value typed again is no edit: nothing to save
	}
	*d = *trial
	return true
}

// nextStep returns the listed value after (or before) cur.
func nextStep(steps []float64, cur float64, up bool) float64 {
	if up {
		for _, s := range steps {
			if s > cur+1e-12 {
				return s
			}
		}
		return steps[len(steps)-1]
	}
	for i := len(steps) - 1; i >= 0; i-- {
		if steps[i] < cur-1e-12 {
			return steps[i]
		}
	}
	return steps[0]
}

// layoutTable lines up the cells of t into text rows, header first: the
// row's mark (TIE, BEATEN) when some row has one, then its re-check
// margin, then the report and its pays, so that a narrow pane, or a
// point table with many outcome columns, still shows what each row's
// verdict is (the pays scroll sideways). It runs in the background with
// the fit, so Update only joins the rows.
func layoutTable(t *TableView) {
	marked := slices.ContainsFunc(t.Marks, func(s string) bool { return s != "" })
	var lead []string // the header cells before the report's
	if marked {
		lead = append(lead, "mark")
	}
	if t.Margins != nil {
		lead = append(lead, "margin")
	}
	rows := [][]string{append(slices.Clone(lead), t.Header...)}
	for i, r := range t.Rows {
		var out []string
		if marked {
			out = append(out, t.Marks[i])
		}
		if t.Margins != nil {
			out = append(out, t.Margins[i])
		}
		rows = append(rows, append(out, r...))
	}
	widths := columnWidths(rows)[:len(rows[0])]
	t.lines = nil
	for _, r := range rows {
		parts := make([]string, 0, len(r))
		for i, c := range r {
			if i < len(widths) {
				if marked && i == 0 {
					parts = append(parts, padRight(c, widths[i]))
				} else {
					parts = append(parts, padLeft(c, widths[i]))
				}
			}
		}
		t.lines = append(t.lines, strings.Join(parts, "  "))
	}
}

// tableText is the scroll content: the table, then the notes wrapped to
// the pane, so the table gets the room first.
func (p BudgetPane) tableText() string {
	t := p.table
	if t == nil || len(t.lines) == 0 {
		return ""
	}
	var b strings.Builder
	b.WriteString(p.st.Label.Render(t.lines[0]))
	for _, l := range t.lines[1:] {
		b.WriteByte('\n')
		b.WriteString(l)
	}
	if len(t.Notes) > 0 {
		b.WriteByte('\n')
		for _, n := range t.Notes {
			b.WriteString("\n" + p.st.Dim.Width(max(10, p.vp.Width)).Render(n))
		}
	}
	return b.String()
}

// fieldRows is how many field lines the pane shows at most: the rest of
// its height goes to the verdict and the table.
func (p BudgetPane) fieldRows(n int) int {
	return min(n, max(3, (p.h-4)/2))
}

// fieldWindow is the first of rows fields shown, so that the selected one
// is.
func (p BudgetPane) fieldWindow(n, rows int) int {
	return min(max(0, p.sel-rows/2), n-rows)
}

// fieldLine is one field's line: label, value (or the input) and help.
func (p BudgetPane) fieldLine(i int, f budgetField, d *design.Design) string {
	st := p.st
	m, ls := "  ", st.Label
	if p.focused && i == p.sel && !p.typing {
		m, ls = st.Selected.Render("› "), st.Selected
	}
	val, help := f.show(d), f.help
	if why := p.offNote(f, d); why != "" {
		val, help = "—", why[len(f.label)+2:]
	}
	if f.label == "Cap" && d.Budget.MeanPay != nil {
		help = "unused while a mean pay is set"
	}
	if p.typing && i == p.sel {
		return m + ls.Render(fmt.Sprintf("%-9s", f.label)) + " " + p.ti.View()
	}
	if len([]rune(val)) > 16 {
		val = string([]rune(val)[:15]) + "…"
	}
	return m + ls.Render(fmt.Sprintf("%-9s", f.label)) + " " + fmt.Sprintf("%-8s", val) + " " + st.Dim.Render(help)
}

// minTableLines is the table's head and the rows it keeps at the least
// before the fields and proposals get their full room: a table of one or
// two rows says nothing at 80×24 (where the pane has nine lines inside).
const minTableLines = 5

// View draws the pane for design d. The height is shared in this order:
// the selected field, a refusal or the typing hint, the verdict and the
// proposals, the table's head and first rows, the proposal keys, the
// other fields; what is left goes to the table.
func (p BudgetPane) View(d *design.Design) string {
	st := p.st
	fields := fieldsFor(d)
	p.sel = min(p.sel, len(fields)-1)
	iw := max(10, p.w-2)
	wrapped := func(s lipgloss.Style, text string) []string { return strings.Split(s.Width(iw).Render(text), "\n") }
	var note, hint, status, props, keys []string
	if p.note != "" {
		note = wrapped(st.Error, p.note)
	} else if p.typing {
		if h := p.typingHint(fields[p.sel]); h != "" {
			hint = wrapped(st.Dim, h)
		}
	}
	table := false
	switch {
	case !p.available:
		status = []string{st.Dim.Render("The payment table (package contract/budget)"), st.Dim.Render("is not part of this build yet.")}
	case p.err != nil && !p.running:
		status = wrapped(st.Error, "✗ "+p.err.Error())
	case p.table != nil || p.running:
		table = true
		if p.running {
			status = []string{p.progressLine()}
		} else {
			status = []string{p.verdictLine()}
		}
		props, keys = p.proposalLines()
	default:
		status = []string{st.Dim.Render("fitting…")}
	}
	floor := 0 // the table's lines kept first
	if table && p.table != nil {
		floor = min(minTableLines, len(p.table.lines))
	}
	room := p.h - 2 - 1 - len(note) - len(hint) - len(status) - len(props) - floor
	if len(keys) > room {
		keys = nil // the footer lists them too
	}
	room -= len(keys)
	nf := min(p.fieldRows(len(fields)), 1+max(0, room))
	var lines []string
	first := p.fieldWindow(len(fields), nf)
	for i := first; i < first+nf; i++ {
		lines = append(lines, p.fieldLine(i, fields[i], d))
	}
	lines = append(lines, note...)
	lines = append(lines, hint...)
	lines = append(lines, status...)
	lines = append(lines, props...)
	lines = append(lines, keys...)
	if table {
		vp := p.vp
		vp.Height = max(1, p.h-2-len(lines))
		lines = append(lines, vp.View())
	}
	title := fmt.Sprintf("Budget and table · field %d of %d", p.sel+1, len(fields))
	return paneFrame(st, title, p.focused, p.w, p.h, strings.Join(lines, "\n"))
}

// typingHint is the help under the input of field f: its own, and while
// the value stands whole, that typing replaces it.
func (p BudgetPane) typingHint(f budgetField) string {
	if !p.ti.Whole() {
		return f.hint
	}
	return strings.TrimPrefix(f.hint+"; typing replaces the value, ←/→ edit it", "; ")
}

// progressLine is the fit's progress: the re-check's beliefs done.
func (p BudgetPane) progressLine() string {
	pct := 0.0
	if p.total > 0 {
		pct = p.done / p.total
	}
	line := p.bar.ViewAs(pct) + fmt.Sprintf(" %3.0f%% fitting", pct*100)
	if p.table != nil {
		line += p.st.Dim.Render(" (table below: previous design)")
	}
	return line
}

// verdictLine is the menu re-check's verdict and smallest margin.
func (p BudgetPane) verdictLine() string {
	st, t := p.st, p.table
	v := st.Pass.Render("menu re-check passed")
	if !t.Passed {
		v = st.Fail.Render("menu re-check FAILED")
	}
	v += ", margin " + numfmt.Margin(t.MinMargin)
	if t.NoRecheck != "" {
		v = st.Dim.Render(t.NoRecheck)
	}
	if p.stale {
		v += st.Dim.Render(" (previous design)")
	}
	return v
}
