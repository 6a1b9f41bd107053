package tui

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"

	"scorewright/contract/annex"
	"scorewright/contract/budget"
	"scorewright/contract/lottery"
	"scorewright/contract/table"
	"scorewright/generator/design"
	"scorewright/generator/payout"
	"scorewright/generator/point"
	"scorewright/internal/num"
	"scorewright/internal/safefile"
	"scorewright/presets"
	"scorewright/verify"
	"scorewright/verify/pointcheck"
)

// The engine parts the workbench plugs in by default: the checks of
// package verify, the budget fit of contract/budget and the exports of
// contract/table. Tests replace them through Settings.

func defaultChecker() Checker                 { return verifyChecker }
func defaultFitter() Fitter                   { return budgetFitter }
func defaultExporter(version string) Exporter { return tableExporter{version: version} }

// workers leaves one core to the screen when there are several.
func workers(s Settings) int {
	if s.Workers > 0 {
		return s.Workers
	}
	return max(1, runtime.GOMAXPROCS(0)-1)
}

// verifyChecker checks a generator design with verify.CheckRule and audits
// a payout design with verify.Audit.
func verifyChecker(ctx context.Context, d *design.Design, s Settings, progress func(done, total int64)) (*CheckReport, error) {
	vs := verify.Settings{Resolution: s.Resolution, Tolerance: s.Tolerance, Workers: workers(s), Progress: progress}
	switch d.Mode {
	case design.ModeGenerator, design.ModeEmphasis:
		r, _, _, err := designRule(d)
		if err != nil {
			return nil, err
		}
		rep, err := verify.CheckRule(ctx, r, vs)
		if err != nil {
			return nil, err
		}
		return fromVerify(rep), nil
	case design.ModePoint:
		c := compileDesign(d)
		if c.err != nil {
			return nil, c.err
		}
		rep, err := pointcheck.CheckGenerator(ctx, c.point, pointSettings(s, progress))
		if err != nil {
			return nil, err
		}
		return fromPoint(rep), nil
	case design.ModePointPayout:
		return auditPointPayout(ctx, d, s, progress)
	case design.ModePayout:
		p, err := payout.New(d.Formula, payout.Options{Outcomes: d.N(), Ordered: d.Ordered, Weights: d.Weights, Params: d.Params})
		if err != nil {
			return nil, err
		}
		rep, err := verify.Audit(ctx, p, auditCandidates(d), vs)
		if err != nil {
			return nil, err
		}
		out := fromVerify(&rep.Report)
		if id := rep.Identified; id != nil {
			out.Notes = append(out.Notes, fmt.Sprintf("identified: pay = %.6g - %.6g × effort of the %s preset%s", id.Shift, id.Scale, id.Preset, id.WithParam()))
		}
		if rep.Gap.Max > 0 {
			if b, r, ok := num.FormatApart(rep.Gap.Belief, rep.Gap.BestReport); ok {
				out.Notes = append(out.Notes, fmt.Sprintf("largest honesty gap %.4g at belief %s: best report %s", rep.Gap.Max, b, r))
			} else {
				out.Notes = append(out.Notes, fmt.Sprintf("largest honesty gap %.4g at belief %s, at a report that cannot be told apart from it (no misreport named)", rep.Gap.Max, b))
			}
		}
		return out, nil
	}
	return nil, fmt.Errorf("this build cannot check %s designs", d.Mode)
}

// pointSettings are the checks pane's grid and tolerance for verify/pointcheck.
func pointSettings(s Settings, progress func(done, total int64)) pointcheck.Settings {
	ps := pointcheck.Settings{Resolution: s.Resolution, Tolerance: s.Tolerance}
	if progress != nil {
		ps.Progress = func(done, total int) { progress(int64(done), int64(total)) }
	}
	return ps
}

// fromPoint is a verify/pointcheck report as the checks pane shows it.
func fromPoint(rep *pointcheck.Report) *CheckReport {
	out := &CheckReport{Verdict: rep.Verdict, Resolution: rep.Grid.Resolution, Points: int64(rep.Grid.Points), Tolerance: rep.Grid.Tolerance, Notes: rep.Notes}
	for _, ck := range rep.Checks {
		row := CheckRow{Name: ck.Name, Passed: ck.Passed, Worst: ck.Worst, Note: ck.What}
		if ck.At != nil {
			row.Report = ck.At.Report
		}
		out.Rows = append(out.Rows, row)
	}
	return out
}

