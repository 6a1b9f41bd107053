package annex

import (
	"strings"

	"scorewright/contract/cost"
	"scorewright/contract/table"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
)

// The payment table as every writer shows it: a row number, the report,
// and the value for each outcome, headed in two or three short lines so
// that narrow columns keep whole words.

// Column is one column of the payment table.
type Column struct {
	// Head is the heading, one entry per line.
	Head []string
	// Report marks a report column (probabilities, or the point forecast);
	// otherwise it holds values (money or chances).
	Report bool
}

// Columns returns the table's columns after the row number.
func (d *Document) Columns() []Column {
	t := d.Table
	var cols []Column
	for k := range t.ReportColumns() {
		h := []string{"report", t.Labels[k]}
		if t.ReportName != "" {
			h = []string{"report", t.ReportName}
		}
		cols = append(cols, Column{Head: h, Report: true})
	}
	unit := d.Currency
	if t.Kind != table.KindMoney {
		unit = "chance"
	}
	for k := range t.Labels {
		h := []string{t.ValueName + " if", t.Labels[k]}
		if unit != "" && unit != t.ValueName {
			h = append(h, "("+unit+")")
		}
		cols = append(cols, Column{Head: h})
	}
	return cols
}

// Cells returns row i as text: report entries, then values with the
// table's decimals.
func (d *Document) Cells(i int) []string {
	t := d.Table
	var row []string
	for _, x := range t.Reports[i] {
		row = append(row, numfmt.Fixed(x, d.reportDecimals))
	}
	for _, v := range t.Values[i] {
		row = append(row, t.Value(v))
	}
	return row
}

// ReportDecimals is how many decimals every report entry is written
// with: the fewest that show each one exactly.
func ReportDecimals(t *table.Table) int {
	var all []float64
	for _, r := range t.Reports {
		all = append(all, r...)
	}
	return numfmt.Decimals(all, maxReportDecimals)
}

// maxReportDecimals bounds the decimals of a report entry; a menu read
// from a file with more is shown to this many.
const maxReportDecimals = 9

// HeadLine is a column heading on one line.
func (c Column) HeadLine() string { return strings.Join(c.Head, " ") }

// CostBaseRate states the base rate the cost was priced at.
func (d *Document) CostBaseRate() string {
	if d.Cost == nil {
		return ""
	}
	return num.Format(d.Cost.Season.BaseRate) + " over " + strings.Join(quoted(d.Table.Labels), ", ") + " (" + d.Cost.Season.BaseRateFrom + ")"
}

// CostIntro is the sentence that opens the cost statement. It names the
// base rate without calling it the buyer's: CostBaseRate says where it
// came from, which may be the budget's reference belief or a uniform
// default when the design states no base rate.
func (d *Document) CostIntro() string {
	return "Expected pay at the base rate " + d.CostBaseRate() + "."
}

// CostLines are the cost statement's rows, or nil.
func (d *Document) CostLines() []cost.Line {
	if d.Cost == nil {
		return nil
	}
	return d.Cost.Lines()
}

// Short is the fingerprint's first 16 hex digits, for page heads.
func (d *Document) Short() string { return d.Fingerprint[:16] }
