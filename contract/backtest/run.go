package backtest

import (
	"cmp"
	"context"
	"errors"
	"io"

	"scorewright/contract/backtest/history"
	"scorewright/internal/pool"
)

// DefaultMaxSkipped is how many skipped rows a Result keeps when
// Options.MaxSkipped is zero; all are counted.
const DefaultMaxSkipped = 1000

// progressEvery is how many rows pass between progress calls and
// cancellation checks: often enough for a live line, rare enough to cost
// nothing.
const progressEvery = 1 << 16

// Options tune Run. The zero value means the defaults.
type Options struct {
	Tally TallyOptions
	// Strict stops at the first bad row, returning its *history.RowError.
	Strict bool
	// MaxSkipped bounds the skipped rows kept in the Result; 0 means
	// DefaultMaxSkipped, negative keeps none.
	MaxSkipped int
	// Progress, if set, is called every 65536 rows and once at the end
	// (Last): Done is the bytes of input consumed (read ahead of the rows
	// counted by at most a few batches) of Total = Size (pool.UnitBytes),
	// Items the rows read (valid or not) and Skipped those skipped.
	Progress pool.Progress
	// Size is the length of the input in bytes when known (a regular
	// file), 0 when not (a pipe): the progress Total. The last report of
	// an input of unknown size gives Total = Done.
	Size int64
	// OnRow, if set, sees every valid row with what it earns under each
	// scheme; both are reused after it returns. An error it returns stops
	// the run.
	OnRow func(row *history.Row, paid []Paid) error
}

// batchRows is how many rows travel together from the reading goroutine
// to the scoring one: enough to make the hand-over cheap, few enough to
// stay in cache.
const batchRows = 512

// batch is a run of rows read ahead. Bad rows stay in place (with ok
// false) so that skips are recorded in file order.
type batch struct {
	rows   []history.Row
	ok     []bool
	why    []string
	end    []int     // last line of each bad record
	p      []float64 // n per row, backing rows[i].P
	offset int64
	err    error // a reading error that ends the input (not io.EOF)
}

// Run replays the history h under schemes. Bad rows are skipped and
// recorded (or, with Strict, end the run with their error); cancelling
// ctx stops the run with ctx's error.
//
// Reading and scoring overlap: one goroutine parses and validates rows in
// batches while the calling one pays them, so on two or more cores the
// backtest runs at about the speed of reading the CSV.
func Run(ctx context.Context, h *history.Reader, schemes []Scheme, opt Options) (*Result, error) {
	t, err := NewTally(schemes, opt.Tally)
	if err != nil {
		return nil, err
	}
	kept := false // the temporary file goes with the Result, or now
	defer func() {
		if !kept {
			t.Close()
		}
	}()
	keep := opt.MaxSkipped
	if keep == 0 {
		keep = DefaultMaxSkipped
	}
	n := len(h.Labels())
	free, full := newBatches(n)
	done := make(chan struct{})
	defer close(done)
	go readBatches(h, n, free, full, done)

	var skipped []Skipped
	var rows, nSkipped int
	var offset int64
	report := func(last bool) {
		if opt.Progress == nil {
			return
		}
		total := opt.Size
		if last && total == 0 {
			total = offset
		}
		opt.Progress(pool.Step{Done: float64(offset), Total: float64(total), Unit: pool.UnitBytes,
			Items: int64(rows), Skipped: int64(nSkipped), Last: last})
	}
	for b := range full {
		if b.err != nil {
			return nil, b.err
		}
		offset = b.offset
		for i := range b.rows {
			rows++
			if rows%progressEvery == 0 {
				if err := cmp.Or(ctx.Err(), t.Err()); err != nil {
					return nil, err
				}
				report(false)
			}
			row := &b.rows[i]
			if !b.ok[i] {
				if opt.Strict {
					return nil, &history.RowError{Line: row.Line, EndLine: b.end[i], Why: b.why[i], Unit: h.Unit()}
				}
				nSkipped++
				if len(skipped) < keep {
					skipped = append(skipped, Skipped{Line: row.Line, EndLine: b.end[i], Why: b.why[i]})
				}
				continue
			}
			paid := t.AddDated(row.Forecaster, row.Line, row.Outcome, row.P, row.Month)
			if opt.OnRow != nil {
				if err := opt.OnRow(row, paid); err != nil {
					return nil, err
				}
			}
		}
		free <- b
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	report(true)
	r, err := t.Result()
	if err != nil {
		return nil, err
	}
	kept = true
	r.SkippedCount, r.Skipped, r.Spans = nSkipped, skipped, h.Spans()
	return r, nil
}

// newBatches makes the channels batches travel on, the free one holding
// the few batches in flight.
func newBatches(n int) (free, full chan *batch) {
	const inFlight = 4
	free, full = make(chan *batch, inFlight), make(chan *batch, inFlight)
	for range inFlight {
		b := &batch{rows: make([]history.Row, batchRows), ok: make([]bool, batchRows), why: make([]string, batchRows), end: make([]int, batchRows), p: make([]float64, batchRows*n)}
		for i := range b.rows {
			b.rows[i].P = b.p[i*n : (i+1)*n]
		}
		free <- b
	}
	return free, full
}

// readBatches fills free batches from h and sends them on full, closing
// full at the end of the input; it stops early when done closes.
func readBatches(h *history.Reader, n int, free <-chan *batch, full chan<- *batch, done <-chan struct{}) {
	defer close(full)
	for {
		var b *batch
		select {
		case b = <-free:
		case <-done:
			return
		}
		b.rows, b.ok, b.why, b.end = b.rows[:cap(b.rows)], b.ok[:cap(b.ok)], b.why[:cap(b.why)], b.end[:cap(b.end)]
		i := 0
		var end error
		var re *history.RowError
		for ; i < len(b.rows); i++ {
			row, err := h.Next()
			if err == io.EOF {
				end = err
				break
			}
			dst := &b.rows[i]
			switch {
			case err == nil:
				p := dst.P
				*dst = *row
				dst.P = p
				copy(p, row.P)
				b.ok[i], b.why[i] = true, ""
			case errors.As(err, &re):
				*dst = history.Row{Line: re.Line, P: dst.P}
				b.ok[i], b.why[i], b.end[i] = false, re.Why, re.EndLine
			default:
				b.err, end = err, err
			}
			if end != nil {
				break
			}
		}
		b.rows, b.ok, b.why = b.rows[:i], b.ok[:i], b.why[:i]
		b.offset = h.InputOffset()
		select {
		case full <- b:
		case <-done:
			return
		}
		if end != nil {
			return
		}
	}
}
