package history

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"
)

// csvSource reads CSV under a guard that bounds how far one record may
// run. Lines without a quote, nearly every line of a history, are split
// by the source itself: a record of such a line is the line cut at its
// commas, exactly as encoding/csv reads it, at a fraction of the cost.
// Any other record (one with a quote, a line longer than the buffer, a
// last line without its line break) is read by encoding/csv from the same
// buffer, so quoting, its errors and the bounds are encoding/csv's and
// the guard's as before.
type csvSource struct {
	br    *bufio.Reader // shared with csv: both consume whole lines from it
	csv   *csv.Reader
	guard *guard
	// chunk holds complete quote-free lines taken out of br as one string,
	// not yet split; the fields of a record are substrings of it, so a
	// record costs no allocation (a kept field holds on to its chunk).
	chunk string
	rec   []string
	// line and off are the lines and bytes consumed; csvLine is the lines
	// encoding/csv has counted (it sees only the records it reads), so
	// its line numbers are shifted by line - csvLine.
	line, csvLine int
	off           int64
	// lastEnd is the last line of the previous record, so that a record
	// too long to finish can be placed.
	lastEnd int
	err     error // a read error met while filling chunk, for the next call
}

// readAhead is the buffer between the guard and the parsers: the guard
// counts what leaves it, so a record is bounded to MaxRecordBytes plus
// this much.
const readAhead = 64 << 10

func newCSVSource(r io.Reader) *csvSource {
	g := &guard{r: r, limit: MaxRecordBytes + readAhead}
	br := bufio.NewReaderSize(g, readAhead)
	c := csv.NewReader(br) // csv.NewReader keeps br itself: it is large enough
	c.ReuseRecord = true
	c.FieldsPerRecord = -1 // counted by the Reader, with a clearer message
	return &csvSource{br: br, csv: c, guard: g}
}

func (s *csvSource) unit() string { return "line" }

func (s *csvSource) offset() int64 { return s.off }

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
	for {
		if s.chunk == "" {
			s.fill()
		}
		if s.chunk == "" {
			if s.err != nil {
				return nil, 0, 0, s.err
			}
			return s.slow()
		}
		i := strings.IndexByte(s.chunk, '\n') // every line of chunk ends with one
		ln := s.chunk[:i]
		s.chunk = s.chunk[i+1:]
		s.line++
		s.off += int64(i + 1)
		if i > 0 && ln[i-1] == '\r' {
			ln = ln[:i-1] // encoding/csv reads \r\n as \n
		}
		if ln == "" {
			continue // encoding/csv skips empty lines
		}
		s.rec = s.rec[:0]
		for {
			j := strings.IndexByte(ln, ',')
			if j < 0 {
				break
			}
			s.rec = append(s.rec, ln[:j])
			ln = ln[j+1:]
		}
		s.rec = append(s.rec, ln)
		s.lastEnd = s.line
		// A line shorter than the buffer cannot hold a field over
		// MaxFieldBytes, so the check of slow is not needed here.
		return s.rec, s.line, s.line, nil
	}
}

// fill moves the complete lines buffered before the first quote into
// chunk, reading more first when no complete line is buffered. It leaves
// chunk empty when the next record is for encoding/csv.
func (s *csvSource) fill() {
	s.guard.mark(s.off)
	buf, _ := s.br.Peek(s.br.Buffered())
	if bytes.IndexByte(buf, '\n') < 0 {
		var err error
		buf, err = s.br.Peek(s.br.Size())
		if err != nil && err != io.EOF && err != bufio.ErrBufferFull && len(buf) == 0 {
			s.err = err
		}
	}
	if q := bytes.IndexByte(buf, '"'); q >= 0 {
		buf = buf[:q]
	}
	k := bytes.LastIndexByte(buf, '\n')
	if k < 0 {
		return
	}
	s.chunk = string(buf[:k+1])
	s.br.Discard(k + 1)
}

// slow reads one record with encoding/csv, placing it on the source's
// lines.
func (s *csvSource) slow() ([]string, int, int, error) {
	s.guard.mark(s.off)
	shift := s.line - s.csvLine
	before := s.csv.InputOffset()
	rec, err := s.csv.Read()
	s.off += s.csv.InputOffset() - before
	if s.guard.tripped {
		return nil, 0, 0, fmt.Errorf("line %d: a record runs past %d bytes (the limit for one record); is a closing quote missing?", s.lastEnd+1, MaxRecordBytes)
	}
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			s.csvLine, s.line = pe.Line, pe.Line+shift
			moved := *pe
			moved.StartLine += shift
			moved.Line += shift
			pe = &moved
		}
		if pe != nil && !errors.Is(pe.Err, io.ErrUnexpectedEOF) {
			s.lastEnd = pe.Line
			why := "not valid CSV: " + pe.Err.Error()
			if pe.Line > pe.StartLine {
				why += fmt.Sprintf(" (a quote opened on line %d runs to line %d; is a closing quote missing?)", pe.StartLine, pe.Line)
			}
			return nil, 0, 0, &RowError{Line: pe.StartLine, EndLine: pe.Line, Why: why}
		}
		if pe != nil {
			return nil, 0, 0, pe
		}
		return nil, 0, 0, err
	}
	first, _ := s.csv.FieldPos(0)
	end := first
	for _, f := range rec {
		end += strings.Count(f, "\n")
	}
	s.csvLine = end
	line := first + shift
	end += shift
	s.line = end
	for i, f := range rec {
		if len(f) > MaxFieldBytes {
			s.lastEnd = line // as before the fast path: the record is named by its first line
			return nil, 0, 0, &RowError{Line: line, EndLine: line, Why: fmt.Sprintf("field %d is %d bytes, longer than the limit of %d", i+1, len(f), MaxFieldBytes)}
		}
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
