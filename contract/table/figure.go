package table

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"
	"strings"
	"unicode/utf8"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	// The figure formats register themselves with draw.
	_ "gonum.org/v1/plot/vg/vgimg"
	_ "gonum.org/v1/plot/vg/vgpdf"
	_ "gonum.org/v1/plot/vg/vgsvg"
)

// Figure layout. Sizes are fixed so that a figure reads the same in every
// format.
const (
	figWidth    = 18 * vg.Centimeter
	panelHeight = 9 * vg.Centimeter
	// trianglePanelHeight makes a third of the width show the triangle's
	// x range 1.2 and y range 1.1 at about the same scale.
	trianglePanelHeight = 6 * vg.Centimeter
	slicePanelHeight    = 7 * vg.Centimeter
	metaFontSize        = 6.5
	metaWrap            = 130 // characters per metadata line
	panelCols           = 3
)

// writeFigure draws pay against report for each outcome, with the
// metadata block (and any warning, in red) drawn under the panels.
//
// n = 2: one panel, a curve per outcome over the event's probability.
// n = 3: one panel per outcome over the simplex triangle, colour = value.
// n > 3: one panel per outcome, the value when that outcome happens
// against the probability the report gave it (a slice through the menu).
// Point forecasts: one panel, a curve per outcome column over the report.
// Curves have their legend in a strip under the panel.
func (t *Table) writeFigure(w io.Writer, format string) error {
	plots, legend, err := t.panels()
	if err != nil {
		return err
	}
	grid := panelGrid(plots)
	// The metadata is set in a monospaced face, so that wrapped lines
	// keep their spacing in every format and the wrap width is exact.
	mono := font.Font{Typeface: "Liberation", Variant: "Mono"}
	sty := draw.TextStyle{Font: font.From(mono, metaFontSize), Handler: plot.DefaultTextHandler, YAlign: draw.YTop}
	wrapAt := int((figWidth - vg.Centimeter) / sty.Width("M"))
	lines, colours := t.figureText(wrapAt)
	lineH := sty.Height("Ag") * 1.25
	textH := lineH*vg.Length(len(lines)) + vg.Centimeter/2
	legendH := legendHeight(legend)
	height := t.panelHeight()*vg.Length(len(grid)) + legendH + textH

	cw, err := draw.NewFormattedCanvas(figWidth, height, format)
	if err != nil {
		return err
	}
	dc := draw.New(cw)
	// White background: PNG would otherwise be transparent.
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())

	plotArea := dc
	plotArea.Min.Y += textH + legendH
	strip := dc
	strip.Min.Y, strip.Max.Y = dc.Min.Y+textH, dc.Min.Y+textH+legendH
	drawLegend(strip, legend)
	drawGrid(grid, plotArea)
	y := dc.Min.Y + textH - vg.Centimeter/4
	for i, line := range lines {
		s := sty
		s.Color = colours[i]
		dc.FillText(s, vg.Point{X: dc.Min.X + vg.Centimeter/2, Y: y}, line)
		y -= lineH
	}
	if format != "png" {
		_, err = cw.WriteTo(w)
		return err
	}
	var img bytes.Buffer
	if _, err := cw.WriteTo(&img); err != nil {
		return err
	}
	named, err := withSoftware(img.Bytes(), "scorewright "+t.Meta.Version)
	if err != nil {
		return err
	}
	_, err = w.Write(named)
	return err
}

// panels are the figure's plots, by the kind of table, and the legend of
// its curves (none for the coloured triangles and the slices).
func (t *Table) panels() ([]*plot.Plot, []legendEntry, error) {
	n := len(t.Labels)
	switch {
	case t.ReportName != "":
		p, legend, err := t.curvePlot(t.ReportName + " (point forecast)")
		return []*plot.Plot{p}, legend, err
	case n == 2:
		p, legend, err := t.curvePlot("report: probability of " + t.Labels[0])
		return []*plot.Plot{p}, legend, err
	case n == 3:
		plots, err := t.trianglePlots()
		return plots, nil, err
	}
	plots, err := t.slicePlots()
	return plots, nil, err
}

// panelHeight is the height of one row of panels: the simplex triangle
// kept close to equilateral, the slices lower.
func (t *Table) panelHeight() vg.Length {
	switch n := len(t.Labels); {
	case t.ReportName != "":
	case n == 3:
		return trianglePanelHeight
	case n > 3:
		return slicePanelHeight
	}
	return panelHeight
}

// panelGrid lays the plots out in rows of at most panelCols.
func panelGrid(plots []*plot.Plot) [][]*plot.Plot {
	cols := min(len(plots), panelCols)
	rows := (len(plots) + cols - 1) / cols
	grid := make([][]*plot.Plot, rows)
	for r := range grid {
		grid[r] = make([]*plot.Plot, cols)
		for c := range cols {
			if i := r*cols + c; i < len(plots) {
				grid[r][c] = plots[i]
			}
		}
	}
	return grid
}