// auditPointPayout audits a point-forecast payout pay(x, y) on the
// design's interval with verify/pointcheck.AuditPayout, as `scorewright audit
// --interval` does: is the mean the best report, the honesty gap and
// where, and the point preset it is a scaled copy of, if any.
func auditPointPayout(ctx context.Context, d *design.Design, s Settings, progress func(done, total int64)) (*CheckReport, error) {
	p, err := pointcheck.NewPayout(d.Formula, d.Params)
	if err != nil {
		return nil, err
	}
	lo, hi := d.Interval[0], d.Interval[1]
	rep, err := pointcheck.AuditPayout(ctx, p, lo, hi, pointSettings(s, progress), pointAuditCandidates(lo, hi))
	if err != nil {
		return nil, err
	}
	out := fromPoint(rep)
	if id := rep.Identified; id != nil {
		if id.OutcomeTerm {
			out.Notes = append(out.Notes, fmt.Sprintf("identified: pay = g(y) - %.6g × D(y, x), preset %s", id.Scale, id.Preset),
				"  (g a term in the outcome alone: it changes no incentive)")
		} else {
			out.Notes = append(out.Notes, fmt.Sprintf("identified: pay = %.6g - %.6g × D(y, x), preset %s", id.Shift, id.Scale, id.Preset))
		}
	}
	if g := rep.Gap; g != nil && rep.Verdict == pointcheck.Improper && g.Max > 0 {
		head := fmt.Sprintf("honesty gap %.4g at a report that cannot be told apart from the mean %.6g (no misreport named),", g.Max, g.Mean)
		if x, m, ok := num.FormatApart([]float64{g.BestReport}, []float64{g.Mean}); ok {
			head = fmt.Sprintf("honesty gap %.4g: best report %s, not the mean %s,", g.Max, strings.Trim(x, "()"), strings.Trim(m, "()"))
		}
		out.Notes = append(out.Notes, head,
			fmt.Sprintf("  for outcomes %s weighted %s", num.Format(g.Outcomes), num.Format(g.Weights)))
	}
	return out, nil
}

// pointAuditCandidates are the point-forecast presets an audited payout
// is compared with, on the design's interval.
func pointAuditCandidates(lo, hi float64) []pointcheck.Candidate {
	var out []pointcheck.Candidate
	for _, g := range presets.PointGenerators(lo, hi) {
		out = append(out, pointcheck.Candidate(g))
	}
	return out
}

func fromVerify(r *verify.Report) *CheckReport {
	out := &CheckReport{Verdict: string(r.Verdict), Resolution: r.Grid.Resolution, Points: int64(r.Grid.Points),
		Tolerance: r.Grid.Tolerance, Notes: r.Notes}
	if r.Grid.Sampled {
		out.Notes = append(out.Notes, "the grid points are a random sample of the lattice")
	}
	for _, c := range r.Checks {
		out.Rows = append(out.Rows, CheckRow{Name: c.Name, Passed: c.Passed, Worst: c.Worst, Belief: c.Belief, Report: c.Report, Note: c.Note})
	}
	return out
}

// fitDesign fits a generator design to its budget on its step menu and
// re-checks the menu.
func fitDesign(ctx context.Context, d *design.Design) (*budget.Fit, *budget.Recheck, error) {
	if d.Mode != design.ModeGenerator && d.Mode != design.ModeEmphasis {
		return nil, nil, fmt.Errorf("the budget fit works on generator and emphasis designs; this one is in %s mode", d.Mode)
	}
	if d.Budget.Step <= 0 {
		return nil, nil, errors.New("set a report menu step (Step) to see the payment table")
	}
	r, _, _, err := designRule(d)
	if err != nil {
		return nil, nil, err
	}
	menu, err := budget.StepMenu(d.N(), d.Budget.Step, d.Budget.ReportFloor)
	if err != nil {
		return nil, nil, err
	}
	fit, err := budget.FitRule(r, menu, d.Budget)
	if err != nil {
		return nil, nil, err
	}
	rc, err := fit.Recheck(ctx, budget.RecheckSettings{})
	if err != nil {
		return nil, nil, err
	}
	return fit, rc, nil
}

// pointTable builds the payment table of a point-forecast design and
// re-checks it (generator/point, exact on the rounded table).
func pointTable(ctx context.Context, d *design.Design) (*point.Table, *point.Recheck, error) {
	c := compileDesign(d)
	if c.err != nil {
		return nil, nil, c.err
	}
	b := d.Budget
	if b.MeanPay != nil {
		return nil, nil, errors.New("point-forecast tables are fitted to a floor and a cap, not a mean pay")
	}
	if !(b.Cap > b.Floor) {
		return nil, nil, errors.New("set a cap above the floor to see the payment table")
	}
	t, err := c.point.BuildTable(ctx, point.TableSpec{Floor: b.Floor, Cap: b.Cap, Step: b.Step, Unit: b.Unit, Rounding: b.Rounding})
	if errors.Is(err, point.ErrUnbounded) {
		return nil, nil, fmt.Errorf("%v; narrow the interval so the effort stays finite", err)
	}
	if err != nil {
		return nil, nil, err
	}
	rc, err := t.Recheck(ctx)
	if err != nil {
		return nil, nil, err
	}
	return t, rc, nil
}

