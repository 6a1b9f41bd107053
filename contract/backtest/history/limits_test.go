package history

import (
	"errors"
	"fmt"
	"io"
	"strings"
	"testing"
)

// A row opening a quote it never closes must not swallow the rows after
// it silently: the bad record names the lines it took in.
func TestUnclosedQuoteIsReportedWithItsSpan(t *testing.T) {
	var b strings.Builder
	b.WriteString("forecaster,question,outcome,frost,clear\n")
	b.WriteString("Alder,n0,frost,0.5,0.5\n")      // line 2
	b.WriteString("\"Smith, J,q1,frost,0.3,0.7\n") // line 3: the quote opens
	for i := range 100 {
		fmt.Fprintf(&b, "Birch,n%d,clear,0.2,0.8\n", i) // lines 4..103
	}
	rows, bad := read(t, b.String(), frost)
	if len(rows) != 1 || len(bad) != 1 {
		t.Fatalf("got %d rows and bad records %v, want 1 row and one bad record", len(rows), bad)
	}
	if bad[0].Line != 3 || bad[0].EndLine != 103 || !strings.Contains(bad[0].Error(), "lines 3–103") || !strings.Contains(bad[0].Why, "closing quote missing") {
		t.Errorf("bad record %q (lines %d–%d), want lines 3–103 and a missing quote named", bad[0].Error(), bad[0].Line, bad[0].EndLine)
	}

	// A later quoted field ends the swallowing there; the rows after it
	// are read again.
	b.Reset()
	b.WriteString("forecaster,question,outcome,frost,clear\n")
	b.WriteString("\"Smith, J,q1,frost,0.3,0.7\n") // line 2
	b.WriteString("Birch,n1,clear,0.2,0.8\n")      // line 3
	b.WriteString("Birch,\"n 2\",clear,0.2,0.8\n") // line 4: the quote before n closes it
	b.WriteString("Birch,n3,clear,0.2,0.8\n")      // line 5
	rows, bad = read(t, b.String(), frost)
	if len(bad) != 1 || bad[0].Line != 2 || bad[0].EndLine != 4 {
		t.Fatalf("bad records %v, want one over lines 2–4", bad)
	}
	if len(rows) != 1 || rows[0].Line != 5 {
		t.Errorf("rows %+v, want line 5 read", rows)
	}

	// A quote that closes at the end of a later line gives a record of
	// the right shape whose forecaster holds a line break: refused.
	src := "forecaster,question,outcome,frost,clear\n\"Alder\nBirch\",n1,clear,0.2,0.8\n"
	_, bad = read(t, src, frost)
	if len(bad) != 1 || bad[0].Line != 2 || bad[0].EndLine != 3 || !strings.Contains(bad[0].Why, "runs across lines 2–3") {
		t.Errorf("bad records %v, want the forecaster over lines 2–3 refused", bad)
	}
}

// A question over two lines is accepted and counted, so a report can
// say so.
func TestSpansAreCounted(t *testing.T) {
	src := "forecaster,question,outcome,frost,clear\nAlder,\"night\n1\",frost,0.5,0.5\nAlder,n2,frost,0.5,0.5\n"
	h, err := NewReader(strings.NewReader(src), frost, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for {
		if _, err := h.Next(); err == io.EOF {
			break
		} else if err != nil {
			t.Fatal(err)
		}
	}
	if s := h.Spans(); s.Count != 1 || len(s.First) != 1 || s.First[0] != [2]int{2, 3} {
		t.Errorf("spans %+v, want one over lines 2–3", s)
	}
}

// A field over MaxFieldBytes is a bad record, and its text is not echoed
// into the message.
func TestLongFieldIsAnErrorNotData(t *testing.T) {
	long := strings.Repeat("x", MaxFieldBytes+1)
	src := "forecaster,question,outcome,frost,clear\nAlder," + long + ",frost,0.5,0.5\nAlder,n2,frost," + strings.Repeat("7", 5000) + ",0.5\nAlder,n3,frost,0.5,0.5\n"
	rows, bad := read(t, src, frost)
	if len(bad) != 2 || len(rows) != 1 {
		t.Fatalf("rows %d, bad %v", len(rows), len(bad))
	}
	if !strings.Contains(bad[0].Why, fmt.Sprintf("field 2 is %d bytes, longer than the limit of %d", MaxFieldBytes+1, MaxFieldBytes)) {
		t.Errorf("long field: %q", bad[0].Why)
	}
	for _, e := range bad {
		if len(e.Error()) > 300 {
			t.Errorf("message of %d bytes echoes the field: %.80q…", len(e.Error()), e.Error())
		}
	}
}

// endless is an input that never ends: the header, then one field that
// goes on for ever (or, with lines, an opened quote and rows for ever).
type endless struct {
	head  string
	fill  []byte
	given int64
}

func (e *endless) Read(p []byte) (int, error) {
	n := 0
	if e.head != "" {
		n = copy(p, e.head)
		e.head = e.head[n:]
	}
	for n < len(p) {
		n += copy(p[n:], e.fill)
	}
	e.given += int64(n)
	return n, nil
}

// Fed an endless record, the reader stops with an error after reading
// a bounded amount: the record limit plus its read-ahead buffers.
func TestEndlessStreamIsBounded(t *testing.T) {
	for _, c := range []struct {
		name string
		fill string
	}{
		{"one endless field", "xxxxxxxxxxxxxxxx"},
		{"an opened quote, then rows for ever", "Birch,n,clear,0.2,0.8\n"},
	} {
		head := "forecaster,question,outcome,frost,clear\nAlder,"
		if c.fill[0] != 'x' {
			head += "\""
		}
		in := &endless{head: head, fill: []byte(c.fill)}
		h, err := NewReader(in, frost, Options{})
		if err != nil {
			t.Fatal(err)
		}
		var last error
		for range 10 {
			if _, last = h.Next(); last != nil {
				var re *RowError
				if !errors.As(last, &re) {
					break
				}
			}
		}
		if last == nil || !strings.Contains(last.Error(), fmt.Sprintf("line 2: a record runs past %d bytes", MaxRecordBytes)) {
			t.Errorf("%s: error %v, want the record limit named at line 2", c.name, last)
		}
		if bound := int64(MaxRecordBytes + 3*readAhead); in.given > bound {
			t.Errorf("%s: read %d bytes, want at most %d", c.name, in.given, bound)
		}
	}
	// JSON lines: the same bound on one line.
	in := &endless{fill: []byte("{{{{{{{{")}
	if _, err := Open(in, JSONLines, frost, Options{}); err == nil || !strings.Contains(err.Error(), "runs past") || in.given > MaxRecordBytes+3*readAhead {
		t.Errorf("JSON lines: error %v after %d bytes", err, in.given)
	}
}
