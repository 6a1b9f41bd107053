package history

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// DefaultTolerance is how far from 1 the probabilities of a row may sum
// when Options.Tolerance is zero: enough for values written with six
// decimals, far too little to hide a mistake.
const DefaultTolerance = 1e-6

// Names of the three columns every history has besides the probabilities.
const (
	ColForecaster = "forecaster"
	ColQuestion   = "question"
	ColOutcome    = "outcome"
)

// Options tune the reader. The zero value means the defaults.
type Options struct {
	// Tolerance is how far from 1 a row's probabilities may sum; zero
	// means DefaultTolerance. Accepted rows are renormalised to sum to 1.
	Tolerance float64
}

// Row is one valid forecast. The Row and its P belong to the reader and
// are overwritten by the next call to Next; the strings are ordinary Go
// strings and stay valid (each holds on to its record's text, so clone a
// name you keep for long).
type Row struct {
	// Line is the 1-based line of the file the row starts on.
	Line int
	// Forecaster and Question are as written, trimmed.
	Forecaster, Question string
	// Outcome is the 0-based index of the outcome that happened.
	Outcome int
	// P is the forecast, in the order of the labels given to NewReader,
	// summing to 1.
	P []float64
}

// RowError says why one row is not a valid forecast. Reading can go on
// after it.
type RowError struct {
	Line int
	Why  string
}

// Error writes "line N: why".
func (e *RowError) Error() string { return fmt.Sprintf("line %d: %s", e.Line, e.Why) }

// Reader streams forecasts from a history file.
type Reader struct {
	csv    *csv.Reader
	labels []string
	tol    float64
	// Column positions of the fixed fields and of each label's probability.
	colF, colQ, colO int
	colP             []int
	fields           int
	row              Row
}

// NewReader reads the header of a history and matches its probability
// columns to labels by name. A header that does not fit the labels is an
// error naming what is missing or extra.
func NewReader(r io.Reader, labels []string, opt Options) (*Reader, error) {
	tol := opt.Tolerance
	if tol == 0 {
		tol = DefaultTolerance
	}
	if !(tol > 0) || math.IsInf(tol, 0) {
		return nil, fmt.Errorf("history: tolerance %g must be positive", tol)
	}
	c := csv.NewReader(r)
	c.ReuseRecord = true
	c.FieldsPerRecord = -1 // counted here, with a clearer message
	header, err := c.Read()
	if err == io.EOF {
		return nil, errors.New("history is empty: want a header row (forecaster, question, outcome, then one column per outcome)")
	}
	if err != nil {
		return nil, fmt.Errorf("history header: %w", err)
	}
	if len(header) == 1 {
		for _, sep := range []string{";", "\t", "|"} {
			if strings.Contains(header[0], sep) {
				return nil, fmt.Errorf("history header is one column %q: the file looks separated by %q, and a history is comma-separated", header[0], sep)
			}
		}
	}
	h := &Reader{csv: c, labels: labels, tol: tol, colF: -1, colQ: -1, colO: -1, colP: make([]int, len(labels)), fields: len(header)}
	for k := range h.colP {
		h.colP[k] = -1
	}
	seen := map[string]int{}
	var extra []string
	for i, name := range header {
		name = strings.TrimSpace(name)
		if i == 0 {
			name = strings.TrimPrefix(name, "\uFEFF") // spreadsheets often write a byte-order mark
		}
		if j, dup := seen[name]; dup {
			return nil, fmt.Errorf("history header: column %q appears twice (columns %d and %d)", name, j+1, i+1)
		}
		seen[name] = i
		switch strings.ToLower(name) {
		case ColForecaster:
			h.colF = i
			continue
		case ColQuestion:
			h.colQ = i
			continue
		case ColOutcome:
			h.colO = i
			continue
		}
		k := indexOf(labels, name)
		if k < 0 {
			extra = append(extra, name)
			continue
		}
		h.colP[k] = i
	}
	var missing []string
	for _, fixed := range []struct {
		name string
		col  int
	}{{ColForecaster, h.colF}, {ColQuestion, h.colQ}, {ColOutcome, h.colO}} {
		if fixed.col < 0 {
			missing = append(missing, fixed.name)
		}
	}
	for k, col := range h.colP {
		if col < 0 {
			missing = append(missing, labels[k])
		}
	}
	if len(missing) > 0 || len(extra) > 0 {
		msg := "history header does not match the rule's outcomes (" + strings.Join(labels, ", ") + ")"
		if len(missing) > 0 {
			msg += "; missing " + columns(missing)
		}
		if len(extra) > 0 {
			msg += "; unexpected " + columns(extra)
		}
		return nil, errors.New(msg)
	}
	h.row.P = make([]float64, len(labels))
	return h, nil
}

