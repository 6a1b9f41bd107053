package annex

import (
	"bytes"
	_ "embed"
	"fmt"
	"html/template"
	"io"
)

//go:embed annex.html.tmpl
var htmlSource string

// htmlTemplate is parsed once per write: templates are cheap, and a
// package-level parsed value would be shared mutable state.
func htmlTemplate() (*template.Template, error) {
	return template.New("annex").Funcs(template.FuncMap{
		"add1": func(i int) int { return i + 1 },
	}).Parse(htmlSource)
}

// htmlRow is one row of the payment table.
type htmlRow struct {
	N     int
	Cells []string
}

// WriteHTML writes the annex as one self-contained HTML page (styles
// inline, no scripts) that opens in a browser and in word processors;
// the table head repeats on every printed page.
func (d *Document) WriteHTML(w io.Writer) error {
	tpl, err := htmlTemplate()
	if err != nil {
		return fmt.Errorf("annex: %w", err)
	}
	rows := make([]htmlRow, len(d.Table.Reports))
	for i := range rows {
		rows[i] = htmlRow{N: i + 1, Cells: d.Cells(i)}
	}
	var buf bytes.Buffer
	if err := tpl.Execute(&buf, struct {
		*Document
		Rows    []htmlRow
		Columns []Column
	}{d, rows, d.Columns()}); err != nil {
		return fmt.Errorf("annex: %w", err)
	}
	_, err = w.Write(buf.Bytes())
	return err
}
