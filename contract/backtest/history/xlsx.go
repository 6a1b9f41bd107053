package history

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"
)

// MaxXLSXBytes bounds an XLSX history: a workbook is a zip read whole, so
// it is read into memory up to this size, and its sheets may unpack to at
// most MaxXLSXUnpacked.
const (
	MaxXLSXBytes    = 256 << 20
	MaxXLSXUnpacked = 2 << 30
)

// xlsxSource reads one sheet of a workbook row by row with excelize's
// streaming row iterator. Row numbers are the sheet's; empty rows are
// skipped, as CSV skips blank lines. A date column holding spreadsheet
// date serials is turned into YYYY-MM-DD.
type xlsxSource struct {
	f     *excelize.File
	rows  *excelize.Rows
	row   int
	size  int64
	dateC int
	rec   []string
}

func newXLSXSource(r io.Reader, sheet string) (*xlsxSource, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxXLSXBytes+1))
	if err != nil {
		return nil, fmt.Errorf("history: %w", err)
	}
	if len(data) > MaxXLSXBytes {
		return nil, fmt.Errorf("history workbook is larger than %d MiB; save the sheet as CSV instead", MaxXLSXBytes>>20)
	}
	f, err := excelize.OpenReader(bytes.NewReader(data), excelize.Options{UnzipSizeLimit: MaxXLSXUnpacked, UnzipXMLSizeLimit: 16 << 20})
	if err != nil {
		return nil, fmt.Errorf("history is not a readable XLSX workbook: %v", err)
	}
	if sheet == "" {
		sheet = f.GetSheetName(0)
	} else if idx, err := f.GetSheetIndex(sheet); err != nil || idx < 0 {
		return nil, fmt.Errorf("history workbook has no sheet %q (it has %q)", clip(sheet), f.GetSheetList())
	}
	rows, err := f.Rows(sheet)
	if err != nil {
		return nil, fmt.Errorf("history sheet %q: %v", clip(sheet), err)
	}
	return &xlsxSource{f: f, rows: rows, size: int64(len(data)), dateC: -1}, nil
}

func (s *xlsxSource) unit() string { return "row" }

// offset is unknown while a sheet streams; the whole file was read.
func (s *xlsxSource) offset() int64 { return s.size }

// nextRow returns the next non-empty row and its number.
func (s *xlsxSource) nextRow() ([]string, int, error) {
	for s.rows.Next() {
		s.row++
		cols, err := s.rows.Columns(excelize.Options{RawCellValue: true})
		if err != nil {
			return nil, 0, fmt.Errorf("row %d: %v", s.row, err)
		}
		size := 0
		empty := true
		for _, c := range cols {
			size += len(c)
			if c != "" {
				empty = false
			}
		}
		if size > MaxRecordBytes {
			return nil, 0, fmt.Errorf("row %d: a record of %d bytes, over the limit of %d for one record", s.row, size, MaxRecordBytes)
		}
		if !empty {
			return cols, s.row, nil
		}
	}
	if err := s.rows.Error(); err != nil {
		return nil, 0, err
	}
	return nil, 0, io.EOF
}

func (s *xlsxSource) header() ([]string, error) {
	cols, _, err := s.nextRow()
	if err == io.EOF {
		return nil, errors.New("history sheet is empty: want a header row (forecaster, question, outcome, then one column per outcome)")
	}
	if err != nil {
		return nil, err
	}
	for i, c := range cols {
		if strings.EqualFold(strings.TrimSpace(c), ColDate) {
			s.dateC = i
		}
	}
	s.rec = make([]string, len(cols))
	return append([]string(nil), cols...), nil
}

func (s *xlsxSource) next() ([]string, int, int, error) {
	cols, row, err := s.nextRow()
	if err != nil {
		return nil, 0, 0, err
	}
	// Trailing empty cells are left out by the sheet; pad to the header.
	rec := s.rec[:0]
	rec = append(rec, cols...)
	for len(rec) < len(s.rec) {
		rec = append(rec, "")
	}
	for i, c := range rec {
		if len(c) > MaxFieldBytes {
			return nil, 0, 0, &RowError{Line: row, EndLine: row, Why: fmt.Sprintf("cell %d is %d bytes, longer than the limit of %d", i+1, len(c), MaxFieldBytes), Unit: "row"}
		}
	}
	if s.dateC >= 0 && s.dateC < len(rec) {
		if serial, err := strconv.ParseFloat(rec[s.dateC], 64); err == nil {
			if t, err := excelize.ExcelDateToTime(serial, false); err == nil {
				rec[s.dateC] = t.Format("2006-01-02")
			}
		}
	}
	s.rec = rec[:len(s.rec)]
	return rec, row, row, nil
}
