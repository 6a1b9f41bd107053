package tui

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
	"scorewright/generator/formula"
	"scorewright/presets"
)

func (p DesignPane) updatePicker(km tea.KeyMsg, d *design.Design) (DesignPane, tea.Cmd, bool) {
	all := presets.All()
	switch {
	case key.Matches(km, p.keys.Leave):
		p.edit, p.confirm = editNone, 0
	case key.Matches(km, p.keys.Up):
		p.pick, p.confirm = (p.pick+len(all)-1)%len(all), 0
	case key.Matches(km, p.keys.Down):
		p.pick, p.confirm = (p.pick+1)%len(all), 0
	case key.Matches(km, p.keys.Edit):
		ps := all[p.pick]
		if why := presetUnavailable(ps, d); why != "" {
			p.note = ps.Name + ": " + why
			return p, nil, false
		}
		if p.AsksFirst(d) {
			p.confirm = p.pick + 1 // asked: the next enter takes it
			return p, nil, false
		}
		p.edit, p.confirm = editNone, 0
		if ps.Kind != presets.KindPoint && d.N() < 2 {
			d.Labels = design.DefaultLabels(2) // a point design read from a file may name no outcomes
		}
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
			p.note = "weights set to 1 for every outcome (edit them in the budget pane: Weights)"
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

// AsksFirst reports whether enter on the picked preset only asks: the
// preset changes what the design forecasts (outcomes or a number on an
// interval) and the question has not been put yet.
func (p DesignPane) AsksFirst(d *design.Design) bool {
	return p.edit == editPreset && p.confirm != p.pick+1 && kindQuestion(presets.All()[p.pick], d) != ""
}

// kindQuestion is the question a preset that changes what the design
// forecasts asks before it is taken, or "".
func kindQuestion(ps presets.Preset, d *design.Design) string {
	toPoint := ps.Kind == presets.KindPoint
	switch {
	case toPoint && !onInterval(d):
		return fmt.Sprintf("%s forecasts a number on an interval: the outcomes %s are dropped.", ps.Name, strings.Join(d.Labels, ", "))
	case !toPoint && onInterval(d):
		iv := "the interval"
		if len(d.Interval) == 2 {
			iv = fmt.Sprintf("the interval [%g, %g]", d.Interval[0], d.Interval[1])
		}
		return fmt.Sprintf("%s pays for outcomes: %s is dropped.", ps.Name, iv)
	}
	return ""
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

// setParam sets parameter name to v and shows the new formula in the
// editor: what the user sees is what is checked and saved.
func (p *DesignPane) setParam(d *design.Design, name string, v float64) {
	setParam(d, name, v)
	p.ta.SetValue(d.Formula)
}

// setParam sets parameter name to v by rewriting its line of the formula,
// so the text stays the one source of the value; an override of the same
// name (from a design file or --param) goes, since the line now says the
// value. A parameter without a line of its own keeps v as an override.
func setParam(d *design.Design, name string, v float64) {
	if src, ok := rewriteParam(d.Formula, name, v); ok {
		d.Formula = src
		delete(d.Params, name)
		if len(d.Params) == 0 {
			d.Params = nil
		}
		return
	}
	if d.Params == nil {
		d.Params = map[string]float64{}
	}
	d.Params[name] = v
}

// rewriteParam returns src with the line of parameter name saying v,
// keeping its indentation and a trailing comment. ok is false when there
// is no such line, or when the new text would not read back as the same
// formula with name = v.
func rewriteParam(src, name string, v float64) (string, bool) {
	f, err := formula.Parse(src)
	if err != nil {
		return "", false
	}
	lines := strings.Split(src, "\n")
	found := false
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
		found = true
	}
	out := strings.Join(lines, "\n")
	back, err := formula.Parse(out)
	if !found || err != nil || len(back.Params) != len(f.Params) {
		return "", false
	}
	for _, pl := range back.Params {
		if pl.Name == name && paramLiteral(pl.Value) != v {
			return "", false
		}
	}
	return out, true
}

// paramLiteral is the value of a parameter written as a number (or a
// signed one); NaN for anything else.
func paramLiteral(n formula.Node) float64 {
	switch n := n.(type) {
	case *formula.Num:
		return n.Value
	case *formula.Unary:
		if x, ok := n.X.(*formula.Num); ok && n.Op == "-" {
			return -x.Value
		}
		if x, ok := n.X.(*formula.Num); ok && n.Op == "+" {
			return x.Value
		}
	}
	return math.NaN()
}

// foldParams writes every parameter override of d (from a design file or
// --param) into its line of the formula, so that the editor shows the
// values that are checked; it returns the names folded, sorted.
// Overrides of parameters without a line stay overrides.
func foldParams(d *design.Design) []string {
	var names []string
	for name := range d.Params {
		names = append(names, name)
	}
	slices.Sort(names)
	var folded []string
	for _, name := range names {
		setParam(d, name, d.Params[name])
		if _, still := d.Params[name]; !still {
			folded = append(folded, name)
		}
	}
	return folded
}

// foldedNote tells that parameter overrides were written into the
// formula, so the changed text is not a surprise.
func (p *DesignPane) foldedNote(names []string) {
	if len(names) > 0 {
		p.note = "now in the formula's lines: " + strings.Join(names, ", ")
	}
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
