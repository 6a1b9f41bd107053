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

	"scorewright"
	"scorewright/contract/annex"
	"scorewright/contract/budget"
	"scorewright/contract/cost"
	"scorewright/contract/lottery"
	"scorewright/contract/table"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/internal/pool"
	"scorewright/internal/safefile"
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

// verifyChecker checks a rule design and audits a payout design through
// scorewright.Rule.Examine, as `scorewright check` and `audit` do.
func verifyChecker(ctx context.Context, d *design.Design, s Settings, progress pool.Progress) (*CheckReport, error) {
	r, err := scorewright.Open(d)
	if err != nil {
		return nil, err
	}
	// The grid alone: the certificate is a job of its own that starts
	// when this ends (tui/certjob.go), so a slow proof never holds back
	// the grid's verdict, and it sets the verdict's kind for every mode.
	vs := verify.Settings{Resolution: s.Resolution, Tolerance: s.Tolerance, Workers: workers(s), Progress: progress}
	found, err := r.Examine(ctx, vs)
	if err != nil {
		return nil, err
	}
	var out *CheckReport
	switch {
	case found.Rule != nil:
		return fromVerify(found.Rule), nil
	case found.Audit != nil:
		out = fromVerify(&found.Audit.Report)
	default:
		out = fromPoint(found.Point)
	}
	if line := found.IdentifiedLine(); line != "" {
		out.Notes = append(out.Notes, line)
	}
	if line := found.GapLine(); line != "" && found.Audit.Gap.Max > 0 {
		out.Notes = append(out.Notes, line)
	}
	if p := found.Point; p != nil && p.Gap != nil && p.Verdict == verify.Improper && p.Gap.Max > 0 {
		g := p.Gap
		head := fmt.Sprintf("honesty gap %.4g at a report that cannot be told apart from the mean %.6g (no misreport named),", g.Max, g.Mean)
		if x, m, ok := num.FormatApart([]float64{g.BestReport}, []float64{g.Mean}); ok {
			head = fmt.Sprintf("honesty gap %.4g: best report %s, not the mean %s,", g.Max, strings.Trim(x, "()"), strings.Trim(m, "()"))
		}
		out.Notes = append(out.Notes, head,
			fmt.Sprintf("  for outcomes %s weighted %s", num.Format(g.Outcomes), num.Format(g.Weights)))
	}
	return out, nil
}

// fromPoint is a verify/pointcheck report as the checks pane shows it.
func fromPoint(rep *pointcheck.Report) *CheckReport {
	out := &CheckReport{Verdict: string(rep.Verdict), Resolution: rep.Grid.Resolution, Points: int64(rep.Grid.Points), Tolerance: rep.Grid.Tolerance, Notes: rep.Notes}
	for _, ck := range rep.Checks {
		row := CheckRow{Name: ck.Name, Passed: ck.Passed, Worst: pointcheck.Shown(ck), Note: ck.Note}
		if len(ck.Report) > 0 {
			row.Report = ck.Report
		}
		out.Rows = append(out.Rows, row)
	}
	return out
}

func fromVerify(r *verify.Report) *CheckReport {
	out := &CheckReport{Verdict: string(r.Verdict), Resolution: r.Grid.Resolution, Points: int64(r.Grid.Points),
		Sampled: r.Grid.Sampled, Tolerance: r.Grid.Tolerance, Notes: r.Notes}
	for _, c := range r.Checks {
		// The worst value as the command prints it: rounding noise is 0.
		worst := scorewright.CleanWorst(c.Worst, r.Grid)
		out.Rows = append(out.Rows, CheckRow{Name: c.Name, Passed: c.Passed, Worst: worst, Belief: c.Belief, Report: c.Report, Note: c.Note})
	}
	return out
}

// fitTable fits a design to its budget on its menu and re-checks the
// rounded table (scorewright.Rule.Table), in the workbench's words for
// what is missing.
func fitTable(ctx context.Context, d *design.Design, progress pool.Progress) (*scorewright.Rule, *scorewright.Table, error) {
	r, err := scorewright.Open(d)
	if err != nil {
		return nil, nil, err
	}
	// The re-check, like the checks, leaves a core to the screen.
	t, err := r.TableWith(ctx, nil, scorewright.TableSettings{Progress: progress, Workers: workers(Settings{})})
	var ue *budget.UnboundedError
	switch {
	case errors.Is(err, scorewright.ErrNoMenu):
		return nil, nil, errors.New("set a report menu step (Step) or a menu file (Menu) to see the payment table")
	case errors.Is(err, scorewright.ErrNoCap):
		return nil, nil, errors.New("set a cap above the floor to see the payment table")
	case errors.As(err, &ue) && ue.AtZero:
		return nil, nil, fmt.Errorf("the rule's effort is %v at report %s when %q happens: it is unbounded where a report gives an outcome probability 0. "+
			"Two ways out, in this pane: R.floor (e.g. 0.01: every report gives each outcome at least that) or Clamp (e.g. 0.01: reports are paid as if each probability were at least that; it bends honesty near the boundary and the re-check says by how much)",
			ue.Effort, num.Format(ue.Report), ue.Label)
	case err != nil:
		return nil, nil, err
	}
	return r, t, nil
}

