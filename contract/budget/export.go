package budget

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"scorewright/contract/table"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
)

// Info is what a table's record needs beyond the fit: where the rule came
// from, which build made the table, and when.
type Info struct {
	Title   string
	Formula string
	// FormulaRole says what the formula is; see table.Meta.
	FormulaRole string
	Preset      string
	Params      map[string]float64
	// Weights and Ordered are the design's outcome weights and order.
	Weights []float64
	Ordered bool
	Version string
	// Currency labels the table's amounts ("" for none).
	Currency string
	// Date is written as given, so tests can fix it.
	Date string
	// Certificate is the statement of an interval certificate run on the
	// rule (verify/certify), and VerdictKind what it proved, in the words
	// the record writes ("certified strictly proper", "certified proper");
	// empty when none was run: the table then records that its verdict is
	// grid evidence.
	Certificate string
	VerdictKind string
}

// listItems names up to five menu items, then says how many more.
func (f *Fit) listItems(items []int) string {
	var parts []string
	for i, it := range items {
		if i == 5 {
			parts = append(parts, fmt.Sprintf("and %d more", len(items)-5))
			break
		}
		parts = append(parts, num.Format(f.Menu.Reports[it]))
	}
	return strings.Join(parts, ", ")
}

// Verdict says in one sentence what the re-check found.
func (rc *Recheck) Verdict(f *Fit) string {
	if rc.MinMarginItem < 0 {
		return "not re-checked"
	}
	M := len(f.Menu.Reports)
	where := ""
	if rc.MinMarginRival >= 0 {
		where = fmt.Sprintf(" (smallest margin %s at item %s against %s)", numfmt.Margin(rc.MinMargin),
			num.Format(f.Menu.Reports[rc.MinMarginItem]), num.Format(f.Menu.Reports[rc.MinMarginRival]))
	}
	if rc.Passed {
		return fmt.Sprintf("each of the %d menu items is the strict best report for a forecaster whose belief is that item, after scaling and rounding%s; each compared with every other item, tie tolerance %.3g",
			M, where, rc.Tolerance)
	}
	var why []string
	if len(rc.Ties) > 0 {
		why = append(why, "tied with another item: "+f.listItems(rc.Ties))
	}
	if len(rc.Beaten) > 0 {
		why = append(why, "beaten by another item: "+f.listItems(rc.Beaten))
	}
	are := "are"
	if len(rc.Ties)+len(rc.Beaten) == 1 {
		are = "is"
	}
	return fmt.Sprintf("%d of the %d menu items %s not the strict best report for a forecaster whose belief is that item, after scaling and rounding (%s)%s; tie tolerance %.3g",
		len(rc.Ties)+len(rc.Beaten), M, are, strings.Join(why, "; "), where, rc.Tolerance)
}

// BudgetDesc says what the fit aimed at.
func (f *Fit) BudgetDesc() string {
	if f.MeanPay != nil {
		return fmt.Sprintf("expected pay of a truthful forecaster at the reference belief %s is %s (before rounding); the largest menu effort pays the floor %s; the fit's largest payment is %s",
			f.referenceText(), table.FormatNumber(*f.MeanPay), table.FormatNumber(f.Floor), table.FormatNumber(f.Cap))
	}
	return fmt.Sprintf("payments span [%s, %s] over the menu and every outcome (before rounding)", table.FormatNumber(f.Floor), table.FormatNumber(f.Cap))
}

// referenceText writes the reference belief of a mean-pay budget.
func (f *Fit) referenceText() string { return num.Format(f.Reference) }

// MenuDesc describes the menu, clamp included.
func (f *Fit) MenuDesc() string {
	d := strings.Replace(f.Menu.Desc, firstOutcome, strconv.Quote(f.Labels[0]), 1)
	if f.Clamp > 0 {
		d += fmt.Sprintf("; clamp %s: each report is paid as if every probability were at least %s, rescaled to sum 1", short(f.Clamp), short(f.Clamp))
	}
	return d
}

// gridCaveat follows every finding that comes from a search over beliefs.
const gridCaveat = "; a grid search: evidence, not proof"