// drawGrid draws the panels of grid, aligned, in area.
func drawGrid(grid [][]*plot.Plot, area draw.Canvas) {
	tiles := draw.Tiles{Rows: len(grid), Cols: len(grid[0]), PadX: vg.Centimeter / 2, PadY: vg.Centimeter / 2,
		PadTop: vg.Centimeter / 4, PadLeft: vg.Centimeter / 4, PadRight: vg.Centimeter / 2}
	canvases := plot.Align(grid, tiles, area)
	for r := range grid {
		for c := range grid[r] {
			if grid[r][c] != nil {
				grid[r][c].Draw(canvases[r][c])
			}
		}
	}
}

// figureText is the metadata block wrapped to the figure's width, with
// warnings in red.
func (t *Table) figureText(width int) ([]string, []color.Color) {
	var lines []string
	var colours []color.Color
	warn := color.RGBA{R: 0xb0, A: 0xff}
	for _, f := range t.Meta.Fields() {
		c := color.Color(color.Black)
		if f.Key == "WARNING" {
			c = warn
		}
		for i, l := range Wrap(f.Key+": "+oneLine(f.Value), width-4) {
			if i > 0 {
				l = "    " + l
			}
			lines = append(lines, l)
			colours = append(colours, c)
		}
	}
	return lines, colours
}

// Wrap breaks s into lines of at most width characters at spaces; a word
// longer than a line (a long formula written without spaces) is cut into
// pieces of width characters, so no line runs off a figure.
func Wrap(s string, width int) []string {
	width = max(width, 8)
	var lines []string
	var cur strings.Builder
	var words []string
	for _, word := range strings.Fields(s) {
		for r := []rune(word); ; {
			if len(r) <= width {
				words = append(words, string(r))
				break
			}
			words = append(words, string(r[:width]))
			r = r[width:]
		}
	}
	n := 0 // characters in cur
	for _, word := range words {
		wn := utf8.RuneCountInString(word)
		if n > 0 && n+1+wn > width {
			lines = append(lines, cur.String())
			cur.Reset()
			n = 0
		}
		if n > 0 {
			cur.WriteByte(' ')
			n++
		}
		cur.WriteString(word)
		n += wn
	}
	if cur.Len() > 0 {
		lines = append(lines, cur.String())
	}
	return lines
}

func (t *Table) valueAxis() string {
	switch {
	case t.Kind == KindMoney:
		return t.ValueName
	case strings.Contains(string(t.Kind), t.ValueName):
		// "chance of the prize", not "chance (chance of the prize)".
		return string(t.Kind)
	}
	return fmt.Sprintf("%s (%s)", t.ValueName, t.Kind)
}

// legendEntry is one line of a figure's legend.
type legendEntry struct {
	label  string
	thumbs []plot.Thumbnailer
}

// Legend layout: entries in up to legendCols columns in a strip between
// the panel and the metadata, so that no legend sits on a curve.
const (
	legendCols     = 3
	legendFontSize = 10
	legendPad      = 3 * vg.Millimeter / 2
)

// newLegend is an empty legend in the figure's style.
func newLegend() plot.Legend {
	l := plot.NewLegend()
	l.TextStyle.Font.Size = legendFontSize
	l.Padding = legendPad
	l.Top, l.Left = true, true
	return l
}

// legendRows is how many entries each legend column holds.
func legendRows(entries []legendEntry) int {
	return (len(entries) + legendCols - 1) / legendCols
}

// legendHeight is the height of the legend strip (0 without entries).
func legendHeight(entries []legendEntry) vg.Length {
	if len(entries) == 0 {
		return 0
	}
	l := newLegend()
	return vg.Length(legendRows(entries))*(l.TextStyle.Rectangle("Ag").Max.Y+legendPad) + vg.Centimeter/2
}

// drawLegend draws the entries column by column into c.
func drawLegend(c draw.Canvas, entries []legendEntry) {
	if len(entries) == 0 {
		return
	}
	rows := legendRows(entries)
	colW := (c.Max.X - c.Min.X - 2*vg.Centimeter) / legendCols
	for col := 0; col*rows < len(entries); col++ {
		l := newLegend()
		for _, e := range entries[col*rows : min(len(entries), (col+1)*rows)] {
			l.Add(e.label, e.thumbs...)
		}
		sub := c
		sub.Min.X = c.Min.X + 1.5*vg.Centimeter + vg.Length(col)*colW
		sub.Max.X = sub.Min.X + colW
		sub.Max.Y -= vg.Centimeter / 4
		l.Draw(sub)
	}
}

