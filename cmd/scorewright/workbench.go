package main

import (
	"errors"
	"os"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/mattn/go-isatty"

	"scorewright/generator/design"
	"scorewright/tui"
	"scorewright/tui/recovery"
)

// runWorkbench opens the workbench on d (nil: the built-in demo design);
// path is the file d came from, if any.
func runWorkbench(e *env, d *design.Design, path ...string) error {
	in, inOK := e.stdin.(*os.File)
	out, outOK := e.stdout.(*os.File)
	if !inOK || !outOK || !isatty.IsTerminal(in.Fd()) || !isatty.IsTerminal(out.Fd()) {
		return errors.New("the workbench needs a terminal; for scripts, run scorewright --help for the commands")
	}
	p := ""
	if len(path) > 0 {
		p = path[0]
	}
	set := tui.Settings{Version: version}
	// Unsaved edits are kept in the user's state directory; without one
	// the workbench still runs, only without a recovery file.
	if dir, err := recovery.DefaultDir(); err == nil {
		set.RecoveryDir = dir
	}
	m := tui.New(d, p, set, tui.NewStyles(lipgloss.DefaultRenderer()))
	defer m.Close()
	prog := tea.NewProgram(m, tea.WithAltScreen(), tea.WithInput(in), tea.WithOutput(out))
	_, err := prog.Run()
	return err
}
