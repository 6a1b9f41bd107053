package tui

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/cursor"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textarea"
	"github.com/charmbracelet/bubbles/textinput"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
	"scorewright/generator/formula"
	"scorewright/presets"
)

// designRow is one selectable line of the design pane.
type designRow int

const (
	rowOutcomes designRow = iota
	rowOrder
	rowMode
	rowFormula
	rowParams // rowParams+i is parameter i; the preset row follows them
)

// editing says which input of the design pane has the keys.
type editing int

const (
	editNone editing = iota
	editFormula
	editLabels
	editParam
	editPreset
)

// modes lists the mode row's entries in the order ←/→ cycle; emphasis is
// skipped unless there are 2 outcomes.
func modes() []design.Mode { return design.Modes }

// samplePoint is the generator offered the first time a design switches
// to point mode: phi = -x^2, squared error.
const samplePoint = "-x^2"

// defaultInterval is the interval a design gets when it first becomes a
// point-forecast design.
func defaultInterval() []float64 { return []float64{0, 100} }

// samplePayout is the formula offered the first time a design switches to
// payout mode: a scaled quadratic payment, to be replaced by the payout
// under audit.
const samplePayout = "# pay(p, y): the payment when outcome y happens\n10 - 5*sum((p - hit)^2)"

// samplePointPayout is the formula offered the first time a design
// switches to auditing a point-forecast payout: a scaled squared error on
// the default interval [0, 100], paying 0 to 50.
const samplePointPayout = "# pay(x, y): the payment for report x when the outcome is y\n50 - (x - y)^2 / 200"

// sampleEmphasis is the weight offered the first time a design switches
// to emphasis mode: the beta family, a = b = 1 the quadratic rule.
const sampleEmphasis = "# w(c): where the rule puts its incentive\na = 1\nb = 1\nc^(a-1) * (1-c)^(b-1)"

// DesignPane edits the design: outcomes, order, mode, formula, parameters
// and preset.
type DesignPane struct {
	st       Styles
	keys     KeyMap
	w, h     int
	focused  bool
	sel      int
	edit     editing
	ta       textarea.Model
	ti       textinput.Model
	pick     int
	params   []formula.ParamValue
	err      error // the compile error of the current design
	warnings []string
	note     string // a one-line remark on the last action
	byMode   map[design.Mode]string
	// interval keeps a point design's interval while the design is a
	// payout over outcomes (which must have none).
	interval []float64
	// stepByMode keeps the menu step of point (true) and outcome (false)
	// designs apart when the mode changes.
	stepByMode map[bool]float64
	compiles   bool
}

// NewDesignPane returns a design pane showing d.
func NewDesignPane(st Styles, keys KeyMap, d *design.Design) DesignPane {
	ta := textarea.New()
	ta.ShowLineNumbers = false
	ta.Prompt = "┃ "
	// No limit of the editor's own: it would cut a longer formula, opened
	// or pasted, without a word. The language's limit is enforced in
	// Update, with a message.
	ta.CharLimit = 0
	ta.MaxHeight = 0
	ta.Cursor.SetMode(cursor.CursorStatic)
	ta.FocusedStyle.CursorLine = st.Header.UnsetBold()
	ta.BlurredStyle.Text = st.Dim
	ta.SetValue(d.Formula)
	ti := textinput.New()
	ti.Prompt = "› "
	ti.Cursor.SetMode(cursor.CursorStatic)
	return DesignPane{st: st, keys: keys, ta: ta, ti: ti, byMode: map[design.Mode]string{}, stepByMode: map[bool]float64{}}
}

// SetSize sets the outer size of the pane.
func (p *DesignPane) SetSize(w, h int) {
	p.w, p.h = w, h
	p.ta.SetWidth(max(10, w-4))
	p.ta.SetHeight(p.formulaHeight())
	p.ti.Width = max(10, w-6)
}

func (p DesignPane) formulaHeight() int {
	return max(2, min(8, p.h-16))
}

