package annex

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
	"golang.org/x/net/html"
)

// hostileLabels are outcome labels made of the characters each format
// gives a meaning: Markdown, LaTeX, HTML and spreadsheet syntax. Each
// must come back from every writer as the same text.
var hostileLabels = []string{
	`<script>alert("x")</script> & *b* _u_ | #h {x}`,
	"$5 50% C:\\dir ~^ `c` [l](u) =1+1 'q'",
}

const hostileTitle = `Title <b>&amp;</b> *not bold* \textbf{no} % # $`

// hostileDoc is the water annex with hostile labels and title.
func hostileDoc(t *testing.T) *Document {
	t.Helper()
	d := waterDesign()
	d.Labels = hostileLabels
	d.Title = hostileTitle
	d.Contract.Buyer = "Buyer <i>&</i> {Co}"
	return docFor(t, d)
}

// The HTML annex parses to text nodes that say exactly the labels, and
// carries no element the labels spelt.
func TestHostileLabelsHTML(t *testing.T) {
	var buf bytes.Buffer
	if err := hostileDoc(t).WriteHTML(&buf); err != nil {
		t.Fatal(err)
	}
	root, err := html.Parse(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	walk(root, func(n *html.Node) {
		if n.Type == html.ElementNode && (n.Data == "script" || n.Data == "b" || n.Data == "i") {
			t.Errorf("the annex has a <%s> element made from user text", n.Data)
		}
	})
	all := text(root)
	for _, want := range append(hostileLabels, hostileTitle, "Buyer <i>&</i> {Co}") {
		if !strings.Contains(all, want) {
			t.Errorf("the HTML annex's text lacks %q", want)
		}
	}
}

// The XLSX annex holds the labels as plain text cells, never formulas.
func TestHostileLabelsXLSX(t *testing.T) {
	var buf bytes.Buffer
	if err := hostileDoc(t).WriteXLSX(&buf); err != nil {
		t.Fatal(err)
	}
	f, err := excelize.OpenReader(&buf)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var all strings.Builder
	for _, sheet := range f.GetSheetList() {
		rows, err := f.GetRows(sheet, excelize.Options{RawCellValue: true})
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range rows {
			for j, c := range r {
				all.WriteString(c + "\n")
				cell := cellName(t, j+1, i+1)
				if fm, _ := f.GetCellFormula(sheet, cell); fm != "" {
					t.Errorf("%s!%s is a formula %q", sheet, cell, fm)
				}
			}
		}
	}
	for _, want := range append(hostileLabels, hostileTitle) {
		if !strings.Contains(all.String(), want) {
			t.Errorf("the workbook lacks %q", want)
		}
	}
}

// The PDF annex, read back with pdftotext (poppler), shows the labels as
// written.
func TestHostileLabelsPDF(t *testing.T) {
	if _, err := exec.LookPath("pdftotext"); err != nil {
		t.Skip("pdftotext (poppler-utils) is not installed")
	}
	var buf bytes.Buffer
	if err := hostileDoc(t).WritePDF(&buf); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	pdf := filepath.Join(dir, "annex.pdf")
	if err := os.WriteFile(pdf, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("pdftotext", "-raw", pdf, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	// Long cells wrap; compare with the line breaks of the PDF taken out.
	got := strings.Join(strings.Fields(string(out)), " ")
	for _, want := range append(hostileLabels, hostileTitle) {
		if !strings.Contains(strings.ReplaceAll(got, " ", ""), strings.ReplaceAll(want, " ", "")) {
			t.Errorf("the PDF's text lacks %q:\n%s", want, got)
		}
	}
}
