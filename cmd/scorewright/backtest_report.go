package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/charmbracelet/x/ansi"

	"scorewright/contract/backtest"
	"scorewright/contract/backtest/history"
	"scorewright/contract/table"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/internal/textcol"
)

// maxSkippedShown caps the skipped rows the text report lists; --json
// lists every one the run kept.
const maxSkippedShown = 20

// fewPerBin is the mean number of forecasts per bin below which the
// report warns that the decomposition's terms rest on few outcomes.
const fewPerBin = 5

func newBacktestReport(path string, h *history.Reader, schemes []*backtestScheme, res *backtest.Result) *backtestReport {
	r := &backtestReport{History: path, Outcomes: h.Labels(), Tolerance: h.Tolerance(), Rows: res.Rows,
		SkipCount: res.SkippedCount, Skipped: []skippedReport{}, Caution: table.Caution(), unit: h.Unit(),
		ForecasterCount: res.ForecasterCount, Grouping: res.Grouping}
	for _, s := range res.Skipped {
		sr := skippedReport{Line: s.Line, Why: s.Why}
		if s.EndLine > s.Line {
			sr.EndLine = s.EndLine
		}
		r.Skipped = append(r.Skipped, sr)
	}
	for i, s := range schemes {
		m := res.All[i]
		r.decimals = append(r.decimals, s.terms.Fit.Decimals())
		rr := ruleReport{ID: s.id, Name: s.name, Formula: s.statement, Pay: s.terms.PayFormula(),
			Menu: s.terms.MenuDesc(), Budget: s.terms.BudgetDesc(), ByFormula: s.terms.ByFormula, Count: m.Count, Total: num.Float(m.Total), Mean: num.Float(m.Mean),
			Min: num.Float(m.Min), Max: num.Float(m.Max), OffMenu: m.OffMenu, BelowLow: m.BelowLow, AboveHigh: m.AboveHigh,
			NonFinite: m.NonFinite, MostTotal: num.Float(float64(m.Count) * s.scheme.High)}
		if mp := s.d.Budget.MeanPay; mp != nil {
			mean, total := num.Float(*mp), num.Float(*mp*float64(m.Count))
			rr.TargetMean, rr.TargetTotal = &mean, &total
		}
		r.Rules = append(r.Rules, rr)
		for _, n := range s.terms.Notes {
			r.Notes = append(r.Notes, fmt.Sprintf("rule %s: %s", s.id, n))
		}
		if s.terms.Warning != "" {
			r.Warnings = append(r.Warnings, fmt.Sprintf("rule %s: %s", s.id, s.terms.Warning))
		}
		if m.OffMenu > 0 {
			r.Notes = append(r.Notes, fmt.Sprintf("rule %s: %d of %d forecasts are off the report menu; the table has no row for them, so they are paid by the formula (A - B·L, then rounded as the table is)",
				s.id, m.OffMenu, m.Count))
		}
		if m.NonFinite > 0 {
			r.Notes = append(r.Notes, fmt.Sprintf("rule %s: %s not finite (first on line %d): the forecast gave the outcome that happened a probability at which the rule's effort is infinite, and no clamp applies; totals include them",
				s.id, plural(m.NonFinite, "payment is", "payments are"), m.FirstNonFinite))
		}
	}
	var thin []string
	for _, f := range res.Forecasters {
		fr := forecasterReport{Name: f.Name, Count: f.Count, Total: num.Float(f.Money[0].Total), Mean: num.Float(f.Money[0].Mean),
			Rank: f.Rank[0], Ranks: f.Rank, Binning: f.Binning.String()}
		for i, m := range f.Money {
			fr.Totals = append(fr.Totals, num.Float(m.Total))
			fr.Means = append(fr.Means, num.Float(m.Mean))
			fr.OffMenu = append(fr.OffMenu, m.OffMenu)
			d := f.Decomposition[i]
			fr.Decomposition = append(fr.Decomposition, decompositionReport{Rule: schemes[i].id, MeanEffort: num.Float(d.MeanEffort),
				Uncertainty: num.Float(d.Uncertainty), Resolution: num.Float(d.Resolution), Reliability: num.Float(d.Reliability),
				WithinBin: num.Float(d.WithinBin)})
		}
		fr.CORP = corpReports(&f, r.Outcomes, schemes)
		if len(f.Rank) > 1 {
			c := f.Rank[0] - f.Rank[1]
			fr.RankChange = &c
		}
		if len(f.Bins) > 0 && f.Count < fewPerBin*len(f.Bins) {
			thin = append(thin, fmt.Sprintf("%s (%d forecasts in %d bins)", f.Name, f.Count, len(f.Bins)))
		}
		r.Forecasters = append(r.Forecasters, fr)
	}
	if len(thin) > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("fewer than %d forecasts per bin on average for %s: resolution and reliability are then measured on few outcomes each and read high (the split stays exact, the terms are noisy)",
			fewPerBin, strings.Join(thin, ", ")))
	}
	r.addCurves(res)
	r.addMonths(res)
	if res.Spans.Count > 0 {
		first := res.Spans.First[0]
		r.Notes = append(r.Notes, fmt.Sprintf("%s a quoted question over several lines (the first, lines %d–%d); they were read as one record each",
			plural(res.Spans.Count, "record has", "records have"), first[0], first[1]))
	}
	if res.Grouping != "" && !strings.HasPrefix(res.Grouping, "every") {
		r.Notes = append(r.Notes, "decompositions: "+res.Grouping)
	}
	return r
}