// curvePlot draws one curve per outcome (or outcome column) against the
// first entry of each report; the legend entries are returned, to be
// drawn outside the data area.
func (t *Table) curvePlot(xLabel string) (*plot.Plot, []legendEntry, error) {
	p := plot.New()
	p.X.Label.Text = xLabel
	p.Y.Label.Text = t.valueAxis()
	var legend []legendEntry
	for k := range t.Labels {
		xys := make(plotter.XYs, len(t.Reports))
		for i, r := range t.Reports {
			xys[i] = plotter.XY{X: r[0], Y: finiteOr(t.Values[i][k])}
		}
		// A menu read from a file may list reports in any order.
		sort.Slice(xys, func(a, b int) bool { return xys[a].X < xys[b].X })
		line, points, err := plotter.NewLinePoints(xys)
		if err != nil {
			return nil, nil, err
		}
		line.Color = plotutil.Color(k)
		points.Color = plotutil.Color(k)
		points.Shape = plotutil.Shape(k)
		p.Add(line, points)
		legend = append(legend, legendEntry{t.ValueHeader(k), []plot.Thumbnailer{line, points}})
	}
	p.Add(plotter.NewGrid())
	return p, legend, nil
}

// finiteOr keeps a non-finite value from breaking the axis range; a table
// that reaches here has finite values, so this is a guard, not a policy.
func finiteOr(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	return v
}

// valueRange returns the smallest and largest finite value of outcome k.
func (t *Table) valueRange(k int) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for i := range t.Values {
		v := t.Values[i][k]
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return lo, hi
}

// trianglePlots draws, for each outcome, the menu on the simplex triangle
// coloured by the value paid when that outcome happens.
func (t *Table) trianglePlots() ([]*plot.Plot, error) {
	s3 := math.Sqrt(3) / 2
	corner := func(p []float64) plotter.XY { return plotter.XY{X: p[1] + p[2]/2, Y: s3 * p[2]} }
	var plots []*plot.Plot
	for k := range t.Labels {
		lo, hi := t.valueRange(k)
		cm := moreland.SmoothBlueRed()
		cm.SetMin(lo)
		cm.SetMax(math.Max(hi, lo+1e-12))
		p := plot.New()
		p.Title.Text = fmt.Sprintf("%s (blue %s, red %s)", t.ValueHeader(k), t.Value(lo), t.Value(hi))
		p.Title.TextStyle.Font.Size = 9
		p.HideAxes()
		edge, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}, {X: 0.5, Y: s3}, {X: 0, Y: 0}})
		if err != nil {
			return nil, err
		}
		edge.Color = color.Gray{Y: 0x80}
		xys := make(plotter.XYs, len(t.Reports))
		for i, r := range t.Reports {
			xys[i] = corner(r)
		}
		sc, err := plotter.NewScatter(xys)
		if err != nil {
			return nil, err
		}
		values := t.Values
		sc.GlyphStyleFunc = func(i int) draw.GlyphStyle {
			c, err := cm.At(finiteOr(values[i][k]))
			if err != nil {
				c = color.Black
			}
			return draw.GlyphStyle{Color: c, Radius: vg.Points(2.5), Shape: draw.CircleGlyph{}}
		}
		labels, err := plotter.NewLabels(plotter.XYLabels{
			XYs:    plotter.XYs{{X: 0, Y: -0.12}, {X: 1, Y: -0.12}, {X: 0.5, Y: s3 + 0.03}},
			Labels: []string{t.Labels[0], t.Labels[1], t.Labels[2]},
		})
		if err != nil {
			return nil, err
		}
		for i := range labels.TextStyle {
			labels.TextStyle[i].XAlign = draw.XCenter
		}
		p.Add(edge, sc, labels)
		p.X.Min, p.X.Max = -0.1, 1.1
		p.Y.Min, p.Y.Max = -0.15, 1
		plots = append(plots, p)
	}
	return plots, nil
}

// slicePlots draws, for each outcome k, the value paid when k happens
// against the probability the report gave k.
func (t *Table) slicePlots() ([]*plot.Plot, error) {
	var plots []*plot.Plot
	for k := range t.Labels {
		p := plot.New()
		p.Title.Text = t.ValueHeader(k)
		p.Title.TextStyle.Font.Size = 9
		// A third of the figure's width: axis labels at the title's size,
		// so that a long outcome name is not cut at the panel's edge.
		p.X.Label.Text = "report: probability of " + t.Labels[k]
		p.X.Label.TextStyle.Font.Size = 9
		p.Y.Label.Text = t.valueAxis()
		p.Y.Label.TextStyle.Font.Size = 9
		xys := make(plotter.XYs, len(t.Reports))
		for i, r := range t.Reports {
			xys[i] = plotter.XY{X: r[k], Y: finiteOr(t.Values[i][k])}
		}
		sc, err := plotter.NewScatter(xys)
		if err != nil {
			return nil, err
		}
		sc.Color = plotutil.Color(k)
		sc.Radius = vg.Points(1.5)
		p.Add(sc, plotter.NewGrid())
		plots = append(plots, p)
	}
	return plots, nil
}
