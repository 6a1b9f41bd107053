package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/NimbleMarkets/ntcharts/canvas"
	"github.com/NimbleMarkets/ntcharts/linechart"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"

	"scorewright/contract/research/study"
	"scorewright/generator/design"
)

const researchTitle = "Research — what the work is worth under each rule"

func visibleWidth(s string) int { return ansi.StringWidth(s) }

func (r *ResearchRoom) statusLine() string {
	st := r.st
	switch {
	case r.running:
		s := "studying: " + r.stage
		if r.total > 0 {
			s += fmt.Sprintf(" (%d of %d)", r.done, r.total)
		}
		if r.stale {
			s += " — below: the previous inputs"
		}
		return st.Dim.Render(s)
	case r.stale:
		return st.Dim.Render("previous design — the study reruns when the edit settles")
	case r.res != nil:
		// Naming the model studied tells which inputs the table is for,
		// and changes the line whenever a new study lands.
		model, strength := r.forIn.modelWords()
		return st.Pass.Render("✓ study done: "+model+", "+strength) + st.Dim.Render("   ↑/↓ choose   ←/→ step   esc back")
	case r.err != nil:
		return st.Dim.Render("no study: see below   esc back")
	}
	return st.Dim.Render("waiting for the design to compile")
}

// View draws the view for design d.
func (r *ResearchRoom) View(d *design.Design) string {
	st := r.st
	iw, ih := max(4, r.w-2), max(1, r.h-2)
	lines := []string{r.statusLine()}
	lines = append(lines, r.inputsLine(d)...)
	if r.err != nil {
		lines = append(lines, strings.Split(st.Error.Width(iw).Render("✗ "+strings.ReplaceAll(r.err.Error(), "\n", "; ")), "\n")...)
		return paneFrame(st, researchTitle, true, r.w, r.h, strings.Join(lines, "\n"))
	}
	rep := r.res
	if rep == nil {
		return paneFrame(st, researchTitle, true, r.w, r.h, strings.Join(lines, "\n"))
	}
	table := r.table(rep, iw)
	rest := ih - len(lines) - len(table)
	if len(rep.Labels) == 2 && len(rep.Beliefs) > 0 {
		side := iw >= 110
		if side {
			tw := 0
			for _, l := range table {
				tw = max(tw, visibleWidth(l))
			}
			chartW := iw - tw - 2
			chart := strings.Split(drawResearch(st, chartW, min(ih-len(lines)-4, 20), rep), "\n")
			for i := 0; i < max(len(chart), len(table)); i++ {
				a, b := "", ""
				if i < len(table) {
					a = table[i]
				}
				if i < len(chart) {
					b = chart[i]
				}
				lines = append(lines, fit(a, iw-chartW-2)+"  "+b)
			}
		} else {
			lines = append(lines, table...)
			if rest >= researchMinHeight {
				lines = append(lines, strings.Split(drawResearch(st, iw, min(rest, 20), rep), "\n")...)
			} else {
				lines = append(lines, st.Dim.Render(fmt.Sprintf("(the gain-against-belief chart needs %d more rows)", researchMinHeight-rest)))
			}
		}
	} else {
		lines = append(lines, table...)
	}
	for _, n := range r.notes(rep) {
		if len(lines) >= ih {
			break
		}
		lines = append(lines, st.Dim.Render(ansi.Truncate(n, iw, "…")))
	}
	return paneFrame(st, researchTitle, true, r.w, r.h, strings.Join(lines, "\n"))
}

// table is the compared rules, one line each, in currency.
func (r *ResearchRoom) table(rep *study.Report, width int) []string {
	rows := rep.All()
	steps := len(rows) > 0 && rows[0].Steps != nil
	nameW := 20
	if width < 70 {
		nameW = 14
	}
	head := padRight("rule", nameW) + fmt.Sprintf(" %9s %10s %9s", "gain", "per season", "cost")
	if steps {
		head += fmt.Sprintf(" %5s %6s", "obs", "error")
	}
	out := []string{r.st.Header.Render(head)}
	best := rep.Best()
	for i, row := range rows {
		g := row.Gain
		line := padRight(ansi.Truncate(row.Name, nameW, "…"), nameW) + fmt.Sprintf(" %9.4g %10.4g %9.4g", g.PerForecast, g.Season.Gain, g.CostWith)
		if steps && row.Steps != nil {
			line += fmt.Sprintf(" %5.3g %6.3g", row.Steps.Steps, row.Steps.Error)
		}
		if m := researchMarker(i, len(rep.Rows), rep.Optimum != nil); m != "" && len(rep.Labels) == 2 {
			line = seriesStyle(r.st, i, len(rep.Rows)).Render(m) + " " + line
		} else {
			line = "  " + line
		}
		if best != nil && row.Name == best.Name && i < len(rep.Rows) {
			line += r.st.Dim.Render(" best known")
		}
		out = append(out, line)
	}
	return out
}

