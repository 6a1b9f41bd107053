package history

import (
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

// Names of the columns every history has besides the probabilities, and
// of the optional date column.
const (
	ColForecaster = "forecaster"
	ColQuestion   = "question"
	ColOutcome    = "outcome"
	ColDate       = "date"
)

// Bounds on what one record may hold. They are far above any forecast
// record and keep a broken or hostile file from filling memory.
const (
	// MaxFieldBytes bounds one field (a question text, say).
	MaxFieldBytes = 64 << 10
	// MaxRecordBytes bounds one record, all its fields together.
	MaxRecordBytes = 1 << 20
	// MaxNameBytes bounds a forecaster's name, which reports print.
	MaxNameBytes = 256
)

// Options tune the reader. The zero value means the defaults.
type Options struct {
	// Tolerance is how far from 1 a row's probabilities may sum; zero
	// means DefaultTolerance. Accepted rows are renormalised to sum to 1.
	Tolerance float64
	// Sheet names the XLSX sheet to read; empty means the first.
	Sheet string
}

// Row is one valid forecast. The Row and its P belong to the reader and
// are overwritten by the next call to Next; the strings are ordinary Go
// strings and stay valid (each holds on to the text it was cut from, up to
// 64 KiB of lines, so clone a name you keep for long).
type Row struct {
	// Line is the 1-based line (XLSX: row) the record starts on.
	Line int
	// Forecaster and Question are as written, trimmed.
	Forecaster, Question string
	// Outcome is the 0-based index of the outcome that happened.
	Outcome int
	// P is the forecast, in the order of the labels given to NewReader,
	// summing to 1.
	P []float64
	// Month is the month of the row's date; 0 when the history has no
	// date column.
	Month Month
}

// RowError says why one record is not a valid forecast. Reading can go on
// after it.
type RowError struct {
	// Line is where the record starts and EndLine where it ends (equal
	// unless a quoted field runs across lines).
	Line, EndLine int
	Why           string
	// Unit is "line" (CSV, JSON lines) or "row" (XLSX); empty means line.
	Unit string
}

// Error writes "line N: why", or "lines N–M: why" for a record over
// several lines.
func (e *RowError) Error() string { return e.Where() + ": " + e.Why }

// Where names the record: "line 12", "lines 12–40" or "row 7".
func (e *RowError) Where() string { return where(e.Unit, e.Line, e.EndLine) }

func where(unit string, line, end int) string {
	if unit == "" {
		unit = "line"
	}
	if end > line {
		return fmt.Sprintf("%ss %d–%d", unit, line, end)
	}
	return fmt.Sprintf("%s %d", unit, line)
}

// source is one file format: it yields the header once, then records
// with the lines they cover. A *RowError from next is one bad record;
// io.EOF is the end; any other error ends the reading.
type source interface {
	header() ([]string, error)
	next() (rec []string, line, end int, err error)
	offset() int64
	unit() string
}

// Reader streams forecasts from a history.
type Reader struct {
	src    source
	labels []string
	tol    float64
	// Column positions of the fixed fields, of the date (-1: none) and
	// of each label's probability.
	colF, colQ, colO, colD int
	colP                   []int
	fields                 int
	row                    Row
	spans                  Spans
}

// Spans counts the valid records whose question ran across lines, with
// the first few, so that a report can say so.
type Spans struct {
	Count int
	// First holds up to MaxSpansKept of them as [start, end] lines.
	First [][2]int
}

// MaxSpansKept is how many multi-line records Spans lists.
const MaxSpansKept = 5

// NewReader reads the header of a CSV history and matches its probability
// columns to labels by name. A header that does not fit the labels is an
// error naming what is missing or extra.
func NewReader(r io.Reader, labels []string, opt Options) (*Reader, error) {
	return Open(r, CSV, labels, opt)
}

// Open reads the header of a history in the given format.
func Open(r io.Reader, format Format, labels []string, opt Options) (*Reader, error) {
	tol := opt.Tolerance
	if tol == 0 {
		tol = DefaultTolerance
	}
	if !(tol > 0) || math.IsInf(tol, 0) {
		return nil, fmt.Errorf("history: tolerance %g must be positive", tol)
	}
	var src source
	var err error
	switch format {
	case CSV:
		src = newCSVSource(r)
	case JSONLines:
		src = newJSONSource(r, labels)
	case XLSX:
		if src, err = newXLSXSource(r, opt.Sheet); err != nil {
			return nil, err
		}
	default:
		return nil, fmt.Errorf("history: unknown format %d", format)
	}
	header, err := src.header()
	if err != nil {
		return nil, err
	}
	h := &Reader{src: src, labels: labels, tol: tol, colD: -1, fields: len(header)}
	if err := h.matchHeader(header); err != nil {
		return nil, err
	}
	h.row.P = make([]float64, len(labels))
	return h, nil
}

// matchHeader finds the fixed columns and the labels' columns.
func (h *Reader) matchHeader(header []string) error {
	h.colF, h.colQ, h.colO = -1, -1, -1
	h.colP = make([]int, len(h.labels))
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
			return fmt.Errorf("history header: column %q appears twice (columns %d and %d)", clip(name), j+1, i+1)
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
		case ColDate:
			h.colD = i
			continue
		}
		k := indexOf(h.labels, name)
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
			missing = append(missing, h.labels[k])
		}
	}
	if len(missing) > 0 || len(extra) > 0 {
		msg := "history header does not match the rule's outcomes (" + strings.Join(h.labels, ", ") + ")"
		if len(missing) > 0 {
			msg += "; missing " + columns(missing)
		}
		if len(extra) > 0 {
			msg += "; unexpected " + columns(extra)
		}
		return errors.New(msg)
	}
	return nil
}