// Focus marks the pane as the one keys go to.
func (p *DesignPane) Focus() { p.focused = true }

// Blur ends any editing and unmarks the pane.
func (p *DesignPane) Blur() {
	p.focused = false
	p.stopEditing()
}

func (p *DesignPane) stopEditing() {
	p.edit = editNone
	p.ta.Blur()
	p.ti.Blur()
}

// Typing reports whether a text input has the keys, so printable keys
// are text, not shortcuts.
func (p DesignPane) Typing() bool {
	return p.edit == editFormula || p.edit == editLabels || p.edit == editParam
}

// Picking reports whether the preset picker is open.
func (p DesignPane) Picking() bool { return p.edit == editPreset }

// KeyHelp lists the pane's keys.
func (p DesignPane) KeyHelp() []key.Binding {
	k := p.keys
	return []key.Binding{k.Up, k.Down, k.Edit, k.Leave, k.Less, k.More, k.Toggle, k.AddOutcome, k.DropOutcome}
}

// setCompiled takes the result of compiling the current design.
func (p *DesignPane) setCompiled(c *compiled) {
	p.err, p.warnings = c.err, c.warnings
	p.compiles = c.err == nil
	if c.err == nil {
		p.params = c.params
	}
	if p.sel > p.presetRow() {
		p.sel = p.presetRow()
	}
}

// reset shows a design freshly loaded.
func (p *DesignPane) reset(d *design.Design) {
	p.stopEditing()
	p.ta.SetValue(d.Formula)
	p.params, p.err, p.sel, p.byMode, p.stepByMode = nil, nil, 0, map[design.Mode]string{}, map[bool]float64{}
}

func (p DesignPane) presetRow() int { return int(rowParams) + len(p.params) }

// Update handles a message for the pane, editing d in place; changed says
// whether the design changed.
func (p DesignPane) Update(msg tea.Msg, d *design.Design) (DesignPane, tea.Cmd, bool) {
	km, isKey := msg.(tea.KeyMsg)
	if !isKey {
		return p, nil, false
	}
	switch p.edit {
	case editFormula:
		if key.Matches(km, p.keys.Leave) {
			p.stopEditing()
			return p, nil, false
		}
		var cmd tea.Cmd
		before := p.ta.Value()
		p.ta, cmd = p.ta.Update(km)
		if p.ta.Value() == before {
			return p, cmd, false
		}
		if n := len(p.ta.Value()); n > formula.MaxSource {
			p.ta.SetValue(before)
			p.note = fmt.Sprintf("refused: the formula would be %d bytes; a formula may be at most %d (64 KiB)", n, formula.MaxSource)
			return p, cmd, false
		}
		d.Formula = p.ta.Value()
		d.Preset = ""
		pruneParams(d)
		return p, cmd, true
	case editLabels, editParam:
		switch {
		case key.Matches(km, p.keys.Leave):
			p.stopEditing()
			p.note = "not changed"
			return p, nil, false
		case key.Matches(km, p.keys.Edit):
			changed := p.commitInput(d)
			return p, nil, changed
		}
		var cmd tea.Cmd
		p.ti, cmd = p.ti.Update(km)
		return p, cmd, false
	case editPreset:
		return p.updatePicker(km, d)
	}
	return p.updateRows(km, d)
}