// Notes are the findings a table's record carries besides the verdict.
func (f *Fit) Notes(rc *Recheck) []string {
	tr := f.Truthful
	// The truthful forecaster is paid for the report raised to the floor
	// and clamped (paidReport), so the formula names what is paid.
	formula := "A - B·H(q)"
	switch {
	case f.Clamp > 0 && f.ReportFloor > 0:
		formula = "A - B·Phi(q, q raised to the report floor and clamped)"
	case f.Clamp > 0:
		formula = "A - B·Phi(q, clamped q)"
	case f.ReportFloor > 0:
		formula = "A - B·Phi(q, q raised to the report floor)"
	}
	notes := []string{
		fmt.Sprintf("expected pay of a truthful forecaster under the exact rule, %s before rounding and menu, ranges from %s (belief %s) to %s (belief %s), over %s",
			formula, table.FormatNumber(tr.Min), num.Format(tr.MinBelief), table.FormatNumber(tr.Max), num.Format(tr.MaxBelief), tr.Grid+gridCaveat),
		fmt.Sprintf("buyer's worst case per forecast: %s (the largest payment in the table); the smallest is %s",
			table.FormatNumber(f.MaxPay), table.FormatNumber(f.MinPay)),
	}
	if f.MinPay < f.Floor-1e-9 || (f.MeanPay == nil && f.MaxPay > f.Cap+1e-9) {
		notes = append(notes, fmt.Sprintf("rounding takes payments outside the budget: from %s to %s", table.FormatNumber(f.MinPay), table.FormatNumber(f.MaxPay)))
	}
	if rc != nil {
		mp := rc.MenuPay
		over := "over " + rc.Grid + gridCaveat
		if mp.Exact {
			over = "exactly (expected pay is linear in the belief)"
		}
		notes = append(notes, fmt.Sprintf("expected pay per forecast on this table, for a forecaster who picks the best menu item for the belief, ranges from %s (belief %s) to %s (belief %s), %s",
			table.FormatNumber(mp.Min), num.Format(mp.MinBelief), table.FormatNumber(mp.Max), num.Format(mp.MaxBelief), over))
		if len(rc.NeverChosen) > 0 {
			where := "on the grid (" + rc.Grid + gridCaveat + ")"
			if mp.Exact {
				where = "(exact)"
			}
			items := "menu items are"
			if len(rc.NeverChosen) == 1 {
				items = "menu item is"
			}
			notes = append(notes, fmt.Sprintf("%d %s the unique best report for no belief %s: %s", len(rc.NeverChosen), items, where, f.listItems(rc.NeverChosen)))
		}
		if rc.TiedBeliefs > 0 {
			notes = append(notes, fmt.Sprintf("%d of %d grid beliefs sit where two menu items tie for the best report (cell boundaries)", rc.TiedBeliefs, rc.Beliefs))
		}
		if g := rc.ClampGap; g != nil {
			if g.Max > 0 {
				notes = append(notes, fmt.Sprintf("clamp %s: honesty gap %s (exact currency: the most a forecaster gains by reporting a menu item instead of the belief itself, both paid by the clamped rule) at belief %s, best report %s; over %s",
					short(f.Clamp), table.FormatNumber(g.Max), num.Format(g.Belief), num.Format(g.Best), g.Grid+gridCaveat))
			} else {
				notes = append(notes, fmt.Sprintf("clamp %s: no honesty gap found over %s", short(f.Clamp), g.Grid+gridCaveat))
			}
		}
	}
	return notes
}

// notChecked stands in for a missing re-check: it fails, so that a table
// nobody re-checked says so.
func notChecked() *Recheck {
	return &Recheck{MinMargin: math.NaN(), MinMarginItem: -1, MinMarginRival: -1}
}

// Table builds the payment table of f with its record. A table whose
// re-check failed (or that was not re-checked: rc nil) carries a warning
// in its record, which every format shows before anything else.
func (f *Fit) Table(rc *Recheck, info Info) *table.Table {
	notes := f.Notes(rc)
	checked := rc != nil
	if !checked {
		rc = notChecked()
	}
	rows := make([][]float64, len(f.Menu.Reports))
	vals := make([][]float64, len(f.Pays))
	for i := range rows {
		rows[i] = append([]float64(nil), f.Menu.Reports[i]...)
		vals[i] = append([]float64(nil), f.Pays[i]...)
	}
	payment := "pay(p, k) = A - B·L(p, k), where L(p, k) is the rule's effort for report p when outcome k happens, rounded as stated"
	if f.Clamp > 0 {
		payment += "; L is taken at the clamped report"
	}
	meta := table.Meta{
		Title: info.Title, Formula: info.Formula, FormulaRole: info.FormulaRole, Preset: info.Preset, Params: info.Params,
		Weights: num.Floats(info.Weights), Ordered: info.Ordered,
		Outcomes: append([]string(nil), f.Labels...),
		Menu:     f.MenuDesc(), Payment: payment,
		A: num.Float(f.A), B: num.Float(f.B),
		Budget: f.BudgetDesc(), Rounding: f.RoundingDesc(),
		Unit: num.Float(f.Unit), RoundingMode: f.Rounding, Floor: num.Float(f.Floor), Cap: num.Float(f.Cap),
		Passed: rc.Passed, Verdict: rc.Verdict(f), MinMargin: num.Float(numfmt.Clean(rc.MinMargin)),
		VerdictKind: table.GridEvidence, Certificate: info.Certificate,
		Notes:   notes,
		Version: info.Version, Date: info.Date, Currency: info.Currency,
		Cautions: table.Caution(),
	}
	if info.VerdictKind != "" {
		meta.VerdictKind = info.VerdictKind
	}
	switch {
	case !checked:
		meta.Warnings = []string{"this table was NOT re-checked after scaling and rounding; do not sign it before it is."}
	case !rc.Passed:
		meta.Warnings = []string{"this table FAILED the menu re-check after scaling and rounding and was exported only on request (--force): some forecasters would gain by not reporting their belief. Do not sign it as it stands."}
	}
	return &table.Table{
		Kind: table.KindMoney, ValueName: "pay", Decimals: f.Decimals(),
		Labels: append([]string(nil), f.Labels...), Reports: rows, Values: vals, Meta: meta,
	}
}
