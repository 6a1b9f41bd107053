package tui

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"

	"scorewright/contract/lottery"
)

// dialogKind says what a file dialog is for.
type dialogKind int

const (
	dialogSave dialogKind = iota
	dialogOpen
	dialogExport
	dialogHistory
)

// dialogAction is what the root must do after a dialog key.
type dialogAction int

const (
	actNone dialogAction = iota
	actCancel
	actSubmit
)

// fileDialog asks for a path (and, for exports, a format), and for
// permission before a file is replaced.
type fileDialog struct {
	st      Styles
	keys    KeyMap
	kind    dialogKind
	formats []string
	format  int
	// path is the path field. A save or an export suggests a file name,
	// which stands whole, so the first key typed replaces it, as a value
	// input does, and a cursor key (or tab) keeps it to edit in place; an
	// open or a history load suggests a folder, which typing extends.
	path      valueInput
	confirm   bool // waiting for y/n on an existing file
	overwrite bool
	msg       string
	busy      bool
	// lottery says the export pays a chance of winning a prize instead of
	// money (contract/lottery); only export dialogs offer it.
	lottery bool
	// seq numbers the dialog, for telling its answers from late ones.
	seq uint64
	// base is the folder relative paths start from; exts the extensions
	// tab completes to (folders always).
	base string
	exts []string
	// cands are the names the last tab left open, shown under the path.
	cands []string
	more  int
}

func newFileDialog(st Styles, keys KeyMap, kind dialogKind, path string, formats []string) fileDialog {
	ti := newValueInput(st.Selected.Reverse(true))
	ti.Prompt = "path › "
	ti.Width = 44
	ti.Start(path) // static cursor: no blink to run
	if kind == dialogOpen || kind == dialogHistory {
		// These suggest a folder, to type a name into: it is kept.
		ti.keep()
	}
	exts := formats
	switch kind {
	case dialogSave, dialogOpen:
		exts = []string{"toml"}
	case dialogHistory:
		exts = []string{"csv", "jsonl", "ndjson", "xlsx"}
	}
	return fileDialog{st: st, keys: keys, kind: kind, formats: formats, path: ti, exts: exts}
}

// dialogWords are each kind's title and what enter does, by dialogKind.
var dialogWords = [...]struct{ title, verb string }{
	dialogSave:    {"Save the design", "saves"},
	dialogOpen:    {"Open a design", "opens"},
	dialogExport:  {"Export the payment table", "exports"},
	dialogHistory: {"Load a forecast history (CSV) for this design", "loads"},
}

func (d fileDialog) title() string { return dialogWords[d.kind].title }

// verb is what enter does in the dialog.
func (d fileDialog) verb() string { return dialogWords[d.kind].verb }

// Path is the path typed.
func (d fileDialog) Path() string { return strings.TrimSpace(d.path.Value()) }

// Format is the format chosen ("" when the dialog has none).
func (d fileDialog) Format() string {
	if len(d.formats) == 0 {
		return ""
	}
	return d.formats[d.format]
}

// askOverwrite switches the dialog to asking before replacing a file.
func (d *fileDialog) askOverwrite() {
	d.confirm, d.busy = true, false
	d.msg = d.Path() + " exists. Replace it? y / n"
}

func (d *fileDialog) failed(msg string) {
	d.msg, d.busy, d.confirm, d.overwrite = msg, false, false, false
}

// Update handles a key.
func (d fileDialog) Update(km tea.KeyMsg) (fileDialog, tea.Cmd, dialogAction) {
	if d.busy {
		// Opening reads a file and changes nothing until it is read, so
		// esc may leave it (and stops the read); a save or an export
		// that has started writing is seen through.
		if d.kind == dialogOpen && key.Matches(km, d.keys.Cancel) {
			return d, nil, actCancel
		}
		return d, nil, actNone
	}
	if d.confirm {
		switch {
		case key.Matches(km, d.keys.Yes):
			d.confirm, d.overwrite, d.busy = false, true, true
			return d, nil, actSubmit
		case key.Matches(km, d.keys.No), key.Matches(km, d.keys.Cancel):
			d.confirm, d.msg = false, "kept the existing file; choose another path"
		}
		return d, nil, actNone
	}
	switch {
	case key.Matches(km, d.keys.Cancel):
		return d, nil, actCancel
	case key.Matches(km, d.keys.Confirm):
		if d.Path() == "" {
			d.msg = "type a path first"
			return d, nil, actNone
		}
		d.busy, d.overwrite, d.msg = true, false, "working…"
		return d, nil, actSubmit
	case d.kind == dialogExport && key.Matches(km, d.keys.Lottery):
		d.lottery = !d.lottery
		return d, nil, actNone
	case key.Matches(km, d.keys.Complete):
		return d, completeCmd(d.seq, d.path.Value(), d.base, d.exts), actNone
	case len(d.formats) > 1 && key.Matches(km, d.keys.Field):
		step := 1
		if key.Matches(km, d.keys.Up) {
			step = len(d.formats) - 1
		}
		old := d.formats[d.format]
		d.format = (d.format + step) % len(d.formats)
		d.path.SetValue(swapExt(d.Path(), old, d.formats[d.format]))
		d.path.CursorEnd()
		return d, nil, actNone
	}
	var cmd tea.Cmd
	d.path, cmd = d.path.Update(km)
	d.cands, d.more = nil, 0
	d.formatFromPath() // a typed extension chooses the format at once
	return d, cmd, actNone
}

