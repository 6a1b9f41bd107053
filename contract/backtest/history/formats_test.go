package history

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"
)

// formatHistory is one history with good and bad records and a blank
// line, in CSV; the other formats are built from the same cells.
var formatCells = [][]string{
	{"forecaster", "question", "outcome", "date", "frost", "clear"},
	{"Alder", "night 1", "frost", "2026-03-20", "0.3", "0.7"},
	{"Birch", "night 1", "frost", "2026-03-20", "0.8", "0.3"}, // sums to 1.1
	nil, // blank line / empty row
	{"Cedar", "night 2", "2", "2026-04-01", "0.15", "0.85"},
	{"Alder", "night 2", "hail", "2026-04-01", "0.5", "0.5"}, // not an outcome
	{"Birch", "night 3", "clear", "2026-04-02", "0.1", "0.9"},
	{"Cedar", "night 3", "clear", "April", "0.5", "0.5"}, // not a date
}

func cellsCSV() string {
	var b strings.Builder
	for _, r := range formatCells {
		b.WriteString(strings.Join(r, ","))
		b.WriteString("\n")
	}
	return b.String()
}

func cellsJSON() string {
	var b strings.Builder
	head := formatCells[0]
	for _, r := range formatCells[1:] {
		if r == nil {
			b.WriteString("\n")
			continue
		}
		obj := map[string]any{}
		for i, c := range r {
			// Probabilities as JSON numbers, the rest as strings.
			if i >= 4 {
				obj[head[i]] = json.Number(c)
			} else {
				obj[head[i]] = c
			}
		}
		line, _ := json.Marshal(obj)
		b.Write(line)
		b.WriteString("\n")
	}
	return b.String()
}

// cellsXLSX writes the cells into a workbook, probabilities as numbers and
// dates as date serials with a date format, as a spreadsheet holds them.
func cellsXLSX(t *testing.T) []byte {
	f := excelize.NewFile()
	defer f.Close()
	style, err := f.NewStyle(&excelize.Style{NumFmt: 14})
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range formatCells {
		for j, c := range r {
			cell, _ := excelize.CoordinatesToCellName(j+1, i+1)
			var v any = c
			if i > 0 && j >= 4 {
				v, _ = strconv.ParseFloat(c, 64)
			}
			if d, err := time.Parse("2006-01-02", c); err == nil && j == 3 {
				v = d
			}
			if err := f.SetCellValue("Sheet1", cell, v); err != nil {
				t.Fatal(err)
			}
			if i > 0 && j == 3 {
				f.SetCellStyle("Sheet1", cell, cell, style)
			}
		}
	}
	var buf bytes.Buffer
	if err := f.Write(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// readAll reads a history in a format into one comparable text.
func readAll(t *testing.T, data []byte, format Format, shift int) string {
	t.Helper()
	h, err := Open(bytes.NewReader(data), format, []string{"frost", "clear"}, Options{})
	if err != nil {
		t.Fatalf("%v: %v", format, err)
	}
	var out strings.Builder
	for {
		r, err := h.Next()
		if err == io.EOF {
			return out.String()
		}
		var re *RowError
		if errors.As(err, &re) {
			fmt.Fprintf(&out, "bad %d–%d %s\n", re.Line+shift, re.EndLine+shift, re.Why)
			continue
		}
		if err != nil {
			t.Fatalf("%v: %v", format, err)
		}
		fmt.Fprintf(&out, "row %d %s %s %d %v %v\n", r.Line+shift, r.Forecaster, r.Question, r.Outcome, r.P, r.Month)
	}
}

// The three formats give the same rows, the same months and the same bad
// records, each named by its own line (row) number: the CSV line, the
// sheet row (the same, header in row 1) and the JSON line (one less, as
// JSON lines have no header line).
func TestFormatsAgree(t *testing.T) {
	csv := readAll(t, []byte(cellsCSV()), CSV, 0)
	want := "row 2 Alder night 1 0 [0.3 0.7] 2026-03\n" +
		"bad 3–3 probabilities sum to 1.1, not 1 (tolerance 1e-06)\n" +
		"row 5 Cedar night 2 1 [0.15 0.85] 2026-04\n" +
		"bad 6–6 outcome \"hail\" is neither one of \"frost\", \"clear\" nor an index 1..2\n" +
		"row 7 Birch night 3 1 [0.1 0.9] 2026-04\n" +
		"bad 8–8 date \"April\" is not a date written YYYY-MM-DD (or YYYY-MM)\n"
	if csv != want {
		t.Fatalf("CSV reads\n%s\nwant\n%s", csv, want)
	}
	if j := readAll(t, []byte(cellsJSON()), JSONLines, 1); j != csv {
		t.Errorf("JSON lines read\n%s\nCSV read\n%s", j, csv)
	}
	if x := readAll(t, cellsXLSX(t), XLSX, 0); x != csv {
		t.Errorf("XLSX read\n%s\nCSV read\n%s", x, csv)
	}
}

func TestFormatOf(t *testing.T) {
	for path, want := range map[string]Format{"a.csv": CSV, "b.JSONL": JSONLines, "c.ndjson": JSONLines, "d.xlsx": XLSX, "e": CSV} {
		if got := FormatOf(path); got != want {
			t.Errorf("FormatOf(%q) = %v, want %v", path, got, want)
		}
	}
}

func TestJSONLinesBadRecords(t *testing.T) {
	src := `{"forecaster":"A","question":"q","outcome":"frost","frost":0.5,"clear":0.5}` + "\n" +
		`{"forecaster":"A","question":"q","outcome":"frost","frost":0.5}` + "\n" +
		`{"forecaster":"A","question":"q","outcome":"frost","frost":0.5,"clear":0.5,"hail":1}` + "\n" +
		`[1,2]` + "\n" +
		`{"forecaster":"A","question":"q","outcome":"frost","frost":true,"clear":0.5}` + "\n"
	got := readAll(t, []byte(src), JSONLines, 0)
	for _, w := range []string{`bad 2–2 key "clear" is missing`, `bad 3–3 key "hail" is not one of`, "bad 4–4 not a JSON object", `bad 5–5 "frost": want a string or a number`} {
		if !strings.Contains(got, w) {
			t.Errorf("JSON lines errors\n%s\nlack %q", got, w)
		}
	}
}

func TestXLSXSheetAndEmpty(t *testing.T) {
	if _, err := Open(bytes.NewReader(cellsXLSX(t)), XLSX, frost, Options{Sheet: "Nights"}); err == nil || !strings.Contains(err.Error(), `no sheet "Nights"`) {
		t.Errorf("missing sheet: %v", err)
	}
	if _, err := Open(strings.NewReader("not a zip"), XLSX, frost, Options{}); err == nil || !strings.Contains(err.Error(), "not a readable XLSX") {
		t.Errorf("not a workbook: %v", err)
	}
}
