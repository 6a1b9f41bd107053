package history

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"sort"
	"strings"
)

// jsonSource reads JSON lines: one object per line whose keys are the
// CSV header's names (forecaster, question, outcome, optionally date, and
// one key per outcome label), with strings or numbers as values. Blank
// lines are skipped, as CSV skips them. The columns are the keys of the
// first object, so that a later object with a key missing or extra is a
// bad record, as a CSV row with a field short would be.
type jsonSource struct {
	r      *bufio.Reader
	labels []string
	line   int
	off    int64
	cols   map[string]int
	names  []string
	rec    []string
	filled []bool
	first  []byte // the first object, read while finding the header
	firstN int
	buf    []byte
	obj    map[string]json.RawMessage
}

func newJSONSource(r io.Reader, labels []string) *jsonSource {
	return &jsonSource{r: bufio.NewReaderSize(r, readAhead), labels: labels}
}

func (s *jsonSource) unit() string { return "line" }

func (s *jsonSource) offset() int64 { return s.off }

// readLine returns the next non-blank line and its number, bounded to
// MaxRecordBytes.
func (s *jsonSource) readLine() ([]byte, int, error) {
	for {
		s.buf = s.buf[:0]
		for {
			chunk, err := s.r.ReadSlice('\n')
			s.off += int64(len(chunk))
			if len(s.buf)+len(chunk) > MaxRecordBytes {
				return nil, 0, fmt.Errorf("line %d: a record runs past %d bytes (the limit for one record)", s.line+1, MaxRecordBytes)
			}
			s.buf = append(s.buf, chunk...)
			if err == bufio.ErrBufferFull {
				continue
			}
			if err != nil && err != io.EOF {
				return nil, 0, err
			}
			if len(s.buf) == 0 && err == io.EOF {
				return nil, 0, io.EOF
			}
			break
		}
		s.line++
		b := bytes.TrimSpace(s.buf)
		if s.line == 1 {
			b = bytes.TrimPrefix(b, []byte("\uFEFF"))
		}
		if len(b) > 0 {
			return b, s.line, nil
		}
	}
}

func (s *jsonSource) header() ([]string, error) {
	b, line, err := s.readLine()
	if err == io.EOF {
		return nil, errors.New("history is empty: want one JSON object per line with keys forecaster, question, outcome and one per outcome")
	}
	if err != nil {
		return nil, err
	}
	obj := map[string]json.RawMessage{}
	if err := json.Unmarshal(b, &obj); err != nil {
		return nil, fmt.Errorf("history line %d: not a JSON object: %v", line, err)
	}
	s.cols = map[string]int{}
	for k := range obj {
		s.names = append(s.names, k)
	}
	// The order of the columns does not matter to the Reader; sorting
	// makes the messages repeatable.
	sort.Strings(s.names)
	for i, k := range s.names {
		s.cols[k] = i
	}
	s.rec = make([]string, len(s.names))
	s.filled = make([]bool, len(s.names))
	s.first, s.firstN = append([]byte(nil), b...), line
	return s.names, nil
}

func (s *jsonSource) next() ([]string, int, int, error) {
	var b []byte
	var line int
	if s.first != nil {
		b, line, s.first = s.first, s.firstN, nil
	} else {
		var err error
		if b, line, err = s.readLine(); err != nil {
			return nil, 0, 0, err
		}
	}
	bad := func(why string) error { return &RowError{Line: line, EndLine: line, Why: why} }
	clear(s.obj)
	if s.obj == nil {
		s.obj = map[string]json.RawMessage{}
	}
	if err := json.Unmarshal(b, &s.obj); err != nil {
		return nil, 0, 0, bad("not a JSON object: " + err.Error())
	}
	clear(s.filled)
	for k, v := range s.obj {
		i, ok := s.cols[k]
		if !ok {
			return nil, 0, 0, bad(fmt.Sprintf("key %q is not one of the first line's keys (%s)", clip(k), strings.Join(s.names, ", ")))
		}
		str, err := jsonField(v)
		if err != nil {
			return nil, 0, 0, bad(fmt.Sprintf("%q: %v", clip(k), err))
		}
		if len(str) > MaxFieldBytes {
			return nil, 0, 0, bad(fmt.Sprintf("%q is %d bytes, longer than the limit of %d", clip(k), len(str), MaxFieldBytes))
		}
		s.rec[i], s.filled[i] = str, true
	}
	for i, ok := range s.filled {
		if !ok {
			return nil, 0, 0, bad(fmt.Sprintf("key %q is missing", s.names[i]))
		}
	}
	return s.rec, line, line, nil
}

// jsonField turns a value into the text a CSV field would hold: a string
// as it is, a number as written (so that 0.1 parses to the same double as
// in CSV).
func jsonField(v json.RawMessage) (string, error) {
	v = bytes.TrimSpace(v)
	if len(v) > 0 && v[0] == '"' {
		var s string
		if err := json.Unmarshal(v, &s); err != nil {
			return "", err
		}
		return s, nil
	}
	if len(v) > 0 && (v[0] == '-' || (v[0] >= '0' && v[0] <= '9')) {
		return string(v), nil
	}
	return "", fmt.Errorf("want a string or a number, not %s", clip(string(v)))
}
