package tui

import (
	"strings"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textarea"
	tea "github.com/charmbracelet/bubbletea"
)

// KeyMap is the workbench's own key map. Keys that print a character are
// only shortcuts while no text input has focus; a focused input sees every
// printable key first.
type KeyMap struct {
	// Global.
	Quit, QuitHard, Help, NextPane, PrevPane, Save, Open, Export, Demo, New, Backtest, Risk, Research, Terms key.Binding
	// Moving inside a pane and changing the selected item.
	Up, Down, Less, More, LessFine, MoreFine, Edit, Leave, Toggle key.Binding
	// Design pane.
	AddOutcome, DropOutcome key.Binding
	// Picture pane.
	Measure, Pair, BeliefUp, BeliefDown key.Binding
	// Checks pane.
	Rerun key.Binding
	// Budget pane.
	PageUp, PageDown, TableLeft, TableRight, Propose, TakeFirst, TakeSecond key.Binding
	// Backtest view.
	History, StopRun key.Binding
	// Dialogs.
	Confirm, Cancel, Yes, No, Field, Complete, Lottery key.Binding
	// The unsaved-changes prompt and the offer of recovered edits.
	SaveFirst, Discard, Restore key.Binding
}

// DefaultKeyMap returns the workbench's key map. The global commands are
// ctrl chords that work while typing too, chosen by initial (s save, f
// file to open, e export, n next demo, d data: a forecast history, r
// risk, y yield of research) and kept clear of keys with other meanings
// elsewhere: ctrl+b and ctrl+a (terminal multiplexers' prefixes), ctrl+l
// (redraw), and ctrl+o, ctrl+x, ctrl+k, ctrl+u (a widely known small
// editor's write, exit and cut keys; the text fields here do not cut with
// ctrl+k or ctrl+u either). Arrows, tab, esc, ? and q keep their usual
// meanings. Help and the footer are generated from this map.
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
		Open:     b([]string{"ctrl+f"}, "ctrl+f", "open a design file"),
		Export:   b([]string{"ctrl+e"}, "ctrl+e", "export the table"),
		Demo:     b([]string{"ctrl+n"}, "ctrl+n", "next demo design"),
		// F3: a function key, like the terms' F2, so it works while typing.
		New:      b([]string{"f3"}, "F3", "new, blank design"),
		Backtest: b([]string{"ctrl+d"}, "ctrl+d", "backtest a forecast history (data)"),
		Risk:     b([]string{"ctrl+r"}, "ctrl+r", "risk attitude view"),
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
		// < and >: the table's columns sideways (←/→ step the field).
		TableLeft:  b([]string{"<"}, "<", "scroll the table left"),
		TableRight: b([]string{">"}, ">", "scroll the table right"),
		// f: find a budget that passes; the digits take the proposal
		// listed under that number, so taking one is a deliberate choice.
		Propose:    b([]string{"f"}, "f", "find a unit or cap the re-check passes with"),
		TakeFirst:  b([]string{"1"}, "1", "take proposal 1"),
		TakeSecond: b([]string{"2"}, "2", "take proposal 2"),

		History: b([]string{"l"}, "l", "load a forecast history (CSV)"),
		StopRun: b([]string{"x"}, "x", "stop the backtest"),

		Confirm:  b([]string{"enter"}, "enter", "confirm"),
		Cancel:   b([]string{"esc"}, "esc", "cancel"),
		Yes:      b([]string{"y"}, "y", "yes, replace the file"),
		No:       b([]string{"n"}, "n", "no, keep it"),
		Field:    b([]string{"up", "down"}, "↑/↓", "change the export format"),
		Complete: b([]string{"tab"}, "tab", "complete the path (names that match show below)"),
		Lottery:  b([]string{"ctrl+t"}, "ctrl+t", "export money or a lottery ticket"),

		SaveFirst: b([]string{"s"}, "s", "save first, then go on"),
		Discard:   b([]string{"d"}, "d", "go on without saving (drop the edits)"),
		Restore:   b([]string{"r"}, "r", "restore edits kept from the last session"),
	}
}

// helpGroup is one titled block of the help overlay: its keys, then
// notes (which name keys only through the map, so they cannot drift).
type helpGroup struct {
	title string
	keys  []key.Binding
	notes []string
}

// relabel is binding b under another description, for a pane where the
// key does something the map's general wording would misname (← and →
// step a budget value there, not the design's mode).
func relabel(b key.Binding, desc string) key.Binding {
	return key.NewBinding(key.WithKeys(b.Keys()...), key.WithHelp(b.Help().Key, desc))
}

// keyList joins the help labels of bindings, for notes.
func keyList(bs ...key.Binding) string {
	var ks []string
	for _, b := range bs {
		ks = append(ks, b.Help().Key)
	}
	return strings.Join(ks, " ")
}

// fieldKeys is the text fields' own editing keys as the workbench sets
// them (calmEditing), for the help overlay.
func fieldKeys() textarea.KeyMap {
	km := textarea.DefaultKeyMap
	calmEditing(&km.DeleteAfterCursor, &km.DeleteBeforeCursor)
	return km
}