func (p DesignPane) updateRows(km tea.KeyMsg, d *design.Design) (DesignPane, tea.Cmd, bool) {
	k := p.keys
	row := p.sel
	switch {
	case key.Matches(km, k.Up):
		p.sel = max(0, p.sel-1)
	case key.Matches(km, k.Down):
		p.sel = min(p.presetRow(), p.sel+1)
	case key.Matches(km, k.Edit):
		switch {
		case row == int(rowOutcomes):
			p.edit = editLabels
			p.ti.SetValue(strings.Join(d.Labels, ", "))
			if onInterval(d) {
				p.ti.SetValue(fmt.Sprintf("%g, %g", d.Interval[0], d.Interval[1]))
			}
			p.ti.CursorEnd()
			return p, p.ti.Focus(), false
		case row == int(rowOrder) && !onInterval(d):
			d.Ordered = !d.Ordered
			return p, nil, true
		case row == int(rowFormula):
			p.edit = editFormula
			return p, p.ta.Focus(), false
		case row >= int(rowParams) && row < p.presetRow():
			p.edit = editParam
			p.ti.SetValue(strconv.FormatFloat(p.params[row-int(rowParams)].Value, 'g', -1, 64))
			p.ti.CursorEnd()
			return p, p.ti.Focus(), false
		case row == p.presetRow():
			p.edit = editPreset
			p.pick = 0
			for i, ps := range presets.All() {
				if ps.Name == d.Preset {
					p.pick = i
				}
			}
		}
	case key.Matches(km, k.Toggle) && row == int(rowOrder) && !onInterval(d):
		d.Ordered = !d.Ordered
		return p, nil, true
	case (key.Matches(km, k.AddOutcome) || key.Matches(km, k.DropOutcome)) && onInterval(d):
		p.note = "a point forecast has no outcome list; set the interval instead"
		return p, nil, false
	case key.Matches(km, k.AddOutcome):
		if d.N() >= formula.MaxOutcomes {
			p.note = fmt.Sprintf("at most %d outcomes", formula.MaxOutcomes)
			return p, nil, false
		}
		d.Labels = append(d.Labels, freshLabel(d.Labels))
		p.dropWeights(d)
		return p, nil, true
	case key.Matches(km, k.DropOutcome):
		if d.N() <= 2 {
			p.note = "a design needs at least 2 outcomes"
			return p, nil, false
		}
		d.Labels = d.Labels[:d.N()-1]
		p.dropWeights(d)
		return p, nil, true
	case key.Matches(km, k.Less), key.Matches(km, k.More), key.Matches(km, k.LessFine), key.Matches(km, k.MoreFine):
		up := key.Matches(km, k.More) || key.Matches(km, k.MoreFine)
		fine := key.Matches(km, k.LessFine) || key.Matches(km, k.MoreFine)
		switch {
		case row == int(rowMode):
			p.cycleMode(d, up)
			return p, nil, true
		case row == int(rowOrder) && !onInterval(d):
			d.Ordered = !d.Ordered
			return p, nil, true
		case row >= int(rowParams) && row < p.presetRow():
			step := 0.1
			if fine {
				step = 0.01
			}
			if !up {
				step = -step
			}
			pv := p.params[row-int(rowParams)]
			v := math.Round((pv.Value+step)*1e9) / 1e9
			setParam(d, pv.Name, v)
			p.params[row-int(rowParams)].Value = v
			p.note = fmt.Sprintf("%s = %s", pv.Name, strconv.FormatFloat(v, 'g', -1, 64))
			return p, nil, true
		}
	}
	return p, nil, false
}

// commitInput applies the labels or parameter value typed.
func (p *DesignPane) commitInput(d *design.Design) bool {
	val := p.ti.Value()
	if p.edit == editLabels && onInterval(d) {
		iv, err := parseInterval(val)
		if err != nil {
			p.note = "interval: " + err.Error()
			return false
		}
		p.stopEditing()
		d.Interval = iv
		p.note = fmt.Sprintf("interval [%g, %g]", iv[0], iv[1])
		return true
	}
	if p.edit == editLabels {
		labels, err := design.ParseOutcomes(val)
		if err != nil {
			p.note = "outcomes: " + err.Error()
			return false
		}
		p.stopEditing()
		d.Labels = labels
		p.dropWeights(d)
		p.note = fmt.Sprintf("%d outcomes", len(labels))
		return true
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(val), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		p.note = fmt.Sprintf("%q is not a finite number", val)
		return false
	}
	i := p.sel - int(rowParams)
	p.stopEditing()
	setParam(d, p.params[i].Name, v)
	p.params[i].Value = v
	return true
}

