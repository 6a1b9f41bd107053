package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/NimbleMarkets/ntcharts/canvas"
	"github.com/NimbleMarkets/ntcharts/linechart"
	"github.com/charmbracelet/x/ansi"
)

// distortMinHeight is the smallest height drawDistortion draws in: a
// title line, a plot of six rows with its axis, the x-axis name and a
// legend line.
const distortMinHeight = 10

// drawDistortion draws the n = 2 distortion curve of r in w×h cells: the
// best report against the belief (both the probability of the first
// outcome) beside the dotted diagonal of the truthful report, the chosen
// belief marked, axes ticked every 0.2, labelled, and a legend.
func drawDistortion(st Styles, w, h int, r *RiskResult) string {
	if w < 24 || h < distortMinHeight {
		return st.Dim.Render(fmt.Sprintf("(the distortion curve needs at least 24×%d cells)", distortMinHeight))
	}
	event := r.Labels[0]
	legend := st.Dim.Render("⠑⠑") + " truthful report   " + st.Series[0].Render("•") + " best report   " + st.Selected.Render("◆") + " chosen belief"
	// Two columns to the right of the graph keep room for the last x tick.
	plotW, plotH := w-2, h-3
	tick := func(_ int, v float64) string { return fmt.Sprintf("%.1f", v) }
	mk := func(w, h, xs, ys int) linechart.Model {
		return linechart.New(w, h, 0, 1, 0, 1, linechart.WithXYSteps(xs, ys),
			linechart.WithXLabelFormatter(tick), linechart.WithYLabelFormatter(tick),
			linechart.WithStyles(st.Dim, st.Label, st.Dim))
	}
	// Ticks fall on multiples of 0.2, the last x tick (1.0) included, when
	// the graph is one more than a multiple of five columns wide and a
	// multiple of five rows high.
	lc := mk(plotW, plotH, 1, 1)
	plotW -= (lc.GraphWidth() - 1) % 5
	plotH -= lc.GraphHeight() % 5
	lc = mk(plotW, plotH, 1, 1)
	lc = mk(plotW, plotH, max(1, (lc.GraphWidth()-1)/5), max(1, lc.GraphHeight()/5))
	lc.DrawXYAxisAndLabel()
	lc.DrawBrailleLineWithStyle(canvas.Float64Point{X: 0, Y: 0}, canvas.Float64Point{X: 1, Y: 1}, st.Dim)
	var prev *canvas.Float64Point
	for _, p := range r.Curve.Points {
		pt := canvas.Float64Point{X: p.Belief[0], Y: p.Report[0]}
		if math.IsNaN(pt.Y) {
			prev = nil
			continue
		}
		if prev != nil {
			lc.DrawRuneLineWithStyle(*prev, pt, '•', st.Series[0])
		} else {
			lc.DrawRuneWithStyle(pt, '•', st.Series[0])
		}
		prev = &pt
	}
	if c := r.Chosen; c != nil {
		lc.DrawRuneWithStyle(canvas.Float64Point{X: c.Belief[0], Y: c.Report[0]}, '◆', st.Selected)
	}
	plot := strings.Split(lc.View(), "\n")
	if last := len(plot) - 1; last > 0 {
		// ntcharts leaves out the tick at the right end of the x axis.
		at := lc.Origin().X + 5*max(1, (lc.GraphWidth()-1)/5)
		if row := strings.TrimRight(plot[last], " "); ansi.StringWidth(row) <= at {
			plot[last] = row + strings.Repeat(" ", at-ansi.StringWidth(row)) + st.Label.Render("1.0")
		}
	}
	lines := []string{ansi.Truncate(fmt.Sprintf("best report: probability of %q", event), w, "…"), strings.Join(plot, "\n"),
		ansi.Truncate(padLeft(fmt.Sprintf("belief: probability of %q", event), plotW), w, "…"),
		ansi.Truncate(legend, w, "…")}
	return strings.Join(lines, "\n")
}
