package main

// Point forecasts of a mean in every command that takes a rule: the check,
// audit, table and eval commands call these when the design is in point
// mode (--interval LO,HI).

import (
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"scorewright"
	"scorewright/contract/annex"
	"scorewright/contract/budget"
	"scorewright/contract/table"
	"scorewright/generator/design"
	"scorewright/generator/point"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/internal/textcol"
	"scorewright/presets"
	"scorewright/verify"
	"scorewright/verify/certify"
	"scorewright/verify/pointcheck"
)

// applyPointPreset fills a point design from a point-forecast preset; an
// empty name leaves the design alone.
func applyPointPreset(d *design.Design, name string) error {
	if name == "" {
		return nil
	}
	p, err := presets.Lookup(name)
	if err != nil {
		return usagef("--preset: %v", err)
	}
	if p.Kind != presets.KindPoint {
		return usagef("preset %q is a %s preset; with --interval use a point-forecast preset (%s)", name, p.Kind, strings.Join(pointPresetNames(), ", "))
	}
	d.Preset, d.Formula = name, p.Formula
	return nil
}

func pointPresetNames() []string {
	var names []string
	for _, p := range presets.All() {
		if p.Kind == presets.KindPoint {
			names = append(names, p.Name)
		}
	}
	return names
}

// parseOutcomeDistribution reads "y1,y2,..." (equally likely) or
// "y1:w1,y2:w2,..." (weights summing to 1).
func parseOutcomeDistribution(s string) (ys, ws []float64, err error) {
	parts := strings.Split(s, ",")
	weighted := strings.Contains(s, ":")
	for i, p := range parts {
		yv, wv, hasW := strings.Cut(strings.TrimSpace(p), ":")
		if hasW != weighted {
			return nil, nil, fmt.Errorf("entry %d: give weights for every outcome (y:w) or for none", i+1)
		}
		y, err := strconv.ParseFloat(strings.TrimSpace(yv), 64)
		if err != nil || math.IsNaN(y) || math.IsInf(y, 0) {
			return nil, nil, fmt.Errorf("entry %d: %q is not a finite number", i+1, yv)
		}
		w := 1 / float64(len(parts))
		if hasW {
			if w, err = strconv.ParseFloat(strings.TrimSpace(wv), 64); err != nil || !(w >= 0 && w <= 1) {
				return nil, nil, fmt.Errorf("entry %d: weight %q is not a number in [0, 1]", i+1, wv)
			}
		}
		ys, ws = append(ys, y), append(ws, w)
	}
	if err := num.CheckDistribution(ws, num.SimplexTolerance); err != nil {
		return nil, nil, fmt.Errorf("weights: %v", err)
	}
	return ys, ws, nil
}

type pointEvalJSON struct {
	Interval         []float64   `json:"interval"`
	Report           []num.Float `json:"report"`
	Entropy          num.Float   `json:"entropy"`
	Derivative       num.Float   `json:"derivative"`
	SecondDerivative num.Float   `json:"second_derivative"`
	Outcomes         []num.Float `json:"outcomes,omitempty"`
	Weights          []num.Float `json:"weights,omitempty"`
	Effort           []num.Float `json:"effort,omitempty"`
	Expected         *num.Float  `json:"expected_effort,omitempty"`
	Mean             *num.Float  `json:"mean,omitempty"`
	AtMean           *num.Float  `json:"expected_effort_at_mean,omitempty"`
	Notes            []string    `json:"notes,omitempty"`
}

