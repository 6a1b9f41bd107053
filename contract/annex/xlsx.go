package annex

import (
	"fmt"
	"io"
	"strings"

	"github.com/xuri/excelize/v2"
)

// Sheet names of the XLSX annex.
const (
	TableSheet  = "Payment table"
	RecordSheet = "Record"
)

// WriteXLSX writes the annex as a workbook: the payment table as numbers
// with number formats and a frozen head on the first sheet, everything
// else the annex says on the second, one statement a row.
func (d *Document) WriteXLSX(w io.Writer) error {
	f := excelize.NewFile()
	defer f.Close()
	if err := f.SetSheetName("Sheet1", TableSheet); err != nil {
		return err
	}
	if err := d.xlsxTable(f); err != nil {
		return fmt.Errorf("annex: %w", err)
	}
	if err := d.xlsxRecord(f); err != nil {
		return fmt.Errorf("annex: %w", err)
	}
	if err := f.SetDocProps(&excelize.DocProperties{Title: d.Title, Subject: "Payment annex", Creator: d.Producer,
		Description: "made by " + d.Producer + "; design SHA-256 " + d.Fingerprint, Created: d.Date + "T00:00:00Z", Modified: d.Date + "T00:00:00Z"}); err != nil {
		return err
	}
	if err := f.SetAppProps(&excelize.AppProperties{Application: "scorewright"}); err != nil {
		return err
	}
	_, err := f.WriteTo(w)
	return err
}

// numberFormat is an Excel format showing decimals digits after the point.
func numberFormat(decimals int) string {
	if decimals <= 0 {
		return "0"
	}
	return "0." + strings.Repeat("0", decimals)
}

func (d *Document) xlsxTable(f *excelize.File) error {
	cols := d.Columns()
	head, err := f.NewStyle(&excelize.Style{Font: &excelize.Font{Bold: true}, Alignment: &excelize.Alignment{WrapText: true, Horizontal: "right", Vertical: "top"},
		Fill: excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{"E4E8DE"}}})
	if err != nil {
		return err
	}
	repFmt := numberFormat(d.reportDecimals)
	valFmt := numberFormat(max(d.Table.Decimals, 0))
	if d.Table.Decimals < 0 {
		valFmt = "General"
	}
	repStyle, err := f.NewStyle(&excelize.Style{CustomNumFmt: &repFmt})
	if err != nil {
		return err
	}
	valStyle, err := f.NewStyle(&excelize.Style{CustomNumFmt: &valFmt})
	if err != nil {
		return err
	}
	heads := []any{"row"}
	for _, c := range cols {
		heads = append(heads, strings.Join(c.Head, "\n"))
	}
	if err := f.SetSheetRow(TableSheet, "A1", &heads); err != nil {
		return err
	}
	last, _ := excelize.CoordinatesToCellName(len(heads), 1)
	if err := f.SetCellStyle(TableSheet, "A1", last, head); err != nil {
		return err
	}
	if err := f.SetRowHeight(TableSheet, 1, 15*float64(3)); err != nil {
		return err
	}
	t := d.Table
	for i := range t.Reports {
		row := []any{i + 1}
		for _, x := range t.Reports[i] {
			row = append(row, x)
		}
		for _, v := range t.Values[i] {
			row = append(row, v)
		}
		cell, _ := excelize.CoordinatesToCellName(1, i+2)
		if err := f.SetSheetRow(TableSheet, cell, &row); err != nil {
			return err
		}
	}
	n := len(t.Reports) + 1
	for j, c := range cols {
		from, _ := excelize.CoordinatesToCellName(j+2, 2)
		to, _ := excelize.CoordinatesToCellName(j+2, n)
		st := valStyle
		if c.Report {
			st = repStyle
		}
		if err := f.SetCellStyle(TableSheet, from, to, st); err != nil {
			return err
		}
		name, _ := excelize.ColumnNumberToName(j + 2)
		if err := f.SetColWidth(TableSheet, name, name, 16); err != nil {
			return err
		}
	}
	return f.SetPanes(TableSheet, &excelize.Panes{Freeze: true, XSplit: 1, YSplit: 1, TopLeftCell: "B2", ActivePane: "bottomRight"})
}

// RecordRows are the second sheet's rows: a heading or key, and a text.
func (d *Document) RecordRows() [][2]string {
	rows := [][2]string{{"title", d.Title}}
	for _, w := range d.Warnings {
		rows = append(rows, [2]string{"WARNING", w})
	}
	for _, t := range d.Terms {
		v := t.Value
		if v == "" {
			v = "(to be filled in)"
		}
		rows = append(rows, [2]string{t.Key, v})
	}
	rows = append(rows, [2]string{"payment clause", d.Clause}, [2]string{"report not on the menu", d.OffMenu})
	if d.Draw != "" {
		rows = append(rows, [2]string{"draw", d.Draw})
	}
	for _, l := range d.FormulaLines {
		rows = append(rows, [2]string{"pay per outcome", l})
	}
	rows = append(rows, [2]string{"about the formula", d.FormulaNote})
	if d.CostNote != "" {
		rows = append(rows, [2]string{"cost", d.CostNote})
	}
	if d.Cost != nil {
		rows = append(rows, [2]string{"cost at the base rate", d.CostBaseRate()})
		for _, l := range d.Cost.Lines() {
			rows = append(rows, [2]string{"cost: " + l.Who, l.PerForecast + " per forecast; " + l.Season + " per season"})
		}
	}
	for _, f := range d.Record {
		rows = append(rows, [2]string{f.Key, f.Value})
	}
	for _, c := range d.Cautions {
		rows = append(rows, [2]string{"caution", c})
	}
	rows = append(rows, [2]string{"design SHA-256", d.Fingerprint}, [2]string{"made again", d.Remake})
	for _, l := range strings.Split(strings.TrimRight(d.DesignText, "\n"), "\n") {
		rows = append(rows, [2]string{"design file", l})
	}
	return append(rows, [2]string{"producer", d.Producer}, [2]string{"date", d.Date})
}

func (d *Document) xlsxRecord(f *excelize.File) error {
	if _, err := f.NewSheet(RecordSheet); err != nil {
		return err
	}
	wrap, err := f.NewStyle(&excelize.Style{Alignment: &excelize.Alignment{WrapText: true, Vertical: "top"}})
	if err != nil {
		return err
	}
	bold, err := f.NewStyle(&excelize.Style{Font: &excelize.Font{Bold: true}, Alignment: &excelize.Alignment{Vertical: "top"}})
	if err != nil {
		return err
	}
	for i, r := range d.RecordRows() {
		a, _ := excelize.CoordinatesToCellName(1, i+1)
		b, _ := excelize.CoordinatesToCellName(2, i+1)
		if err := f.SetSheetRow(RecordSheet, a, &[]any{r[0], r[1]}); err != nil {
			return err
		}
		if err := f.SetCellStyle(RecordSheet, a, a, bold); err != nil {
			return err
		}
		if err := f.SetCellStyle(RecordSheet, b, b, wrap); err != nil {
			return err
		}
	}
	if err := f.SetColWidth(RecordSheet, "A", "A", 28); err != nil {
		return err
	}
	return f.SetColWidth(RecordSheet, "B", "B", 110)
}
