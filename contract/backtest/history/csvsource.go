package history

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"
)

// csvSource reads CSV with encoding/csv, under a guard that bounds how
// far one record may run.
type csvSource struct {
	csv   *csv.Reader
	guard *guard
	// lastEnd is the last line of the previous record, so that a record
	// too long to finish can be placed.
	lastEnd int
}

// readAhead is the buffer between the guard and encoding/csv: the guard
// counts what leaves it, so a record is bounded to MaxRecordBytes plus
// this much.
const readAhead = 64 << 10

func newCSVSource(r io.Reader) *csvSource {
	g := &guard{r: r, limit: MaxRecordBytes + readAhead}
	c := csv.NewReader(bufio.NewReaderSize(g, readAhead))
	c.ReuseRecord = true
	c.FieldsPerRecord = -1 // counted by the Reader, with a clearer message
	return &csvSource{csv: c, guard: g}
}

func (s *csvSource) unit() string { return "line" }

func (s *csvSource) offset() int64 { return s.csv.InputOffset() }

func (s *csvSource) header() ([]string, error) {
	rec, _, _, err := s.next()
	if err == io.EOF {
		return nil, errors.New("history is empty: want a header row (forecaster, question, outcome, then one column per outcome)")
	}
	var re *RowError
	if errors.As(err, &re) {
		return nil, fmt.Errorf("history header (%s): %s", re.Where(), re.Why)
	}
	if err != nil {
		return nil, fmt.Errorf("history header: %w", err)
	}
	if len(rec) == 1 {
		for _, sep := range []string{";", "\t", "|"} {
			if strings.Contains(rec[0], sep) {
				return nil, fmt.Errorf("history header is one column %q: the file looks separated by %q, and a history is comma-separated", clip(rec[0]), sep)
			}
		}
	}
	return append([]string(nil), rec...), nil
}

func (s *csvSource) next() ([]string, int, int, error) {
	s.guard.mark(s.csv.InputOffset())
	rec, err := s.csv.Read()
	if s.guard.tripped {
		return nil, 0, 0, fmt.Errorf("line %d: a record runs past %d bytes (the limit for one record); is a closing quote missing?", s.lastEnd+1, MaxRecordBytes)
	}
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) && !errors.Is(pe.Err, io.ErrUnexpectedEOF) {
			s.lastEnd = pe.Line
			why := "not valid CSV: " + pe.Err.Error()
			if pe.Line > pe.StartLine {
				why += fmt.Sprintf(" (a quote opened on line %d runs to line %d; is a closing quote missing?)", pe.StartLine, pe.Line)
			}
			return nil, 0, 0, &RowError{Line: pe.StartLine, EndLine: pe.Line, Why: why}
		}
		return nil, 0, 0, err
	}
	line, _ := s.csv.FieldPos(0)
	end := line
	for i, f := range rec {
		if len(f) > MaxFieldBytes {
			s.lastEnd = line
			return nil, 0, 0, &RowError{Line: line, EndLine: line, Why: fmt.Sprintf("field %d is %d bytes, longer than the limit of %d", i+1, len(f), MaxFieldBytes)}
		}
		end += strings.Count(f, "\n")
	}
	s.lastEnd = end
	return rec, line, end, nil
}

// guard passes reads through until more than limit bytes have left it
// since the last mark; then it fails every read, so that encoding/csv,
// which would hold a whole record however long, stops.
type guard struct {
	r       io.Reader
	limit   int64
	read    int64 // bytes passed on
	start   int64 // input offset of the record being read
	tripped bool
}

// errRecordTooLong is what the guard returns once tripped; the source
// turns it into a message with the line.
var errRecordTooLong = errors.New("record too long")

// mark says a record starts at input offset off.
func (g *guard) mark(off int64) { g.start = off }

func (g *guard) Read(p []byte) (int, error) {
	room := g.limit - (g.read - g.start)
	if room <= 0 {
		g.tripped = true
		return 0, errRecordTooLong
	}
	if int64(len(p)) > room {
		p = p[:room]
	}
	n, err := g.r.Read(p)
	g.read += int64(n)
	return n, err
}