// runEvalPoint is eval for a point design: phi and its derivatives at the
// report x, and with --belief y1,y2,... (or y:w pairs) the effort
// D(y, x) of each outcome, the expected effort and that of the mean.
func runEvalPoint(e *env, g *point.Generator, report, belief string, asJSON bool) error {
	if report == "" {
		return usagef("--report X is required (the point forecast)")
	}
	x, err := strconv.ParseFloat(strings.TrimSpace(report), 64)
	if err != nil {
		return usagef("--report: %q is not a number; a point forecast is one number", report)
	}
	if x < g.Lo || x > g.Hi {
		return usagef("--report %g is outside the interval [%g, %g]", x, g.Lo, g.Hi)
	}
	ev := g.NewEvaluator()
	phi, d1, d2 := ev.Derivatives(x)
	out := pointEvalJSON{Interval: []float64{g.Lo, g.Hi}, Report: num.Floats([]float64{x}), Entropy: num.Float(phi), Derivative: num.Float(d1), SecondDerivative: num.Float(d2)}
	if belief != "" {
		ys, ws, err := parseOutcomeDistribution(belief)
		if err != nil {
			return usagef("--belief: %v", err)
		}
		for _, y := range ys {
			if y < g.Lo || y > g.Hi {
				return usagef("--belief: outcome %g is outside the interval [%g, %g]", y, g.Lo, g.Hi)
			}
			out.Effort = append(out.Effort, num.Float(ev.Divergence(y, x)))
		}
		m := point.Mean(ys, ws)
		ex, mf, am := num.Float(ev.Expected(x, ys, ws)), num.Float(m), num.Float(ev.Expected(m, ys, ws))
		out.Outcomes, out.Weights, out.Expected, out.Mean, out.AtMean = num.Floats(ys), num.Floats(ws), &ex, &mf, &am
	}
	if d2 > 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("phi''(%g) = %g > 0: phi is not concave here, so the mean need not be the best report", x, d2))
	}
	for _, v := range append([]num.Float{out.Entropy, out.Derivative}, out.Effort...) {
		if f := float64(v); math.IsNaN(f) || math.IsInf(f, 0) {
			out.Notes = append(out.Notes, fmt.Sprintf("a value is %v at report %g; the rule is not finite there", f, x))
			break
		}
	}
	if asJSON {
		return writeJSON(e.stdout, out)
	}
	tw := textcol.NewWriter(e.stdout, 0)
	fmt.Fprintf(tw, "report x\t%.10g (interval [%g, %g])\n", x, g.Lo, g.Hi)
	fmt.Fprintf(tw, "phi(x), phi'(x), phi''(x)\t%.10g, %.10g, %.10g\n", phi, d1, d2)
	for j, y := range out.Outcomes {
		fmt.Fprintf(tw, "effort D(%g, x)\t%.10g (weight %.4g)\n", float64(y), float64(out.Effort[j]), float64(out.Weights[j]))
	}
	if out.Expected != nil {
		fmt.Fprintf(tw, "expected effort\t%.10g\n", float64(*out.Expected))
		fmt.Fprintf(tw, "mean of the belief\t%.10g, expected effort there %.10g\n", float64(*out.Mean), float64(*out.AtMean))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, n := range out.Notes {
		fmt.Fprintln(e.stdout, "note:", n)
	}
	return nil
}

// addPointAuditFlag registers audit's --interval, which makes the audited
// payout a point-forecast payout pay(x, y).
func addPointAuditFlag(fs *flag.FlagSet) *string {
	return fs.String("interval", "", "audit a point-forecast payout pay(x, y) on [LO, HI] (x the report, y the outcome) instead of --outcomes")
}

// pointPayoutDesign is the design audit builds from --interval "LO,HI"
// and --payout.
func pointPayoutDesign(payout, interval string, params map[string]float64) (*design.Design, error) {
	iv, err := num.ParseVector(interval)
	if err != nil || len(iv) != 2 || !(iv[0] < iv[1]) || math.IsInf(iv[0], 0) || math.IsInf(iv[1], 0) {
		return nil, usagef("--interval wants LO,HI with LO < HI, got %q", interval)
	}
	if payout == "" {
		return nil, usagef("--payout EXPR in x (the report) and y (the outcome) is required")
	}
	return &design.Design{Version: design.SchemaVersion, Mode: design.ModePointPayout, Interval: iv, Formula: payout, Params: params}, nil
}

type pointCheckJSON struct {
	Verdict verify.Verdict `json:"verdict"`
	// Kind is the verdict's kind: certified when it rests on the
	// certificate, under Certificate; Basis says which of the two it rests
	// on when the grid and the certificate disagree (scorewright.Standing).
	Kind       certify.Kind        `json:"kind"`
	Basis      string              `json:"basis,omitempty"`
	Grid       pointGridJSON       `json:"grid"`
	Checks     []pointCheckOut     `json:"checks"`
	Gap        *pointGapOut        `json:"gap,omitempty"`
	Identified *pointIdentifiedOut `json:"identified,omitempty"`
	Notes      []string            `json:"notes,omitempty"`
	// Certificate is what --certify proved about a point generator.
	Certificate *certificateJSON `json:"certificate,omitempty"`
}

type pointGridJSON struct {
	Resolution int     `json:"resolution"`
	Points     int     `json:"points"`
	Tolerance  float64 `json:"tolerance"`
	Lo         float64 `json:"lo"`
	Hi         float64 `json:"hi"`
}

type pointCheckOut struct {
	Name   string      `json:"name"`
	Passed bool        `json:"passed"`
	Worst  num.Float   `json:"worst"`
	At     *pointAtOut `json:"at,omitempty"`
	What   string      `json:"what"`
}

