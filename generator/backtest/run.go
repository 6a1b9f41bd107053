package backtest

import (
	"context"
	"errors"
	"io"

	"scorewright/generator/history"
)

// DefaultMaxSkipped is how many skipped rows a Result keeps when
// Options.MaxSkipped is zero; all are counted.
const DefaultMaxSkipped = 1000

// progressEvery is how many rows pass between progress calls and
// cancellation checks: often enough for a live line, rare enough to cost
// nothing.
const progressEvery = 1 << 16

// Progress is how far a backtest has read.
type Progress struct {
	// Rows read so far (valid or not), and how many were skipped.
	Rows, Skipped int
	// Offset is the number of bytes of input consumed.
	Offset int64
}

// Options tune Run. The zero value means the defaults.
type Options struct {
	Tally TallyOptions
	// Strict stops at the first bad row, returning its *history.RowError.
	Strict bool
	// MaxSkipped bounds the skipped rows kept in the Result; 0 means
	// DefaultMaxSkipped, negative keeps none.
	MaxSkipped int
	// Progress, if set, is called every 65536 rows and once at the end.
	Progress func(Progress)
	// OnRow, if set, sees every valid row with what it earns under each
	// scheme; both are reused after it returns. An error it returns stops
	// the run.
	OnRow func(row *history.Row, paid []Paid) error
}

// Run replays the history h under schemes. Bad rows are skipped and
// recorded (or, with Strict, end the run with their error); cancelling
// ctx stops the run with ctx's error.
func Run(ctx context.Context, h *history.Reader, schemes []Scheme, opt Options) (*Result, error) {
	t, err := NewTally(schemes, opt.Tally)
	if err != nil {
		return nil, err
	}
	keep := opt.MaxSkipped
	if keep == 0 {
		keep = DefaultMaxSkipped
	}
	var skipped []Skipped
	var rows, nSkipped int
	report := func() {
		if opt.Progress != nil {
			opt.Progress(Progress{Rows: rows, Skipped: nSkipped, Offset: h.InputOffset()})
		}
	}
	for {
		row, err := h.Next()
		if err == io.EOF {
			break
		}
		rows++
		if rows%progressEvery == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			report()
		}
		if err != nil {
			var re *history.RowError
			if !errors.As(err, &re) || opt.Strict {
				return nil, err
			}
			nSkipped++
			if len(skipped) < keep {
				skipped = append(skipped, Skipped{Line: re.Line, Why: re.Why})
			}
			continue
		}
		paid := t.Add(row.Forecaster, row.Line, row.Outcome, row.P)
		if opt.OnRow != nil {
			if err := opt.OnRow(row, paid); err != nil {
				return nil, err
			}
		}
	}
	report()
	r := t.Result()
	r.SkippedCount, r.Skipped = nSkipped, skipped
	return r, nil
}
