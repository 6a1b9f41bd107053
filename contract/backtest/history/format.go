package history

import (
	"fmt"
	"path/filepath"
	"strings"
	"time"
)

// Format is a history's file format.
type Format int

// The formats a history may come in.
const (
	CSV Format = iota
	JSONLines
	XLSX
)

// String names the format as reports do.
func (f Format) String() string {
	switch f {
	case JSONLines:
		return "JSON lines"
	case XLSX:
		return "XLSX"
	}
	return "CSV"
}

// FormatOf returns the format a path's extension names: .jsonl and
// .ndjson are JSON lines, .xlsx a workbook, anything else CSV.
func FormatOf(path string) Format {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".jsonl", ".ndjson":
		return JSONLines
	case ".xlsx":
		return XLSX
	}
	return CSV
}

// Month is a calendar month counted from year 0 plus one, so that the
// zero value means no date.
type Month int32

// MonthOf returns the month of year y and month m (1..12).
func MonthOf(y, m int) Month { return Month(y*12 + m) }

// String writes the month as YYYY-MM.
func (m Month) String() string {
	if m == 0 {
		return "no date"
	}
	v := int(m) - 1
	return fmt.Sprintf("%04d-%02d", v/12, v%12+1)
}

// ParseMonth reads the month of a date written as YYYY-MM-DD, YYYY-MM,
// or YYYY-MM-DD followed by a time ('T' or a space, then anything).
func ParseMonth(s string) (Month, error) {
	d := s
	if i := strings.IndexAny(d, "T "); i == 10 {
		d = d[:10]
	}
	layout := "2006-01-02"
	if len(d) == 7 {
		layout = "2006-01"
	}
	t, err := time.Parse(layout, d)
	if err != nil {
		if s == "" {
			return 0, fmt.Errorf("date is empty")
		}
		return 0, fmt.Errorf("date %q is not a date written YYYY-MM-DD (or YYYY-MM)", clip(s))
	}
	return MonthOf(t.Year(), int(t.Month())), nil
}