// budgetFitter is the default Fitter.
func budgetFitter(ctx context.Context, d *design.Design) (*TableView, error) {
	if d.Mode == design.ModePoint {
		t, rc, err := pointTable(ctx, d)
		if err != nil {
			return nil, err
		}
		tv := &TableView{Passed: rc.Passed, MinMargin: rc.MinMargin, Notes: append([]string{"re-check: " + rc.Verdict(t)}, t.Notes...)}
		tv.Header = []string{"report \\ outcome"}
		for _, y := range t.Outcomes {
			tv.Header = append(tv.Header, table.FormatNumber(y))
		}
		for i, x := range t.Reports {
			row := []string{table.FormatNumber(x)}
			for _, v := range t.Pay[i] {
				row = append(row, table.FormatNumber(v))
			}
			tv.Rows = append(tv.Rows, row)
		}
		return tv, nil
	}
	fit, rc, err := fitDesign(ctx, d)
	if err != nil {
		return nil, err
	}
	tb := fit.Table(rc, budget.DesignInfo(d, "", ""))
	tv := &TableView{Passed: rc.Passed, MinMargin: rc.MinMargin, Pay: fit.Pay, Notes: fit.Notes(rc)}
	// Column heads are the bare outcome labels, under a first head that
	// says what the cells are: narrow panes keep every column.
	tv.Header = append(tv.Header, "report \\ "+tb.ValueName+" if")
	tv.Header = append(tv.Header, d.Labels...)
	value := tb.Value
	if d.Budget.Unit == 0 {
		// Unrounded pay prints every digit; the preview shows four decimals
		// and says so, the export keeps them all.
		value = func(v float64) string { return strconv.FormatFloat(v, 'f', 4, 64) }
		tv.Notes = append([]string{"preview shows 4 decimals; with no rounding unit the export keeps every digit"}, tv.Notes...)
	}
	for i, p := range fit.Menu.Reports {
		row := []string{num.Format(p)}
		for _, v := range fit.Pays[i] {
			row = append(row, value(v))
		}
		tv.Rows = append(tv.Rows, row)
	}
	return tv, nil
}

// tableExporter writes the fitted table with contract/table, or the
// annex with contract/annex, as `scorewright table` does.
type tableExporter struct{ version string }

// Formats are the table's formats and the annexes, for point tables too.
func (tableExporter) Formats(d *design.Design) []string { return annex.ExportFormats() }

func (te tableExporter) Export(ctx context.Context, d *design.Design, req ExportRequest) ([]string, error) {
	date := time.Now().UTC().Format("2006-01-02")
	var ax *annex.Input
	var drawable func() (bool, error)
	var err error
	if d.Mode == design.ModePoint {
		t, rc, err := pointTable(ctx, d)
		if err != nil {
			return nil, err
		}
		if !rc.Passed {
			return nil, refused(rc.MinMargin)
		}
		tb := t.Export(rc, point.Info{Title: d.Title, Preset: d.Preset, Params: d.Params, Version: te.version, Date: date})
		if ax, err = annex.InputFor(d, tb, nil, 0, 0, 0, te.version); err != nil {
			return nil, err
		}
		drawable = func() (bool, error) {
			lrc, err := lottery.ForPoint(ctx, t, tb, lottery.DefaultDraws)
			return err == nil && lrc.Passed, err
		}
	} else {
		fit, rc, err := fitDesign(ctx, d)
		if err != nil {
			return nil, err
		}
		if !rc.Passed {
			return nil, refused(rc.MinMargin)
		}
		tb := fit.Table(rc, budget.DesignInfo(d, te.version, date))
		if ax, err = annex.InputFor(d, tb, fit.Rule(), fit.A, fit.B, fit.Clamp, te.version); err != nil {
			return nil, err
		}
		drawable = func() (bool, error) {
			lrc, err := lottery.ForFit(ctx, fit, tb, lottery.DefaultDraws)
			return err == nil && lrc.Passed, err
		}
	}
	if req.Lottery {
		// The same lottery as `scorewright table --lottery`: whole
		// thousandths, re-checked.
		ok, err := drawable()
		if err != nil {
			return nil, fmt.Errorf("lottery: %w", err)
		}
		if !ok {
			return nil, fmt.Errorf("the chances, rounded to whole thousandths so they can be drawn, failed the re-check, so nothing was written; widen the menu step")
		}
	}
	var buf bytes.Buffer
	if err = annex.WriteAny(&buf, ax, req.Format); err != nil {
		return nil, err
	}
	return writeExport(req.Path, buf.Bytes(), req.Overwrite)
}

// refused is the error of an export whose table failed its re-check: as
// `scorewright table` does without --force, nothing is written.
func refused(margin float64) error {
	return fmt.Errorf("the menu re-check failed (smallest margin %.4g), so nothing was written; change the budget or the step", margin)
}

// writeExport writes an export atomically and returns its absolute path.
func writeExport(path string, data []byte, overwrite bool) ([]string, error) {
	if err := safefile.Write(path, data, overwrite); err != nil {
		return nil, err
	}
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	return []string{path}, nil
}

// auditCandidates are the generator presets an audited payout is compared
// with, each built as the design would build it.
func auditCandidates(d *design.Design) []verify.Candidate {
	var out []verify.Candidate
	for _, r := range presets.Rules(d.N(), d.Ordered, d.Weights) {
		out = append(out, verify.Candidate(r))
	}
	return out
}
