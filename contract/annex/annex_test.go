package annex

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
	"golang.org/x/net/html"

	"scorewright/contract/budget"
	"scorewright/contract/cost"
	"scorewright/contract/lottery"
	"scorewright/contract/payform"
	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/generator/design"
)

// waterDesign is an invented contract: a water utility paying a
// contractor for daily "demand exceeds capacity" forecasts by the
// quadratic rule, 75 to 150 per forecast.
func waterDesign() *design.Design {
	return &design.Design{
		Version: design.SchemaVersion, Title: "Daily capacity forecasts — Kestrel Vale Water",
		Labels: []string{"demand exceeds capacity", "capacity holds"}, Mode: design.ModeGenerator,
		Preset: "quadratic", Formula: "# quadratic rule\n1 - sum(p^2)",
		Budget: design.Budget{Floor: 75, Cap: 150, Step: 0.02, Unit: 0.01, Rounding: "nearest"},
		Contract: design.Contract{Buyer: "Kestrel Vale Water Board", Currency: "EUR", Start: "2027-01-01",
			Forecasts: 365, BaseRate: []float64{0.1, 0.9}},
	}
}

func waterDoc(t *testing.T) *Document {
	t.Helper()
	return docFor(t, waterDesign())
}

// docFor is the annex of design d, fitted and re-checked as the command does.
func docFor(t *testing.T, d *design.Design) *Document {
	t.Helper()
	rule := bregmantest.Rule(t, d.Formula, bregman.Options{Outcomes: d.N()})
	rule.Labels = d.Labels
	menu, err := budget.StepMenu(2, d.Budget.Step, 0)
	if err != nil {
		t.Fatal(err)
	}
	fit, err := budget.FitRule(rule, menu, d.Budget)
	if err != nil {
		t.Fatal(err)
	}
	rc, err := fit.Recheck(context.Background(), budget.RecheckSettings{})
	if err != nil {
		t.Fatal(err)
	}
	tb := fit.Table(rc, budget.Info{Title: d.Title, Formula: d.Formula, FormulaRole: "the generator H(p), concave; efforts by the Bregman construction L(p, k) = H(p) + dH_k - <dH, p>",
		Preset: d.Preset, Version: "test", Date: "2027-01-01", Currency: d.Contract.Currency})
	f, ok := payform.Find(rule, fit.A, fit.B)
	if !ok {
		t.Fatal("no closed form for the quadratic rule")
	}
	c, err := cost.Of(tb, cost.SeasonOf(d))
	if err != nil {
		t.Fatal(err)
	}
	doc, err := New(Input{Design: d, Table: tb, Formula: f, Cost: c, Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	return doc
}

// quadraticPay is the pay of the water table, derived by hand:
// 150 − 75·(1 − p)² rounded to cents.
func quadraticPay(p float64) float64 { return math.Round((150-75*(1-p)*(1-p))*100) / 100 }

func TestDocumentStatesTheContract(t *testing.T) {
	doc := waterDoc(t)
	if doc.FormulaLines[0] != `pay if "demand exceeds capacity" = 150 − 75·(1 − p)²` {
		t.Errorf("formula line %q", doc.FormulaLines[0])
	}
	sum := sha256.Sum256([]byte(doc.DesignText))
	if hex.EncodeToString(sum[:]) != doc.Fingerprint {
		t.Error("the fingerprint is not the SHA-256 of the printed design")
	}
	back, err := design.Decode([]byte(doc.DesignText))
	if err != nil || back.Contract.Buyer != "Kestrel Vale Water Board" || back.Formula != waterDesign().Formula {
		t.Fatalf("the printed design does not read back: %v %+v", err, back)
	}
	blanks := 0
	for _, term := range doc.Terms {
		if term.Value == "" {
			blanks++
		}
	}
	// Forecaster, last forecast and the signing date are unset.
	if blanks != 3 {
		t.Errorf("%d blank terms, want 3: %+v", blanks, doc.Terms)
	}
	for _, f := range doc.Record {
		if f.Key == "formula" && f.Value != "1 - sum(p^2)" {
			t.Errorf("a formula opening with a comment reads %q in the record", f.Value)
		}
	}
}

func TestXLSXReadsBack(t *testing.T) {
	doc := waterDoc(t)
	var buf bytes.Buffer
	if err := doc.WriteXLSX(&buf); err != nil {
		t.Fatal(err)
	}
	f, err := excelize.OpenReader(&buf)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := f.GetRows(TableSheet, excelize.Options{RawCellValue: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 52 || !strings.Contains(rows[0][3], "EUR") {
		t.Fatalf("%d rows, head %q", len(rows), rows[0])
	}
	for i, r := range rows[1:] {
		p := float64(i) / 50
		for k, want := range []float64{quadraticPay(p), quadraticPay(1 - p)} {
			got, err := f.GetCellValue(TableSheet, cellName(t, 4+k, i+2), excelize.Options{RawCellValue: true})
			if err != nil {
				t.Fatal(err)
			}
			if v := parse(t, got); math.Abs(v-want) > 1e-9 {
				t.Fatalf("row %d outcome %d: %v, want %v (row %q)", i+1, k, v, want, r)
			}
		}
	}
	// Shown with two decimals, as numbers.
	if shown, _ := f.GetCellValue(TableSheet, "D2"); shown != "75.00" {
		t.Errorf("D2 shows %q, want 75.00", shown)
	}
	if typ, _ := f.GetCellType(TableSheet, "D2"); typ != excelize.CellTypeNumber && typ != excelize.CellTypeUnset {
		t.Errorf("D2 has type %v, not a number", typ)
	}
	panes, err := f.GetPanes(TableSheet)
	if err != nil || !panes.Freeze || panes.YSplit != 1 {
		t.Errorf("head not frozen: %+v %v", panes, err)
	}
	rec, err := f.GetRows(RecordSheet)
	if err != nil {
		t.Fatal(err)
	}
	var text strings.Builder
	for _, r := range rec {
		text.WriteString(strings.Join(r, " ") + "\n")
	}
	for _, want := range []string{doc.Fingerprint, "qualified counsel", "52286.25 EUR", "(to be filled in)"} {
		if !strings.Contains(text.String(), want) {
			t.Errorf("record sheet lacks %q", want)
		}
	}
	props, err := f.GetDocProps()
	if err != nil || !strings.HasPrefix(props.Creator, "scorewright") {
		t.Errorf("creator %q %v", props.Creator, err)
	}
}

func cellName(t *testing.T, col, row int) string {
	t.Helper()
	c, err := excelize.CoordinatesToCellName(col, row)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func parse(t *testing.T, s string) float64 {
	t.Helper()
	var v float64
	if _, err := fmt.Sscan(s, &v); err != nil {
		t.Fatalf("%q is not a number", s)
	}
	return v
}

func TestHTMLParses(t *testing.T) {
	doc := waterDoc(t)
	var buf bytes.Buffer
	if err := doc.WriteHTML(&buf); err != nil {
		t.Fatal(err)
	}
	root, err := html.Parse(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	tbl := byID(root, "payment-table")
	if tbl == nil {
		t.Fatal("no payment table")
	}
	var body [][]string
	walk(tbl, func(n *html.Node) {
		if n.Type == html.ElementNode && n.Data == "tr" && n.Parent.Data == "tbody" {
			var row []string
			for c := n.FirstChild; c != nil; c = c.NextSibling {
				if c.Type == html.ElementNode {
					row = append(row, text(c))
				}
			}
			body = append(body, row)
		}
	})
	if len(body) != 51 {
		t.Fatalf("%d rows", len(body))
	}
	// Row 6 is the report 0.1: 89.25 if demand exceeds capacity, 149.25
	// otherwise (150 − 75·0.81 and 150 − 75·0.01, by hand).
	if got := strings.Join(body[5], " "); got != "6 0.10 0.90 89.25 149.25" {
		t.Errorf("row 6 reads %q", got)
	}
	if fp := byID(root, "fingerprint"); fp == nil || text(fp) != doc.Fingerprint {
		t.Error("fingerprint missing")
	}
	if !bytes.Contains(buf.Bytes(), []byte(`<meta name="generator" content="scorewright test">`)) {
		t.Error("no generator meta")
	}
	if !bytes.Contains(buf.Bytes(), []byte("150 − 75·(1 − p)²")) {
		t.Error("formula not in UTF-8")
	}
}

func TestPDFEmbedsFontAndDesign(t *testing.T) {
	doc := waterDoc(t)
	var buf bytes.Buffer
	if err := doc.WritePDF(&buf); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	if !bytes.HasPrefix(b, []byte("%PDF")) {
		t.Fatal("not a PDF")
	}
	// The attachment's name is written in UTF-16 (big-endian).
	var name []byte
	for _, c := range []byte("design.toml") {
		name = append(name, 0, c)
	}
	for _, want := range []string{"/FontFile2", string(name), "/EmbeddedFile"} {
		if !bytes.Contains(b, []byte(want)) {
			t.Errorf("PDF lacks %s", want)
		}
	}
}

func byID(n *html.Node, id string) *html.Node {
	var found *html.Node
	walk(n, func(m *html.Node) {
		for _, a := range m.Attr {
			if a.Key == "id" && a.Val == id && found == nil {
				found = m
			}
		}
	})
	return found
}

func walk(n *html.Node, f func(*html.Node)) {
	f(n)
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		walk(c, f)
	}
}

func text(n *html.Node) string {
	var b strings.Builder
	walk(n, func(m *html.Node) {
		if m.Type == html.TextNode {
			b.WriteString(m.Data)
		}
	})
	return strings.TrimSpace(b.String())
}

// An untitled design's pages once ran under "Payment annex — payment
// annex"; a title that names an annex is said once, any other title is
// followed by what the document is.
func TestRunningHeadSaysAnnexOnce(t *testing.T) {
	d := waterDesign()
	d.Title = ""
	untitled := docFor(t, d)
	if got := untitled.RunningHead(); got != "Payment annex" {
		t.Errorf("untitled head %q, want %q", got, "Payment annex")
	}
	d.Title = "Frost payment annex"
	if got := docFor(t, d).RunningHead(); got != "Frost payment annex" {
		t.Errorf("head %q repeats the annex", got)
	}
	if got := waterDoc(t).RunningHead(); got != "Daily capacity forecasts — Kestrel Vale Water — payment annex" {
		t.Errorf("titled head %q", got)
	}
}

// A lottery annex says in its clause what is paid for certain and what
// the prize is, each with the currency, and how its cost relates to the
// money table's: the water table (75 to 150 EUR) as chances of a prize of
// 75 EUR besides 75 EUR for certain, drawn in thousandths, so rounding a
// chance moves the expected cost by at most 75/2000 = 0.0375 EUR (derived
// by hand).
func TestLotteryAnnexStatesPrizeAndCost(t *testing.T) {
	d := waterDesign()
	base := docFor(t, d)
	tb := base.Table
	if err := lottery.Convert(tb, 75, 150); err != nil {
		t.Fatal(err)
	}
	if err := lottery.Drawable(tb, 0); err != nil {
		t.Fatal(err)
	}
	doc, err := New(Input{Design: d, Table: tb, Cost: base.Cost, Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"the buyer pays the forecaster 75 EUR and", "winning a prize of 75 EUR"} {
		if !strings.Contains(doc.Clause, want) {
			t.Errorf("clause %q lacks %q", doc.Clause, want)
		}
	}
	if !strings.Contains(doc.Draw, "from 1 to 1000") {
		t.Errorf("draw %q", doc.Draw)
	}
	if !strings.Contains(doc.CostNote, "at most 0.0375 EUR per forecast") {
		t.Errorf("cost note %q", doc.CostNote)
	}
}

// The cost statement calls its base rate the buyer's only when the design
// states one: without it the rate is a uniform default, and a signed annex
// must not say "the buyer's base rate (uniform; no base rate stated)".
func TestCostIntroSaysWhoseBaseRate(t *testing.T) {
	stated := waterDoc(t)
	if got := stated.CostIntro(); strings.Count(got, "buyer's base rate") != 1 {
		t.Errorf("with a stated base rate the intro reads %q, want the buyer's base rate named once", got)
	}
	d := waterDesign()
	d.Contract.BaseRate = nil
	doc := docFor(t, d)
	var buf bytes.Buffer
	if err := doc.WriteHTML(&buf); err != nil {
		t.Fatal(err)
	}
	page := html.UnescapeString(buf.String())
	if !strings.Contains(page, "Expected pay at the base rate (0.5, 0.5)") || !strings.Contains(page, "uniform; no base rate stated") {
		t.Errorf("HTML cost statement lacks the uniform base rate: %q", doc.CostIntro())
	}
	if strings.Contains(page, "buyer's base rate") {
		t.Errorf("HTML calls an unstated base rate the buyer's: %q", doc.CostIntro())
	}
}

// A design that reads its menu from a file: the workbook and the page,
// which attach nothing, say the menu file is needed beside the design and
// not included; the PDF, given the file's bytes, attaches it and says the
// two attachments make the table again. The printed design names the
// menu by its base name, the name it is attached under, whatever folder
// the design named. Without a menu file the sentence stays as it was.
func TestRemakeNamesAMenuFile(t *testing.T) {
	plain := waterDoc(t)
	if plain.Remake != "Running scorewright table --design design.toml makes this table again." || plain.RemakePDF != plain.Remake {
		t.Errorf("step menu: %q / %q", plain.Remake, plain.RemakePDF)
	}
	d := waterDesign()
	d.Budget.Menu = "../menus/levels.csv"
	doc := docFor(t, d)
	var buf bytes.Buffer
	if err := doc.WriteHTML(&buf); err != nil {
		t.Fatal(err)
	}
	page := html.UnescapeString(buf.String())
	for _, want := range []string{`with the menu file "levels.csv" it names beside it`, "which this annex does not include", `menu = "levels.csv"`} {
		if !strings.Contains(page, want) {
			t.Errorf("HTML lacks %q: %q", want, doc.Remake)
		}
	}
	if d.Budget.Menu != "../menus/levels.csv" {
		t.Errorf("the annex changed the caller's design: menu %q", d.Budget.Menu)
	}
	if doc.MenuFile != nil || strings.Contains(doc.RemakePDF, "attached") {
		t.Errorf("no menu bytes given, yet the PDF says it attaches them: %q", doc.RemakePDF)
	}
	in := Input{Design: d, Table: doc.Table, Version: "test", MenuFile: []byte("0\n1\n")}
	withFile, err := New(in)
	if err != nil {
		t.Fatal(err)
	}
	want := `The menu file the design names is attached beside it as "levels.csv"; running scorewright table --design design.toml in a folder that holds both attachments makes this table again.`
	if withFile.RemakePDF != want || withFile.MenuName != "levels.csv" || withFile.Remake != doc.Remake {
		t.Errorf("PDF sentence %q, menu name %q", withFile.RemakePDF, withFile.MenuName)
	}
	if withFile.Fingerprint != doc.Fingerprint {
		t.Error("the fingerprint depends on whether the menu bytes were given")
	}
}

// MenuName keeps only the file name of a menu path, under either
// separator, and refuses one with no file name to attach.
func TestMenuName(t *testing.T) {
	for in, want := range map[string]string{"a.csv": "a.csv", "m/a.csv": "a.csv", `C:\menus\a.csv`: "a.csv", "/abs/a b.csv": "a b.csv"} {
		if got, err := MenuName(in); err != nil || got != want {
			t.Errorf("MenuName(%q) = %q, %v; want %q", in, got, err, want)
		}
	}
	for _, bad := range []string{"menus/", "..", "x/.", "design.toml", "sub/design.toml"} {
		if got, err := MenuName(bad); err == nil {
			t.Errorf("MenuName(%q) = %q, want an error", bad, got)
		}
	}
}

// The annex attaches the menu file only while it still lists the table's
// reports: a file rewritten after the table was made is refused, and a
// file beyond the menu bound is refused before it is parsed.
func TestInputForReadsTheMenuTheTableUsed(t *testing.T) {
	dir := t.TempDir()
	d := waterDesign()
	d.Budget.Step, d.Budget.Menu, d.Dir = 0, "levels.csv", dir
	tb := waterDoc(t).Table
	var csv strings.Builder
	for _, r := range tb.Reports {
		fmt.Fprintf(&csv, "%v\n", r[0])
	}
	path := dir + "/levels.csv"
	if err := os.WriteFile(path, []byte(csv.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	rule := bregmantest.Rule(t, d.Formula, bregman.Options{Outcomes: d.N()})
	in, err := InputFor(d, tb, rule, 150, 75, 0, "test")
	if err != nil {
		t.Fatal(err)
	}
	if string(in.MenuFile) != csv.String() {
		t.Errorf("attached menu %q, want the file as written", in.MenuFile)
	}
	if err := os.WriteFile(path, []byte("0\n0.5\n1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := InputFor(d, tb, rule, 150, 75, 0, "test"); err == nil || !strings.Contains(err.Error(), "no longer lists the table's reports") {
		t.Errorf("a changed menu file: %v", err)
	}
	if err := os.WriteFile(path, bytes.Repeat([]byte("0\n"), budget.MaxMenuBytes/2+1), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := InputFor(d, tb, rule, 150, 75, 0, "test"); err == nil || !strings.Contains(err.Error(), "too large") {
		t.Errorf("an oversized menu file: %v", err)
	}
}
