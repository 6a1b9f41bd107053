package history

import (
	"errors"
	"io"
	"math"
	"strings"
	"testing"
)

var frost = []string{"frost", "clear"}

// read collects every row and row error of src.
func read(t *testing.T, src string, labels []string) (rows []Row, bad []*RowError) {
	t.Helper()
	h, err := NewReader(strings.NewReader(src), labels, Options{})
	if err != nil {
		t.Fatalf("NewReader: %v", err)
	}
	for {
		r, err := h.Next()
		if err == io.EOF {
			return rows, bad
		}
		var re *RowError
		if errors.As(err, &re) {
			bad = append(bad, re)
			continue
		}
		if err != nil {
			t.Fatalf("Next: %v", err)
		}
		c := *r
		c.P = append([]float64(nil), r.P...)
		rows = append(rows, c)
	}
}

func TestGoodRows(t *testing.T) {
	// Columns in any order; outcome as label or 1-based index; a quoted
	// question spanning two lines; a byte-order mark before the header.
	src := "\uFEFFquestion,clear,forecaster,outcome,frost\n" +
		"night 1,0.7,Alder,clear,0.3\n" +
		"\"night\n2\",0.4,Birch,1,0.6\n" +
		"night 3, 0.5 , Cedar ,2,0.5\n" +
		"night 4,0.6666666,Alder,frost,0.3333333\n"
	rows, bad := read(t, src, frost)
	if len(bad) != 0 {
		t.Fatalf("unexpected bad rows: %v", bad)
	}
	want := []struct {
		line       int
		who, q     string
		y          int
		p0, p1, to float64
	}{
		{2, "Alder", "night 1", 1, 0.3, 0.7, 0},
		{3, "Birch", "night\n2", 0, 0.6, 0.4, 0},
		{5, "Cedar", "night 3", 1, 0.5, 0.5, 0},
		// renormalised from a sum of 1 - 1e-7 (inside the default tolerance)
		{6, "Alder", "night 4", 0, 0.3333333 / 0.9999999, 0.6666666 / 0.9999999, 1e-15},
	}
	if len(rows) != len(want) {
		t.Fatalf("got %d rows, want %d", len(rows), len(want))
	}
	for i, w := range want {
		r := rows[i]
		if r.Line != w.line || r.Forecaster != w.who || r.Question != w.q || r.Outcome != w.y ||
			math.Abs(r.P[0]-w.p0) > w.to || math.Abs(r.P[1]-w.p1) > w.to {
			t.Errorf("row %d = %+v, want %+v", i, r, w)
		}
	}
}

func TestBadRows(t *testing.T) {
	src := "forecaster,question,outcome,frost,clear\n" +
		"Alder,n1,frost,0.6,0.6\n" + // 2
		"Alder,n2,hail,0.5,0.5\n" + // 3
		"Alder,n3,frost,0.5\n" + // 4
		"Alder,n4,frost,n/a,0.5\n" + // 5
		"Alder,n5,frost,-0.1,1.1\n" + // 6
		"Alder,n6,3,0.5,0.5\n" + // 7
		",n7,frost,0.5,0.5\n" + // 8
		"Alder,,frost,0.5,0.5\n" + // 9
		"Alder,n9,frost,,1\n" + // 10
		"Alder,n10,frost,NaN,0.5\n" + // 11
		"Alder,n\"11,frost,0.5,0.5\n" + // 12: bare quote
		"Alder,n12,clear,0.2,0.8\n" // 13: good, after all that
	rows, bad := read(t, src, frost)
	want := []struct {
		line int
		why  string
	}{
		{2, "sum to 1.2"},
		{3, `outcome "hail" is neither one of "frost", "clear" nor an index 1..2`},
		{4, "has 4 fields, the header has 5"},
		{5, `probability of "frost" is "n/a", not a number`},
		{6, `probability of "frost" is -0.1, outside [0, 1]`},
		{7, `outcome "3"`},
		{8, "forecaster is empty"},
		{9, "question is empty"},
		{10, `probability of "frost" is empty`},
		{11, "outside [0, 1]"},
		{12, "not valid CSV"},
	}
	if len(bad) != len(want) {
		t.Fatalf("got %d bad rows %v, want %d", len(bad), bad, len(want))
	}
	for i, w := range want {
		if bad[i].Line != w.line || !strings.Contains(bad[i].Why, w.why) {
			t.Errorf("bad row %d = line %d %q, want line %d containing %q", i, bad[i].Line, bad[i].Why, w.line, w.why)
		}
	}
	if len(rows) != 1 || rows[0].Line != 13 || rows[0].Question != "n12" {
		t.Errorf("reading did not go on after bad rows: %+v", rows)
	}
}

func TestHeaderErrors(t *testing.T) {
	cases := []struct {
		name, src string
		want      string
	}{
		{"empty", "", "history is empty"},
		{"missing label", "forecaster,question,outcome,frost\n", `missing column "clear"`},
		{"wrong labels", "forecaster,question,outcome,1,2\n", `missing columns "frost", "clear"; unexpected columns "1", "2"`},
		{"missing fixed", "forecaster,outcome,frost,clear\n", `missing column "question"`},
		{"semicolons", "forecaster;question;outcome;frost;clear\n", `separated by ";", and a history is comma-separated`},
		{"duplicate", "forecaster,question,outcome,frost,clear,frost\n", `column "frost" appears twice (columns 4 and 6)`},
	}
	for _, c := range cases {
		_, err := NewReader(strings.NewReader(c.src), frost, Options{})
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want it to contain %q", c.name, err, c.want)
		}
	}
}

func TestTolerance(t *testing.T) {
	src := "forecaster,question,outcome,below,near,above\nA,q,near,0.33,0.33,0.33\n"
	labels := []string{"below", "near", "above"}
	for _, c := range []struct {
		tol float64
		ok  bool
	}{{0, false}, {1e-3, false}, {0.011, true}} {
		h, err := NewReader(strings.NewReader(src), labels, Options{Tolerance: c.tol})
		if err != nil {
			t.Fatal(err)
		}
		_, err = h.Next()
		if (err == nil) != c.ok {
			t.Errorf("tolerance %g: error %v, want ok=%v", c.tol, err, c.ok)
		}
	}
}

// A valid row costs at most one string (encoding/csv's per record, or a
// share of the reader's string per block of quote-free lines).
func TestNextAllocations(t *testing.T) {
	const line = "Alder,night,frost,0.25,0.75\n"
	src := "forecaster,question,outcome,frost,clear\n" + strings.Repeat(line, 200)
	h, err := NewReader(strings.NewReader(src), frost, Options{})
	if err != nil {
		t.Fatal(err)
	}
	allocs := testing.AllocsPerRun(100, func() {
		if _, err := h.Next(); err != nil {
			t.Fatal(err)
		}
	})
	if allocs > 1 {
		t.Errorf("Next allocates %.1f times per row, want at most 1", allocs)
	}
}
