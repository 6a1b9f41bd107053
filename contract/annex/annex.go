// Package annex writes a payment table as the annex two parties sign: a
// PDF document, an XLSX workbook and an HTML page that all say the same
// thing — title, parties, currency and dates (blank lines to fill in
// where the design leaves them unset), the payment clause in plain words,
// what happens to a report that is not on the menu, the pay per outcome
// as a closed formula where the rule has one, the table itself, what the
// contract costs, the verification record, the cautions, and the design
// itself with its SHA-256 fingerprint so that anyone can run it again.
//
// The package does no mathematics: contract/budget fits the table,
// contract/payform finds the closed formula, contract/cost prices the
// season. Document gathers their results into sentences once, and each
// writer only lays them out.
package annex

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"scorewright/contract/cost"
	"scorewright/contract/lottery"
	"scorewright/contract/payform"
	"scorewright/contract/table"
	"scorewright/generator/design"
	"scorewright/internal/numfmt"
)

// Formats lists the annex formats.
func Formats() []string { return []string{"pdf", "xlsx", "html"} }

// IsFormat reports whether format is an annex format.
func IsFormat(format string) bool {
	for _, f := range Formats() {
		if f == format {
			return true
		}
	}
	return false
}

// Input is what an annex is made from.
type Input struct {
	// Design is the design the table was made from; its canonical
	// encoding is printed, attached and fingerprinted.
	Design *design.Design
	// Table is the finished table (money, or chances after a lottery
	// conversion) with its record.
	Table *table.Table
	// Formula is the closed form of the money pay, nil when the rule has
	// none (or a clamp bends it).
	Formula *payform.Formula
	// Cost is what the season costs, nil when it cannot be said (a point
	// table).
	Cost *cost.Cost
	// Version is the build that made the annex.
	Version string
	// MenuFile is the design's menu file as read (InputFor reads it), nil
	// without one: the PDF attaches it beside design.toml under MenuName,
	// so that the attachments alone make the table again.
	MenuFile []byte
}

// Term is one line of the terms block; an empty Value is a blank to fill in.
type Term struct{ Key, Value string }

// Document is an annex as sentences, laid out by each writer.
type Document struct {
	Title    string
	Terms    []Term
	Warnings []string
	// Clause is the payment clause; OffMenu what happens to a report that
	// is not a row; Draw how a lottery is settled ("" for money).
	Clause, OffMenu, Draw string
	// FormulaLines state the pay per outcome; FormulaNote says how the
	// table's amounts relate to them.
	FormulaLines []string
	FormulaNote  string
	Table        *table.Table
	// Currency labels amounts ("" when the table holds chances).
	Currency string
	Cost     *cost.Cost
	// CostNote says what the contract costs when Cost cannot (a point
	// table: no distribution of the outcome is stated): the buyer's worst
	// case; beside Cost, how a lottery's cost relates to it.
	CostNote string
	// Record is the verification record, in the order every format
	// writes it.
	Record   []table.Field
	Cautions []string
	// DesignText is the canonical design file; Fingerprint its SHA-256
	// in hex.
	DesignText  string
	Fingerprint string
	// Remake says how the table is made again from the design file; a
	// design that reads its menu from a file needs that file beside it,
	// which the workbook and the page do not carry, and the sentence says
	// so. RemakePDF is the PDF's sentence: the PDF attaches the menu file
	// when the input has it.
	Remake, RemakePDF string
	// MenuName is the menu file's name in the printed design ("" without
	// one); MenuFile its bytes, attached to the PDF under that name (nil
	// when the input did not read it).
	MenuName string
	MenuFile []byte
	// Producer names the program that made the annex.
	Producer string
	Date     string

	reportDecimals int
}

// blank is how a field left unset reads in the text formats.
const blank = ""

