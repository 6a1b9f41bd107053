package history

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// csvRecord is what a CSV source yields for one record: its fields and
// lines, or the lines and reason of a bad record, and the input offset
// after it.
type csvRecord struct {
	rec         []string
	line, end   int
	bad         string
	offset      int64
	fatalOrDone bool
}

// referenceRecords reads src with encoding/csv alone, record by record:
// the independent reading the fast path must reproduce.
func referenceRecords(src string) []csvRecord {
	c := csv.NewReader(strings.NewReader(src))
	c.FieldsPerRecord = -1
	var out []csvRecord
	for {
		rec, err := c.Read()
		var pe *csv.ParseError
		switch {
		case err == nil:
			line, _ := c.FieldPos(0)
			end := line
			for _, f := range rec {
				end += strings.Count(f, "\n")
			}
			r := csvRecord{rec: rec, line: line, end: end, offset: c.InputOffset()}
			for i, f := range rec {
				if len(f) > MaxFieldBytes { // the history's bound, not encoding/csv's
					r = csvRecord{line: line, end: line, offset: r.offset,
						bad: fmt.Sprintf("field %d is %d bytes, longer than the limit of %d", i+1, len(f), MaxFieldBytes)}
					break
				}
			}
			out = append(out, r)
		case errors.As(err, &pe) && !errors.Is(pe.Err, io.ErrUnexpectedEOF):
			out = append(out, csvRecord{line: pe.StartLine, end: pe.Line, bad: pe.Err.Error(), offset: c.InputOffset()})
		default:
			return append(out, csvRecord{fatalOrDone: true})
		}
	}
}

// sourceRecords reads src with the source the Reader uses.
func sourceRecords(src string) []csvRecord {
	s := newCSVSource(strings.NewReader(src))
	var out []csvRecord
	for {
		rec, line, end, err := s.next()
		var re *RowError
		switch {
		case err == nil:
			out = append(out, csvRecord{rec: slices.Clone(rec), line: line, end: end, offset: s.offset()})
		case errors.As(err, &re):
			why := strings.TrimPrefix(re.Why, "not valid CSV: ")
			if i := strings.Index(why, " (a quote opened"); i >= 0 {
				why = why[:i]
			}
			out = append(out, csvRecord{line: re.Line, end: re.EndLine, bad: why, offset: s.offset()})
		default:
			return append(out, csvRecord{fatalOrDone: true})
		}
	}
}

// randomCSV writes lines from pieces that exercise every case of the two
// readers: quotes (closed, open, doubled, bare), CR LF and lone CR,
// empty lines, a last line with or without its line break, and now and
// then a line longer than the read-ahead buffer.
func randomCSV(rng *rand.Rand) string {
	pieces := []string{"a", "bc", "0.25", ",", ",", ",", " ", "\"", "\"\"", "\"q,\nr\"", "\r", "\r\n", "\n", "\n", "\n"}
	var b strings.Builder
	for range rng.IntN(60) {
		if rng.IntN(40) == 0 {
			b.WriteString(strings.Repeat("x", readAhead+rng.IntN(3*readAhead)))
		}
		if rng.IntN(3) == 0 {
			b.WriteString("alder,q1,near,0.5,0.5\n") // a clean line, the common case
			continue
		}
		b.WriteString(pieces[rng.IntN(len(pieces))])
	}
	return b.String()
}

// The source gives the records, lines, bad records and offsets that
// encoding/csv alone gives, on random text of every kind.
func TestCSVSourceMatchesEncodingCSV(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 1))
	for i := range 3000 {
		src := randomCSV(rng)
		want, got := referenceRecords(src), sourceRecords(src)
		if len(want) != len(got) {
			t.Fatalf("case %d %q: %d records, encoding/csv gives %d", i, clip(src), len(got), len(want))
		}
		for k := range want {
			w, g := want[k], got[k]
			if !slices.Equal(w.rec, g.rec) || w.line != g.line || w.end != g.end || w.bad != g.bad || w.offset != g.offset || w.fatalOrDone != g.fatalOrDone {
				t.Fatalf("case %d %q, record %d:\n got %s\nwant %s", i, clip(src), k, clip(fmt.Sprintf("%+v", g)), clip(fmt.Sprintf("%+v", w)))
			}
		}
	}
}
