package tui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/cursor"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textinput"
	"github.com/charmbracelet/bubbles/viewport"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
)

// budgetField is one editable line of the budget pane.
type budgetField struct {
	label, help string
	get         func(b *design.Budget) float64
	set         func(b *design.Budget, v float64)
	// steps, when set, are the values ←/→ cycle through; otherwise ←/→
	// add ±step (±step/10 with shift).
	steps []float64
	step  float64
}

// budgetFields lists the editable fields, fresh on each call.
func budgetFields() []budgetField {
	return []budgetField{
		{label: "Floor", help: "smallest payment", step: 1,
			get: func(b *design.Budget) float64 { return b.Floor }, set: func(b *design.Budget, v float64) { b.Floor = v }},
		{label: "Cap", help: "largest payment", step: 1,
			get: func(b *design.Budget) float64 { return b.Cap }, set: func(b *design.Budget, v float64) { b.Cap = v }},
		{label: "Mean", help: "mean pay instead of the cap", step: 1,
			get: func(b *design.Budget) float64 {
				if b.MeanPay == nil {
					return 0
				}
				return *b.MeanPay
			},
			set: func(b *design.Budget, v float64) {
				if v <= 0 {
					b.MeanPay = nil
					return
				}
				b.MeanPay = &v
			}},
		{label: "Step", help: "report menu step", steps: []float64{0.01, 0.02, 0.025, 0.05, 0.1, 0.125, 0.2, 0.25, 0.5},
			get: func(b *design.Budget) float64 { return b.Step }, set: func(b *design.Budget, v float64) { b.Step = v }},
		{label: "Unit", help: "rounding unit (0: none)", steps: []float64{0, 0.01, 0.05, 0.1, 0.25, 0.5, 1, 5},
			get: func(b *design.Budget) float64 { return b.Unit }, set: func(b *design.Budget, v float64) { b.Unit = v }},
	}
}

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
	ti        textinput.Model
	vp        viewport.Model
	table     *TableView
	err       error
	stale     bool
	note      string
}

// NewBudgetPane returns a budget pane; available says whether the build
// can fit budgets.
func NewBudgetPane(st Styles, keys KeyMap, available bool) BudgetPane {
	ti := textinput.New()
	ti.Prompt = "› "
	ti.Cursor.SetMode(cursor.CursorStatic)
	calmEditing(&ti.KeyMap.DeleteAfterCursor, &ti.KeyMap.DeleteBeforeCursor)
	vp := viewport.New(10, 3)
	vp.KeyMap = viewport.KeyMap{PageDown: keys.PageDown, PageUp: keys.PageUp}
	return BudgetPane{st: st, keys: keys, available: available, ti: ti, vp: vp}
}

// SetSize sets the outer size of the pane.
func (p *BudgetPane) SetSize(w, h int) {
	p.w, p.h = w, h
	p.vp.Width = max(4, w-2)
	p.vp.Height = max(1, h-2-len(budgetFields())-1)
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
	return []key.Binding{k.Up, k.Down, k.Less, k.More, k.Edit, k.PageUp, k.PageDown}
}

// setTable shows a fit result.
func (p *BudgetPane) setTable(t *TableView, err error) {
	p.table, p.err, p.stale = t, err, false
	p.vp.SetContent(p.tableText())
}

func (p *BudgetPane) edited() { p.stale = p.table != nil }

// Update handles a key, editing d's budget in place.
func (p BudgetPane) Update(msg tea.Msg, d *design.Design) (BudgetPane, tea.Cmd, bool) {
	km, ok := msg.(tea.KeyMsg)
	if !ok {
		return p, nil, false
	}
	k := p.keys
	f := budgetFields()[p.sel]
	if p.typing {
		switch {
		case key.Matches(km, k.Leave):
			p.typing = false
			p.ti.Blur()
			return p, nil, false
		case key.Matches(km, k.Edit):
			v, err := strconv.ParseFloat(strings.TrimSpace(p.ti.Value()), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				p.note = fmt.Sprintf("%q is not a finite number", p.ti.Value())
				return p, nil, false
			}
			p.typing = false
			p.ti.Blur()
			return p, nil, p.apply(d, f, v)
		}
		var cmd tea.Cmd
		p.ti, cmd = p.ti.Update(km)
		return p, cmd, false
	}
	switch {
	case key.Matches(km, k.Up):
		p.sel = max(0, p.sel-1)
	case key.Matches(km, k.Down):
		p.sel = min(len(budgetFields())-1, p.sel+1)
	case key.Matches(km, k.Edit):
		p.typing = true
		p.ti.SetValue(strconv.FormatFloat(f.get(&d.Budget), 'g', -1, 64))
		p.ti.CursorEnd()
		return p, p.ti.Focus(), false
	case key.Matches(km, k.Less), key.Matches(km, k.More), key.Matches(km, k.LessFine), key.Matches(km, k.MoreFine):
		up := key.Matches(km, k.More) || key.Matches(km, k.MoreFine)
		cur := f.get(&d.Budget)
		var v float64
		if f.label == "Step" && d.Mode.OnInterval() && len(d.Interval) == 2 {
			// A point menu step is in the interval's units: hundredths of it.
			s := (d.Interval[1] - d.Interval[0]) / 100
			if !up {
				s = -s
			}
			v = math.Max(0, math.Round((cur+s)/(d.Interval[1]-d.Interval[0])*100)*(d.Interval[1]-d.Interval[0])/100)
		} else if f.label == "Mean" && d.Budget.MeanPay == nil {
			if !up {
				return p, nil, false
			}
			// From none: three quarters of the way from floor to cap, what
			// the quadratic rule pays a uniform belief on a cap budget.
			v = math.Round(d.Budget.Floor + 0.75*(d.Budget.Cap-d.Budget.Floor))
		} else if f.label == "Mean" && !up && f.get(&d.Budget)-f.step <= d.Budget.Floor {
			v = 0 // stepping below the floor clears the mean pay
		} else if f.steps != nil {
			v = nextStep(f.steps, cur, up)
		} else {
			s := f.step
			if key.Matches(km, k.LessFine) || key.Matches(km, k.MoreFine) {
				s /= 10
			}
			if !up {
				s = -s
			}
			v = math.Round((cur+s)*1e9) / 1e9
		}
		return p, nil, p.apply(d, f, v)
	case key.Matches(km, k.PageUp), key.Matches(km, k.PageDown):
		var cmd tea.Cmd
		p.vp, cmd = p.vp.Update(km)
		return p, cmd, false
	}
	return p, nil, false
}

