package budget

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"

	"scorewright/contract/table"
	"scorewright/generator/point"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
)

// PointSpec says how a point-forecast rule (generator/point) is turned into
// a payment table:
// rows are the reports on the menu, columns the outcome values.
type PointSpec struct {
	// Floor and Cap bound every payment in the table. A perfect forecast
	// (D = 0) is paid Cap, the worst cell Floor.
	Floor, Cap float64
	// Step is the spacing of the report menu from Lo; 0 means (Hi-Lo)/20.
	Step float64
	// Columns is the number of outcome values, Lo..Hi evenly; 0 means 11.
	Columns int
	// Unit is the currency rounding unit; 0 means no rounding.
	Unit float64
	// Rounding is "nearest" (default), "down" or "up"; see Rounder.
	Rounding string
}

// PointTable is a point-forecast rule fitted to a budget: Pay[i][j] is what
// report Reports[i] earns when the outcome is Outcomes[j], the rule
// pay = A - B·D(y, x) rounded as the budget says. Between two columns the
// contract pays by linear interpolation. Recheck says what rounding did
// to honesty and Export makes the table.Table every format writes.
type PointTable struct {
	Reports  []float64   `json:"reports"`
	Outcomes []float64   `json:"outcomes"`
	Pay      [][]float64 `json:"pay"`
	A        float64     `json:"A"`
	B        float64     `json:"B"`
	// Floor and Cap are the budget; MinPay and MaxPay the smallest and
	// largest payments in the rounded table.
	Floor, Cap     float64
	MinPay, MaxPay float64
	// Step is the menu spacing.
	Step float64
	// Notes explain how to read the table.
	Notes []string
	gen   *point.Generator
	round Rounder
}

// ErrPointUnbounded is returned when D is infinite or NaN somewhere on the
// table, so no finite budget fits.
var ErrPointUnbounded = errors.New("point: the effort is not finite on the table")

// payCells fills the rounded payments A - B·D of the divergences d, and
// the smallest and largest of them.
func (f *PointTable) payCells(d [][]float64, worst float64) {
	f.Pay = make([][]float64, len(d))
	f.MinPay, f.MaxPay = math.Inf(1), math.Inf(-1)
	for i := range d {
		f.Pay[i] = make([]float64, len(d[i]))
		for j, v := range d[i] {
			// The worst cell pays the floor exactly, whatever the float
			// noise in A - B·worst.
			pay := f.A - f.B*v
			if v == worst {
				pay = f.Floor
			}
			f.Pay[i][j] = f.round.Round(pay)
			f.MinPay, f.MaxPay = math.Min(f.MinPay, f.Pay[i][j]), math.Max(f.MaxPay, f.Pay[i][j])
		}
	}
}