// pointAtOut is where a point check found its worst value: the
// forecaster's outcomes and their weights, and the report.
type pointAtOut struct {
	Outcomes []float64 `json:"outcomes,omitempty"`
	Weights  []float64 `json:"weights,omitempty"`
	Report   []float64 `json:"report,omitempty"`
}

// pointAt is the place a point check located its worst value at, nil
// for a check that locates none.
func pointAt(c verify.CheckResult) *pointAtOut {
	if c.Report == nil {
		return nil
	}
	return &pointAtOut{c.Outcomes, c.Belief, c.Report}
}

type pointIdentifiedOut struct {
	Preset      string  `json:"preset"`
	Scale       float64 `json:"scale"`
	Shift       float64 `json:"shift"`
	OutcomeTerm bool    `json:"outcome_term,omitempty"`
}

type pointGapOut struct {
	Max        num.Float `json:"max"`
	Outcomes   []float64 `json:"outcomes"`
	Weights    []float64 `json:"weights"`
	Mean       num.Float `json:"mean"`
	BestReport num.Float `json:"best_report"`
	Precision  string    `json:"precision,omitempty"`
}

// printPointReport prints a point check's report and, when --certify
// ran, the certificate under it; errFailed when a check failed or the
// certificate proved the rule improper.
func printPointReport(e *env, rep *pointcheck.Report, asJSON bool, cert *certificateJSON, improper bool) error {
	st := standing(rep.Verdict, cert)
	if asJSON {
		g := rep.Grid
		out := pointCheckJSON{Verdict: st.Verdict, Kind: st.Kind, Basis: st.Basis, Grid: pointGridJSON{g.Resolution, g.Points, g.Tolerance, g.Lo, g.Hi}, Notes: rep.Notes, Certificate: cert}
		if id := rep.Identified; id != nil {
			out.Identified = &pointIdentifiedOut{id.Preset, id.Scale, id.Shift, id.OutcomeTerm}
		}
		for _, c := range rep.Checks {
			out.Checks = append(out.Checks, pointCheckOut{c.Name, c.Passed, num.Float(c.Worst), pointAt(c), c.Note})
		}
		if g := rep.Gap; g != nil {
			out.Gap = &pointGapOut{num.Float(g.Max), g.Outcomes, g.Weights, num.Float(g.Mean), num.Float(g.BestReport), g.Precision}
		}
		if err := writeJSON(e.stdout, out); err != nil {
			return err
		}
	} else {
		fmt.Fprintf(e.stdout, "verdict: %s\n", st.Words())
		fmt.Fprintf(e.stdout, "grid: [%g, %g], resolution %d (%d reports), tolerance %g\n", rep.Grid.Lo, rep.Grid.Hi, rep.Grid.Resolution, rep.Grid.Points, rep.Grid.Tolerance)
		tw := textcol.NewWriter(e.stdout, 0)
		for _, c := range rep.Checks {
			mark := "pass"
			if !c.Passed {
				mark = "FAIL"
			}
			at := ""
			if len(c.Report) > 0 {
				at = fmt.Sprintf("at report %.6g", c.Report[0])
				if len(c.Outcomes) > 0 {
					at += ", outcomes " + num.Format(c.Outcomes)
				}
				if len(c.Belief) > 0 {
					at += " weighted " + num.Format(c.Belief)
				}
			}
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", mark, c.Name, numfmt.Effort(pointcheck.Shown(c)), at)
			fmt.Fprintf(tw, "\t\t\t  (%s)\n", c.Note)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
		if line := (&scorewright.Findings{Point: rep}).IdentifiedLine(); line != "" {
			fmt.Fprintln(e.stdout, line)
		}
		for _, n := range rep.Notes {
			fmt.Fprintln(e.stdout, "note:", n)
		}
		printCertificate(e.stdout, cert)
	}
	if rep.Failed() || improper {
		return errFailed
	}
	return nil
}

// writePointTable exports the table of a point design (the menu of
// reports against outcome columns) and prints its summary, like any other
// table.
func writePointTable(e *env, d *design.Design, t *scorewright.Table, tb *table.Table, format string, tf *tableFlags, g *point.Generator) error {
	fit, rc := t.Point, t.PointRecheck
	ax := annex.InputForPoint(d, tb, g, fit.A, fit.B, version)
	var err error
	sum := newPointTableSummary(fit, rc, tb, format, tf.out)
	if tf.lottery {
		if sum.Lottery, err = lotteryTable(tb, t, tf.draws); err != nil {
			return err
		}
		sum.Caution = tb.Meta.Cautions
	}
	return exportTable(e, ax, format, tf, rc.Passed && tb.Meta.Passed, &sum.Output, sum, func() error {
		return printPointTableSummary(e.stdout, fit, rc, sum)
	})
}

// pointTableSummary is what table --json prints for a point design; the
// names follow the summary of a table over outcomes.
type pointTableSummary struct {
	Interval []num.Float `json:"interval"`
	Menu     menuJSON    `json:"menu"`
	Columns  []num.Float `json:"outcome_columns"`
	fitJSON
	Recheck pointRecheckJSON `json:"recheck"`
	exportJSON
}

type pointRecheckJSON struct {
	recheckCore
	Grid recheckGridJSON `json:"grid"`
}

func newPointTableSummary(f *budget.PointTable, rc *budget.PointRecheck, tb *table.Table, format, out string) *pointTableSummary {
	rep := func(i int) []num.Float {
		if i < 0 {
			return nil
		}
		return num.Floats([]float64{f.Reports[i]})
	}
	reps := func(idx []int) [][]num.Float {
		out := [][]num.Float{}
		for _, i := range idx {
			out = append(out, rep(i))
		}
		return out
	}
	last := len(f.Reports) - 1
	s := &pointTableSummary{
		Interval: num.Floats([]float64{f.Reports[0], f.Outcomes[len(f.Outcomes)-1]}),
		Menu:     menuJSON{Desc: tb.Meta.Menu, Items: len(f.Reports), First: rep(0), Last: rep(last)},
		Columns:  num.Floats(f.Outcomes),
		fitJSON:  newFitJSON(&tb.Meta, f.MinPay, f.MaxPay),
		Recheck: pointRecheckJSON{recheckCore: recheckCore{Passed: rc.Passed, Verdict: rc.Verdict(f), MinMargin: num.Float(rc.MinMargin),
			At: rep(rc.MinItem), Rival: rep(rc.MinRival), Ties: reps(rc.Ties), Beaten: reps(rc.Beaten)},
			Grid: recheckGridJSON{Desc: "exact: for each menu report, every point mass and two-column mixture of the outcome columns with that mean", Points: rc.Beliefs, Tolerance: num.Float(rc.Tolerance)}},
		exportJSON: exportJSON{Output: tableOutput{Format: format, File: out}, Notes: tb.Meta.Notes, Caution: tb.Meta.Cautions},
	}
	for i := range f.Reports {
		s.Margins = append(s.Margins, marginJSON{Report: rep(i), Margin: num.Float(rc.Margins[i]), Rival: rep(rc.Rivals[i])})
	}
	return s
}

// printPointTableSummary writes the fit and the re-check of a point table
// for a person: the failing reports, or all of them when the menu is
// short.
func printPointTableSummary(w io.Writer, f *budget.PointTable, rc *budget.PointRecheck, s *pointTableSummary) error {
	head := summaryHead{
		menu:     s.Menu.Desc,
		payment:  fmt.Sprintf("pay = A - B·D(y, x), A = %s, B = %s", table.FormatNumber(f.A), table.FormatNumber(f.B)),
		budget:   fmt.Sprintf("payments span [%s, %s] over the menu and the outcome columns (before rounding)", table.FormatNumber(f.Floor), table.FormatNumber(f.Cap)),
		rounding: s.Rounding,
		passed:   rc.Passed, margin: rc.MinMargin,
		verdict: s.Recheck.Verdict, notes: s.Notes, lottery: s.Lottery,
	}
	if err := head.print(w); err != nil {
		return err
	}
	var rows []int
	for i, m := range rc.Margins {
		if len(f.Reports) <= maxItemRows || !(m > rc.Tolerance) {
			rows = append(rows, i)
		}
	}
	if len(rows) > 0 {
		fmt.Fprintln(w)
		tw := textcol.NewWriter(w, 0)
		fmt.Fprintf(tw, "report x\tmargin\t\tclosest rival\n")
		rows = rows[:min(len(rows), maxItemRows)]
		shown := make([]float64, len(rows))
		for j, i := range rows {
			shown[j] = rc.Margins[i]
		}
		margins := numfmt.MarginColumn(shown)
		for j, i := range rows {
			mark := marginMark(rc.Margins[i], rc.Tolerance)
			rival := "-"
			if r := rc.Rivals[i]; r >= 0 {
				rival = table.FormatNumber(f.Reports[r])
			}
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", table.FormatNumber(f.Reports[i]), margins[j], mark, rival)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
		if len(rows) > maxItemRows {
			fmt.Fprintf(w, "... and %d more reports (--json lists them all)\n", len(rows)-maxItemRows)
		}
	}
	if s.Output.Written {
		fmt.Fprintf(w, "wrote %s (%s)\n", s.Output.File, s.Output.Format)
	}
	return nil
}