// budgetFitter is the default Fitter.
func budgetFitter(ctx context.Context, d *design.Design, progress pool.Progress) (*TableView, error) {
	r, t, err := fitTable(ctx, d, progress)
	var needs *scorewright.NeedsOutcomesError
	if errors.As(err, &needs) {
		// The engine's words name a command; here it is the mode.
		return nil, fmt.Errorf("no payment table in %s mode: a table is fitted from a generator rule or a point forecast; switch the Mode row to fit one", needs.Mode)
	}
	if err != nil {
		return nil, err
	}
	if t.Point != nil {
		return pointTableView(t.Point, t.PointRecheck), nil
	}
	fit, rc := t.Fit, t.Recheck
	tb := fit.Table(rc, r.Info("", ""))
	tv := &TableView{Passed: rc.Passed, MinMargin: rc.MinMargin, Pay: fit.Pay, Notes: fit.Notes(rc)}
	if c, err := cost.Of(tb, cost.SeasonOf(d)); err == nil {
		// What the contract costs comes first: it is what the buyer asks.
		tv.Notes = append([]string{c.Sentence(num.Format(c.Season.BaseRate))}, tv.Notes...)
	}
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
	markRows(tv, rc.Margins, rc.Ties, rc.Beaten)
	return tv, nil
}

// markRows gives each row of tv its re-check margin and marks the rows
// whose report ties with another (TIE) or is beaten by one (BEATEN) for
// the belief that is the report itself.
func markRows(tv *TableView, margins []float64, ties, beaten []int) {
	tv.Marks = make([]string, len(tv.Rows))
	tv.Margins = make([]string, len(tv.Rows))
	// One count of decimals for the column, as the command writes it.
	copy(tv.Margins, numfmt.MarginColumn(margins[:min(len(margins), len(tv.Rows))]))
	for _, i := range ties {
		if i >= 0 && i < len(tv.Marks) {
			tv.Marks[i] = markTie
		}
	}
	for _, i := range beaten {
		if i >= 0 && i < len(tv.Marks) {
			tv.Marks[i] = markBeaten
		}
	}
}

// The marks of rows that fail the re-check.
const (
	markTie    = "TIE"
	markBeaten = "BEATEN"
)

// pointTableView is the preview of a point-forecast table: reports down,
// outcome values across.
func pointTableView(t *budget.PointTable, rc *budget.PointRecheck) *TableView {
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
	markRows(tv, rc.Margins, rc.Ties, rc.Beaten)
	return tv
}

// tableExporter writes the fitted table with contract/table, or the
// annex with contract/annex, as `scorewright table` does.
type tableExporter struct{ version string }

// Formats are the table's formats and the annexes, for point tables too.
func (tableExporter) Formats(d *design.Design) []string { return annex.ExportFormats() }

func (te tableExporter) Export(ctx context.Context, d *design.Design, req ExportRequest) ([]string, error) {
	date := time.Now().UTC().Format("2006-01-02")
	r, t, err := fitTable(ctx, d, nil)
	if err != nil {
		return nil, err
	}
	if !t.Passed() {
		return nil, refused(t.MinMargin())
	}
	tb := r.Export(t, te.version, date)
	if req.Certificate != "" {
		tb.Meta.Certificate = req.Certificate
		if req.VerdictKind != "" {
			tb.Meta.VerdictKind = req.VerdictKind
		}
	}
	var ax *annex.Input
	if t.Point != nil {
		ax = annex.InputForPoint(d, tb, r.Point(), t.Point.A, t.Point.B, te.version)
	} else {
		a, b, clamp := t.PayLine()
		if ax, err = annex.InputFor(d, tb, r.Outcomes(), a, b, clamp, te.version); err != nil {
			return nil, err
		}
	}
	if req.Lottery {
		// The same lottery as `scorewright table --lottery`: whole
		// thousandths, re-checked.
		ok, err := t.Lottery(ctx, tb, lottery.DefaultDraws)
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
	return fmt.Errorf("the menu re-check failed (smallest margin %s), so nothing was written; change the budget or the step", numfmt.Margin(margin))
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