// FitPoint fits the point-forecast rule g to the budget over the menu ×
// outcome grid. It honours ctx between rows.
func FitPoint(ctx context.Context, g *point.Generator, spec PointSpec) (*PointTable, error) {
	if !(spec.Cap > spec.Floor) {
		return nil, fmt.Errorf("point: cap %g must exceed floor %g", spec.Cap, spec.Floor)
	}
	rd, err := NewRounder(spec.Unit, spec.Rounding)
	if err != nil {
		return nil, fmt.Errorf("point: %v", err)
	}
	step := spec.Step
	if step == 0 {
		step = (g.Hi - g.Lo) / 20
	}
	if !(step > 0) {
		return nil, fmt.Errorf("point: menu step %g must be positive", step)
	}
	rows := int(math.Floor((g.Hi-g.Lo)/step*(1+1e-12))) + 1
	if rows > 10000 {
		return nil, fmt.Errorf("point: a step of %g gives %d reports; at most 10000", step, rows)
	}
	cols := spec.Columns
	if cols == 0 {
		cols = 11
	}
	if cols < 2 || cols > 1000 {
		return nil, fmt.Errorf("point: %d outcome columns; need 2..1000", cols)
	}
	f := &PointTable{Reports: make([]float64, rows), Outcomes: make([]float64, cols), Floor: spec.Floor, Cap: spec.Cap, Step: step, gen: g, round: rd}
	for i := range f.Reports {
		f.Reports[i] = math.Min(g.Lo+float64(i)*step, g.Hi)
	}
	for j := range f.Outcomes {
		f.Outcomes[j] = g.Lo + (g.Hi-g.Lo)*float64(j)/float64(cols-1)
	}
	ev := g.NewEvaluator()
	d := make([][]float64, rows)
	var worst float64
	for i, x := range f.Reports {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		d[i] = make([]float64, cols)
		for j, y := range f.Outcomes {
			v := ev.Divergence(y, x)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("%w: D(y = %g, x = %g) = %v", ErrPointUnbounded, y, x, v)
			}
			d[i][j] = v
			worst = math.Max(worst, v)
		}
	}
	if worst == 0 {
		return nil, errors.New("point: the effort is zero everywhere on the table; the generator is affine")
	}
	if rd, err = rd.Within(spec.Floor, spec.Cap); err != nil {
		return nil, fmt.Errorf("point: %w", err)
	}
	f.round = rd
	f.A, f.B = spec.Cap, (spec.Cap-spec.Floor)/worst
	f.payCells(d, worst)
	f.Notes = []string{
		fmt.Sprintf("pay = %.6g - %.6g * D(y, x), D from phi = %s on [%g, %g]", f.A, f.B, g.Source, g.Lo, g.Hi),
		"for an outcome between two columns, pay by linear interpolation between them: the part of the pay that depends on the report is affine in the outcome, so with interpolation the best menu report is still the one nearest the mean in the rule's divergence D(mean, x)",
		pointBinNote,
	}
	if spec.Unit > 0 {
		f.Notes = append(f.Notes, fmt.Sprintf("payments rounded to %g (%s); rounding can make neighbouring reports tie", spec.Unit, rd.Mode()))
	}
	return f, nil
}

const pointBinNote = "paying each column's value for a whole bin instead makes the best report the mean of the binned outcome, which can differ from the mean by up to half a bin"

// PointRecheck is what the rounded table does to honesty. Between columns the
// table pays by linear interpolation, so a forecaster's expected pay for
// report i is sum_j w_j Pay[i][j] for weights w on the columns whose
// mean sum_j w_j y_j is the forecaster's mean; the weights that make a
// menu item look worst are, by linear programming, on at most two
// columns around the mean. The re-check therefore tries, for each item
// x_i and each rival, every point mass and every two-column mixture with
// mean x_i: exact, not a grid search.
type PointRecheck struct {
	// Passed is true when every menu item is the strict best report for
	// every forecaster whose mean is that item.
	Passed bool
	// Margins[i] is the smallest, over such forecasters and rivals, of
	// the expected pay of x_i minus that of the rival; Rivals[i] is the
	// rival that attains it.
	Margins []float64
	Rivals  []int
	// MinMargin is the smallest margin, at item MinItem against MinRival.
	MinMargin         float64
	MinItem, MinRival int
	// Ties and Beaten list the items whose margin is within Tolerance of
	// zero, or below.
	Ties, Beaten []int
	Tolerance    float64
	// Beliefs counts the (item, belief) pairs tried: every point mass and
	// two-column mixture whose mean is the item.
	Beliefs int
}

// maxPointRecheckWork bounds items² × column pairs.
const maxPointRecheckWork = 4e8