// groups lists every key, for the help overlay.
func (k KeyMap) groups() []helpGroup {
	f := fieldKeys()
	join := func(b key.Binding) string { return strings.Join(b.Keys(), "/") }
	return []helpGroup{
		{title: "Anywhere", keys: []key.Binding{k.QuitHard, k.Quit, k.Help, k.NextPane, k.PrevPane, k.Save, k.Open, k.Export, k.Demo, k.New, k.Backtest, k.Risk, k.Research, k.Terms}},
		{title: "Design pane", keys: []key.Binding{k.Up, k.Down, k.Edit, k.Leave, k.Less, k.More, k.LessFine, k.MoreFine, k.Toggle, k.AddOutcome, k.DropOutcome}},
		{title: "While typing (formula, labels, values)", notes: []string{
			"printable keys are text, never shortcuts;",
			k.Leave.Help().Key + " stops, " + k.NextPane.Help().Key + " moves on; still working:",
			keyList(k.QuitHard, k.Save, k.Open, k.Export, k.Backtest, k.Risk, k.Research, k.Terms, k.New) + " F1",
			"editor: arrows, home/end, enter new line,",
			join(f.WordBackward) + " / " + join(f.WordForward) + " word,",
			join(f.DeleteAfterCursor) + " / " + join(f.DeleteBeforeCursor) + " cut to line end / start,",
			join(f.DeleteWordBackward) + " delete word, " + join(f.Paste) + " paste"}},
		{title: "Unsaved changes", keys: []key.Binding{k.SaveFirst, k.Discard, k.Restore}, notes: []string{
			"every key that leaves or replaces the design asks first;",
			"while edits are unsaved they are kept in a recovery file,",
			"offered at the next start"}},
		{title: "Picture pane", keys: []key.Binding{k.Measure, k.BeliefDown, k.BeliefUp, k.Pair}},
		{title: "Checks pane", keys: []key.Binding{k.Rerun}, notes: []string{
			keyList(k.Up, k.Down) + " choose a check (the list scrolls), " + keyList(k.Edit) + " its full text;",
			"there " + keyList(k.Up, k.Down, k.PageUp, k.PageDown) + " scroll, " + keyList(k.Less, k.More) + " the other checks,",
			keyList(k.Leave) + " back to the list"}},
		{title: "Terms of the annex (" + k.Terms.Help().Key + ")", keys: []key.Binding{k.Up, k.Down, relabel(k.Edit, "edit the field"), k.Leave}},
		{title: "Budget pane (↑/↓ as above)", keys: []key.Binding{relabel(k.Less, "step down"), relabel(k.More, "step up"), relabel(k.Edit, "edit"), k.PageUp, k.PageDown, k.TableLeft, k.TableRight, k.Propose, k.TakeFirst, k.TakeSecond}, notes: []string{
			"rows the re-check fails are marked TIE or BEATEN;",
			keyList(k.Leave) + " drops the proposals; an edit cancels the search"}},
		{title: "Backtest view (" + k.Backtest.Help().Key + ")", keys: []key.Binding{k.History, k.StopRun}, notes: []string{
			keyList(k.Up, k.Down, k.PageUp, k.PageDown) + " scroll, " + keyList(k.Leave, k.Backtest) + " close;",
			"an edit reruns it and cancels the old run"}},
		{title: "Risk view (" + k.Risk.Help().Key + ")", notes: []string{
			keyList(k.Up, k.Down) + " choose utility, coefficient, wealth or",
			"belief; " + keyList(k.Less, k.More) + " step it (shift: a tenth);",
			keyList(k.Leave, k.Risk) + " close; a change reruns it"}},
		{title: "Research view (" + k.Research.Help().Key + ")", notes: []string{
			keyList(k.Up, k.Down) + " choose, " + keyList(k.Less, k.More) + " step, " + keyList(k.Leave, k.Research) + " close"}},
		{title: "Dialogs", keys: []key.Binding{k.Complete, k.Field, k.Lottery, k.Confirm, k.Cancel, k.Yes, k.No}},
	}
}

// calmEditing moves a text field's cut-to-line-end and cut-to-line-start
// keys off ctrl+k and ctrl+u (another program's signature, meaning other
// things there) onto alt+end and alt+home.
func calmEditing(after, before *key.Binding) {
	after.SetKeys("alt+end")
	after.SetHelp("alt+end", "cut to the end of the line")
	before.SetKeys("alt+home")
	before.SetHelp("alt+home", "cut to the start of the line")
}

// fieldKey reads the keys of a view whose inputs are a list of n fields:
// ↑/↓ move the selection sel (moved), ←/→ ask for a step of the selected
// field (step, with its direction up and fine for the shifted small step).
func fieldKey[F ~int](k KeyMap, km tea.KeyMsg, sel *F, n F) (moved, step, up, fine bool) {
	switch {
	case key.Matches(km, k.Up):
		*sel = (*sel + n - 1) % n
		return true, false, false, false
	case key.Matches(km, k.Down):
		*sel = (*sel + 1) % n
		return true, false, false, false
	case key.Matches(km, k.Less), key.Matches(km, k.More), key.Matches(km, k.LessFine), key.Matches(km, k.MoreFine):
		return false, true, key.Matches(km, k.More) || key.Matches(km, k.MoreFine), key.Matches(km, k.LessFine) || key.Matches(km, k.MoreFine)
	}
	return false, false, false, false
}