func (p *DesignPane) dropWeights(d *design.Design) {
	if d.Weights != nil && len(d.Weights) != d.N() {
		d.Weights = nil
		p.note = "outcome weights dropped (their count no longer matched)"
	}
}

func (p *DesignPane) cycleMode(d *design.Design, up bool) {
	i := 0
	ms := modes()
	for j, m := range ms {
		if m == d.Mode {
			i = j
		}
	}
	for {
		if up {
			i = (i + 1) % len(ms)
		} else {
			i = (i + len(ms) - 1) % len(ms)
		}
		if ms[i] != design.ModeEmphasis || d.N() == 2 {
			break
		}
	}
	p.byMode[d.Mode] = d.Formula
	p.stepByMode[onInterval(d)] = d.Budget.Step
	if len(d.Interval) == 2 {
		p.interval = d.Interval
	}
	d.Mode = ms[i]
	switch {
	case d.Mode.OnInterval() && len(d.Interval) != 2:
		d.Interval = p.interval
	case !d.Mode.OnInterval() && d.Mode.Payout():
		d.Interval = nil // a payout over outcomes has no interval
	}
	f, ok := p.byMode[ms[i]]
	if !ok {
		f = modeRows[d.Mode].sample
	}
	// The menu step means a probability step over outcomes and a step in
	// the interval's units for point forecasts; each kind keeps its own.
	if s, ok := p.stepByMode[d.Mode.OnInterval()]; ok {
		d.Budget.Step = s
	} else if d.Mode.OnInterval() {
		d.Budget.Step = 0 // BuildTable's default: a twentieth of the interval
	}
	if d.Mode.OnInterval() && len(d.Interval) != 2 {
		d.Interval = defaultInterval()
	}
	if f != "" {
		d.Formula = f
	}
	d.Preset = ""
	pruneParams(d)
	p.ta.SetValue(d.Formula)
}

func (p DesignPane) updatePicker(km tea.KeyMsg, d *design.Design) (DesignPane, tea.Cmd, bool) {
	all := presets.All()
	switch {
	case key.Matches(km, p.keys.Leave):
		p.edit = editNone
	case key.Matches(km, p.keys.Up):
		p.pick = (p.pick + len(all) - 1) % len(all)
	case key.Matches(km, p.keys.Down):
		p.pick = (p.pick + 1) % len(all)
	case key.Matches(km, p.keys.Edit):
		ps := all[p.pick]
		if why := presetUnavailable(ps, d); why != "" {
			p.note = ps.Name + ": " + why
			return p, nil, false
		}
		p.edit = editNone
		d.Preset = ps.Name
		d.Params = nil
		wasPoint := onInterval(d)
		if err := presets.Apply(d); err != nil {
			p.note = err.Error()
			return p, nil, false
		}
		if ps.Weighted && d.Weights == nil {
			d.Weights = make([]float64, d.N())
			for i := range d.Weights {
				d.Weights[i] = 1
			}
			p.note = "weights set to 1 for every outcome (edit them in the design file)"
		} else {
			p.note = "preset " + ps.Name
		}
		if d.Mode.OnInterval() && len(d.Interval) != 2 {
			d.Interval = defaultInterval()
		}
		if wasPoint != onInterval(d) {
			d.Budget.Step = p.stepByMode[onInterval(d)]
		}
		p.ta.SetValue(d.Formula)
		return p, nil, true
	}
	return p, nil, false
}

// parseInterval reads "lo, hi".
func parseInterval(s string) ([]float64, error) {
	parts := strings.Split(s, ",")
	if len(parts) != 2 {
		return nil, fmt.Errorf("give two numbers lo, hi, e.g. 0, 100")
	}
	iv := make([]float64, 2)
	for i, part := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(part), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%q is not a finite number", strings.TrimSpace(part))
		}
		iv[i] = v
	}
	if !(iv[0] < iv[1]) {
		return nil, fmt.Errorf("lo %g must be below hi %g", iv[0], iv[1])
	}
	return iv, nil
}

