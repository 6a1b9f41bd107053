package annex

import (
	"fmt"
	"io"

	"scorewright/contract/cost"
	"scorewright/contract/payform"
	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/point"
	"scorewright/internal/num"
)

// InputFor gathers what an annex needs besides a money table made from
// d: the closed formula of the pay A − B·L of rule (none with a clamp,
// which bends the rule, or for a point table, rule nil) and the season's
// cost, which it also states in the table's record; and the menu file d
// names, if any, for the PDF to attach. Call it before a
// lottery conversion: the cost is in money.
func InputFor(d *design.Design, tb *table.Table, rule *bregman.Rule, a, b, clamp float64, version string) (*Input, error) {
	in := &Input{Design: d, Table: tb, Version: version}
	if d.Budget.Menu != "" {
		b, err := readMenuFile(d, tb)
		if err != nil {
			return nil, err
		}
		in.MenuFile = b
	}
	if rule != nil && clamp == 0 {
		if f, ok := payform.Find(rule, a, b); ok {
			in.Formula = f
		}
	}
	if tb.ReportName == "" {
		c, err := cost.Of(tb, cost.SeasonOf(d))
		if err != nil {
			return nil, fmt.Errorf("cost: %w", err)
		}
		in.Cost = c
		tb.Meta.Notes = append(tb.Meta.Notes, c.Sentence(num.Format(c.Season.BaseRate)))
	}
	return in, nil
}

// InputForPoint gathers the annex of a point-forecast table: the closed
// formula when the generator g is a quadratic (payform.FindPoint); no
// expected cost, which would need a distribution of the outcome that a
// point design does not state (the annex gives the buyer's worst case).
func InputForPoint(d *design.Design, tb *table.Table, g *point.Generator, a, b float64, version string) *Input {
	in := &Input{Design: d, Table: tb, Version: version}
	if f, ok := payform.FindPoint(g, a, b); ok {
		in.Formula = f
	}
	return in
}

// ExportFormats are the table's own formats, the PDF figure aside (pdf
// is the annex), and the annexes: what the command and the workbench
// offer.
func ExportFormats() []string {
	var f []string
	for _, t := range table.Formats() {
		if t != "pdf" {
			f = append(f, t)
		}
	}
	return append(f, Formats()...)
}

// WriteAny writes the table of in in one of ExportFormats.
func WriteAny(w io.Writer, in *Input, format string) error {
	if !IsFormat(format) {
		return in.Table.Write(w, format)
	}
	doc, err := New(*in)
	if err != nil {
		return err
	}
	return doc.Write(w, format)
}
