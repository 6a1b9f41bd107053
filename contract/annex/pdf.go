package annex

import (
	"bytes"
	"fmt"
	"io"
	"time"

	"codeberg.org/go-pdf/fpdf"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/goregular"
)

// Page layout of the PDF annex, in millimetres on A4.
const (
	pageMargin = 20
	bodySize   = 10
	smallSize  = 8
	lineH      = 5
	smallLineH = 3.8
	rowH       = 5.5
	// minCellSize is the smallest font the payment table shrinks to so
	// that every column fits the page width.
	minCellSize = 5.5
	// tableKeep is the room the payment table needs under its heading
	// to start on the same page: its head and a few rows.
	tableKeep = 60
)

// Font families: the Go fonts carry the characters an annex writes (·,
// −, ², √, Σ, “ ”) that the PDF core fonts lack.
const (
	sans = "gosans"
	mono = "gomono"
)

// WritePDF writes the annex as a PDF document.
func (d *Document) WritePDF(w io.Writer) error {
	pdf := fpdf.New("P", "mm", "A4", "")
	pdf.AddUTF8FontFromBytes(sans, "", goregular.TTF)
	pdf.AddUTF8FontFromBytes(sans, "B", gobold.TTF)
	pdf.AddUTF8FontFromBytes(mono, "", gomono.TTF)
	pdf.SetMargins(pageMargin, pageMargin, pageMargin)
	pdf.SetAutoPageBreak(true, pageMargin)
	pdf.SetTitle(d.Title, true)
	pdf.SetSubject("Payment annex: a payment table for probability forecasts", true)
	pdf.SetCreator(d.Producer, true)
	pdf.SetProducer(d.Producer, true)
	if t, err := time.Parse("2006-01-02", d.Date); err == nil {
		pdf.SetCreationDate(t)
		pdf.SetModificationDate(t)
	}
	files := []fpdf.Attachment{{Content: []byte(d.DesignText), Filename: "design.toml",
		Description: "the design this annex was made from; SHA-256 " + d.Fingerprint}}
	if d.MenuFile != nil {
		files = append(files, fpdf.Attachment{Content: d.MenuFile, Filename: d.MenuName,
			Description: "the report menu the design names; one report per row of the payment table"})
	}
	pdf.SetAttachments(files)
	pdf.AliasNbPages("{nb}")
	pdf.SetHeaderFunc(func() { d.pdfHead(pdf) })
	pdf.SetFooterFunc(func() { d.pdfFoot(pdf) })
	pdf.AddPage()
	d.pdfBody(pdf)
	if err := pdf.Error(); err != nil {
		return fmt.Errorf("annex: %w", err)
	}
	var buf bytes.Buffer
	if err := pdf.Output(&buf); err != nil {
		return fmt.Errorf("annex: %w", err)
	}
	_, err := w.Write(buf.Bytes())
	return err
}

func (d *Document) pdfBody(pdf *fpdf.Fpdf) {
	pdf.SetFont(sans, "B", 18)
	pdf.MultiCell(0, 8, d.Title, "", "L", false)
	pdf.SetFont(sans, "", bodySize)
	pdf.MultiCell(0, lineH, "Annex to the agreement between the parties named below: how each probability forecast is paid.", "", "L", false)
	pdf.Ln(2)
	for _, warn := range d.Warnings {
		pdf.SetTextColor(160, 0, 0)
		pdf.SetFont(sans, "B", bodySize)
		pdf.MultiCell(0, lineH, "WARNING: "+warn, "1", "L", false)
		pdf.SetTextColor(0, 0, 0)
		pdf.Ln(2)
	}
	d.pdfSection(pdf, "1. Parties and terms")
	d.pdfTerms(pdf)
	d.pdfSection(pdf, "2. Payment")
	d.pdfPara(pdf, d.Clause)
	d.pdfPara(pdf, d.OffMenu)
	if d.Draw != "" {
		d.pdfPara(pdf, d.Draw)
	}
	d.pdfSection(pdf, "3. Pay per outcome as a formula")
	pdf.SetFont(sans, "B", bodySize)
	for _, l := range d.FormulaLines {
		pdf.MultiCell(0, lineH+0.5, l, "", "L", false)
	}
	d.pdfPara(pdf, d.FormulaNote)
	d.pdfSection(pdf, "4. What the contract costs")
	if d.Cost != nil {
		d.pdfCost(pdf)
	}
	if d.CostNote != "" {
		d.pdfPara(pdf, d.CostNote)
	}
	d.pdfSectionKeep(pdf, "5. The payment table", tableKeep)
	d.pdfTable(pdf)
	d.pdfSection(pdf, "6. Verification record")
	d.pdfRecord(pdf)
	d.pdfSection(pdf, "7. Cautions")
	for _, c := range d.Cautions {
		d.pdfPara(pdf, "• "+c)
	}
	d.pdfSignatures(pdf)
	d.pdfDesign(pdf)
}

func (d *Document) pdfHead(pdf *fpdf.Fpdf) {
	if pdf.PageNo() == 1 {
		return
	}
	pdf.SetFont(sans, "", smallSize)
	pdf.SetTextColor(90, 90, 90)
	pdf.CellFormat(0, smallLineH, d.RunningHead(), "", 0, "L", false, 0, "")
	pdf.CellFormat(0, smallLineH, "design "+d.Short(), "", 1, "R", false, 0, "")
	pdf.SetTextColor(0, 0, 0)
	pdf.Ln(3)
}

func (d *Document) pdfFoot(pdf *fpdf.Fpdf) {
	pdf.SetY(-pageMargin + 6)
	pdf.SetFont(sans, "", smallSize)
	pdf.SetTextColor(90, 90, 90)
	pdf.CellFormat(0, smallLineH, "made by "+d.Producer+" on "+d.Date, "", 0, "L", false, 0, "")
	pdf.CellFormat(0, smallLineH, fmt.Sprintf("page %d of {nb}", pdf.PageNo()), "", 0, "R", false, 0, "")
	pdf.SetTextColor(0, 0, 0)
}