// cash formats a payment with the rule's currency decimals.
func (r *backtestReport) cash(rule int, v num.Float) string {
	return numfmt.Amount(float64(v), r.decimals[rule])
}

func (r *backtestReport) writeText(w io.Writer) error {
	// Warnings come first, as in a table's export, where no reader can
	// miss them.
	for _, warn := range r.Warnings {
		fmt.Fprintf(w, "WARNING: %s\n", warn)
	}
	if len(r.Warnings) > 0 {
		fmt.Fprintln(w)
	}
	// The probability rule is stated apart from the count: rows are
	// skipped for other reasons too (an unknown outcome, a bad date), each
	// given in the list below, and a parenthesis after the count would
	// read as the reason for all of them.
	skipped := "no rows skipped"
	if r.SkipCount > 0 {
		skipped = plural(r.SkipCount, "row") + ` skipped (the reasons are under "skipped rows" below)`
	}
	fmt.Fprintf(w, "history %s: %s scored, %s; a row's probabilities must lie in [0, 1] and sum to 1 within %g\n\n",
		r.History, plural(r.Rows, "forecast"), skipped, r.Tolerance)
	for _, rule := range r.Rules {
		fmt.Fprintf(w, "rule %s: %s, %s\n", rule.ID, rule.Name, rule.Formula)
		fmt.Fprintf(w, "  %s\n  menu: %s\n  budget: %s\n", rule.Pay, rule.Menu, rule.Budget)
	}
	fmt.Fprintln(w)
	left := r.nameColumn()
	r.writeForecasterTable(w, left)
	r.writeTotals(w)
	r.writeDecomposition(w, left)
	r.writeCORP(w, left)
	r.writeMonths(w)
	if err := r.writeQuestions(w); err != nil {
		return err
	}
	r.writeSkipped(w)
	fmt.Fprintln(w)
	for _, n := range r.Notes {
		fmt.Fprintln(w, "note:", n)
	}
	var err error
	for _, c := range r.Caution {
		_, err = fmt.Fprintln(w, "caution:", c)
	}
	return err
}

// nameColumn pads a forecaster's name to the display width of the
// widest, so that names read left-aligned in the right-aligning tables
// (textcol measures cells by display width; a rune count would pad a name
// in wide characters too far).
func (r *backtestReport) nameColumn() func(string) string {
	nw := len("forecaster")
	for _, f := range r.Forecasters {
		nw = max(nw, ansi.StringWidth(f.Name))
	}
	return func(s string) string { return s + strings.Repeat(" ", max(0, nw-ansi.StringWidth(s))) }
}

// writeForecasterTable writes every forecaster's count, totals, means and
// ranks under each rule, then the line of all forecasts.
func (r *backtestReport) writeForecasterTable(w io.Writer, left func(string) string) {
	two := len(r.Rules) > 1
	tw := textcol.NewWriter(w, textcol.AlignRight)
	fmt.Fprintf(tw, "%s\tforecasts\t", left("forecaster"))
	for _, rule := range r.Rules {
		fmt.Fprintf(tw, "total %s\tmean %s\trank %s\t", rule.ID, rule.ID, rule.ID)
	}
	if two {
		fmt.Fprint(tw, "rank A→B\t")
	}
	// Without a menu nothing can be off it: no column of zeros.
	menu := !r.Rules[0].ByFormula
	if menu {
		fmt.Fprint(tw, "off menu\t")
	}
	fmt.Fprintln(tw)
	for _, f := range r.Forecasters {
		fmt.Fprintf(tw, "%s\t%d\t", left(f.Name), f.Count)
		for i := range r.Rules {
			fmt.Fprintf(tw, "%s\t%s\t%d\t", r.cash(i, f.Totals[i]), numfmt.Statistic(float64(f.Means[i]), 0), f.Ranks[i])
		}
		if two {
			change := "="
			switch c := *f.RankChange; {
			case c > 0:
				change = fmt.Sprintf("%d→%d up", f.Ranks[0], f.Ranks[1])
			case c < 0:
				change = fmt.Sprintf("%d→%d down", f.Ranks[0], f.Ranks[1])
			}
			fmt.Fprintf(tw, "%s\t", change)
		}
		if menu {
			fmt.Fprintf(tw, "%d\t", f.OffMenu[0])
		}
		fmt.Fprintln(tw)
	}
	fmt.Fprintf(tw, "%s\t%d\t", left("all"), r.Rows)
	for i, rule := range r.Rules {
		fmt.Fprintf(tw, "%s\t%s\t\t", r.cash(i, rule.Total), numfmt.Statistic(float64(rule.Mean), 0))
	}
	if two {
		fmt.Fprint(tw, "\t")
	}
	if menu {
		fmt.Fprintf(tw, "%d\t", r.Rules[0].OffMenu)
	}
	fmt.Fprintln(tw)
	tw.Flush()
	if menu {
		fmt.Fprintln(w, "(ranks by mean pay per forecast, 1 is best; off menu: forecasts not on rule A's report menu)")
	} else {
		fmt.Fprintln(w, "(ranks by mean pay per forecast, 1 is best)")
	}
	fmt.Fprintln(w)
}