// Recheck checks every menu item against every rival on the rounded
// table; it honours ctx between items.
func (f *PointTable) Recheck(ctx context.Context) (*PointRecheck, error) {
	R, C := len(f.Reports), len(f.Outcomes)
	if w := float64(R) * float64(R) * float64(C) * float64(C) / 4; w > maxPointRecheckWork {
		return nil, fmt.Errorf("point: the re-check of %d reports × %d columns is too large (%.3g cell pairs; at most %.3g); take a coarser --step", R, C, w, maxPointRecheckWork)
	}
	rc := &PointRecheck{Margins: make([]float64, R), Rivals: make([]int, R), MinMargin: math.Inf(1), MinItem: -1, MinRival: -1,
		Tolerance: 1e-9 * math.Max(1, math.Max(math.Abs(f.MaxPay), math.Abs(f.MinPay)))}
	diff := make([]float64, C)
	for i, m := range f.Reports {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		rc.Margins[i], rc.Rivals[i] = math.Inf(1), -1
		for k := range f.Reports {
			if k == i {
				continue
			}
			for j := range diff {
				diff[j] = f.Pay[i][j] - f.Pay[k][j]
			}
			v, tried := worstMixture(diff, f.Outcomes, m)
			if rc.Rivals[i] < 0 {
				// The beliefs are the same for every rival: count them once.
				rc.Beliefs += tried
			}
			if v < rc.Margins[i] || rc.Rivals[i] < 0 {
				rc.Margins[i], rc.Rivals[i] = v, k
			}
		}
		switch v := rc.Margins[i]; {
		case math.Abs(v) <= rc.Tolerance:
			rc.Ties = append(rc.Ties, i)
		case v < 0:
			rc.Beaten = append(rc.Beaten, i)
		}
		if rc.Margins[i] < rc.MinMargin {
			rc.MinMargin, rc.MinItem, rc.MinRival = rc.Margins[i], i, rc.Rivals[i]
		}
	}
	rc.Passed = len(rc.Ties) == 0 && len(rc.Beaten) == 0
	return rc, nil
}

// worstMixture is the smallest sum_j w_j diff_j over weights w on at most
// two columns with mean m (ys ascending), a point mass when m is a column;
// tried is how many such weightings there are.
func worstMixture(diff, ys []float64, m float64) (worst float64, tried int) {
	best := math.Inf(1)
	tol := 1e-12 * math.Max(1, math.Abs(m))
	for j, y := range ys {
		if math.Abs(y-m) <= tol {
			best = math.Min(best, diff[j])
			tried++
		}
		if y >= m-tol {
			continue
		}
		for l := len(ys) - 1; l > j && ys[l] > m+tol; l-- {
			t := (m - y) / (ys[l] - y)
			best = math.Min(best, (1-t)*diff[j]+t*diff[l])
			tried++
		}
	}
	return best, tried
}

// Verdict says in one sentence what the re-check found.
func (rc *PointRecheck) Verdict(f *PointTable) string {
	M := len(f.Reports)
	where := ""
	if rc.MinItem >= 0 && rc.MinRival >= 0 {
		xs := distinct(f.Reports)
		where = fmt.Sprintf(" (smallest margin %s at report %s against %s)", numfmt.Margin(rc.MinMargin), xs[rc.MinItem], xs[rc.MinRival])
	}
	scope := "every forecaster whose mean is that report (every point mass and two-column mixture with that mean, pay interpolated between columns; exact), after scaling and rounding"
	if rc.Passed {
		return fmt.Sprintf("each of the %d menu reports is the strict best report for %s%s; tie tolerance %.3g", M, scope, where, rc.Tolerance)
	}
	return fmt.Sprintf("%d of the %d menu reports are not the strict best report for %s (%d tied, %d beaten)%s; tie tolerance %.3g",
		len(rc.Ties)+len(rc.Beaten), M, scope, len(rc.Ties), len(rc.Beaten), where, rc.Tolerance)
}

// PointInfo is what a point table's record needs beyond the fit.
type PointInfo struct {
	Title   string
	Preset  string
	Params  map[string]float64
	Version string
	Date    string
}

