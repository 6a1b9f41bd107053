// Package reliability draws a reliability picture for yes/no forecasts as
// text, for the workbench and the terminal: observed frequency of the
// event against the forecast probability, one marker per bin and
// forecaster, beside a dotted diagonal of perfect reliability, with
// labelled axes and a legend. It holds no Bubble Tea state; the pane that
// shows it calls View with its size.
package reliability

import (
	"fmt"
	"math"
	"strings"

	"github.com/NimbleMarkets/ntcharts/canvas"
	"github.com/NimbleMarkets/ntcharts/linechart"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"

	"scorewright/contract/backtest"
)

// Markers are the runes that tell forecasters apart, in order; after the
// last they repeat.
var markers = []rune{'●', '▲', '■', '◆', '✚', '✖', '○', '△'}

// Minimum size for a readable chart.
const (
	MinWidth  = 24
	MinHeight = 10
)

// Styles colour the chart. The zero value draws plain text.
type Styles struct {
	Axis, Label, Diagonal lipgloss.Style
	// Series styles each forecaster's markers, in order; missing entries
	// are plain.
	Series []lipgloss.Style
}

// Chart is a reliability picture of one event.
type Chart struct {
	// Outcome names the event whose probability is plotted.
	Outcome string
	// Curves are the binned forecasts, one per forecaster.
	Curves []backtest.Curve
	Styles Styles
}

// New returns a plain chart of curves for the event called outcome.
func New(outcome string, curves []backtest.Curve) Chart {
	return Chart{Outcome: outcome, Curves: curves}
}

// View draws the chart in width × height cells: a title line with the
// y-axis name, the plot with axes ticked 0 to 1, the x-axis name and a
// legend line.
func (c Chart) View(width, height int) string {
	if width < MinWidth || height < MinHeight {
		return fmt.Sprintf("(reliability chart needs at least %d×%d cells)", MinWidth, MinHeight)
	}
	legend := c.legend(width)
	plotW, plotH := width, height-2-len(legend)
	// Ticks fall on multiples of 0.2 only when the graph area is a
	// multiple of 5 cells each way, so shrink the plot to fit (the padding
	// goes to the right and bottom).
	lc := c.chart(plotW, plotH, 1, 1)
	if gw := lc.GraphWidth(); gw > 5 {
		plotW -= gw % 5
	}
	if gh := lc.GraphHeight(); gh > 5 {
		plotH -= gh % 5
	}
	lc = c.chart(plotW, plotH, 1, 1)
	lc = c.chart(plotW, plotH, max(1, lc.GraphWidth()/5), max(1, lc.GraphHeight()/5))
	lc.DrawXYAxisAndLabel()
	lc.DrawBrailleLineWithStyle(canvas.Float64Point{X: 0, Y: 0}, canvas.Float64Point{X: 1, Y: 1}, c.Styles.Diagonal)
	// Markers go in the cell whose tick value is nearest, so that they
	// agree with the axis labels (row i above the axis is i/height).
	o, gw, gh := lc.Origin(), lc.GraphWidth(), lc.GraphHeight()
	for i, cv := range c.Curves {
		cell := canvas.NewCellWithStyle(markers[i%len(markers)], c.series(i))
		for _, p := range cv.Points {
			x := o.X + int(math.Round(clamp01(p.Forecast)*float64(gw)))
			y := o.Y - int(math.Round(clamp01(p.Observed)*float64(gh)))
			lc.Canvas.SetCell(canvas.Point{X: min(x, lc.Canvas.Width()-1), Y: max(y, 0)}, cell)
		}
	}
	lines := []string{clip(fmt.Sprintf("observed frequency of %q", c.Outcome), width)}
	lines = append(lines, lc.View())
	lines = append(lines, clip(alignRight(fmt.Sprintf("forecast probability of %q", c.Outcome), plotW), width))
	lines = append(lines, legend...)
	for range height - 2 - len(legend) - plotH {
		lines = append(lines, "")
	}
	return strings.Join(lines, "\n")
}

// chart makes the empty plot with ticks every xStep and yStep cells.
func (c Chart) chart(w, h, xStep, yStep int) linechart.Model {
	tick := func(_ int, v float64) string { return fmt.Sprintf("%.1f", v) }
	return linechart.New(w, h, 0, 1, 0, 1, linechart.WithXYSteps(xStep, yStep),
		linechart.WithXLabelFormatter(tick), linechart.WithYLabelFormatter(tick),
		linechart.WithStyles(c.Styles.Axis, c.Styles.Label, lipgloss.Style{}))
}

func (c Chart) series(i int) lipgloss.Style {
	if i < len(c.Styles.Series) {
		return c.Styles.Series[i]
	}
	return lipgloss.Style{}
}

// legend lays the entries out on as many lines as the width needs, at
// most two; a forecaster with no forecasts still gets its marker.
func (c Chart) legend(width int) []string {
	entries := []string{c.Styles.Diagonal.Render("⠑⠑") + " perfect reliability"}
	for i, cv := range c.Curves {
		entries = append(entries, c.series(i).Render(string(markers[i%len(markers)]))+" "+cv.Name)
	}
	var lines []string
	var cur string
	used := 0
	for _, e := range entries {
		w := lipgloss.Width(e)
		if used > 0 && used+2+w > width {
			lines = append(lines, cur)
			cur, used = "", 0
		}
		if used > 0 {
			cur += "  "
			used += 2
		}
		cur += e
		used += w
	}
	lines = append(lines, cur)
	if len(lines) > 2 {
		lines = append(lines[:1], clip(strings.Join(lines[1:], "  "), width))
	}
	return lines
}

func clamp01(x float64) float64 { return math.Min(1, math.Max(0, x)) }

func clip(s string, width int) string { return ansi.Truncate(s, width, "…") }

// alignRight right-aligns s in display width w: the outcome's name is the
// user's, and %*s would count its runes, not the cells they take.
func alignRight(s string, w int) string {
	return strings.Repeat(" ", max(0, w-ansi.StringWidth(s))) + s
}
