package table_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/csv"
	"encoding/json"
	"flag"
	"hash/crc32"
	"image/png"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"scorewright/contract/budget"
	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// build fits a rule through the real pipeline and returns its table, with
// a fixed date and version so that exports are reproducible.
func build(t testing.TB, src string, labels []string, step float64, b design.Budget) *table.Table {
	t.Helper()
	g, err := bregman.NewFormula(src, bregman.Options{Outcomes: len(labels)})
	if err != nil {
		t.Fatal(err)
	}
	m, err := budget.StepMenu(len(labels), step, b.ReportFloor)
	if err != nil {
		t.Fatal(err)
	}
	f, err := budget.FitRule(&bregman.Rule{Gen: g, Labels: labels}, m, b)
	if err != nil {
		t.Fatal(err)
	}
	rc, err := f.Recheck(context.Background(), budget.RecheckSettings{})
	if err != nil {
		t.Fatal(err)
	}
	return f.Table(rc, budget.Info{Title: "Frost-night forecasts, orchard co-operative", Formula: src, Version: "test", Date: "2026-01-15"})
}

func brier(t testing.TB) *table.Table {
	return build(t, "1 - sum(p^2)", []string{"frost", "clear"}, 0.1, design.Budget{Floor: 0, Cap: 100, Unit: 1})
}

// failed is rounded so coarsely (unit 25, step 0.2) that menu items tie.
func failed(t testing.TB) *table.Table {
	return build(t, "1 - sum(p^2)", []string{"frost", "clear"}, 0.2, design.Budget{Floor: 0, Cap: 100, Unit: 25})
}

func render(t testing.TB, tb *table.Table, format string) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := tb.Write(&buf, format); err != nil {
		t.Fatalf("%s: %v", format, err)
	}
	return buf.Bytes()
}

func TestGolden(t *testing.T) {
	cases := []struct {
		name string
		tb   *table.Table
	}{{"brier", brier(t)}, {"failed", failed(t)}}
	for _, c := range cases {
		for _, format := range []string{"csv", "md", "json", "tex"} {
			got := render(t, c.tb, format)
			path := filepath.Join("testdata", c.name+"."+format)
			if *update {
				if err := os.WriteFile(path, got, 0o644); err != nil {
					t.Fatal(err)
				}
				continue
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -update to create it)", err)
			}
			if !bytes.Equal(got, want) {
				t.Errorf("%s differs from the golden file; run go test ./contract/table -update and review the diff", path)
			}
		}
	}
}

// Every export carries the whole record, and a failed table's warning
// comes before the first row.
func TestMetadataInEveryFormat(t *testing.T) {
	ok, bad := brier(t), failed(t)
	for _, format := range []string{"csv", "md", "json", "tex", "svg"} {
		s := string(render(t, ok, format))
		if format == "svg" {
			// SVG text is split into glyph runs; check the drawn warning
			// and caution through a failed table's first words instead.
			s = string(render(t, bad, format))
			if !strings.Contains(s, "WARNING") || !strings.Contains(s, "counsel") {
				t.Errorf("svg lacks the warning or the caution")
			}
			continue
		}
		for _, want := range []string{"1 - sum(p^2)", "frost", "A", "B", "multiples of 1", "passed", "test", "2026-01-15", "not law", "counsel", "regulated", "steps of 0.1"} {
			if !strings.Contains(s, want) {
				t.Errorf("%s export lacks %q", format, want)
			}
		}
		if strings.Contains(s, "WARNING") {
			t.Errorf("%s: a passed table carries a warning", format)
		}
		b := string(render(t, bad, format))
		mark := "WARNING"
		if format == "json" {
			mark = `"warnings"`
		}
		w, row := strings.Index(b, mark), strings.Index(b, "75")
		if w < 0 || row >= 0 && w > row {
			t.Errorf("%s: the warning is missing or comes after the table (at %d, first row at %d)", format, w, row)
		}
	}
}

// The CSV reads back with encoding/csv and its numbers are the table's,
// bit for bit, for whole units, cents and unrounded amounts.
func TestCSVRoundTrip(t *testing.T) {
	tables := map[string]*table.Table{
		"unit 1":    brier(t),
		"unit 0.01": build(t, "-sum(p*ln(p))", []string{"frost", "clear"}, 0.05, design.Budget{Floor: 0, Cap: 50, Unit: 0.01, ReportFloor: 0.01}),
		"unit 0.3":  build(t, "1 - sum(p^2)", []string{"frost", "clear"}, 0.05, design.Budget{Floor: 0, Cap: 10, Unit: 0.3}),
		"unrounded": build(t, "-sum(p*ln(p))", []string{"below", "near", "above"}, 0.25, design.Budget{Floor: 3, Cap: 7.5, ReportFloor: 0.01}),
	}
	for name, tb := range tables {
		r := csv.NewReader(bytes.NewReader(render(t, tb, "csv")))
		r.Comment = '#'
		recs, err := r.ReadAll()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		n := len(tb.Labels)
		if len(recs) != len(tb.Reports)+1 || len(recs[0]) != 2*n {
			t.Fatalf("%s: %d records of %d fields", name, len(recs), len(recs[0]))
		}
		for i, rec := range recs[1:] {
			for k := range n {
				p, err1 := strconv.ParseFloat(rec[k], 64)
				v, err2 := strconv.ParseFloat(rec[n+k], 64)
				if err1 != nil || err2 != nil || p != tb.Reports[i][k] || v != tb.Values[i][k] {
					t.Errorf("%s row %d col %d: %q %q, table %v %v", name, i+1, k, rec[k], rec[n+k], tb.Reports[i][k], tb.Values[i][k])
				}
			}
		}
	}
}