// Export builds the export of f with its record: the same metadata block,
// warnings and cautions as a table over outcomes. A failed re-check (or
// none, rc nil) puts a warning first.
func (f *PointTable) Export(rc *PointRecheck, info PointInfo) *table.Table {
	g := f.gen
	ys, xs := distinct(f.Outcomes), distinct(f.Reports)
	lo, hi := ys[0], ys[len(ys)-1]
	labels := make([]string, len(f.Outcomes))
	for j, y := range ys {
		labels[j] = "y = " + y
	}
	reports := make([][]float64, len(f.Reports))
	vals := make([][]float64, len(f.Pay))
	for i, x := range f.Reports {
		reports[i] = []float64{x}
		vals[i] = append([]float64(nil), f.Pay[i]...)
	}
	meta := table.Meta{
		Title: info.Title, Formula: g.Source, Preset: info.Preset, Params: info.Params,
		FormulaRole: fmt.Sprintf("the generator phi(x) of a point forecast of the mean of a quantity in [%s, %s] (concave)", lo, hi),
		Outcomes:    labels,
		Menu:        fmt.Sprintf("point forecasts x from %s to %s in steps of %s (%d reports); outcome columns y from %s to %s (%d)", xs[0], xs[len(xs)-1], short(f.Step), len(f.Reports), lo, hi, len(f.Outcomes)),
		Payment:     fmt.Sprintf("pay(x, y) = A - B·D(y, x), D(y, x) = phi(x) + phi'(x)(y - x) - phi(y) with phi the formula on [%s, %s], rounded as stated; for an outcome between two columns, pay by linear interpolation between them", lo, hi),
		A:           num.Float(f.A), B: num.Float(f.B),
		Budget:   fmt.Sprintf("payments span [%s, %s] over the menu and the outcome columns (before rounding): a perfect forecast pays the cap, the worst cell the floor", table.FormatNumber(f.Floor), table.FormatNumber(f.Cap)),
		Rounding: f.round.Describe(), Unit: num.Float(f.round.Unit()), RoundingMode: f.round.Mode(),
		Floor: num.Float(f.Floor), Cap: num.Float(f.Cap),
		// What the generator's verdict rests on; the command raises it to
		// certified when a certificate proves the generator.
		VerdictKind: table.GridEvidence,
		// The record states A, B, the formula and the rounding in their
		// own lines, so its notes are the ones that say something new.
		Notes: []string{
			"with interpolation, the part of the pay that depends on the report is affine in the outcome, so the best report is the mean of the forecaster's distribution (before rounding) and on the menu the one nearest it in D(mean, x)",
			pointBinNote,
			fmt.Sprintf("buyer's worst case per forecast: %s (the largest payment in the table); the smallest is %s", table.FormatNumber(f.MaxPay), table.FormatNumber(f.MinPay)),
		},
		Version: info.Version, Date: info.Date,
		Cautions: table.Caution(),
	}
	if f.MinPay < f.Floor-1e-9 || f.MaxPay > f.Cap+1e-9 {
		meta.Notes = append(meta.Notes, fmt.Sprintf("rounding takes payments outside the budget: from %s to %s", table.FormatNumber(f.MinPay), table.FormatNumber(f.MaxPay)))
	}
	switch {
	case rc == nil:
		meta.Verdict, meta.MinMargin = "not re-checked", num.Float(math.NaN())
		meta.Warnings = []string{"this table was NOT re-checked after scaling and rounding; do not sign it before it is."}
	default:
		meta.Passed, meta.Verdict, meta.MinMargin = rc.Passed, rc.Verdict(f), num.Float(numfmt.Clean(rc.MinMargin))
		if !rc.Passed {
			meta.Warnings = []string{"this table FAILED the menu re-check after scaling and rounding and was exported only on request (--force): some forecasters would gain by not reporting their mean. Do not sign it as it stands."}
		}
	}
	return &table.Table{
		Kind: table.KindMoney, ValueName: "pay", Decimals: f.round.Decimals(),
		ReportName: "report x", Labels: labels, Reports: reports, Values: vals, Meta: meta,
	}
}

// write re-checks the table and writes its export in format, for callers
// that hold no build version or date (the record then has none).
func (f *PointTable) write(w io.Writer, format string) error {
	rc, err := f.Recheck(context.Background())
	if err != nil {
		return err
	}
	return f.Export(rc, PointInfo{}).Write(w, format)
}

// WriteCSV re-checks the table and writes it as CSV with its record.
// Export(rc, info).Write is the way with a version and date.
func (f *PointTable) WriteCSV(w io.Writer) error { return f.write(w, "csv") }

// WriteMarkdown re-checks the table and writes it as Markdown with its
// record.
func (f *PointTable) WriteMarkdown(w io.Writer) error { return f.write(w, "md") }

// MarshalJSON writes the JSON export (rows and record) rather than the
// bare numbers, so that encoding a Table carries the caution too.
func (f *PointTable) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	if err := f.write(&b, "json"); err != nil {
		return nil, err
	}
	return bytes.TrimSpace(b.Bytes()), nil
}
