package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"

	"scorewright/generator/design"
	"scorewright/tui"
)

func runOpen(e *env, args []string) error {
	flags := newFlags("open")
	if err := parseFlags(e, flags, "DESIGN.toml", args, true); err != nil {
		return err
	}
	if flags.NArg() != 1 {
		return usagef("open takes one design file, e.g. scorewright open frost.toml")
	}
	path := flags.Arg(0)
	d, err := loadDesign(path, e.stderr)
	if err != nil {
		return err
	}
	return runWorkbench(e, d, path)
}

// loadDesign reads and validates a design file for the workbench, with a
// message naming the file and the problem; a note on what was changed
// (a preset name dropped) goes to notes, and stays on the terminal when
// the workbench closes.
func loadDesign(path string, notes io.Writer) (*design.Design, error) {
	d, err := design.Load(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil, usagef("%s: no such file", path)
	case err != nil:
		return nil, usagef("%v", err)
	}
	note, err := tui.PrepareDesign(d)
	if err != nil {
		return nil, usagef("%s: %v", path, err)
	}
	if note != "" {
		fmt.Fprintf(notes, "scorewright: note: %s: %s\n", path, note)
	}
	return d, nil
}
