// Package figure draws a reliability picture for yes/no forecasts with
// gonum/plot: each forecaster's PAV-recalibrated frequency of the event
// against the probability they gave it, with the consistency band that
// calibrated forecasts would fill (dashed), beside the diagonal of
// perfect reliability, and the caution every export carries. It is a
// separate package so that the engine does not carry a plotting library.
package figure

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"scorewright/contract/backtest"
)

// formats are the file extensions Encode writes.
var formats = []string{"svg", "png", "pdf"}

// Format returns the format named by path's extension, or an error
// listing the ones supported.
func Format(path string) (string, error) {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(path), "."))
	for _, f := range formats {
		if ext == f {
			return f, nil
		}
	}
	return "", fmt.Errorf("figure %q: want a .svg, .png or .pdf file", path)
}

// Reliability plots curves of the event called outcome. Point area grows
// with the number of forecasts at the point; a curve's band, where drawn,
// is two dashed lines in its colour. caution is printed under the x axis.
func Reliability(curves []backtest.Curve, outcome, title string, caution []string) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = fmt.Sprintf("forecast probability of %q", outcome)
	if len(caution) > 0 {
		p.X.Label.Text += "\n" + wrap(strings.Join(caution, " "), 70)
		p.X.Label.TextStyle.Font.Size = vg.Points(7)
	}
	p.Y.Label.Text = fmt.Sprintf("observed frequency of %q", outcome)
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
	p.X.Tick.Marker, p.Y.Tick.Marker = tenths{}, tenths{}
	p.Add(plotter.NewGrid())
	diag, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}})
	if err != nil {
		return nil, err
	}
	diag.Color = plotutil.DarkColors[len(plotutil.DarkColors)-1]
	diag.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	p.Add(diag)
	p.Legend.Add("perfect reliability", diag)
	most := 1
	for _, c := range curves {
		for _, pt := range c.Points {
			most = max(most, pt.Count)
		}
	}
	for i, c := range curves {
		if len(c.Points) == 0 {
			continue
		}
		xys := make(plotter.XYs, len(c.Points))
		for j, pt := range c.Points {
			xys[j] = plotter.XY{X: pt.Forecast, Y: pt.Observed}
		}
		line, pts, err := plotter.NewLinePoints(xys)
		if err != nil {
			return nil, fmt.Errorf("curve of %s: %w", c.Name, err)
		}
		col := plotutil.Color(i)
		line.Color = col
		pts.Color = col
		pts.Shape = plotutil.Shape(i)
		points := c.Points
		pts.GlyphStyleFunc = func(j int) draw.GlyphStyle {
			g := pts.GlyphStyle
			// Continuous forecasts (one case each) draw small marks; a menu's
			// repeated reports grow with their count.
			g.Radius = vg.Points(1.5)
			if most > 1 {
				g.Radius = vg.Points(2 + 5*math.Sqrt(float64(points[j].Count)/float64(most)))
			}
			return g
		}
		p.Add(line, pts)
		p.Legend.Add(c.Name, line, pts)
		if err := addBand(p, c, col); err != nil {
			return nil, err
		}
	}
	// Top left is where a reliability picture is emptiest: forecasts there
	// would be low probabilities of events that nearly always happened.
	p.Legend.Top = true
	p.Legend.Left = true
	p.Legend.XOffs, p.Legend.YOffs = vg.Points(6), -vg.Points(18) // below the title
	return p, nil
}

// tenths ticks the unit interval every 0.1, labelled every 0.2.
type tenths struct{}

// Ticks returns the ticks of [0, 1].
func (tenths) Ticks(_, _ float64) []plot.Tick {
	var t []plot.Tick
	for i := 0; i <= 10; i++ {
		label := ""
		if i%2 == 0 {
			label = fmt.Sprintf("%.1f", float64(i)/10)
		}
		t = append(t, plot.Tick{Value: float64(i) / 10, Label: label})
	}
	return t
}

// Encode renders p as a 12 cm square image in format (svg, png or pdf).
func Encode(p *plot.Plot, format string) ([]byte, error) {
	w, err := p.WriterTo(12*vg.Centimeter, 12*vg.Centimeter, format)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if _, err := w.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// addBand draws the lower and upper edges of a curve's consistency band.
func addBand(p *plot.Plot, c backtest.Curve, col color.Color) error {
	var lo, hi plotter.XYs
	for _, pt := range c.Points {
		if pt.Banded() {
			lo = append(lo, plotter.XY{X: pt.Forecast, Y: pt.Lo})
			hi = append(hi, plotter.XY{X: pt.Forecast, Y: pt.Hi})
		}
	}
	if len(lo) < 2 {
		return nil
	}
	for _, edge := range []plotter.XYs{lo, hi} {
		l, err := plotter.NewLine(edge)
		if err != nil {
			return fmt.Errorf("band of %s: %w", c.Name, err)
		}
		l.Color = col
		l.Width = vg.Points(0.6)
		l.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
		p.Add(l)
	}
	return nil
}

// wrap breaks text at spaces into lines of at most width bytes (a longer
// word stays whole), so that a label never outgrows the picture.
func wrap(text string, width int) string {
	var lines []string
	line := ""
	for _, w := range strings.Fields(text) {
		if line != "" && len(line)+1+len(w) > width {
			lines = append(lines, line)
			line = ""
		}
		if line != "" {
			line += " "
		}
		line += w
	}
	if line != "" {
		lines = append(lines, line)
	}
	return strings.Join(lines, "\n")
}
