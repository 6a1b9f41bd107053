// Command scorewright is a terminal workbench for designing and auditing
// proper scoring rules. With no arguments it opens the workbench on a
// built-in demo design; its subcommands do the same jobs from scripts.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"

	"github.com/mattn/go-isatty"

	"scorewright/internal/textsafe"
)

// version is the tool version written into exports; set with -ldflags at
// release time.
var version = "0.1.0-dev"

// env is what a command reads and writes; tests give their own.
type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
}

// command is one subcommand.
type command struct {
	summary string
	run     func(e *env, args []string) error
}

// commands lists every subcommand. Each lives in its own file.
func commands() map[string]command {
	return map[string]command{
		"presets":  {"list the built-in generators with formula and source", runPresets},
		"eval":     {"evaluate a rule at one report (and belief)", runEval},
		"check":    {"verify a generator-defined rule on a grid", runCheck},
		"audit":    {"audit a payout formula for honesty", runAudit},
		"table":    {"fit a rule to a budget and export the payment table", runTable},
		"distort":  {"the report a risk-averse forecaster gives", runDistort},
		"research": {"what research is worth under each rule, and the best bounded rule for it", runResearch},
		"backtest": {"what a rule would have paid on a forecast history", runBacktest},
		"open":     {"open a saved design in the workbench", runOpen},
	}
}

func main() {
	os.Exit(run(os.Args[1:], newEnv(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)))
}

// newEnv connects a command to the process's files. Text from files
// (titles, names in a history) reaches the terminal; no escape sequence
// in it may move the cursor or recolour a line. stdout is filtered when it
// is a terminal (files and pipes get the bytes unchanged, as exports must
// be); stderr, which carries only messages, always is, through the same
// filter. The workbench draws with escapes of its own, so "open" keeps
// stdout raw; progress lines, which rewrite themselves with "\r", go
// around the filter (progressOut).
func newEnv(args []string, stdin, stdout, stderr *os.File) *env {
	e := &env{stdin: stdin, stdout: stdout, stderr: textsafe.NewWriter(stderr)}
	if len(args) > 0 && args[0] != "open" {
		e.stdout = terminalSafe(stdout)
	}
	return e
}

// progressOut is where a progress line goes: stderr without the filter,
// since the line rewrites itself with "\r" and certify clears it with an
// escape. Only numbers and the program's own words go there.
func (e *env) progressOut() io.Writer {
	if t, ok := e.stderr.(*textsafe.Writer); ok {
		return t.Unwrap()
	}
	return e.stderr
}

// terminalSafe filters f through textsafe when f is a terminal; files and
// pipes get the bytes unchanged.
func terminalSafe(f *os.File) io.Writer {
	if isatty.IsTerminal(f.Fd()) {
		return textsafe.NewWriter(f)
	}
	return f
}

// Exit statuses, as the command-line contract fixes them.
const (
	exitOK     = 0
	exitFailed = 1 // the command ran and the rule failed a check
	exitUsage  = 2 // bad usage or input
)

// errFailed is returned by a command whose rule failed a check, after it has
// printed its report.
var errFailed = errors.New("rule failed a check")

// usageError marks a problem with what the user typed.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, args ...any) error {
	return &usageError{fmt.Sprintf(format, args...)}
}

func run(args []string, e *env) int {
	if len(args) == 0 {
		return exitCode(e, "", runWorkbench(e, nil))
	}
	name := args[0]
	switch name {
	case "-h", "--help", "help":
		printCommands(e.stdout)
		return exitOK
	case "-v", "--version", "version":
		fmt.Fprintln(e.stdout, "scorewright", version)
		return exitOK
	}
	cmd, ok := commands()[name]
	if !ok {
		fmt.Fprintf(e.stderr, "scorewright: unknown command %q; run scorewright --help for the list\n", name)
		return exitUsage
	}
	return exitCode(e, name, cmd.run(e, args[1:]))
}

func exitCode(e *env, name string, err error) int {
	prefix := "scorewright"
	if name != "" {
		prefix += " " + name
	}
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, errHelp):
		return exitOK
	case errors.Is(err, errFailed):
		return exitFailed
	}
	// Every other error is one line naming the problem.
	msg := textsafe.Strip(strings.ReplaceAll(err.Error(), "\n", "; "), false)
	fmt.Fprintf(e.stderr, "%s: %s\n", prefix, msg)
	return exitUsage
}

func printCommands(w io.Writer) {
	fmt.Fprintln(w, "scorewright — design and audit proper scoring rules")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "  scorewright                 open the workbench on the built-in demo design")
	cmds := commands()
	names := make([]string, 0, len(cmds))
	for n := range cmds {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  scorewright %-15s %s\n", n, cmds[n].summary)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Run scorewright COMMAND --help for a command's options.")
}
