package tui

import "github.com/charmbracelet/bubbles/key"

// KeyMap is the workbench's own key map. Keys that print a character are
// only shortcuts while no text input has focus; a focused input sees every
// printable key first.
type KeyMap struct {
	// Global.
	Quit, QuitHard, Help, NextPane, PrevPane, Save, Open, Export, Demo, Backtest, Risk, Research, Terms key.Binding
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
	// Backtest view.
	History, StopRun key.Binding
	// Dialogs.
	Confirm, Cancel, Yes, No, Field, Lottery key.Binding
}

// DefaultKeyMap returns the workbench's key map.
func DefaultKeyMap() KeyMap {
	b := func(keys []string, k, help string) key.Binding {
		return key.NewBinding(key.WithKeys(keys...), key.WithHelp(k, help))
	}
	return KeyMap{
		Quit:     b([]string{"q"}, "q", "quit"),
		QuitHard: b([]string{"ctrl+c"}, "ctrl+c", "quit, from anywhere"),
		Help:     b([]string{"?", "f1"}, "? / F1", "all keys (F1 also while typing)"),
		NextPane: b([]string{"tab"}, "tab", "next pane"),
		PrevPane: b([]string{"shift+tab"}, "shift+tab", "previous pane"),
		Save:     b([]string{"ctrl+s"}, "ctrl+s", "save the design"),
		Open:     b([]string{"ctrl+o"}, "ctrl+o", "open a design"),
		Export:   b([]string{"ctrl+x"}, "ctrl+x", "export the table"),
		Demo:     b([]string{"ctrl+n"}, "ctrl+n", "next demo design"),
		Backtest: b([]string{"ctrl+b"}, "ctrl+b", "backtest a forecast history"),
		Risk:     b([]string{"ctrl+r"}, "ctrl+r", "risk attitude view"),
		// ctrl+y: no terminal multiplexer's default (tmux ctrl+b, screen
		// ctrl+a, zellij's ctrl+g/p/t/n/h/s/o/q) and no key of bubbles'
		// text inputs, so it works while typing too.
		Research: b([]string{"ctrl+y"}, "ctrl+y", "research view: what research is worth"),
		// F2: a function key no multiplexer or text input takes, so the
		// terms open while typing too.
		Terms: b([]string{"f2"}, "F2", "terms of the annex: title, parties, currency, dates"),

		Up:       b([]string{"up"}, "↑", "previous item"),
		Down:     b([]string{"down"}, "↓", "next item"),
		Less:     b([]string{"left"}, "←", "step down, previous mode"),
		More:     b([]string{"right"}, "→", "step up, next mode"),
		LessFine: b([]string{"shift+left"}, "shift+←", "small step down"),
		MoreFine: b([]string{"shift+right"}, "shift+→", "small step up"),
		Edit:     b([]string{"enter"}, "enter", "edit, pick a preset"),
		Leave:    b([]string{"esc"}, "esc", "stop editing, close"),
		Toggle:   b([]string{" "}, "space", "toggle ordered"),

		AddOutcome:  b([]string{"+"}, "+", "add an outcome"),
		DropOutcome: b([]string{"-"}, "-", "remove an outcome"),

		Measure:    b([]string{"m"}, "m", "next measure"),
		Pair:       b([]string{"p"}, "p", "belief target, next pair"),
		BeliefUp:   b([]string{"]"}, "]", "move the belief up"),
		BeliefDown: b([]string{"["}, "[", "move the belief down"),

		Rerun: b([]string{"r"}, "r", "check again now"),

		PageUp:   b([]string{"pgup"}, "pgup", "scroll the table up"),
		PageDown: b([]string{"pgdown"}, "pgdn", "scroll the table down"),

		History: b([]string{"l"}, "l", "load a forecast history (CSV)"),
		StopRun: b([]string{"x"}, "x", "stop the backtest"),

		Confirm: b([]string{"enter"}, "enter", "confirm"),
		Cancel:  b([]string{"esc"}, "esc", "cancel"),
		Yes:     b([]string{"y"}, "y", "yes, replace the file"),
		No:      b([]string{"n"}, "n", "no, keep it"),
		Field:   b([]string{"tab", "shift+tab"}, "tab", "change the export format"),
		Lottery: b([]string{"ctrl+l"}, "ctrl+l", "export money or a lottery"),
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
		{"Anywhere", []key.Binding{k.QuitHard, k.Quit, k.Help, k.NextPane, k.PrevPane, k.Save, k.Open, k.Export, k.Demo, k.Backtest, k.Risk, k.Research, k.Terms}},
		{"Design", []key.Binding{k.Up, k.Down, k.Edit, k.Leave, k.Less, k.More, k.LessFine, k.MoreFine, k.Toggle, k.AddOutcome, k.DropOutcome}},
		{"Picture", []key.Binding{k.Measure, k.BeliefDown, k.BeliefUp, k.Pair}},
		{"Checks", []key.Binding{k.Rerun}},
		{"Budget", []key.Binding{k.Up, k.Down, k.Less, k.More, k.LessFine, k.MoreFine, k.Edit, k.PageUp, k.PageDown}},
		{"Backtest", []key.Binding{k.History, k.StopRun, k.Up, k.Down, k.PageUp, k.PageDown, k.Leave}},
		{"Risk attitude", []key.Binding{k.Up, k.Down, k.Less, k.More, k.LessFine, k.MoreFine, k.Leave}},
		{"Research", []key.Binding{k.Up, k.Down, k.Less, k.More, k.LessFine, k.MoreFine, k.Leave}},
		{"Terms", []key.Binding{k.Up, k.Down, k.Edit, k.Leave}},
		{"Dialogs", []key.Binding{k.Field, k.Lottery, k.Confirm, k.Cancel, k.Yes, k.No}},
	}
}