// Labels are the outcome labels the reader matched, in forecast order.
func (h *Reader) Labels() []string { return h.labels }

// Tolerance is the stated tolerance on the sum of a row's probabilities.
func (h *Reader) Tolerance() float64 { return h.tol }

// InputOffset is how many bytes of the input have been consumed, for
// progress reports.
func (h *Reader) InputOffset() int64 { return h.csv.InputOffset() }

// Next returns the next row. At the end of the input it returns io.EOF. A
// row that is not a valid forecast gives a *RowError, and the next call
// goes on with the following row; any other error ends the reading.
func (h *Reader) Next() (*Row, error) {
	rec, err := h.csv.Read()
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) && !errors.Is(pe.Err, io.ErrUnexpectedEOF) {
			return nil, &RowError{Line: pe.StartLine, Why: "not valid CSV: " + pe.Err.Error()}
		}
		return nil, err
	}
	line, _ := h.csv.FieldPos(0)
	if len(rec) != h.fields {
		return nil, &RowError{Line: line, Why: fmt.Sprintf("has %d fields, the header has %d", len(rec), h.fields)}
	}
	r := &h.row
	r.Line = line
	r.Forecaster = strings.TrimSpace(rec[h.colF])
	r.Question = strings.TrimSpace(rec[h.colQ])
	if r.Forecaster == "" {
		return nil, &RowError{Line: line, Why: "forecaster is empty"}
	}
	if r.Question == "" {
		return nil, &RowError{Line: line, Why: "question is empty"}
	}
	o := strings.TrimSpace(rec[h.colO])
	if r.Outcome = h.outcome(o); r.Outcome < 0 {
		return nil, &RowError{Line: line, Why: fmt.Sprintf("outcome %q is neither one of %s nor an index 1..%d", o, quoteList(h.labels), len(h.labels))}
	}
	var sum float64
	for k, col := range h.colP {
		s := strings.TrimSpace(rec[col])
		x, err := strconv.ParseFloat(s, 64)
		if err != nil {
			if s == "" {
				return nil, &RowError{Line: line, Why: fmt.Sprintf("probability of %q is empty", h.labels[k])}
			}
			return nil, &RowError{Line: line, Why: fmt.Sprintf("probability of %q is %q, not a number", h.labels[k], s)}
		}
		if math.IsNaN(x) || x < 0 || x > 1 {
			return nil, &RowError{Line: line, Why: fmt.Sprintf("probability of %q is %s, outside [0, 1]", h.labels[k], s)}
		}
		r.P[k] = x
		sum += x
	}
	if math.Abs(sum-1) > h.tol {
		return nil, &RowError{Line: line, Why: fmt.Sprintf("probabilities sum to %.10g, not 1 (tolerance %g)", sum, h.tol)}
	}
	if sum != 1 {
		for k := range r.P {
			r.P[k] /= sum
		}
	}
	return r, nil
}

// outcome reads a label or a 1-based index; -1 when it is neither.
func (h *Reader) outcome(s string) int {
	if k := indexOf(h.labels, s); k >= 0 {
		return k
	}
	if i, err := strconv.Atoi(s); err == nil && i >= 1 && i <= len(h.labels) {
		return i - 1
	}
	return -1
}

func indexOf(labels []string, s string) int {
	for k, l := range labels {
		if l == s {
			return k
		}
	}
	return -1
}

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = strconv.Quote(n)
	}
	return strings.Join(q, ", ")
}

func columns(names []string) string {
	if len(names) == 1 {
		return "column " + quoteList(names)
	}
	return "columns " + quoteList(names)
}
