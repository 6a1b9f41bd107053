package tui

import (
	"fmt"
	"reflect"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
)

// termsField is one line of the terms view: a text of the design that the
// annex prints (title, parties, currency, dates, season).
type termsField struct {
	label, help string
	get         func(d *design.Design) string
	// set writes v into d's copy c; Validate then checks the whole
	// contract, so a bad value never reaches the design.
	set func(d *design.Design, v string) error
}

// termsFields lists the terms, fresh on each call.
func termsFields() []termsField {
	text := func(label, help string, field func(c *design.Contract) *string) termsField {
		return termsField{label: label, help: help,
			get: func(d *design.Design) string { return *field(&d.Contract) },
			set: func(d *design.Design, v string) error { *field(&d.Contract) = v; return nil }}
	}
	return []termsField{
		{label: "Title", help: "the annex's title, and the name files are given",
			get: func(d *design.Design) string { return d.Title },
			set: func(d *design.Design, v string) error { d.Title = v; return nil }},
		text("Buyer", "the party that pays", func(c *design.Contract) *string { return &c.Buyer }),
		text("Forecaster", "the party that forecasts and is paid", func(c *design.Contract) *string { return &c.Forecaster }),
		text("Currency", "labels every amount (EUR, credits)", func(c *design.Contract) *string { return &c.Currency }),
		text("First day", "first forecast, YYYY-MM-DD", func(c *design.Contract) *string { return &c.Start }),
		text("Last day", "last forecast, YYYY-MM-DD", func(c *design.Contract) *string { return &c.End }),
		text("Signed on", "date of signature, YYYY-MM-DD (blank: a line to write on)", func(c *design.Contract) *string { return &c.Signed }),
		{label: "Forecasts", help: "forecasts per season, for what the contract costs",
			get: func(d *design.Design) string {
				if d.Contract.Forecasts == 0 {
					return ""
				}
				return strconv.Itoa(d.Contract.Forecasts)
			},
			set: func(d *design.Design, v string) error {
				if v == "" {
					d.Contract.Forecasts = 0
					return nil
				}
				n, err := strconv.Atoi(v)
				if err != nil {
					return fmt.Errorf("forecasts: %q is not a whole number", v)
				}
				d.Contract.Forecasts = n
				return nil
			}},
		{label: "Base rate", help: "how often each outcome happens, q1,q2,... (blank: the reference belief, else uniform)",
			get: func(d *design.Design) string { return vecText(d.Contract.BaseRate, "") },
			set: func(d *design.Design, v string) error {
				q, err := distOrBlank(v, d.N(), "base rate")
				d.Contract.BaseRate = q
				return err
			}},
	}
}

// TermsRoom edits what the annex says besides the mathematics. It
// replaces the panes while shown, as the research view does.
type TermsRoom struct {
	st     Styles
	keys   KeyMap
	w, h   int
	shown  bool
	sel    int
	typing bool
	ti     valueInput
	note   string
}

// NewTermsRoom returns a hidden terms view.
func NewTermsRoom(st Styles, keys KeyMap) *TermsRoom {
	ti := newValueInput(st.Selected.Reverse(true))
	ti.CharLimit = 200
	return &TermsRoom{st: st, keys: keys, ti: ti}
}

// Shown reports whether the view replaces the panes.
func (t *TermsRoom) Shown() bool { return t.shown }

// Toggle shows or hides the view.
func (t *TermsRoom) Toggle() {
	t.shown = !t.shown
	t.stopTyping()
}

// Close hides the view.
func (t *TermsRoom) Close() {
	t.shown = false
	t.stopTyping()
}

// Typing reports whether the value input has the keys.
func (t *TermsRoom) Typing() bool { return t.typing }

func (t *TermsRoom) stopTyping() {
	t.typing = false
	t.ti.Blur()
}

// SetSize sets the size of the body the view fills.
func (t *TermsRoom) SetSize(w, h int) {
	t.w, t.h = w, h
	t.ti.Width = max(10, w-20)
}

