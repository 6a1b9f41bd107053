package scorewright

import (
	"context"
	"errors"
	"fmt"
	"math"

	"scorewright/contract/budget"
	"scorewright/contract/lottery"
	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/internal/pool"
)

// Errors of Table that callers word in their own terms (flags on the
// command line, fields in the workbench).
var (
	// ErrNoMenu: a rule over outcomes has no report menu (no step, no menu).
	ErrNoMenu = errors.New("the report menu is missing")
	// ErrMeanPayOnInterval: point-forecast tables are fitted to a floor and
	// a cap, not a mean pay.
	ErrMeanPayOnInterval = errors.New("point-forecast tables are fitted to a floor and a cap, not a mean pay")
	// ErrNoCap: a point-forecast table needs a cap above the floor.
	ErrNoCap = errors.New("a point-forecast table needs a cap above the floor")
)

// Table is a rule fitted to its budget on a report menu, rounded and
// re-checked: over outcomes (contract/budget) or for point forecasts on
// an interval (generator/point). One of the two pairs is set.
type Table struct {
	Fit     *budget.Fit
	Recheck *budget.Recheck

	Point        *budget.PointTable
	PointRecheck *budget.PointRecheck
}

// MenuFunc builds the report menu of a rule over n outcomes (from a file,
// say); its errors are returned as they are.
type MenuFunc func(n int) (*budget.Menu, error)

// Table fits the rule to the design's budget on a report menu and
// re-checks the rounded table. For a rule over outcomes the menu is
// menu's, or the budget's step menu when menu is nil; a point-forecast
// menu is always the budget's step in the units of the interval. A
// payout under audit has no table (a *NeedsOutcomesError).
func (r *Rule) Table(ctx context.Context, menu MenuFunc) (*Table, error) {
	return r.TableWith(ctx, menu, TableSettings{})
}

// TableSettings tune TableWith. The zero value means the defaults.
type TableSettings struct {
	// Progress, when set, is told the re-check's beliefs done of the total.
	Progress pool.Progress
	// Workers is how many goroutines the re-check may use; 0 means every
	// core (the workbench keeps one for the screen).
	Workers int
}

// TableWith is Table with settings: the re-check's progress and cores.
// Without menu the budget's menu file is read when it names one, else its
// step's grid is built; the budget's clamp applies to a menu that has
// none of its own.
func (r *Rule) TableWith(ctx context.Context, menu MenuFunc, set TableSettings) (*Table, error) {
	if r.point != nil {
		return r.pointTable(ctx)
	}
	rule, m, err := r.menu(menu)
	if err != nil {
		return nil, err
	}
	b := r.d.Budget
	fit, err := budget.FitRule(rule, m, b)
	if err != nil {
		return nil, err
	}
	rc, err := fit.Recheck(ctx, budget.RecheckSettings{Progress: set.Progress, Workers: set.Workers})
	if err != nil {
		return nil, err
	}
	return &Table{Fit: fit, Recheck: rc}, nil
}

// menu is the rule over outcomes and its report menu, as TableWith
// builds them.
// TableMenu is the menu the rule's payment table is made on, as FitTable
// fits on it: the design's menu file, else its step; the design's clamp
// either way. ErrNoMenu when the budget has neither.
func (r *Rule) TableMenu() (*budget.Menu, error) {
	_, m, err := r.menu(nil)
	return m, err
}

func (r *Rule) menu(menu MenuFunc) (*bregman.Rule, *budget.Menu, error) {
	rule, err := r.OverOutcomes()
	if err != nil {
		return nil, nil, err
	}
	b := r.d.Budget
	var m *budget.Menu
	switch {
	case menu != nil:
		m, err = menu(r.d.N())
	case b.Menu != "":
		m, err = DesignMenu(r.d)
	case !(b.Step > 0):
		return nil, nil, ErrNoMenu
	default:
		m, err = budget.StepMenu(r.d.N(), b.Step, b.ReportFloor)
	}
	if err != nil {
		return nil, nil, err
	}
	if m.Clamp == 0 {
		m.Clamp = b.Clamp
	}
	return rule, m, nil
}

// Propose searches for budgets the menu re-check passes with, one field
// of the design's budget changed (budget.Propose: the coarsest currency
// unit, and for a failing table the smallest cap or mean pay); for a
// point-forecast table the same search over its own re-check.
func (r *Rule) Propose(ctx context.Context, progress pool.Progress) ([]budget.Proposal, error) {
	if r.point != nil {
		b := r.d.Budget
		if err := pointBudget(b); err != nil {
			return nil, err
		}
		passes := func(ctx context.Context, c design.Budget) (float64, bool, error) {
			t, err := r.pointFit(ctx, c)
			if err != nil {
				return 0, false, err
			}
			rc, err := t.Recheck(ctx)
			if err != nil {
				return 0, false, err
			}
			return rc.MinMargin, rc.Passed, nil
		}
		return budget.Search(ctx, b, b.Cap, passes, progress)
	}
	rule, m, err := r.menu(nil)
	if err != nil {
		return nil, err
	}
	return budget.Propose(ctx, rule, m, r.d.Budget, progress)
}

