package tui

import (
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/cursor"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textarea"
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

// defaultInterval is the interval a design gets when it first becomes a
// point-forecast design (the point payout's sample, design.Mode.Sample,
// pays 0 to 50 on it).
func defaultInterval() []float64 { return []float64{0, 100} }

// DesignPane edits the design: outcomes, order, mode, formula, parameters
// and preset.
type DesignPane struct {
	st      Styles
	keys    KeyMap
	w, h    int
	focused bool
	sel     int
	edit    editing
	ta      textarea.Model
	ti      valueInput
	pick    int
	// confirm is 1 + the preset asked about: a pick that drops the
	// outcomes (or the interval) is taken on the second enter.
	confirm  int
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
	ta.Prompt = " ▏"
	// No limit of the editor's own: it would cut a longer formula, opened
	// or pasted, without a word. The language's limit is enforced in
	// Update, with a message.
	ta.CharLimit = 0
	ta.MaxHeight = 0
	ta.Cursor.SetMode(cursor.CursorStatic)
	calmEditing(&ta.KeyMap.DeleteAfterCursor, &ta.KeyMap.DeleteBeforeCursor)
	ta.FocusedStyle.CursorLine = st.Header.UnsetBold()
	ta.BlurredStyle.Text = st.Dim
	ta.SetValue(d.Formula)
	ti := newValueInput(st.Selected.Reverse(true))
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
		p.dropPreset(d)
		pruneParams(d)
		return p, cmd, true
	case editLabels, editParam:
		switch {
		case key.Matches(km, p.keys.Leave):
			p.stopEditing()
			p.note = "not changed"
			return p, nil, false
		case key.Matches(km, p.keys.Edit):
			before := d.Clone()
			changed := p.commitInput(d)
			// The same value entered again is no edit: nothing to save.
			return p, nil, changed && !reflect.DeepEqual(before, d)
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
		return p.editRow(d)
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
		return p.stepRow(km, d)
	}
	return p, nil, false
}

// editRow starts editing the selected row (enter): a text field, the
// formula editor, the preset picker, or the order toggled in place.
func (p DesignPane) editRow(d *design.Design) (DesignPane, tea.Cmd, bool) {
	row := p.sel
	switch {
	case row == int(rowOutcomes):
		p.edit = editLabels
		value := strings.Join(d.Labels, ", ")
		if onInterval(d) {
			value = fmt.Sprintf("%g, %g", d.Interval[0], d.Interval[1])
		}
		return p, p.ti.Start(value), false
	case row == int(rowOrder) && !onInterval(d):
		d.Ordered = !d.Ordered
		return p, nil, true
	case row == int(rowFormula):
		p.edit = editFormula
		return p, p.ta.Focus(), false
	case row >= int(rowParams) && row < p.presetRow():
		p.edit = editParam
		return p, p.ti.Start(strconv.FormatFloat(p.params[row-int(rowParams)].Value, 'g', -1, 64)), false
	case row == p.presetRow():
		p.edit = editPreset
		p.pick = 0
		for i, ps := range presets.All() {
			if ps.Name == d.Preset {
				p.pick = i
			}
		}
	}
	return p, nil, false
}

// stepRow steps the selected row (←/→, shift: finer): the mode, the
// order, or a parameter by 0.1 (0.01).
func (p DesignPane) stepRow(km tea.KeyMsg, d *design.Design) (DesignPane, tea.Cmd, bool) {
	k := p.keys
	row := p.sel
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
		p.setParam(d, pv.Name, v)
		p.params[row-int(rowParams)].Value = v
		p.note = fmt.Sprintf("%s = %s", pv.Name, strconv.FormatFloat(v, 'g', -1, 64))
		return p, nil, true
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
	p.setParam(d, p.params[i].Name, v)
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
		if k := ms[i].Outcomes(); k == 0 || k == d.N() {
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
		f = d.Mode.Sample()
	}
	// The menu step means a probability step over outcomes and a step in
	// the interval's units for point forecasts; each kind keeps its own.
	if s, ok := p.stepByMode[d.Mode.OnInterval()]; ok {
		d.Budget.Step = s
	} else if d.Mode.OnInterval() {
		d.Budget.Step = 0 // budget.FitPoint's default: a twentieth of the interval
	}
	if d.Mode.OnInterval() && len(d.Interval) != 2 {
		d.Interval = defaultInterval()
	}
	if f != "" {
		d.Formula = f
	}
	p.dropPreset(d)
	pruneParams(d)
	p.ta.SetValue(d.Formula)
}

// dropPreset forgets the preset the design was made from, now that its
// formula is the user's own, and says so once: the record and the exports
// name the formula, not the preset.
func (p *DesignPane) dropPreset(d *design.Design) {
	if d.Preset == "" {
		return
	}
	p.note = fmt.Sprintf("%q preset dropped (edited)", d.Preset)
	d.Preset = ""
}