// KeyHelp lists the view's keys.
func (t *TermsRoom) KeyHelp() []key.Binding {
	k := t.keys
	return []key.Binding{k.Up, k.Down, key.NewBinding(key.WithKeys(k.Edit.Keys()...), key.WithHelp(k.Edit.Help().Key, "edit the term")),
		key.NewBinding(key.WithKeys(k.Leave.Keys()...), key.WithHelp(k.Leave.Help().Key, "back to the panes"))}
}

// Update handles a key while the view is shown: handled says it was the
// view's, changed that d was edited (the caller starts a new generation).
func (t *TermsRoom) Update(km tea.KeyMsg, d *design.Design) (handled, changed bool, cmd tea.Cmd) {
	k := t.keys
	fields := termsFields()
	if t.typing {
		switch {
		case key.Matches(km, k.Leave):
			// The field keeps its value, so a refusal of what was typed
			// no longer applies: it must not stay on screen as if it did.
			t.stopTyping()
			t.note = ""
			return true, false, nil
		case key.Matches(km, k.Edit):
			ok, changed := t.apply(d, fields[t.sel], strings.TrimSpace(t.ti.Value()))
			if ok {
				t.stopTyping()
			}
			return true, changed, nil
		}
		t.ti, cmd = t.ti.Update(km)
		return true, false, cmd
	}
	switch {
	case key.Matches(km, k.Leave):
		t.Close()
		return true, false, nil
	case key.Matches(km, k.Up):
		t.sel = (t.sel + len(fields) - 1) % len(fields)
	case key.Matches(km, k.Down):
		t.sel = (t.sel + 1) % len(fields)
	case key.Matches(km, k.Edit):
		t.typing, t.note = true, ""
		return true, false, t.ti.Start(fields[t.sel].get(d))
	case key.Matches(km, k.Quit), key.Matches(km, k.Help):
		return false, false, nil // as everywhere else: q quits (asking first), ? shows the keys
	case km.Type == tea.KeyRunes || km.Type == tea.KeySpace || km.Type == tea.KeyLeft || km.Type == tea.KeyRight:
		// A pane's keys must not edit the design behind the view.
		return true, false, nil
	default:
		return false, false, nil
	}
	return true, false, nil
}

// apply sets a field when the design stays valid, saying why not
// otherwise; the design is untouched on failure. changed is false for the
// value the field already had.
func (t *TermsRoom) apply(d *design.Design, f termsField, v string) (ok, changed bool) {
	c := d.Clone()
	err := f.set(c, v)
	if err == nil && strings.ContainsAny(c.Title, "\n\r") {
		err = fmt.Errorf("title: must be one line")
	}
	if err == nil {
		err = c.Contract.Validate(c.N())
	}
	if err != nil {
		t.note = err.Error()
		return false, false
	}
	changed = c.Title != d.Title || !reflect.DeepEqual(c.Contract, d.Contract)
	d.Title, d.Contract = c.Title, c.Contract
	t.note = f.label + " set"
	return true, changed
}

// View draws the terms, one a line, the selected one marked, and a blank
// shown as a line to write on, as the annex prints it.
func (t *TermsRoom) View(d *design.Design) string {
	var b strings.Builder
	b.WriteString(t.st.Header.Render("Terms of the annex") + t.st.Dim.Render("   "+keyList(t.keys.Up, t.keys.Down)+" choose   "+t.keys.Edit.Help().Key+" edit   "+t.keys.Leave.Help().Key+" back") + "\n\n")
	for i, f := range termsFields() {
		mark := "  "
		if i == t.sel {
			mark = "> "
		}
		v := f.get(d)
		switch {
		case i == t.sel && t.typing:
			v = t.ti.View()
		case v == "":
			v = t.st.Dim.Render("________________ (to be filled in)")
		}
		line := fmt.Sprintf("%s%-11s %s", mark, f.label, v)
		if i == t.sel {
			line = t.st.Selected.Render(fmt.Sprintf("%s%-11s", mark, f.label)) + " " + v
		}
		b.WriteString(line + "\n")
	}
	help := termsFields()[t.sel].help
	b.WriteString("\n" + t.st.Dim.Render(help) + "\n")
	if t.note != "" {
		b.WriteString(t.note + "\n")
	}
	return block(b.String(), t.w, t.h)
}
