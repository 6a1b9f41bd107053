package annex

import (
	"fmt"

	"codeberg.org/go-pdf/fpdf"
)

// pdfTable writes the payment table, its heading repeated at the top of
// every page it runs onto. The font shrinks until every column fits the
// width; a row number leads each row so that a row can be named.
func (d *Document) pdfTable(pdf *fpdf.Fpdf) {
	cols := d.Columns()
	pageW, pageH := pdf.GetPageSize()
	width := pageW - 2*pageMargin
	size, widths := d.pdfFit(pdf, cols, width)

	headLines := 0
	for _, c := range cols {
		headLines = max(headLines, len(c.Head))
	}
	cellH := size * 0.5
	head := func() {
		pdf.SetFont(sans, "B", size)
		pdf.SetFillColor(228, 232, 222)
		y := pdf.GetY()
		x := float64(pageMargin)
		hh := float64(headLines) * cellH
		pdf.Rect(x, y, width, hh+1, "F")
		pdf.SetXY(x, y+0.5)
		pdf.CellFormat(widths[0], cellH, "row", "", 0, "R", false, 0, "")
		x += widths[0]
		for i, c := range cols {
			for l, line := range c.Head {
				pdf.SetXY(x, y+0.5+float64(l)*cellH)
				pdf.CellFormat(widths[i+1], cellH, line, "", 0, "R", false, 0, "")
			}
			x += widths[i+1]
		}
		pdf.SetXY(pageMargin, y+hh+1)
		pdf.SetFont(sans, "", size)
	}
	head()
	for i := range d.Table.Reports {
		if pdf.GetY()+cellH+1 > pageH-pageMargin {
			pdf.AddPage()
			pdf.SetFont(sans, "", smallSize)
			pdf.CellFormat(0, smallLineH, "payment table, continued", "", 1, "L", false, 0, "")
			head()
		}
		fill := i%2 == 1
		pdf.SetFillColor(246, 247, 243)
		pdf.CellFormat(widths[0], cellH+1, fmt.Sprint(i+1), "", 0, "R", fill, 0, "")
		for j, cell := range d.Cells(i) {
			pdf.CellFormat(widths[j+1], cellH+1, cell, "", 0, "R", fill, 0, "")
		}
		pdf.Ln(cellH + 1)
	}
	pdf.SetFont(sans, "", bodySize)
	pdf.Ln(2)
}

// pdfFit picks the largest font size (from the body size down to
// minCellSize) at which the row number and every column fit width, and
// the columns' widths at that size, shared out in proportion to need.
func (d *Document) pdfFit(pdf *fpdf.Fpdf, cols []Column, width float64) (float64, []float64) {
	need := func(size float64) []float64 {
		pdf.SetFont(sans, "B", size)
		w := make([]float64, len(cols)+1)
		w[0] = pdf.GetStringWidth(fmt.Sprint(len(d.Table.Reports))) + 3
		w[0] = max(w[0], pdf.GetStringWidth("row")+3)
		for i, c := range cols {
			for _, h := range c.Head {
				w[i+1] = max(w[i+1], pdf.GetStringWidth(h)+3)
			}
		}
		pdf.SetFont(sans, "", size)
		for r := range d.Table.Reports {
			for j, cell := range d.Cells(r) {
				w[j+1] = max(w[j+1], pdf.GetStringWidth(cell)+3)
			}
		}
		return w
	}
	size := float64(bodySize) - 1
	var w []float64
	for ; ; size -= 0.5 {
		w = need(size)
		total := 0.0
		for _, x := range w {
			total += x
		}
		if total <= width || size <= minCellSize {
			// Share what is left so the table spans the width.
			extra := max(0, width-total) / float64(len(w))
			if total > width {
				extra = 0
			}
			for i := range w {
				w[i] += extra
			}
			return size, w
		}
	}
}
