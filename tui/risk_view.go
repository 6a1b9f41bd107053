package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/x/ansi"

	"scorewright"
	"scorewright/contract/risk"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
)

// statusLine says where the view's content stands.
func (v RiskView) statusLine() string {
	st := v.st
	switch {
	case v.running:
		return v.bar.ViewAs(v.done) + fmt.Sprintf(" %3.0f%% solving for the best reports", v.done*100)
	case v.err != nil:
		return st.Error.Render("✗ " + strings.ReplaceAll(v.err.Error(), "\n", "; "))
	case v.res == nil:
		return st.Dim.Render("computing…")
	case v.stale:
		return st.Dim.Render("previous inputs; computing again")
	}
	return st.Dim.Render("current design and inputs")
}

// inputsLine shows the inputs with the selected one marked.
func (v RiskView) inputsLine(in RiskInputs, d *design.Design) string {
	st := v.st
	q := in.Belief
	if q == nil {
		q = scorewright.DefaultBelief(d.Budget, d.N())
	}
	// The input row shows the stepped belief short, so that the row fits
	// 80 columns for three outcomes; the result lines below give it in
	// full, as the command does.
	parts3 := make([]string, len(q))
	for i, x := range q {
		parts3[i] = numfmt.Significant(x, 3)
	}
	belief := "(" + strings.Join(parts3, ", ") + ")"
	if d.N() == 2 {
		belief = fmt.Sprintf("%g %s", q[0], d.Labels[0])
	}
	family := "CRRA"
	if in.Kind == risk.CARA {
		family = "CARA"
	}
	items := []struct{ name, val string }{{"utility", family}, {"coefficient", fmt.Sprintf("%g", in.Coef)},
		{"wealth", fmt.Sprintf("%g", in.Wealth)}, {"belief", belief}}
	var parts []string
	for i, it := range items {
		s := st.Label.Render(it.name) + " " + it.val
		if riskField(i) == v.sel {
			s = st.Selected.Render("› " + it.name + " " + it.val)
		} else {
			s = "  " + s
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, "  ")
}

// describe says in words what the utility is.
func describe(in RiskInputs) string {
	name := fmt.Sprintf("%s %g", strings.ToUpper(string(in.Kind)), in.Coef)
	switch {
	case in.Coef == 0:
		return "linear utility (risk-neutral): the truthful report is best"
	case in.Coef > 0:
		return "risk-averse (" + name + ")"
	}
	return "risk-seeking (" + name + ")"
}

// lotteryNote is the remedy, said under every result, naming the export
// dialog's lottery key.
func lotteryNote(k KeyMap) string {
	// Two lines at 80 columns: the risk view has no line to spare there.
	return scorewright.LotteryRemedy(k.Lottery.Help().Key + " when exporting")
}

// View is the view as last laid out by refresh.
func (v RiskView) View() string { return v.body }

// refresh lays the view out again for design d and inputs in. The model
// calls it when something shown changed (a run's message, a key, the size,
// the design), not on every frame: drawing the curve is work.
func (v *RiskView) refresh(d *design.Design) { v.body = v.render(d, v.in) }

// render draws the view for design d and the current inputs.
func (v RiskView) render(d *design.Design, in RiskInputs) string {
	st := v.st
	iw, ih := max(4, v.w-2), max(1, v.h-2)
	lines := []string{v.statusLine(), v.inputsLine(in, d)}
	if v.err != nil {
		lines[0] = st.Error.Width(iw).Render("✗ " + strings.ReplaceAll(v.err.Error(), "\n", "; "))
	}
	r := v.res
	if r == nil || v.err != nil {
		// An error's inputs have no result; an older one would mislead.
		return paneFrame(st, "Risk attitude — what the forecaster would report", true, v.w, v.h, strings.Join(lines, "\n"))
	}
	lines = append(lines, strings.Split(st.Dim.Width(iw).Render(describe(r.Inputs)+" · "+r.Pay), "\n")...)
	text := v.resultText(r, iw)
	if len(r.Labels) == 2 {
		chartW := iw
		side := iw >= 100
		if side {
			chartW = iw * 55 / 100
		}
		rest := ih - len(lines)
		chartH := rest
		if !side {
			chartH = max(distortMinHeight, rest-len(text))
		}
		chart := drawDistortion(st, chartW, min(chartH, 26), r)
		if side {
			tw := iw - chartW - 2
			text = v.resultText(r, tw)
			cl := strings.Split(chart, "\n")
			for i := 0; i < max(len(cl), len(text)); i++ {
				a, b := "", ""
				if i < len(cl) {
					a = cl[i]
				}
				if i < len(text) {
					b = text[i]
				}
				lines = append(lines, fit(a, chartW)+"  "+b)
			}
		} else {
			lines = append(lines, strings.Split(chart, "\n")...)
			lines = append(lines, text...)
		}
	} else {
		lines = append(lines, v.directionTable(r, iw)...)
		lines = append(lines, text...)
	}
	return paneFrame(st, "Risk attitude — what the forecaster would report", true, v.w, v.h, strings.Join(lines, "\n"))
}

// resultText is the largest distortion, the chosen belief and the note,
// wrapped to width.
func (v RiskView) resultText(r *RiskResult, width int) []string {
	st := v.st
	wrap := func(s string) []string {
		return strings.Split(st.Dim.Width(max(10, width)).UnsetForeground().Render(s), "\n")
	}
	var out []string
	lg := r.Curve.Largest
	where := "belief " + reportText(lg.Belief, r.Labels)
	if len(r.Labels) == 2 {
		where = fmt.Sprintf("belief %s in %q", numfmt.Probability(lg.Belief[0]), r.Labels[0])
	} else if i := indexOf(r.Curve.Points, lg); i >= 0 && i < len(r.Toward) {
		where = fmt.Sprintf("belief %s (toward %q)", reportText(lg.Belief, r.Labels), r.Labels[r.Toward[i]])
	}
	if len(r.Curve.Points) > 0 {
		out = append(out, wrap(fmt.Sprintf("Largest distortion %s probability points, at %s: best report %s.", scorewright.PointsText(lg.Size), where, reportText(lg.Report, r.Labels)))...)
	}
	if c := r.Chosen; c != nil {
		pick := "no menu"
		if r.MenuPick != nil {
			pick = "menu pick " + reportText(r.MenuPick, r.Labels)
		}
		out = append(out, wrap(fmt.Sprintf("Chosen belief %s: best report %s (truthful %s), %s points away; %s; expected pay %s (truthful %s).",
			reportText(c.Belief, r.Labels), reportText(c.Report, r.Labels), reportText(c.Belief, r.Labels), scorewright.PointsText(c.Size), pick,
			scorewright.PayText(c.ExpectedPay), scorewright.PayText(c.TruthfulPay)))...)
	} else if r.ChosenErr != nil {
		out = append(out, wrap("Chosen belief: unsolved: "+r.ChosenErr.Error())...)
	}
	for _, f := range r.Curve.Failed {
		out = append(out, wrap(fmt.Sprintf("Belief %s: unsolved: %v", reportText(f.Belief, r.Labels), f.Err))...)
	}
	out = append(out, strings.Split(st.Dim.Width(max(10, width)).Render(lotteryNote(v.keys)), "\n")...)
	return out
}

// reportText is a report or belief in few digits: for n = 2 the
// probability of the first outcome alone.
func reportText(p []float64, labels []string) string {
	if len(labels) == 2 {
		return numfmt.Probability(p[0])
	}
	return num.Format(p)
}

func indexOf(ps []risk.Result, r risk.Result) int {
	for i, p := range ps {
		if sameVector(p.Belief, r.Belief) {
			return i
		}
	}
	return -1
}

// directionTable is the distortion in points along each direction from
// the uniform belief, one row per outcome, one column per tenth of the
// way (— where the report floor leaves the belief out).
func (v RiskView) directionTable(r *RiskResult, width int) []string {
	st := v.st
	head := fmt.Sprintf("%-12s", "toward")
	for s := 1; s < risk.CurveSteps; s++ {
		head += fmt.Sprintf("%6.1f", float64(s)/risk.CurveSteps)
	}
	out := strings.Split(st.Dim.Width(max(10, width)).Render("distortion in probability points on the segments from the uniform belief toward each outcome, at tenths of the way:"), "\n")
	out = append(out, st.Label.Render(head+"  largest"))
	n := len(r.Labels)
	for k := 0; k < n; k++ {
		row := padRight(ansi.Truncate(r.Labels[k], 11, "…"), 12)
		largest := 0.0
		for s := 1; s < risk.CurveSteps; s++ {
			t := float64(s) / risk.CurveSteps
			cell := "     —"
			for i, p := range r.Curve.Points {
				if i < len(r.Toward) && r.Toward[i] == k && math.Abs(p.Belief[k]-((1-t)/float64(n)+t)) < 1e-9 {
					cell = fmt.Sprintf("%6.3g", p.Size)
					largest = math.Max(largest, p.Size)
				}
			}
			row += cell
		}
		out = append(out, row+fmt.Sprintf("  %7.3g", largest))
	}
	return out
}
