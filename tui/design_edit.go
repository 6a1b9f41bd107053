package tui

import (
	"fmt"
	"math"
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
