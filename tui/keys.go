package tui

import "github.com/charmbracelet/bubbles/key"

// KeyMap is the workbench's own key map. Keys that print a character are
// only shortcuts while no text input has focus; a focused input sees every
// printable key first.
type KeyMap struct {
	// Global.
	Quit, QuitHard, Help, NextPane, PrevPane, Save, Open, Export, Demo key.Binding
	// Moving inside a pane and changing the selected item.
	Up, Down, Less, More, LessFine, MoreFine, Edit, Leave, Toggle key.Binding
	// Design pane.
	AddOutcome, DropOutcome key.Binding
	// Picture pane.
	Measure, Pair, BeliefUp, BeliefDown key.Binding
	// Checks pane.
	Rerun key.Binding
	// Budget pane.
	PageUp, PageDown key.Binding
	// Dialogs.
	Confirm, Cancel, Yes, No, Field key.Binding
}

// DefaultKeyMap returns the workbench's key map.
func DefaultKeyMap() KeyMap {
	b := func(keys []string, k, help string) key.Binding {
		return key.NewBinding(key.WithKeys(keys...), key.WithHelp(k, help))
	}
	return KeyMap{
		Quit:     b([]string{"q"}, "q", "quit (when not typing)"),
		QuitHard: b([]string{"ctrl+c"}, "ctrl+c", "quit, from anywhere"),
		Help:     b([]string{"?", "f1"}, "? / F1", "this help (F1 also while typing)"),
		NextPane: b([]string{"tab"}, "tab", "next pane (also leaves the formula)"),
		PrevPane: b([]string{"shift+tab"}, "shift+tab", "previous pane"),
		Save:     b([]string{"ctrl+s"}, "ctrl+s", "save the design (TOML)"),
		Open:     b([]string{"ctrl+o"}, "ctrl+o", "open a design file"),
		Export:   b([]string{"ctrl+x"}, "ctrl+x", "export the payment table"),
		Demo:     b([]string{"ctrl+n"}, "ctrl+n", "next demo design (frost nights, harvest outlook)"),

		Up:       b([]string{"up"}, "↑", "previous item"),
		Down:     b([]string{"down"}, "↓", "next item"),
		Less:     b([]string{"left"}, "←", "step the item down (mode: previous)"),
		More:     b([]string{"right"}, "→", "step the item up (mode: next)"),
		LessFine: b([]string{"shift+left"}, "shift+←", "small step down"),
		MoreFine: b([]string{"shift+right"}, "shift+→", "small step up"),
		Edit:     b([]string{"enter"}, "enter", "edit the item (formula, labels, a value, preset)"),
		Leave:    b([]string{"esc"}, "esc", "stop editing / close"),
		Toggle:   b([]string{" "}, "space", "toggle (ordered outcomes)"),

		AddOutcome:  b([]string{"+"}, "+", "add an outcome"),
		DropOutcome: b([]string{"-"}, "-", "remove the last outcome"),

		Measure:    b([]string{"m"}, "m", "next measure drawn"),
		Pair:       b([]string{"p"}, "p", "n > 3: next pair of outcomes for the slice"),
		BeliefUp:   b([]string{"]"}, "]", "move the chosen belief toward the next outcome"),
		BeliefDown: b([]string{"["}, "[", "move the chosen belief back"),

		Rerun: b([]string{"r"}, "r", "run the checks again now"),

		PageUp:   b([]string{"pgup"}, "pgup", "scroll the payment table up"),
		PageDown: b([]string{"pgdown"}, "pgdn", "scroll the payment table down"),

		Confirm: b([]string{"enter"}, "enter", "confirm"),
		Cancel:  b([]string{"esc"}, "esc", "cancel"),
		Yes:     b([]string{"y"}, "y", "yes, replace the file"),
		No:      b([]string{"n"}, "n", "no, keep it"),
		Field:   b([]string{"tab", "shift+tab"}, "tab", "change the export format"),
	}
}

// helpGroup is one titled block of the help overlay.
type helpGroup struct {
	title string
	keys  []key.Binding
}

// groups lists every key, for the help overlay.
func (k KeyMap) groups() []helpGroup {
	return []helpGroup{
		{"Anywhere", []key.Binding{k.QuitHard, k.Quit, k.Help, k.NextPane, k.PrevPane, k.Save, k.Open, k.Export, k.Demo}},
		{"Design", []key.Binding{k.Up, k.Down, k.Edit, k.Leave, k.Less, k.More, k.LessFine, k.MoreFine, k.Toggle, k.AddOutcome, k.DropOutcome}},
		{"Picture", []key.Binding{k.Measure, k.BeliefDown, k.BeliefUp, k.Pair}},
		{"Checks", []key.Binding{k.Rerun}},
		{"Budget", []key.Binding{k.Up, k.Down, k.Less, k.More, k.LessFine, k.MoreFine, k.Edit, k.PageUp, k.PageDown}},
		{"Dialogs", []key.Binding{k.Field, k.Confirm, k.Cancel, k.Yes, k.No}},
	}
}
