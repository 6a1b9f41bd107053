package main

// Files of a backtest: reading the history (with its progress line) and
// writing the outputs the flags ask for, never over a file without --force.

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"os"
	"time"

	"scorewright/contract/backtest"
	"scorewright/contract/backtest/corp"
	"scorewright/contract/backtest/figure"
	"scorewright/contract/table"
	"scorewright/internal/pool"
	"scorewright/internal/safefile"
)

// openHistory opens the history file ("-" is stdin) and returns its size
// when known (for progress), or 0.
func openHistory(e *env, path string) (io.Reader, int64, func(), error) {
	if path == "-" {
		return e.stdin, 0, func() {}, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, 0, nil, usagef("--history: %v", err)
	}
	var size int64
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
		size = st.Size()
	}
	// A larger buffer than encoding/csv's own 4 KiB saves system calls.
	return bufio.NewReaderSize(f, 1<<16), size, func() { f.Close() }, nil
}

// newProgressLine returns a progress callback that rewrites one stderr
// line at most four times a second.
func newProgressLine(w io.Writer, size int64) pool.Progress {
	start := time.Now()
	var last time.Time
	return func(p pool.Step) {
		now := time.Now()
		if now.Sub(last) < 250*time.Millisecond && p.Done < float64(size) {
			return
		}
		last = now
		rate := float64(p.Items) / math.Max(now.Sub(start).Seconds(), 1e-9)
		part := ""
		if size > 0 {
			part = fmt.Sprintf(" (%.0f%% of %s)", 100*p.Done/float64(size), byteSize(size))
		}
		fmt.Fprintf(w, "\rbacktest: %d rows read%s, %d skipped, %.2f million rows/s   ", p.Items, part, p.Skipped, rate/1e6)
	}
}

func byteSize(n int64) string {
	switch {
	case n >= 1<<30:
		return fmt.Sprintf("%.1f GiB", float64(n)/(1<<30))
	case n >= 1<<20:
		return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20))
	case n >= 1<<10:
		return fmt.Sprintf("%.1f KiB", float64(n)/(1<<10))
	}
	return fmt.Sprintf("%d B", n)
}

// refuseExisting fails early, before hours of reading, when an output
// file exists and --force was not given.
func refuseExisting(path string, force bool) error {
	if err := safefile.CheckTarget(path); err != nil {
		return usagef("%v", err)
	}
	if force {
		return nil
	}
	if _, err := os.Lstat(path); err == nil {
		return usagef("%s: %v (use --force to replace it)", path, safefile.ErrExists)
	}
	return nil
}

func writeReliabilityFigure(path, format string, force bool, event string, curves []backtest.Curve, warnings []string) error {
	// A failed re-check is said first, then the caution every export has.
	var notes []string
	for _, w := range warnings {
		notes = append(notes, "WARNING: "+w)
	}
	p, err := figure.Reliability(curves, event, fmt.Sprintf("Reliability of forecasts of %q: PAV curves, %.0f%% consistency bands", event, 100*corp.DefaultLevel), append(notes, table.Caution()...))
	if err != nil {
		return err
	}
	data, err := figure.Encode(p, format)
	if err != nil {
		return err
	}
	if err := safefile.Write(path, data, force); err != nil {
		return usagef("%v", err)
	}
	return nil
}

// binGrid turns --bin-width into cells per probability: the width must be
// 1/K for a whole K from 1 to 1000, so that the cells tile [0, 1].
func binGrid(width float64) (int, error) {
	if !(width > 0 && width <= 1) {
		return 0, usagef("--bin-width %g: want a width in (0, 1], such as 0.1", width)
	}
	k := math.Round(1 / width)
	if k > 1000 || math.Abs(k*width-1) > 1e-9 {
		return 0, usagef("--bin-width %g: want 1/K for a whole K up to 1000 (0.1, 0.05, 0.2, ...)", width)
	}
	return int(k), nil
}