func (d *Document) pdfSection(pdf *fpdf.Fpdf, title string) { d.pdfSectionKeep(pdf, title, 25) }

// pdfSectionKeep starts a section on a new page unless keep millimetres
// of what follows fit under its heading.
func (d *Document) pdfSectionKeep(pdf *fpdf.Fpdf, title string, keep float64) {
	_, h := pdf.GetPageSize()
	if pdf.GetY() > h-pageMargin-keep {
		pdf.AddPage()
	}
	pdf.Ln(3)
	pdf.SetFont(sans, "B", 12)
	pdf.CellFormat(0, 7, title, "B", 1, "L", false, 0, "")
	pdf.Ln(1.5)
	pdf.SetFont(sans, "", bodySize)
}

func (d *Document) pdfPara(pdf *fpdf.Fpdf, text string) {
	pdf.SetFont(sans, "", bodySize)
	pdf.MultiCell(0, lineH, text, "", "L", false)
	pdf.Ln(1.5)
}

// pdfTerms writes each term with its value, or a line to write on.
func (d *Document) pdfTerms(pdf *fpdf.Fpdf) {
	const keyW = 48
	for _, t := range d.Terms {
		pdf.SetFont(sans, "B", bodySize)
		pdf.CellFormat(keyW, rowH+1, t.Key, "", 0, "L", false, 0, "")
		pdf.SetFont(sans, "", bodySize)
		if t.Value == "" {
			x, y := pdf.GetX(), pdf.GetY()
			pdf.Line(x, y+rowH, x+90, y+rowH)
			pdf.Ln(rowH + 1)
			continue
		}
		pdf.MultiCell(0, rowH+1, t.Value, "", "L", false)
	}
}

func (d *Document) pdfCost(pdf *fpdf.Fpdf) {
	c := d.Cost
	season := "over the season"
	if c.Season.Forecasts > 0 {
		season = fmt.Sprintf("over %d forecasts", c.Season.Forecasts)
	}
	d.pdfPara(pdf, d.CostIntro())
	// Without a season length there is no season total: the column is
	// left out and a sentence says why, rather than a cell too wide for
	// its column running over the amounts beside it.
	heads, widths := []string{"", "per forecast", season}, []float64{100, 30, 40}
	if c.Season.Forecasts == 0 {
		heads, widths = heads[:2], []float64{135, 35}
	}
	pdf.SetFont(sans, "B", bodySize)
	for i, h := range heads {
		align := "R"
		if i == 0 {
			align = "L"
		}
		pdf.CellFormat(widths[i], rowH, h, "B", 0, align, false, 0, "")
	}
	pdf.Ln(rowH)
	pdf.SetFont(sans, "", bodySize)
	for _, l := range c.Lines() {
		cells := []string{l.Who, l.PerForecast, l.Season}
		for i := range heads {
			align := "R"
			if i == 0 {
				align = "L"
			}
			pdf.CellFormat(widths[i], rowH, cells[i], "", 0, align, false, 0, "")
		}
		pdf.Ln(rowH)
	}
	pdf.Ln(1.5)
	if c.Season.Forecasts == 0 {
		d.pdfPara(pdf, "The terms do not state the forecasts per season, so no season total is given.")
	}
	d.pdfPara(pdf, "The perfect forecaster is priced at the base rate too: over a season the outcomes come as the base rate says, and each forecast is paid the largest amount for the outcome that happened.")
}

func (d *Document) pdfRecord(pdf *fpdf.Fpdf) {
	for _, f := range d.Record {
		pdf.SetFont(sans, "B", smallSize+1)
		pdf.Write(smallLineH+0.4, f.Key+": ")
		pdf.SetFont(sans, "", smallSize+1)
		pdf.Write(smallLineH+0.4, f.Value)
		pdf.Ln(smallLineH + 1.6)
	}
}

func (d *Document) pdfSignatures(pdf *fpdf.Fpdf) {
	_, h := pdf.GetPageSize()
	if pdf.GetY() > h-pageMargin-40 {
		pdf.AddPage()
	}
	pdf.Ln(8)
	for _, who := range []string{"For the buyer", "For the forecaster"} {
		pdf.SetFont(sans, "", bodySize)
		pdf.CellFormat(40, rowH, who, "", 0, "L", false, 0, "")
		x, y := pdf.GetX(), pdf.GetY()
		pdf.Line(x, y+rowH, x+70, y+rowH)
		pdf.SetX(x + 75)
		pdf.CellFormat(12, rowH, "date", "", 0, "L", false, 0, "")
		x = pdf.GetX()
		pdf.Line(x, y+rowH, x+40, y+rowH)
		pdf.Ln(rowH + 9)
	}
}

// pdfDesign prints the fingerprint and the design file itself (also
// attached to the PDF as design.toml).
func (d *Document) pdfDesign(pdf *fpdf.Fpdf) {
	d.pdfSection(pdf, "8. The design and its fingerprint")
	d.pdfPara(pdf, "SHA-256 of the design file below, exactly as printed (UTF-8, one line feed after each line); the same file is attached to this PDF as design.toml. "+d.RemakePDF)
	pdf.SetFont(mono, "", bodySize-1)
	pdf.MultiCell(0, lineH, d.Fingerprint, "", "L", false)
	pdf.Ln(2)
	pdf.SetFont(mono, "", smallSize)
	pdf.SetFillColor(244, 244, 240)
	pdf.MultiCell(0, smallLineH, d.DesignText, "", "L", true)
}
