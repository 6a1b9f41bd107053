package main

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"

	"scorewright/contract/backtest"
	"scorewright/contract/backtest/history"
	"scorewright/contract/table"
	"scorewright/internal/safefile"
)

// payOutFile streams the pay of every forecast to a temporary file beside
// the target and moves it into place only when the whole history has been
// read, so an interrupted run leaves nothing half-written.
type payOutFile struct {
	path, tmp string
	force     bool
	f         *os.File
	buf       *bufio.Writer
	w         *csv.Writer
	rec       []string
	labels    []string
	decimals  []int // per scheme; -1 writes the shortest exact form
	flag      string
	done      bool
}

func createPayOut(path string, force bool, labels []string, schemes []*backtestScheme) (*payOutFile, error) {
	head := []string{"line", "forecaster", "question", "outcome"}
	var decimals []int
	for _, s := range schemes {
		head = append(head, "pay "+s.id, "effort "+s.id, "on menu "+s.id)
		decimals = append(decimals, s.terms.Fit.Decimals())
	}
	o, err := createCSVOut(path, force, head, "--pay-out")
	if err != nil {
		return nil, err
	}
	o.labels, o.decimals = labels, decimals
	for _, s := range schemes {
		if s.terms.Warning != "" {
			fmt.Fprintf(o.buf, "# warning: rule %s: %s\n", s.id, s.terms.Warning)
		}
	}
	return o, nil
}

// createCSVOut starts a CSV file streamed to a temporary file beside
// path: the caution as comment lines (CSV readers with a comment
// character skip them), then the header. flag names the option in errors.
func createCSVOut(path string, force bool, head []string, flag string) (*payOutFile, error) {
	if err := refuseExisting(path, force); err != nil {
		return nil, err
	}
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return nil, usagef("%s: %v", flag, safefile.Named(path, err))
	}
	o := &payOutFile{path: path, tmp: f.Name(), force: force, f: f, buf: bufio.NewWriterSize(f, 1<<16), flag: flag}
	o.w = csv.NewWriter(o.buf)
	for _, c := range table.Caution() {
		fmt.Fprintf(o.buf, "# caution: %s\n", c)
	}
	o.rec = make([]string, len(head))
	if err := o.w.Write(head); err != nil {
		o.abort()
		return nil, err
	}
	return o, nil
}

// write adds one forecast's row.
func (o *payOutFile) write(row *history.Row, paid []backtest.Paid) error {
	o.rec[0] = strconv.Itoa(row.Line)
	o.rec[1], o.rec[2] = row.Forecaster, row.Question
	o.rec[3] = o.labels[row.Outcome]
	for i, p := range paid {
		if d := o.decimals[i]; d >= 0 && !math.IsInf(p.Pay, 0) && !math.IsNaN(p.Pay) {
			o.rec[4+3*i] = strconv.FormatFloat(p.Pay, 'f', d, 64)
		} else {
			o.rec[4+3*i] = strconv.FormatFloat(p.Pay, 'g', -1, 64)
		}
		o.rec[5+3*i] = strconv.FormatFloat(p.Effort, 'g', -1, 64)
		o.rec[6+3*i] = strconv.FormatBool(p.OnMenu)
	}
	return o.w.Write(o.rec)
}

// commit flushes the file and moves it into place.
func (o *payOutFile) commit() error {
	o.w.Flush()
	err := o.w.Error()
	if err == nil {
		err = o.buf.Flush()
	}
	if err == nil {
		err = o.f.Sync()
	}
	if cerr := o.f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(o.tmp, 0o644)
	}
	if err == nil {
		if o.force {
			err = os.Rename(o.tmp, o.path)
		} else if err = os.Link(o.tmp, o.path); err == nil {
			err = os.Remove(o.tmp)
		} else if os.IsExist(err) {
			err = fmt.Errorf("%s: %w (use --force to replace it)", o.path, safefile.ErrExists)
		}
	}
	if err != nil {
		os.Remove(o.tmp)
		o.done = true
		return usagef("%s: %v", o.flag, safefile.Named(o.path, err))
	}
	o.done = true
	return nil
}

// abort removes the temporary file unless commit has run.
func (o *payOutFile) abort() {
	if !o.done {
		o.f.Close()
		os.Remove(o.tmp)
		o.done = true
	}
}