// writeTotals writes what each rule paid against its budget.
func (r *backtestReport) writeTotals(w io.Writer) {
	fmt.Fprintln(w, "totals against the budget")
	for i, rule := range r.Rules {
		fmt.Fprintf(w, "  rule %s: paid %s for %d forecasts (mean %s, smallest %s, largest %s); ", rule.ID,
			r.cash(i, rule.Total), rule.Count, numfmt.Statistic(float64(rule.Mean), 0), r.cash(i, rule.Min), r.cash(i, rule.Max))
		// With no menu there is no table: the bounds are the budget's.
		span, where, largest := "the table's range", "the table's smallest payment", "the table's largest payment"
		offMenu := " (all off the menu)"
		if rule.ByFormula {
			span, where, largest, offMenu = "the budget's range", "the budget's floor", "the budget's largest payment", ""
		}
		if rule.BelowLow+rule.AboveHigh == 0 {
			fmt.Fprintln(w, "every payment within "+span)
		} else {
			fmt.Fprintf(w, "%s below %s, %s above its largest%s\n", plural(rule.BelowLow, "payment"), where, plural(rule.AboveHigh, "payment"), offMenu)
		}
		fmt.Fprintf(w, "          at most %s had every forecast earned %s", r.cash(i, rule.MostTotal), largest)
		if rule.TargetMean != nil {
			fmt.Fprintf(w, "; the budget aims at %s per forecast from a truthful forecaster at its reference belief, %s for %d forecasts",
				r.cash(i, *rule.TargetMean), r.cash(i, *rule.TargetTotal), rule.Count)
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w)
}

// writeDecomposition writes each forecaster's binned decomposition of the
// mean effort under each rule, and which bins each was cut into.
func (r *backtestReport) writeDecomposition(w io.Writer, left func(string) string) {
	fmt.Fprintln(w, "mean effort = uncertainty - resolution + reliability (+ within-bin, zero when bins are the distinct forecasts)")
	tw := textcol.NewWriter(w, textcol.AlignRight)
	fmt.Fprintf(tw, "rule\t%s\tmean effort\tuncertainty\tresolution\treliability\twithin-bin\t\n", left("forecaster"))
	for i, rule := range r.Rules {
		for _, f := range r.Forecasters {
			d := f.Decomposition[i]
			s := math.Max(math.Abs(float64(d.MeanEffort)), math.Abs(float64(d.Uncertainty)))
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", rule.ID, left(f.Name), numfmt.Statistic(float64(d.MeanEffort), s), numfmt.Statistic(float64(d.Uncertainty), s),
				numfmt.Statistic(float64(d.Resolution), s), numfmt.Statistic(float64(d.Reliability), s), numfmt.Statistic(float64(d.WithinBin), s))
		}
	}
	tw.Flush()
	binnings := map[string][]string{}
	var order []string
	for _, f := range r.Forecasters {
		if binnings[f.Binning] == nil {
			order = append(order, f.Binning)
		}
		binnings[f.Binning] = append(binnings[f.Binning], f.Name)
	}
	for _, b := range order {
		fmt.Fprintf(w, "(%s: %s)\n", strings.Join(binnings[b], ", "), b)
	}
}

// writeSkipped lists the first skipped rows and why.
func (r *backtestReport) writeSkipped(w io.Writer) {
	if r.SkipCount == 0 {
		return
	}
	fmt.Fprintf(w, "\nskipped rows (%d):\n", r.SkipCount)
	for i, s := range r.Skipped {
		if i == maxSkippedShown {
			fmt.Fprintf(w, "  ... and %d more (--json lists the first %d)\n", r.SkipCount-maxSkippedShown, len(r.Skipped))
			break
		}
		fmt.Fprintf(w, "  %s: %s\n", (&history.RowError{Line: s.Line, EndLine: s.EndLine, Unit: r.unit}).Where(), s.Why)
	}
}

// plural writes "1 payment" or "3 payments"; forms gives the singular and,
// when it is not just an added s, the plural.
func plural(n int, forms ...string) string {
	one, many := forms[0], forms[0]+"s"
	if len(forms) > 1 {
		many = forms[1]
	}
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}
