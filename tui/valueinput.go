package tui

import (
	"github.com/charmbracelet/bubbles/cursor"
	"github.com/charmbracelet/bubbles/textinput"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
)

// valueInput is the one-line input of a field's value (a budget field, a
// parameter, the outcomes, a term of the annex). It opens with the value
// standing as a whole, the way a cell of a sheet does: the first printable
// key (or a paste) replaces it, backspace or delete clears it, and a
// cursor key (←/→, home, end) keeps it to edit in place. Without this a
// typed 0.02 landed after the 0.05 already there.
type valueInput struct {
	textinput.Model
	// whole says the value has not been touched since Start.
	whole bool
	// wholeStyle marks the value while it stands as a whole.
	wholeStyle, textStyle lipgloss.Style
}

// newValueInput returns a blurred value input with the workbench's prompt;
// whole is the style of a value the next key replaces.
func newValueInput(whole lipgloss.Style) valueInput {
	ti := textinput.New()
	ti.Prompt = "› "
	ti.Cursor.SetMode(cursor.CursorStatic)
	calmEditing(&ti.KeyMap.DeleteAfterCursor, &ti.KeyMap.DeleteBeforeCursor)
	return valueInput{Model: ti, wholeStyle: whole, textStyle: ti.TextStyle}
}

// Start puts value in the input, standing as a whole, and focuses it.
func (v *valueInput) Start(value string) tea.Cmd {
	v.SetValue(value)
	v.CursorEnd()
	v.whole = true
	v.TextStyle = v.wholeStyle
	return v.Focus()
}

// Whole reports whether the next printable key replaces the value.
func (v valueInput) Whole() bool { return v.whole }

// Update takes a key: while the value stands whole, a printable key,
// a paste, backspace or delete replaces it; every other key only ends
// that, then goes to the input as usual.
func (v valueInput) Update(msg tea.Msg) (valueInput, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok && v.whole {
		v.whole = false
		v.TextStyle = v.textStyle
		switch km.Type {
		case tea.KeyRunes, tea.KeySpace:
			v.SetValue("")
		case tea.KeyBackspace, tea.KeyDelete:
			v.SetValue("")
			return v, nil
		}
	}
	var cmd tea.Cmd
	v.Model, cmd = v.Model.Update(msg)
	return v, cmd
}

// keep makes the value the user's to edit in place: the next key no
// longer replaces it.
func (v *valueInput) keep() {
	v.whole = false
	v.TextStyle = v.textStyle
}

// Blur ends the input and forgets that the value stood whole.
func (v *valueInput) Blur() {
	v.whole = false
	v.TextStyle = v.textStyle
	v.Model.Blur()
}