// New gathers the annex of in.
func New(in Input) (*Document, error) {
	if in.Design == nil || in.Table == nil {
		return nil, errors.New("annex: a design and a table are needed")
	}
	if err := in.Table.Check(); err != nil {
		return nil, err
	}
	// The printed design names its menu file as the PDF attaches it.
	shown, menuName, err := withMenuName(in.Design)
	if err != nil {
		return nil, err
	}
	canon, err := Canonical(shown)
	if err != nil {
		return nil, err
	}
	sum := sha256.Sum256(canon)
	t, c := in.Table, in.Design.Contract
	doc := &Document{
		Title: in.Design.Title, Table: t, Cost: in.Cost,
		Warnings: t.Meta.Warnings, Cautions: t.Meta.Cautions,
		DesignText: string(canon), Fingerprint: hex.EncodeToString(sum[:]),
		Producer: "scorewright " + in.Version, Date: t.Meta.Date,
	}
	if menuName != "" {
		doc.MenuName, doc.MenuFile = menuName, in.MenuFile
	}
	doc.Remake = remake(menuName, false)
	doc.RemakePDF = remake(menuName, doc.MenuFile != nil)
	doc.reportDecimals = ReportDecimals(t)
	if doc.Title == "" {
		doc.Title = "Payment annex"
	}
	if t.Kind == table.KindMoney {
		doc.Currency = c.Currency
	}
	doc.Terms = terms(c, t)
	doc.Clause, doc.Draw = clause(t, c.Currency)
	doc.OffMenu = c.OffMenu
	if doc.OffMenu == "" {
		doc.OffMenu = offMenu
	}
	doc.FormulaLines, doc.FormulaNote = formulaText(in.Formula, t)
	switch {
	case in.Cost == nil:
		doc.CostNote = worstCase(t, c)
	case t.Kind != table.KindMoney:
		doc.CostNote = lotteryCost(t, c.Currency)
	}
	for _, f := range t.Meta.Fields() {
		switch f.Key {
		case "WARNING", "title", "caution":
			continue
		}
		doc.Record = append(doc.Record, f)
	}
	return doc, nil
}

// RunningHead is the line at the top of every page after the first: the
// title and what the document is, said once. A title that already names
// an annex (the default title of an untitled design, "Frost payment
// annex") is not followed by "payment annex" again.
func (d *Document) RunningHead() string {
	if strings.Contains(strings.ToLower(d.Title), "annex") {
		return d.Title
	}
	return d.Title + " — payment annex"
}

// worstCase is the cost sentence of a table without a base rate: the
// expected cost needs a distribution of the outcome, so only the buyer's
// worst case, the largest amount for every forecast, is stated.
func worstCase(t *table.Table, c design.Contract) string {
	most := math.Inf(-1)
	for _, row := range t.Values {
		for _, v := range row {
			most = math.Max(most, v)
		}
	}
	unit := ""
	if t.Kind == table.KindMoney {
		unit = " units"
		if c.Currency != "" {
			unit = " " + c.Currency
		}
	}
	s := "The expected cost is not stated: it needs a distribution of the outcome, which the design does not give. The buyer's worst case is the largest amount in the table for every forecast: " + t.Value(most) + unit + " per forecast"
	if t.Kind != table.KindMoney {
		s = "The expected cost is not stated: it needs a distribution of the outcome, which the design does not give. At worst the buyer gives the largest chance in the table, " + t.Value(most) + ", for every forecast"
		return s + "."
	}
	if c.Forecasts > 0 {
		s += fmt.Sprintf(", %s%s over %d forecasts", t.Value(most*float64(c.Forecasts)), unit, c.Forecasts)
	}
	return s + "."
}

// Canonical is the design as a file, version set: the bytes the
// fingerprint is taken over.
func Canonical(d *design.Design) ([]byte, error) {
	c := *d
	if c.Version == 0 {
		c.Version = design.SchemaVersion
	}
	return c.Encode()
}

func terms(c design.Contract, t *table.Table) []Term {
	forecasts := blank
	if c.Forecasts > 0 {
		forecasts = fmt.Sprint(c.Forecasts)
	}
	currency := c.Currency
	if t.Kind != table.KindMoney && currency == "" {
		currency = "(the prize is stated by the parties)"
	}
	return []Term{
		{"Buyer (pays)", c.Buyer},
		{"Forecaster (is paid)", c.Forecaster},
		{"Currency", currency},
		{"First forecast", c.Start},
		{"Last forecast", c.End},
		{"Forecasts per season", forecasts},
		{"Outcomes", strings.Join(quoted(t.Labels), ", ")},
		{"Signed on", c.Signed},
	}
}

func quoted(l []string) []string {
	out := make([]string, len(l))
	for i, s := range l {
		out[i] = "“" + s + "”"
	}
	return out
}

// offMenu is the default clause for a report that is not a row.
const offMenu = "A report that is not one of the rows of the table, exactly as printed, is not a valid forecast: it earns no payment, and the forecaster may replace it with a row until the forecast is due. The table is the whole menu; no amount is paid by any formula for a report that is not in it."