// Labels are the outcome labels the reader matched, in forecast order.
func (h *Reader) Labels() []string { return h.labels }

// Tolerance is the stated tolerance on the sum of a row's probabilities.
func (h *Reader) Tolerance() float64 { return h.tol }

// HasDate reports whether the history has a date column.
func (h *Reader) HasDate() bool { return h.colD >= 0 }

// Unit is what the format numbers records by: "line" or "row".
func (h *Reader) Unit() string { return h.src.unit() }

// Spans are the valid records so far whose question ran across lines.
func (h *Reader) Spans() Spans { return h.spans }

// InputOffset is how many bytes of the input have been consumed, for
// progress reports.
func (h *Reader) InputOffset() int64 { return h.src.offset() }

// Next returns the next row. At the end of the input it returns io.EOF. A
// row that is not a valid forecast gives a *RowError, and the next call
// goes on with the following row; any other error ends the reading.
func (h *Reader) Next() (*Row, error) {
	rec, line, end, err := h.src.next()
	if err != nil {
		return nil, err
	}
	bad := func(format string, args ...any) error {
		return &RowError{Line: line, EndLine: end, Why: fmt.Sprintf(format, args...), Unit: h.src.unit()}
	}
	if len(rec) != h.fields {
		return nil, bad("has %d fields, the header has %d%s", len(rec), h.fields, openQuote(line, end))
	}
	if end > line {
		// Only a question may hold a line break; anywhere else it is a
		// quote left open.
		for i, f := range rec {
			if i != h.colQ && strings.IndexByte(f, '\n') >= 0 {
				return nil, bad("a quoted field runs across lines %d–%d; is a closing quote missing?", line, end)
			}
		}
	}
	r := &h.row
	r.Line = line
	r.Forecaster = trim(rec[h.colF])
	r.Question = trim(rec[h.colQ])
	if r.Forecaster == "" {
		return nil, bad("forecaster is empty")
	}
	if len(r.Forecaster) > MaxNameBytes {
		return nil, bad("forecaster name is %d bytes, longer than the limit of %d", len(r.Forecaster), MaxNameBytes)
	}
	if r.Question == "" {
		return nil, bad("question is empty")
	}
	o := trim(rec[h.colO])
	if r.Outcome = h.outcome(o); r.Outcome < 0 {
		return nil, bad("outcome %q is neither one of %s nor an index 1..%d", clip(o), quoteList(h.labels), len(h.labels))
	}
	r.Month = 0
	if h.colD >= 0 {
		d := trim(rec[h.colD])
		if r.Month, err = ParseMonth(d); err != nil {
			return nil, bad("%v", err)
		}
	}
	if err := h.probabilities(rec, r.P); err != nil {
		return nil, bad("%s", err.Error())
	}
	if end > line {
		h.spans.Count++
		if len(h.spans.First) < MaxSpansKept {
			h.spans.First = append(h.spans.First, [2]int{line, end})
		}
	}
	return r, nil
}

// probabilities parses the row's forecast into p, checks it and
// renormalises it to sum to 1.
func (h *Reader) probabilities(rec []string, p []float64) error {
	var sum float64
	for k, col := range h.colP {
		s := trim(rec[col])
		x, ok := parseDecimal(s)
		var err error
		if !ok {
			x, err = strconv.ParseFloat(s, 64)
		}
		if err != nil {
			if s == "" {
				return fmt.Errorf("probability of %q is empty", h.labels[k])
			}
			return fmt.Errorf("probability of %q is %q, not a number", h.labels[k], clip(s))
		}
		if math.IsNaN(x) || x < 0 || x > 1 {
			return fmt.Errorf("probability of %q is %s, outside [0, 1]", h.labels[k], clip(s))
		}
		p[k] = x
		sum += x
	}
	if math.Abs(sum-1) > h.tol {
		return fmt.Errorf("probabilities sum to %.10g, not 1 (tolerance %g)", sum, h.tol)
	}
	if sum != 1 {
		for k := range p {
			p[k] /= sum
		}
	}
	return nil
}

// openQuote adds, for a record over several lines, the likely cause.
func openQuote(line, end int) string {
	if end <= line {
		return ""
	}
	return fmt.Sprintf(" (a quoted field runs across lines %d–%d; is a closing quote missing?)", line, end)
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

// clipAt is how many bytes of a field an error message quotes.
const clipAt = 40

// clip shortens s for an error message, so that a huge field is never
// echoed: the first bytes (whole runes), then how long it was.
func clip(s string) string {
	if len(s) <= clipAt {
		return s
	}
	cut := clipAt
	for cut > 0 && !isRuneStart(s[cut]) {
		cut--
	}
	return fmt.Sprintf("%s… (%d bytes)", s[:cut], len(s))
}

func isRuneStart(b byte) bool { return b&0xC0 != 0x80 }

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = strconv.Quote(clip(n))
	}
	return strings.Join(q, ", ")
}

func columns(names []string) string {
	if len(names) == 1 {
		return "column " + quoteList(names)
	}
	return "columns " + quoteList(names)
}

// trim is strings.TrimSpace, skipping the call for the usual field that
// starts and ends with a printable ASCII byte (no space to trim, ASCII or
// Unicode).
func trim(s string) string {
	if n := len(s); n > 0 && s[0] > ' ' && s[0] < 0x80 && s[n-1] > ' ' && s[n-1] < 0x80 {
		return s
	}
	return strings.TrimSpace(s)
}
