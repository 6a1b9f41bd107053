package tui

import (
	"context"
	"errors"
	"path/filepath"
	"regexp"
	"slices"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
	"scorewright/internal/safefile"
)

// fileDone finishes a file dialog: an existing file makes it ask before
// replacing, other errors stay in the dialog, success closes it.
func (m *Model) fileDone(seq uint64, err error, ok func(), then ...func() tea.Cmd) tea.Cmd {
	if m.dialog == nil || m.dialog.seq != seq {
		// The dialog was cancelled (esc) or replaced: the answer is late.
		return nil
	}
	m.cancelDialogWork()
	switch {
	case errors.Is(err, safefile.ErrExists):
		m.dialog.askOverwrite()
		return nil
	case err != nil:
		m.dialog.failed(fileError(err))
		return nil
	}
	m.dialog = nil
	ok()
	var cmds []tea.Cmd
	for _, f := range then {
		cmds = append(cmds, f())
	}
	return tea.Batch(cmds...)
}

// cancelDialogWork stops what the dialog started, if it still runs (the
// read of a file being opened).
func (m *Model) cancelDialogWork() {
	if m.stopDialog != nil {
		m.stopDialog()
		m.stopDialog = nil
	}
}

// Unsaved reports whether the design changed since it was opened or saved.
func (m *Model) Unsaved() bool { return m.gen != m.savedGen }

func (m *Model) openHelp() {
	m.help = true
	m.helpView.Width = max(20, m.width-6)
	m.helpView.Height = max(3, m.height-5)
	m.helpView.SetContent(helpText(m.st, m.keys, m.helpView.Width))
	m.helpView.GotoTop()
}

var slugChars = regexp.MustCompile(`[^a-z0-9]+`)

// defaultName is a file name made from the design's title, or for a
// design with a file, that file's name beside it: an export of a design
// opened from another folder lands with the design, not in the working
// directory.
func (m *Model) defaultName(ext string) string {
	if m.path != "" && ext == "toml" {
		return m.path
	}
	base := strings.Trim(slugChars.ReplaceAllString(strings.ToLower(m.d.Title), "-"), "-")
	if base == "" {
		base = "design"
	}
	dir := m.set.Dir
	if m.path != "" {
		base = strings.TrimSuffix(filepath.Base(m.path), filepath.Ext(m.path))
		dir = filepath.Dir(m.path)
	}
	return filepath.Join(dir, base+"."+ext)
}

func (m *Model) openDialog(kind dialogKind) {
	m.designPane.stopEditing()
	m.cancelDialogWork()
	switch kind {
	case dialogSave:
		d := newFileDialog(m.st, m.keys, kind, m.defaultName("toml"), []string{"toml"})
		m.dialog = &d
	case dialogOpen:
		dir := m.set.Dir
		if dir != "" && !strings.HasSuffix(dir, string(filepath.Separator)) {
			dir += string(filepath.Separator)
		}
		d := newFileDialog(m.st, m.keys, kind, dir, nil)
		m.dialog = &d
	case dialogHistory:
		dir := m.set.Dir
		if m.history != "" {
			dir = m.history
		} else if dir != "" && !strings.HasSuffix(dir, string(filepath.Separator)) {
			dir += string(filepath.Separator)
		}
		d := newFileDialog(m.st, m.keys, kind, dir, nil)
		d.msg = "columns: forecaster, question, outcome, then " + strings.Join(m.d.Labels, ", ")
		m.dialog = &d
	case dialogExport:
		if m.set.Exporter == nil {
			m.status = "export needs the table package, which is not part of this build yet"
			return
		}
		fs := m.set.Exporter.Formats(m.d)
		// The format (and the pay) chosen last stay chosen.
		i := max(0, slices.Index(fs, m.exportFormat))
		d := newFileDialog(m.st, m.keys, kind, m.defaultName(fs[i]), fs)
		d.format, d.lottery = i, m.exportLottery
		m.dialog = &d
	}
	if m.dialog != nil {
		m.dialogSeq++
		m.dialog.seq = m.dialogSeq
		m.dialog.base = m.set.Dir
	}
}

// submitDialog returns the command doing what the dialog asked.
func (m *Model) submitDialog() tea.Cmd {
	dl := m.dialog
	dl.formatFromPath()
	path, overwrite, format, lot, seq := expandHome(dl.Path()), dl.overwrite, dl.Format(), dl.lottery, dl.seq
	if dl.kind == dialogExport {
		m.exportFormat, m.exportLottery = format, lot
	}
	if !filepath.IsAbs(path) && m.set.Dir != "" && !strings.HasPrefix(path, m.set.Dir) {
		path = filepath.Join(m.set.Dir, path)
	}
	d, gen := cloneDesign(m.d), m.gen
	switch dl.kind {
	case dialogSave:
		return func() tea.Msg {
			abs, _ := filepath.Abs(path)
			return savedMsg{path: abs, gen: gen, seq: seq, err: d.Save(path, overwrite)}
		}
	case dialogHistory:
		return m.startBacktest(path)
	case dialogOpen:
		ctx, stop := context.WithCancel(m.ctx)
		m.stopDialog = stop
		return func() tea.Msg {
			defer stop()
			nd, err := design.LoadContext(ctx, path)
			var note string
			if err == nil {
				note, err = prepareDesign(nd)
			}
			return openedMsg{path: path, d: nd, gen: gen, seq: seq, err: err, note: note}
		}
	default:
		ex, ctx := m.set.Exporter, m.ctx
		req := ExportRequest{Format: format, Path: path, Overwrite: overwrite, Lottery: lot}
		req.Certificate, req.VerdictKind = m.checks.proof()
		return func() tea.Msg {
			files, err := ex.Export(ctx, d, req)
			return exportedMsg{files: files, gen: gen, seq: seq, err: err}
		}
	}
}

// PrepareDesign readies a loaded design for the workbench: a preset named
// without a formula gets its formula, a preset name over a formula of the
// design's own is dropped (the note says so). It is what `scorewright
// open` runs after design.Load.
func PrepareDesign(d *design.Design) (note string, err error) { return prepareDesign(d) }