// notes are the lines under the table: what is left out, the optimum's
// pieces and the study's notes, most useful first.
func (r *ResearchRoom) notes(rep *study.Report) []string {
	var out []string
	if o := rep.Optimum; o != nil {
		out = append(out, fmt.Sprintf("best bounded rule: %d pieces, gain %.4g per forecast; mixing %g %% quadratic (strictly proper) costs %.4g", len(o.Result.Pieces), o.Result.Gain, 100*o.Mix, o.MixCost))
	}
	if len(rep.Labels) == 2 && len(rep.Rows) > 0 && rep.Rows[0].Steps != nil {
		out = append(out, fmt.Sprintf("obs: observations bought at this price; error: E|report - true chance| (without research %.4g)", rep.Rows[0].Steps.Before))
	}
	for _, l := range rep.LeftOut {
		out = append(out, "left out: "+l)
	}
	out = append(out, "model: "+rep.Model)
	return append(out, rep.Notes...)
}

// researchMinHeight is the smallest height drawResearch draws in.
const researchMinHeight = 8

// researchMarker is the rune row i is drawn with: the first three known
// rules and the optimum (not its mix) get one.
func researchMarker(i, known int, optimum bool) string {
	runes := []string{"•", "+", "x"}
	switch {
	case i < known && i < len(runes):
		return runes[i]
	case optimum && i == known:
		return "◆"
	}
	return ""
}

func seriesStyle(st Styles, i, known int) lipgloss.Style {
	if i == known {
		return st.Selected
	}
	return st.Series[i%len(st.Series)]
}

// drawResearch draws, for n = 2, what a posterior is worth against its
// event probability (GainAt) under the first three known rules and the
// optimum, the base rate marked on the axis by the curves' common zero.
func drawResearch(st Styles, w, h int, rep *study.Report) string {
	if w < 24 || h < researchMinHeight {
		return st.Dim.Render(fmt.Sprintf("(the chart needs at least 24×%d cells)", researchMinHeight))
	}
	rows := rep.All()
	known := len(rep.Rows)
	top := 0.0
	for i, row := range rows {
		if researchMarker(i, known, rep.Optimum != nil) == "" {
			continue
		}
		for _, v := range row.Curve {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				top = math.Max(top, v)
			}
		}
	}
	if !(top > 0) {
		top = 1
	}
	plotW, plotH := w-2, h-3
	lc := linechart.New(plotW, plotH, 0, 1, 0, top, linechart.WithXYSteps(max(1, plotW/12), max(1, plotH/3)),
		linechart.WithXLabelFormatter(func(_ int, v float64) string { return fmt.Sprintf("%.1f", v) }),
		linechart.WithYLabelFormatter(func(_ int, v float64) string { return fmt.Sprintf("%.3g", v) }),
		linechart.WithStyles(st.Dim, st.Label, st.Dim))
	lc.DrawXYAxisAndLabel()
	var legend []string
	for i, row := range rows {
		m := researchMarker(i, known, rep.Optimum != nil)
		if m == "" {
			continue
		}
		style := seriesStyle(st, i, known)
		r := []rune(m)[0]
		var prev *canvas.Float64Point
		for j, v := range row.Curve {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				prev = nil
				continue
			}
			pt := canvas.Float64Point{X: rep.Beliefs[j], Y: math.Min(v, top)}
			if prev != nil {
				lc.DrawRuneLineWithStyle(*prev, pt, r, style)
			}
			prev = &pt
		}
		legend = append(legend, style.Render(m)+" "+row.Name)
	}
	event := rep.Labels[0]
	lines := []string{ansi.Truncate(fmt.Sprintf("what a posterior is worth (currency), base rate %.3g", rep.Prior[0]), w, "…"), lc.View(),
		ansi.Truncate(padLeft(fmt.Sprintf("posterior: probability of %q", event), plotW), w, "…"),
		ansi.Truncate(strings.Join(legend, "  "), w, "…")}
	return strings.Join(lines, "\n")
}
