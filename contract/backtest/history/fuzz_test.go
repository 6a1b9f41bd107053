package history

import (
	"bytes"
	"errors"
	"io"
	"math"
	"testing"
)

// FuzzReader feeds the reader arbitrary CSV and JSON lines: it must never
// panic, every row it accepts must be a forecast (probabilities in [0, 1]
// summing to 1, an outcome in range, lines increasing), and every bad
// record must name a line.
func FuzzReader(f *testing.F) {
	f.Add([]byte("forecaster,question,outcome,frost,clear\nAlder,n1,frost,0.3,0.7\n\"Smith, J,q1,1,0.5,0.5\nB,\"x\ny\",2,1,0\n"), false)
	f.Add([]byte("question,clear,forecaster,outcome,frost,date\nq,0.5,A,1,0.5,2026-02-30\n"), false)
	f.Add([]byte(`{"forecaster":"A","question":"q","outcome":1,"frost":0.25,"clear":"0.75"}`+"\n{}\n"), true)
	f.Fuzz(func(t *testing.T, data []byte, jsonLines bool) {
		format := CSV
		if jsonLines {
			format = JSONLines
		}
		h, err := Open(bytes.NewReader(data), format, []string{"frost", "clear"}, Options{})
		if err != nil {
			return
		}
		last := 0
		for range 10000 {
			r, err := h.Next()
			if err == io.EOF {
				return
			}
			var re *RowError
			if errors.As(err, &re) {
				if re.Line <= 0 || re.EndLine < re.Line {
					t.Fatalf("bad record without a line: %+v", re)
				}
				continue
			}
			if err != nil {
				return
			}
			if r.Line <= last {
				t.Fatalf("line %d after line %d", r.Line, last)
			}
			last = r.Line
			if r.Outcome < 0 || r.Outcome > 1 || r.Forecaster == "" {
				t.Fatalf("accepted %+v", r)
			}
			s := r.P[0] + r.P[1]
			if !(r.P[0] >= 0 && r.P[1] >= 0 && r.P[0] <= 1 && r.P[1] <= 1) || math.Abs(s-1) > 1e-9 {
				t.Fatalf("accepted forecast %v", r.P)
			}
		}
	})
}