// presetUnavailable says why preset ps cannot be used for d, or "".
func presetUnavailable(ps presets.Preset, d *design.Design) string {
	switch {
	case ps.Kind == presets.KindEmphasis && d.N() != 2:
		return "for 2 outcomes only"
	case ps.BinaryOnly && d.N() != 2:
		return "for 2 outcomes only"
	}
	return ""
}

// freshLabel returns "outcome k" for the first k not yet used.
func freshLabel(labels []string) string {
	used := map[string]bool{}
	for _, l := range labels {
		used[l] = true
	}
	for k := len(labels) + 1; ; k++ {
		l := fmt.Sprintf("outcome %d", k)
		if !used[l] {
			return l
		}
	}
}

// setParam sets parameter name to v: an override already in the design
// is updated, otherwise the parameter line of the formula is rewritten, so
// the text stays the one source of the value.
func setParam(d *design.Design, name string, v float64) {
	if _, ok := d.Params[name]; ok {
		d.Params[name] = v
		return
	}
	f, err := formula.Parse(d.Formula)
	if err != nil {
		return
	}
	lines := strings.Split(d.Formula, "\n")
	for _, pl := range f.Params {
		if pl.Name != name || pl.At.Line < 1 || pl.At.Line > len(lines) {
			continue
		}
		old := lines[pl.At.Line-1]
		comment := ""
		if i := strings.Index(old, "#"); i >= 0 {
			comment = "  " + old[i:]
		}
		indent := old[:len(old)-len(strings.TrimLeft(old, " \t"))]
		lines[pl.At.Line-1] = indent + name + " = " + strconv.FormatFloat(v, 'g', -1, 64) + comment
	}
	d.Formula = strings.Join(lines, "\n")
}

// pruneParams drops overrides for parameters the formula no longer sets.
func pruneParams(d *design.Design) {
	if len(d.Params) == 0 {
		return
	}
	f, err := formula.Parse(d.Formula)
	if err != nil {
		return
	}
	keep := map[string]bool{}
	for _, pl := range f.Params {
		keep[pl.Name] = true
	}
	for name := range d.Params {
		if !keep[name] {
			delete(d.Params, name)
		}
	}
}

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

// modeText is what the mode row says about a mode, and the formula a
// design first switched to it is given (none for generator mode, which
// keeps the formula it has).
type modeText struct{ row, sample string }

// modeRows holds the mode row's words for every mode.
var modeRows = map[design.Mode]modeText{
	design.ModeGenerator:   {row: "generator (concave H; ←/→)"},
	design.ModePayout:      {row: "payout audit (pay(p, y); ←/→)", sample: samplePayout},
	design.ModeEmphasis:    {row: "emphasis weight w(c) (←/→)", sample: sampleEmphasis},
	design.ModePoint:       {row: "point forecast phi(x) (←/→)", sample: samplePoint},
	design.ModePointPayout: {row: "point payout audit (pay(x, y); ←/→)", sample: samplePointPayout},
}

func modeLine(m design.Mode) string {
	if t, ok := modeRows[m]; ok {
		return t.row
	}
	return string(m) + " (not computed by this build)"
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
	var out []string
	for i, ps := range presets.All() {
		m := "    "
		name := fmt.Sprintf("%-18s", ps.Name)
		if i == p.pick {
			m, name = p.st.Selected.Render("  ▸ "), p.st.Selected.Render(name)
		}
		desc := ps.Title
		if why := presetUnavailable(ps, d); why != "" {
			desc = p.st.Dim.Render("(" + why + ")")
		}
		out = append(out, m+name+" "+desc)
	}
	return append(out, p.st.Dim.Render("    ↑/↓ choose, enter apply, esc close"))
}