// pointBudget checks that b is a budget a point-forecast table is fitted
// to: a floor and a cap above it.
func pointBudget(b design.Budget) error {
	switch {
	case b.MeanPay != nil:
		return ErrMeanPayOnInterval
	case !(b.Cap > b.Floor):
		return ErrNoCap
	}
	return nil
}

// pointFit is the point-forecast table of budget b.
func (r *Rule) pointFit(ctx context.Context, b design.Budget) (*budget.PointTable, error) {
	t, err := budget.FitPoint(ctx, r.point, budget.PointSpec{Floor: b.Floor, Cap: b.Cap, Step: b.Step, Unit: b.Unit, Rounding: b.Rounding})
	if errors.Is(err, budget.ErrPointUnbounded) {
		return nil, fmt.Errorf("%w; narrow the interval so the effort stays finite", err)
	}
	return t, err
}

func (r *Rule) pointTable(ctx context.Context) (*Table, error) {
	if err := pointBudget(r.d.Budget); err != nil {
		return nil, err
	}
	t, err := r.pointFit(ctx, r.d.Budget)
	if err != nil {
		return nil, err
	}
	rc, err := t.Recheck(ctx)
	if err != nil {
		return nil, err
	}
	return &Table{Point: t, PointRecheck: rc}, nil
}

// Passed reports whether the rounded table passed its re-check.
func (t *Table) Passed() bool {
	if t.Point != nil {
		return t.PointRecheck.Passed
	}
	return t.Recheck.Passed
}

// MinMargin is the re-check's smallest margin.
func (t *Table) MinMargin() float64 {
	if t.Point != nil {
		return t.PointRecheck.MinMargin
	}
	return t.Recheck.MinMargin
}

// Bounds holds every payment in the table: the budget's floor and cap,
// widened to what rounding produced. A lottery is drawn between them.
func (t *Table) Bounds() (lo, hi float64) {
	if t.Point != nil {
		return math.Min(t.Point.Floor, t.Point.MinPay), math.Max(t.Point.Cap, t.Point.MaxPay)
	}
	return math.Min(t.Fit.Floor, t.Fit.MinPay), math.Max(t.Fit.Cap, t.Fit.MaxPay)
}

// Export is the table with its record, as every format writes it;
// version and date are the build's and the day's.
func (r *Rule) Export(t *Table, version, date string) *table.Table {
	d := r.d
	if t.Point != nil {
		tb := t.Point.Export(t.PointRecheck, budget.PointInfo{Title: d.Title, Preset: d.Preset, Params: d.Params, Version: version, Date: date})
		tb.Meta.Currency = d.Contract.Currency
		return tb
	}
	return t.Fit.Table(t.Recheck, r.Info(version, date))
}

// Info is the record of where the design's rule came from, for a table
// over outcomes.
func (r *Rule) Info(version, date string) budget.Info {
	d := r.d
	return budget.Info{Title: d.Title, Formula: d.Formula, FormulaRole: r.FormulaRole(), Preset: d.Preset, Params: d.Params,
		Weights: d.Weights, Ordered: d.Ordered, Version: version, Date: date, Currency: d.Contract.Currency}
}

// Lottery turns tb, the export of t, into drawable chances of winning a
// prize of hi - lo (Bounds), whole multiples of 1/draws, and re-checks
// them; tb's record then holds that re-check. passed is its verdict.
func (t *Table) Lottery(ctx context.Context, tb *table.Table, draws int) (passed bool, err error) {
	if t.Point != nil {
		rc, err := lottery.ForPoint(ctx, t.Point, tb, draws)
		if err != nil {
			return false, err
		}
		return rc.Passed, nil
	}
	rc, err := lottery.ForFit(ctx, t.Fit, tb, draws)
	if err != nil {
		return false, err
	}
	return rc.Passed, nil
}

// PayLine is the fitted pay A - B·effort and the report clamp of a table
// over outcomes, for stating the pay as a closed formula; zeros for a
// point-forecast table, which states its own.
func (t *Table) PayLine() (a, b, clamp float64) {
	if t.Fit == nil {
		return 0, 0, 0
	}
	return t.Fit.A, t.Fit.B, t.Fit.Clamp
}