// clause is the payment clause in plain words, and for a lottery the
// draw that settles each forecast.
func clause(t *table.Table, currency string) (string, string) {
	row := "one row of the table (a probability for each outcome)"
	if t.ReportName != "" {
		row = "one row of the table (a value of " + t.ReportName + ")"
	}
	if t.Kind == table.KindMoney {
		cur := ""
		if currency != "" {
			cur = " in " + currency
		}
		return "For each forecast, the forecaster reports " + row + " before the outcome is known. When the outcome is known, the buyer pays the forecaster the amount" + cur + " in that row's column for the outcome that happened.", ""
	}
	floor, prize := float64(t.Meta.Floor), float64(t.Meta.Cap-t.Meta.Floor)
	certain := ""
	if floor != 0 {
		certain = "the buyer pays the forecaster " + amount(floor, currency) + " and "
	}
	c := "For each forecast, the forecaster reports " + row + " before the outcome is known. When the outcome is known, " + certain + "the forecaster receives the chance in that row's column for the outcome that happened of winning a prize of " + amount(prize, currency) + ", settled by the draw below."
	return c, drawText(t)
}

// lotteryCost relates the money table's cost to the lottery's: the floor
// for certain and the prize when won cost the same in expectation, up to
// the rounding of the chances to whole 1/10^Decimals.
func lotteryCost(t *table.Table, currency string) string {
	prize := float64(t.Meta.Cap - t.Meta.Floor)
	s := "These are the amounts of the money table. Paid as the lottery, each forecast costs the buyer " + amount(float64(t.Meta.Floor), currency) + ", and the prize of " + amount(prize, currency) + " when it is won: in expectation the same"
	if t.Decimals >= 1 && t.Decimals <= 6 {
		s += ", up to the rounding of the chances (at most " + amount(prize*math.Pow10(-t.Decimals)/2, currency) + " per forecast)"
	}
	return s + "."
}

// amount writes an amount of money in the annex's prose with its currency
// label ("units" when the design names none).
func amount(v float64, currency string) string {
	if currency == "" {
		currency = "units"
	}
	return numfmt.Readable(v) + " " + currency
}

// drawText states the draw of a lottery table: a whole number when its
// chances are whole multiples of a power of ten (as lottery.Drawable
// makes them), else a uniform number.
func drawText(t *table.Table) string {
	if t.Decimals >= 1 && t.Decimals <= 6 {
		return lottery.DrawText(int(math.Pow10(t.Decimals)))
	}
	return lottery.Draw
}

// formulaText states the pay per outcome: the closed formula, or why
// there is none.
func formulaText(f *payform.Formula, t *table.Table) ([]string, string) {
	rounding := t.Meta.Rounding
	if f == nil && t.ReportName != "" {
		return nil, "This rule has no short closed formula here; each amount is A − B·D(y, x) with D(y, x) = phi(x) + phi′(x)·(y − x) − phi(y), phi the generator in the record, x the reported value and y the outcome's column, " + rounding + ". The design below computes it again."
	}
	if f == nil {
		return nil, "This rule has no short closed formula here; each amount is A − B·L(p, k) with the effort L of the generator in the record (and the clamp, if any), " + rounding + ". The design below computes it again."
	}
	lines := append([]string(nil), f.Lines...)
	note := "(" + f.Family + " rule) " + f.Where + ". The table's amounts are these values " + rounding + "; where a rounded amount and the formula differ, the table governs."
	if t.ReportName != "" {
		note += " An outcome between two columns is paid as the verification record states."
	}
	if t.Kind != table.KindMoney {
		note += " The chances are (pay − " + amount(float64(t.Meta.Floor), t.Meta.Currency) + ") divided by the prize of " + amount(float64(t.Meta.Cap-t.Meta.Floor), t.Meta.Currency) + "."
	}
	return lines, note
}

// Write writes the annex in format (one of Formats).
func (d *Document) Write(w io.Writer, format string) error {
	switch format {
	case "pdf":
		return d.WritePDF(w)
	case "xlsx":
		return d.WriteXLSX(w)
	case "html":
		return d.WriteHTML(w)
	}
	return fmt.Errorf("annex: unknown format %q; one of %s", format, strings.Join(Formats(), ", "))
}
