package tui

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"runtime"
	"time"

	"scorewright/generator/budget"
	"scorewright/generator/design"
	"scorewright/generator/num"
	"scorewright/generator/payout"
	"scorewright/generator/safefile"
	"scorewright/generator/table"
	"scorewright/verify"
)

// The engine parts the workbench plugs in by default: the checks of
// package verify, the budget fit of generator/budget and the exports of
// generator/table. Tests replace them through Settings.

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
	case design.ModePayout:
		p, err := payout.New(d.Formula, payout.Options{Outcomes: d.N(), Ordered: d.Ordered, Weights: d.Weights, Params: d.Params})
		if err != nil {
			return nil, err
		}
		rep, err := verify.Audit(ctx, p, nil, vs)
		if err != nil {
			return nil, err
		}
		out := fromVerify(&rep.Report)
		if rep.Gap.Max > 0 {
			out.Notes = append(out.Notes, fmt.Sprintf("largest honesty gap %.4g at belief %s: best report %s",
				rep.Gap.Max, num.Format(rep.Gap.Belief), num.Format(rep.Gap.BestReport)))
		}
		return out, nil
	}
	return nil, fmt.Errorf("this build cannot check %s designs", d.Mode)
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

// budgetFitter is the default Fitter.
func budgetFitter(ctx context.Context, d *design.Design) (*TableView, error) {
	fit, rc, err := fitDesign(ctx, d)
	if err != nil {
		return nil, err
	}
	tb := fit.Table(rc, budget.Info{Title: d.Title, Formula: d.Formula, Preset: d.Preset, Params: d.Params})
	tv := &TableView{Passed: rc.Passed, MinMargin: rc.MinMargin, Pay: fit.Pay, Notes: fit.Notes(rc)}
	tv.Header = append(tv.Header, "report")
	for k := range d.Labels {
		tv.Header = append(tv.Header, tb.ValueHeader(k))
	}
	for i, p := range fit.Menu.Reports {
		row := []string{num.Format(p)}
		for _, v := range fit.Pays[i] {
			row = append(row, tb.Value(v))
		}
		tv.Rows = append(tv.Rows, row)
	}
	return tv, nil
}

// tableExporter writes the fitted table with generator/table.
type tableExporter struct{ version string }

func (tableExporter) Formats() []string { return table.Formats() }

func (te tableExporter) Export(ctx context.Context, d *design.Design, format, path string, overwrite bool) ([]string, error) {
	fit, rc, err := fitDesign(ctx, d)
	if err != nil {
		return nil, err
	}
	if !rc.Passed {
		return nil, fmt.Errorf("the menu re-check failed (smallest margin %.4g), so nothing was written; change the budget or the step", rc.MinMargin)
	}
	tb := fit.Table(rc, budget.Info{Title: d.Title, Formula: d.Formula, Preset: d.Preset, Params: d.Params,
		Version: te.version, Date: time.Now().UTC().Format("2006-01-02")})
	var buf bytes.Buffer
	if err := tb.Write(&buf, format); err != nil {
		return nil, err
	}
	if err := safefile.Write(path, buf.Bytes(), overwrite); err != nil {
		return nil, err
	}
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	return []string{path}, nil
}