func TestJSONParses(t *testing.T) {
	var doc struct {
		Rows []struct {
			Report, Values []float64
		}
		Metadata struct {
			A, B          float64
			RecheckPassed bool `json:"recheck_passed"`
			Caution       []string
		}
	}
	if err := json.Unmarshal(render(t, brier(t), "json"), &doc); err != nil {
		t.Fatal(err)
	}
	// Derived by hand in contract/budget's Brier test: A = 100, B = 50,
	// and pay(0.7) = (91, 51).
	if doc.Metadata.A != 100 || doc.Metadata.B != 50 || !doc.Metadata.RecheckPassed || len(doc.Metadata.Caution) == 0 {
		t.Errorf("metadata %+v", doc.Metadata)
	}
	if r := doc.Rows[7]; r.Report[0] != 0.7 || r.Values[0] != 91 || r.Values[1] != 51 {
		t.Errorf("row for 0.7: %+v", r)
	}
}

func TestFigures(t *testing.T) {
	tables := map[string]*table.Table{
		"n=2": brier(t),
		"n=3": build(t, "1 - sum(p^2)", []string{"below", "near", "above"}, 0.25, design.Budget{Floor: 0, Cap: 10, Unit: 0.5}),
		"n=4": build(t, "1 - sum(p^2)", []string{"a", "b", "c", "d"}, 0.5, design.Budget{Floor: 0, Cap: 10}),
	}
	for name, tb := range tables {
		img, err := png.Decode(bytes.NewReader(render(t, tb, "png")))
		if err != nil {
			t.Errorf("%s: png does not decode: %v", name, err)
		} else if b := img.Bounds(); b.Dx() < 100 || b.Dy() < 100 {
			t.Errorf("%s: png is %v", name, b)
		}
		if pdf := render(t, tb, "pdf"); !bytes.HasPrefix(pdf, []byte("%PDF")) {
			t.Errorf("%s: pdf starts with %q", name, pdf[:min(8, len(pdf))])
		}
		if svg := render(t, tb, "svg"); !bytes.Contains(svg[:min(200, len(svg))], []byte("<svg")) {
			t.Errorf("%s: svg starts with %q", name, svg[:min(80, len(svg))])
		}
	}
}

func TestMultiLineFormula(t *testing.T) {
	tb := build(t, "g = 3\n(1 - sum(p^g)) / (g - 1)", []string{"frost", "clear"}, 0.1, design.Budget{Floor: 0, Cap: 10})
	for _, format := range []string{"csv", "md", "tex"} {
		if s := string(render(t, tb, format)); !strings.Contains(s, "g = 3; (1 - sum(p") {
			t.Errorf("%s: the formula's lines run together", format)
		}
	}
}

func TestBadTable(t *testing.T) {
	tb := brier(t)
	tb.Values = tb.Values[:3]
	if err := tb.Write(&bytes.Buffer{}, "csv"); err == nil {
		t.Errorf("a table with missing rows was written")
	}
	if err := brier(t).Write(&bytes.Buffer{}, "xls"); err == nil || !strings.Contains(err.Error(), "unknown format") {
		t.Errorf("unknown format: %v", err)
	}
}

// A lottery-style transform, as a later part will add it, only has to
// replace values, kind and value name and append a caution; the formats
// follow. This checks that the structure allows it.
func TestTransformFriendly(t *testing.T) {
	tb := brier(t)
	tb.Kind, tb.ValueName, tb.Decimals = "chance", "chance of the prize", 4
	for i := range tb.Values {
		for k := range tb.Values[i] {
			tb.Values[i][k] /= 100
		}
	}
	tb.Meta.Cautions = append(tb.Meta.Cautions, "an extra caution line")
	md := string(render(t, tb, "md"))
	for _, want := range []string{"chance of the prize if frost", "0.9100", "an extra caution line"} {
		if !strings.Contains(md, want) {
			t.Errorf("transformed table lacks %q", want)
		}
	}
}

// A PNG figure names its producer in a tEXt "Software" chunk whose CRC is
// right (PNG 1.2, 11.3.4.3; the CRC checked with hash/crc32 over the
// chunk's type and data), and still decodes.
func TestPNGNamesProducer(t *testing.T) {
	b := render(t, brier(t), "png")
	if _, err := png.Decode(bytes.NewReader(b)); err != nil {
		t.Fatal(err)
	}
	found := ""
	for i := 8; i+12 <= len(b); {
		n := int(binary.BigEndian.Uint32(b[i:]))
		typ, data := string(b[i+4:i+8]), b[i+8:i+8+n]
		if crc := binary.BigEndian.Uint32(b[i+8+n:]); crc != crc32.ChecksumIEEE(b[i+4:i+8+n]) {
			t.Fatalf("chunk %s: bad CRC", typ)
		}
		if typ == "tEXt" && bytes.HasPrefix(data, []byte("Software\x00")) {
			found = string(data[len("Software\x00"):])
		}
		i += 12 + n
	}
	if !strings.HasPrefix(found, "scorewright") {
		t.Errorf("Software chunk %q", found)
	}
}
