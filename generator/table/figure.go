package table

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"
	"strings"

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
func (t *Table) writeFigure(w io.Writer, format string) error {
	n := len(t.Labels)
	var plots []*plot.Plot
	var err error
	switch {
	case t.ReportName != "":
		var p *plot.Plot
		p, err = t.pointPlot()
		plots = []*plot.Plot{p}
	case n == 2:
		var p *plot.Plot
		p, err = t.binaryPlot()
		plots = []*plot.Plot{p}
	case n == 3:
		plots, err = t.trianglePlots()
	default:
		plots, err = t.slicePlots()
	}
	if err != nil {
		return err
	}
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

	// The metadata is set in a monospaced face, so that wrapped lines
	// keep their spacing in every format and the wrap width is exact.
	mono := font.Font{Typeface: "Liberation", Variant: "Mono"}
	sty := draw.TextStyle{Font: font.From(mono, metaFontSize), Handler: plot.DefaultTextHandler, YAlign: draw.YTop}
	wrapAt := int((figWidth - vg.Centimeter) / sty.Width("M"))
	lines, colours := t.figureText(wrapAt)
	lineH := sty.Height("Ag") * 1.25
	textH := lineH*vg.Length(len(lines)) + vg.Centimeter/2
	ph := panelHeight
	switch {
	case t.ReportName != "":
	case n == 3:
		// Keep the simplex triangle close to equilateral.
		ph = trianglePanelHeight
	case n > 3:
		ph = slicePanelHeight
	}
	height := ph*vg.Length(rows) + textH

	cw, err := draw.NewFormattedCanvas(figWidth, height, format)
	if err != nil {
		return err
	}
	dc := draw.New(cw)
	// White background: PNG would otherwise be transparent.
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())

	plotArea := dc
	plotArea.Min.Y += textH
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Centimeter / 2, PadY: vg.Centimeter / 2,
		PadTop: vg.Centimeter / 4, PadLeft: vg.Centimeter / 4, PadRight: vg.Centimeter / 2}
	canvases := plot.Align(grid, tiles, plotArea)
	for r := range grid {
		for c := range grid[r] {
			if grid[r][c] != nil {
				grid[r][c].Draw(canvases[r][c])
			}
		}
	}
	y := dc.Min.Y + textH - vg.Centimeter/4
	for i, line := range lines {
		s := sty
		s.Color = colours[i]
		dc.FillText(s, vg.Point{X: dc.Min.X + vg.Centimeter/2, Y: y}, line)
		y -= lineH
	}
	_, err = cw.WriteTo(w)
	return err
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
		for i, l := range wrap(f.Key+": "+oneLine(f.Value), width-4) {
			if i > 0 {
				l = "    " + l
			}
			lines = append(lines, l)
			colours = append(colours, c)
		}
	}
	return lines, colours
}

// wrap breaks s into lines of at most width characters at spaces.
func wrap(s string, width int) []string {
	var lines []string
	var cur strings.Builder
	for _, word := range strings.Fields(s) {
		if cur.Len() > 0 && cur.Len()+1+len(word) > width {
			lines = append(lines, cur.String())
			cur.Reset()
		}
		if cur.Len() > 0 {
			cur.WriteByte(' ')
		}
		cur.WriteString(word)
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

// binaryPlot draws one curve per outcome against the event's probability.
func (t *Table) binaryPlot() (*plot.Plot, error) {
	p, err := t.curvePlot("report: probability of " + t.Labels[0])
	if err != nil {
		return nil, err
	}
	// Headroom above the curves for the legend, which would otherwise sit
	// on the curve that starts high at the left edge.
	p.Y.Max += 0.25 * (p.Y.Max - p.Y.Min)
	return p, nil
}

// pointPlot draws, for a point-forecast table, one curve per outcome
// column against the report. Each curve peaks where the report equals
// that outcome, so the legend goes into room added on the right, past
// every peak.
func (t *Table) pointPlot() (*plot.Plot, error) {
	p, err := t.curvePlot(t.ReportName + " (point forecast)")
	if err != nil {
		return nil, err
	}
	p.Legend.Left = false
	p.Legend.TextStyle.Font.Size = 9
	p.X.Max += 0.3 * (p.X.Max - p.X.Min)
	return p, nil
}

// curvePlot draws one curve per outcome (column) against the first entry
// of each report, with a legend at the top left.
func (t *Table) curvePlot(xLabel string) (*plot.Plot, error) {
	p := plot.New()
	p.X.Label.Text = xLabel
	p.Y.Label.Text = t.valueAxis()
	p.Legend.Top = true
	p.Legend.Left = true
	for k := range t.Labels {
		xys := make(plotter.XYs, len(t.Reports))
		for i, r := range t.Reports {
			xys[i] = plotter.XY{X: r[0], Y: finiteOr(t.Values[i][k])}
		}
		// A menu read from a file may list reports in any order.
		sort.Slice(xys, func(a, b int) bool { return xys[a].X < xys[b].X })
		line, points, err := plotter.NewLinePoints(xys)
		if err != nil {
			return nil, err
		}
		line.Color = plotutil.Color(k)
		points.Color = plotutil.Color(k)
		points.Shape = plotutil.Shape(k)
		p.Add(line, points)
		p.Legend.Add(t.ValueHeader(k), line, points)
	}
	p.Add(plotter.NewGrid())
	return p, nil
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