// apply sets a field if the budget stays valid, saying why not otherwise.
func (p *BudgetPane) apply(d *design.Design, f budgetField, v float64) bool {
	if f.label == "Mean" && v > 0 && d.Mode.OnInterval() {
		p.note = "point-forecast tables are fitted to a floor and a cap; a mean pay is for rules over outcomes"
		return false
	}
	trial := *d
	f.set(&trial.Budget, v)
	if err := trial.ValidateBudget(); err != nil {
		p.note = err.Error()
		return false
	}
	d.Budget = trial.Budget
	p.note = ""
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

// layoutTable lines up the cells of t into text rows, header first. It
// runs in the background with the fit, so Update only joins the rows.
func layoutTable(t *TableView) {
	widths := make([]int, len(t.Header))
	for i, h := range t.Header {
		widths[i] = len([]rune(h))
	}
	for _, r := range t.Rows {
		for i, c := range r {
			if i < len(widths) && len([]rune(c)) > widths[i] {
				widths[i] = len([]rune(c))
			}
		}
	}
	row := func(cells []string) string {
		var parts []string
		for i, c := range cells {
			if i < len(widths) {
				parts = append(parts, fmt.Sprintf("%*s", widths[i], c))
			}
		}
		return strings.Join(parts, "  ")
	}
	t.lines = []string{row(t.Header)}
	for _, r := range t.Rows {
		t.lines = append(t.lines, row(r))
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

// View draws the pane for design d.
func (p BudgetPane) View(d *design.Design) string {
	st := p.st
	var lines []string
	for i, f := range budgetFields() {
		m, ls := "  ", st.Label
		if p.focused && i == p.sel && !p.typing {
			m, ls = st.Selected.Render("› "), st.Selected
		}
		val := strconv.FormatFloat(f.get(&d.Budget), 'g', 6, 64)
		help := f.help
		switch {
		case f.label == "Mean" && d.Mode.OnInterval():
			val, help = "—", "point tables: floor and cap"
		case f.label == "Mean" && d.Budget.MeanPay == nil:
			val = "none"
		case f.label == "Mean":
			help = "truthful mean pay (0: none)"
		case f.label == "Cap" && d.Budget.MeanPay != nil:
			help = "not used while a mean pay is set"
		}
		if p.typing && i == p.sel {
			val = p.ti.View()
		}
		lines = append(lines, m+ls.Render(fmt.Sprintf("%-6s", f.label))+" "+fmt.Sprintf("%-8s", val)+" "+st.Dim.Render(help))
	}
	iw := max(10, p.w-2)
	if p.note != "" {
		lines = append(lines, strings.Split(st.Error.Width(iw).Render(p.note), "\n")...)
	}
	switch {
	case !p.available:
		lines = append(lines, st.Dim.Render("The payment table (package contract/budget)"), st.Dim.Render("is not part of this build yet."))
	case p.err != nil:
		lines = append(lines, strings.Split(st.Error.Width(iw).Render("✗ "+p.err.Error()), "\n")...)
	case p.table != nil:
		t := p.table
		v := st.Pass.Render("menu re-check passed")
		if !t.Passed {
			v = st.Fail.Render("menu re-check FAILED")
		}
		v += fmt.Sprintf(", smallest margin %.4g", t.MinMargin)
		if t.NoRecheck != "" {
			v = st.Dim.Render(t.NoRecheck)
		}
		if p.stale {
			v += st.Dim.Render(" (previous design)")
		}
		lines = append(lines, v+st.Dim.Render("  pgup/pgdn: table and notes"))
		vp := p.vp
		vp.Height = max(1, p.h-2-len(lines))
		lines = append(lines, vp.View())
	default:
		lines = append(lines, st.Dim.Render("fitting…"))
	}
	return paneFrame(st, "Budget and table", p.focused, p.w, p.h, strings.Join(lines, "\n"))
}
