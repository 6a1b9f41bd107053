package lottery

import (
	"context"
	"fmt"
	"math"
	"strings"

	"scorewright/contract/budget"
	"scorewright/contract/table"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
)

// DefaultDraws is how many equally likely numbers a drawable lottery
// draws from: chances are whole thousandths.
const DefaultDraws = 1000

// DrawText states the draw of a lottery whose chances are whole
// multiples of 1/draws.
func DrawText(draws int) string {
	return fmt.Sprintf("Settle each forecast after the outcome is known: draw a whole number from 1 to %d, each equally likely, in a way both parties can verify and record (for example from a published random source agreed in advance); the forecaster wins the prize if the number is at most %d times the chance in the row (a chance of %s wins on 1 to %d).",
		draws, draws, numfmt.Fixed(0.5, decimalsOf(draws)), draws/2)
}

// decimalsOf is log10(draws) for a power of ten, else -1.
func decimalsOf(draws int) int {
	d := 0
	for v := draws; v > 1; v /= 10 {
		if v%10 != 0 {
			return -1
		}
		d++
	}
	return d
}

// Drawable rounds the chances of a converted table to whole multiples of
// 1/draws (nearest; draws a power of ten from 10 to 10^6, 0 meaning
// DefaultDraws), so that the
// draw can be made with a whole number, and states that draw in place of
// the uniform one. The re-check must then be run on the rounded chances
// (RecheckFit, RecheckPoint): rounding can tie two rows.
func Drawable(t *table.Table, draws int) error {
	if t.Kind != KindChance {
		return fmt.Errorf("lottery: the table holds %s, not chances", t.Kind)
	}
	if draws == 0 {
		draws = DefaultDraws
	}
	d := decimalsOf(draws)
	if d < 1 || d > 6 {
		return fmt.Errorf("lottery: %d draws; a power of ten from 10 to 1000000", draws)
	}
	for _, row := range t.Values {
		for k, c := range row {
			row[k] = math.Round(c*float64(draws)) / float64(draws)
		}
	}
	t.Decimals = d
	for i, n := range t.Meta.Notes {
		switch {
		case n == Draw:
			t.Meta.Notes[i] = DrawText(draws)
		case strings.HasPrefix(n, moneyNote):
			t.Meta.Notes[i] = "the notes above speak of the money table; the re-check and the smallest margin are those of the drawable chances"
		}
	}
	t.Meta.Payment += fmt.Sprintf("; chances rounded to the nearest 1/%d so that they can be drawn", draws)
	return nil
}

// RecheckFit re-checks the drawable chances of a table over outcomes made
// from f, exactly as the money table was re-checked (each item against
// every other at the belief that is that item, then a belief grid), and
// writes the result into the table's record.
func RecheckFit(ctx context.Context, f *budget.Fit, t *table.Table) (*budget.Recheck, error) {
	fc := *f
	// The chances are the table now; a clamp's honesty gap speaks of the
	// money rule and was reported with it.
	fc.Pays, fc.Clamp = t.Values, 0
	rc, err := fc.Recheck(ctx, budget.RecheckSettings{})
	if err != nil {
		return nil, err
	}
	record(t, rc.Passed, rc.Verdict(&fc), rc.MinMargin)
	return rc, nil
}

// RecheckPoint is RecheckFit for a point-forecast table made from f.
func RecheckPoint(ctx context.Context, f *budget.PointTable, t *table.Table) (*budget.PointRecheck, error) {
	fc := *f
	fc.Pay, fc.MinPay, fc.MaxPay = t.Values, 0, 1
	rc, err := fc.Recheck(ctx)
	if err != nil {
		return nil, err
	}
	record(t, rc.Passed, rc.Verdict(&fc), rc.MinMargin)
	return rc, nil
}

// record states the re-check of the drawable chances; a failure fails
// the table and warns first, as a failed money re-check does.
func record(t *table.Table, passed bool, verdict string, margin float64) {
	m := &t.Meta
	m.Verdict = "money table: " + m.Verdict + ". Drawable chances, re-checked: " + verdict
	m.MinMargin = num.Float(margin)
	if !passed {
		m.Passed = false
		m.Warnings = append(m.Warnings, "the chances, rounded so that they can be drawn, FAILED the re-check: some forecasters would gain by not reporting their belief. Draw from more numbers, or widen the money table's steps.")
	}
}

// ForFit turns a money table made from f into drawable chances of a
// prize of cap − floor (the bounds that hold every rounded payment),
// whole multiples of 1/draws, and re-checks them.
func ForFit(ctx context.Context, f *budget.Fit, t *table.Table, draws int) (*budget.Recheck, error) {
	lo, hi := Bounds(f)
	if err := convertDrawable(t, lo, hi, draws); err != nil {
		return nil, err
	}
	return RecheckFit(ctx, f, t)
}

// ForPoint is ForFit for a point-forecast table.
func ForPoint(ctx context.Context, f *budget.PointTable, t *table.Table, draws int) (*budget.PointRecheck, error) {
	lo, hi := PointBounds(f)
	if err := convertDrawable(t, lo, hi, draws); err != nil {
		return nil, err
	}
	return RecheckPoint(ctx, f, t)
}

func convertDrawable(t *table.Table, lo, hi float64, draws int) error {
	if err := Convert(t, lo, hi); err != nil {
		return err
	}
	return Drawable(t, draws)
}

// Bounds are the floor and cap a lottery made from f uses.
func Bounds(f *budget.Fit) (lo, hi float64) {
	return math.Min(f.Floor, f.MinPay), math.Max(f.Cap, f.MaxPay)
}

// PointBounds are the floor and cap a lottery made from a point table uses.
func PointBounds(f *budget.PointTable) (lo, hi float64) {
	return math.Min(f.Floor, f.MinPay), math.Max(f.Cap, f.MaxPay)
}
