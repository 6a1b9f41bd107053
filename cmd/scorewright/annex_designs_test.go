package main

import (
	"crypto/sha256"
	"encoding/hex"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
	"golang.org/x/net/html"

	"scorewright/contract/annex"
)

// exportAnnex writes the annex of the invented design name (testdata/designs)
// in format, with extra flags, and returns the file's path.
func exportAnnex(t *testing.T, name, format string, extra ...string) string {
	t.Helper()
	out := filepath.Join(t.TempDir(), name+"."+format)
	args := append([]string{"table", "--design", filepath.Join("..", "..", "testdata", "designs", name+".toml"), "--out", out}, extra...)
	if code, _, errs := runCmd(t, args...); code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	return out
}

// xlsxTable reads the payment sheet back as numbers (the head row aside).
func xlsxTable(t *testing.T, path string) (head []string, rows [][]float64, record string) {
	t.Helper()
	f, err := excelize.OpenFile(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	raw, err := f.GetRows(annex.TableSheet, excelize.Options{RawCellValue: true})
	if err != nil {
		t.Fatal(err)
	}
	head = raw[0]
	for _, r := range raw[1:] {
		var vs []float64
		for _, c := range r {
			v, err := strconv.ParseFloat(c, 64)
			if err != nil {
				t.Fatalf("cell %q of row %q is not a number", c, r)
			}
			vs = append(vs, v)
		}
		rows = append(rows, vs)
	}
	rec, err := f.GetRows(annex.RecordSheet)
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	for _, r := range rec {
		b.WriteString(strings.Join(r, " ") + "\n")
	}
	return head, rows, b.String()
}

// htmlText parses an HTML annex and returns its text.
func htmlText(t *testing.T, path string) string {
	t.Helper()
	fh, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	doc, err := html.Parse(fh)
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.TextNode {
			b.WriteString(n.Data + " ")
		}
		for _, a := range n.Attr {
			if a.Key == "content" {
				b.WriteString(a.Val + " ")
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	return strings.Join(strings.Fields(b.String()), " ")
}

func mustContain(t *testing.T, what, text string, wants ...string) {
	t.Helper()
	for _, w := range wants {
		if !strings.Contains(text, w) {
			t.Errorf("%s lacks %q", what, w)
		}
	}
}

// The ferry operator's invented design (quadratic rule, 200 to 600 NOK,
// menu step 0.05): each amount is 600 − 400·(1 − p)² for the probability p
// the row gives the outcome that happened, to the cent (derived by hand:
// the two-outcome effort is 2(1 − p)² and B = 200). At the base rate 0.08
// the base-rate forecaster picks row 0.1 and expects 0.08·276 + 0.92·596 =
// 570.40 NOK a day, 416392.00 NOK over 730 days.
func TestFerryAnnexReadsBack(t *testing.T) {
	head, rows, record := xlsxTable(t, exportAnnex(t, "ferry", "xlsx"))
	if len(rows) != 21 || !strings.Contains(head[3], "NOK") {
		t.Fatalf("%d rows, head %q", len(rows), head)
	}
	pay := func(p float64) float64 { return math.Round((600-400*(1-p)*(1-p))*100) / 100 }
	for i, r := range rows {
		p := float64(i) * 0.05
		if math.Abs(r[3]-pay(p)) > 1e-9 || math.Abs(r[4]-pay(1-p)) > 1e-9 {
			t.Errorf("row %d: %v, want %v and %v", i+1, r, pay(p), pay(1-p))
		}
	}
	mustContain(t, "the XLSX record", record, "Gullhaven Ferry Company", "416392.00 NOK", "grid evidence", "qualified counsel")
	text := htmlText(t, exportAnnex(t, "ferry", "html"))
	mustContain(t, "the HTML annex", text, "Sailing-cancelled forecasts — Gullhaven Ferries",
		`pay if "sailing cancelled" = 600 − 400·(1 − p)²`, "the buyer pays the forecaster the amount in NOK",
		"not a valid forecast", "570.40 NOK", "416392.00 NOK", "verdict kind: grid evidence", "mathematics, not law", "qualified counsel")
}

// The same design paid as a lottery: each chance is (pay − 200)/400 to the
// thousandth (derived by hand), the clause names the 200 NOK paid for
// certain and the prize of 400 NOK, and the draw is a whole number from 1
// to 1000.
func TestFerryLotteryAnnexReadsBack(t *testing.T) {
	_, rows, record := xlsxTable(t, exportAnnex(t, "ferry", "xlsx", "--lottery"))
	for i, r := range rows {
		p := float64(i) * 0.05
		pay := math.Round((600-400*(1-p)*(1-p))*100) / 100
		if want := math.Round((pay-200)/400*1000) / 1000; math.Abs(r[3]-want) > 1e-12 {
			t.Errorf("row %d: chance %v, want %v", i+1, r[3], want)
		}
	}
	mustContain(t, "the lottery's record", record, "Drawable chances, re-checked", "regulated as gambling")
	text := htmlText(t, exportAnnex(t, "ferry", "html", "--lottery"))
	mustContain(t, "the lottery's HTML annex", text, "the buyer pays the forecaster 200 NOK and", "a prize of 400 NOK",
		"draw a whole number from 1 to 1000", "at most 0.2 NOK per forecast")
}

// The harbour office's untitled point design: phi = −x² makes D(y, x) =
// (y − x)², so with A = 100 and B = 6.25 each amount is 100 − 6.25·(y −
// x)² to the tenth (derived by hand). No base rate for the outcome, so the
// cost states the worst case: 100 NOK a forecast, 36500 NOK over 365.
func TestHarbourPointAnnexReadsBack(t *testing.T) {
	_, rows, _ := xlsxTable(t, exportAnnex(t, "harbour", "xlsx"))
	if len(rows) != 9 {
		t.Fatalf("%d rows", len(rows))
	}
	for i, r := range rows {
		x := float64(i) * 0.5
		for j := range 11 {
			y := float64(j) * 0.4
			if want := math.Round((100-6.25*(y-x)*(y-x))*10) / 10; math.Abs(r[2+j]-want) > 1e-9 {
				t.Errorf("x = %v, y = %v: %v, want %v", x, y, r[2+j], want)
			}
		}
	}
	path := exportAnnex(t, "harbour", "html")
	text := htmlText(t, path)
	mustContain(t, "the point annex", text, "Payment annex", "pay = 100 − 6.25·(y − x)²", "100.0 NOK per forecast", "36500.0 NOK over 365 forecasts",
		"verdict kind: grid evidence", "mathematics, not law", "qualified counsel")
	if strings.Contains(text, "Payment annex — payment annex") {
		t.Error("the untitled annex says 'payment annex' twice")
	}
	// The fingerprint printed is the SHA-256 of the design printed.
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	i, j := strings.Index(page, "<pre"), strings.Index(page, "</pre>")
	if i < 0 || j < i {
		t.Fatal("no printed design")
	}
	printed := html.UnescapeString(page[strings.Index(page[i:], ">")+i+1 : j])
	sum := sha256.Sum256([]byte(printed))
	mustContain(t, "the point annex", text, hex.EncodeToString(sum[:]))
}