// completed takes the answer to tab, unless the path changed meanwhile.
func (d *fileDialog) completed(msg completedMsg) {
	if msg.seq != d.seq || msg.from != d.path.Value() || d.busy || d.confirm {
		return
	}
	d.path.SetValue(msg.c.value)
	d.path.CursorEnd()
	d.path.keep() // a completed path is the user's, to extend
	d.cands, d.more = msg.c.cands, msg.c.more
	d.msg = msg.c.note
	d.formatFromPath()
}

// formatFromPath makes the format the one the path's extension names, when
// it names one of the dialog's formats: what is written into annex.pdf is
// a PDF, whatever the format field showed.
func (d *fileDialog) formatFromPath() {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(d.Path()), "."))
	for i, f := range d.formats {
		if f == ext {
			d.format = i
		}
	}
}

// swapExt replaces extension old of path with new.
func swapExt(path, old, new string) string {
	if strings.EqualFold(filepath.Ext(path), "."+old) {
		return strings.TrimSuffix(path, filepath.Ext(path)) + "." + new
	}
	return path
}

// View draws the dialog box.
func (d fileDialog) View(width int) string {
	st := d.st
	lines := []string{st.Header.Render(d.title()), ""}
	if len(d.formats) > 0 {
		var fs []string
		for i, f := range d.formats {
			if i == d.format {
				fs = append(fs, st.Selected.Render("["+f+"]"))
			} else {
				fs = append(fs, " "+f+" ")
			}
		}
		lines = append(lines, "format "+strings.Join(fs, ""))
		if len(d.formats) > 1 {
			lines = append(lines, st.Dim.Render("       "+d.keys.Field.Help().Key+": change the format, or type its extension"))
		}
	}
	if d.kind == dialogExport {
		money, lot := " money ", " lottery "
		if d.lottery {
			lot = st.Selected.Render("[lottery]")
		} else {
			money = st.Selected.Render("[money]")
		}
		lines = append(lines, "pay    "+money+lot, st.Dim.Render("       "+d.keys.Lottery.Help().Key+": money, or a chance of winning one prize"))
		if d.lottery {
			lines = append(lines, st.Error.Render("Caution: "+lottery.Caution))
		}
	}
	lines = append(lines, d.path.View())
	if len(d.cands) > 0 {
		c := strings.Join(d.cands, "  ")
		if d.more > 0 {
			c += fmt.Sprintf("  (and %d more)", d.more)
		}
		lines = append(lines, st.Dim.Render(c))
	}
	lines = append(lines, "")
	if d.msg != "" {
		ms := st.Dim
		if d.confirm || strings.HasPrefix(d.msg, "✗") {
			ms = st.Error
		}
		lines = append(lines, ms.Render(d.msg))
	}
	lines = append(lines, st.Dim.Render(d.keys.Complete.Help().Key+" completes the path, "+d.keys.Confirm.Help().Key+" "+d.verb()+", "+d.keys.Cancel.Help().Key+" cancels"))
	if d.kind == dialogExport {
		lines = append(lines, st.Dim.Render("Exports say: the tool checks mathematics, not law."))
	}
	w := min(width-4, 60)
	for i, l := range lines {
		// Long lines wrap inside the box (the frame's padding is 2).
		lines[i] = lipgloss.NewStyle().Width(w - 2).Render(l)
	}
	return st.Dialog.Width(w).Render(lipgloss.JoinVertical(lipgloss.Left, lines...))
}
