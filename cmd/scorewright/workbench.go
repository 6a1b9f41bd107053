package main

import (
	"errors"
	"os"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/mattn/go-isatty"

	"scorewright/generator/design"
	"scorewright/tui"
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
	m := tui.New(d, p, tui.Settings{Version: version}, tui.NewStyles(lipgloss.DefaultRenderer()))
	defer m.Close()
	prog := tea.NewProgram(m, tea.WithAltScreen(), tea.WithInput(in), tea.WithOutput(out))
	_, err := prog.Run()
	return err
}
