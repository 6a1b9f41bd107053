// Package lottery turns a bounded payment table into a lottery: instead of
// money, each cell gives the forecaster a chance of winning one fixed
// prize, chance = (pay - floor)/(cap - floor).
//
// The forecaster's expected utility of a lottery over two prizes is
// u(lose) + Pr(win)·(u(win) - u(lose)), which is linear in the chance of
// winning; and the expected chance is an increasing affine function of the
// expected pay, which a proper rule maximises at the truthful report. So
// every expected-utility maximiser who prefers winning reports the belief
// they hold, whatever their attitude to risk (the binarized scoring rule
// of Hossain & Okui 2013, Review of Economic Studies 80:984-1001). Paying
// the floor for certain plus a prize of cap - floor with that chance costs
// the buyer the same in expectation as the money table.
package lottery

import (
	"fmt"
	"math"

	"scorewright/contract/table"
	"scorewright/internal/num"
)

// KindChance marks table values that are chances of winning the prize.
const KindChance table.Kind = "chance of the prize"

// Why is the line every lottery export carries to explain itself.
const Why = "Why truthful reporting is best: expected utility of a lottery with one prize is u(no prize) + Pr(win)·(u(prize) - u(no prize)), linear in the chance of winning, and the expected chance is an increasing affine function of the rule's expected pay, which is largest at the truthful report; so any expected-utility maximiser who prefers the prize reports their belief, whatever their attitude to risk (Hossain & Okui 2013, Review of Economic Studies 80:984-1001). This does not hold for someone who weights probabilities non-linearly."

// Caution is the extra caution line of a lottery export.
const Caution = "Lottery-style payments (a chance of winning a prize) may be regulated as gambling, a lottery or a prize draw in some places; check before using them."

// Draw says how the chance should be settled.
const Draw = "Settle each forecast with a uniform random number U in [0, 1) drawn after the outcome is known and recorded so both parties can verify it: the prize is won when U < chance."

// Chance is (pay - floor)/(cap - floor). It fails when cap <= floor or
// pay is outside [floor, cap] (beyond a relative slack of 1e-9 for
// floating-point noise, within which it is taken as the bound) or not
// finite.
func Chance(pay, floor, cap float64) (float64, error) {
	if !(cap > floor) || math.IsInf(cap-floor, 0) {
		return 0, fmt.Errorf("lottery: cap %g must be finite and above floor %g", cap, floor)
	}
	c := (pay - floor) / (cap - floor)
	if !(c >= -slack && c <= 1+slack) {
		return 0, fmt.Errorf("lottery: payment %g is outside [%g, %g]; only a bounded table becomes a lottery", pay, floor, cap)
	}
	return math.Min(math.Max(c, 0), 1), nil
}

// chanceDecimals is how many decimals chances are written with: the
// fewest (at most 12) that show every chance of the table exactly, up to
// the binary noise of the division (so 0.9974999999999999 reads 0.9975).
// An unrounded money table keeps the shortest exact form of each value.
func chanceDecimals(moneyDecimals int, vals [][]float64) int {
	if moneyDecimals < 0 {
		return -1
	}
	for d := 0; d < 12; d++ {
		scale := math.Pow(10, float64(d))
		fits := true
		for _, row := range vals {
			for _, v := range row {
				if math.Abs(math.Round(v*scale)/scale-v) > 1e-12 {
					fits = false
				}
			}
		}
		if fits {
			return d
		}
	}
	return 12
}

// moneyNote opens the note that says the record speaks of money.
const moneyNote = "the re-check and the notes above speak of the money table"

// slack is how far outside [floor, cap], relative to cap - floor, a
// payment may lie from floating-point noise and still count as the bound.
const slack = 1e-9

// Convert rewrites a money table in place as chances of winning a prize of
// cap - floor, and adds the explanation, the settling rule and the caution
// to its record. The table's margins are rescaled the same way. Every
// payment must lie in [floor, cap].
func Convert(t *table.Table, floor, cap float64) error {
	if t.Kind != table.KindMoney {
		return fmt.Errorf("lottery: the table holds %s, not money", t.Kind)
	}
	vals := make([][]float64, len(t.Values))
	for i, row := range t.Values {
		vals[i] = make([]float64, len(row))
		for k, v := range row {
			c, err := Chance(v, floor, cap)
			if err != nil {
				return fmt.Errorf("%w (row %d, outcome %q)", err, i+1, t.Labels[k])
			}
			vals[i][k] = c
		}
	}
	prize := cap - floor
	t.Values, t.Kind, t.ValueName, t.Decimals = vals, KindChance, "chance", chanceDecimals(t.Decimals, vals)
	m := &t.Meta
	m.Payment = fmt.Sprintf("chance of winning a prize of %s = (pay - %s)/%s, with %s; paying %s for certain plus the prize with that chance costs the buyer the same in expectation as the money table",
		table.FormatNumber(prize), table.FormatNumber(floor), table.FormatNumber(prize), m.Payment, table.FormatNumber(floor))
	m.MinMargin = num.Float(float64(m.MinMargin) / prize)
	m.Notes = append(m.Notes,
		fmt.Sprintf("%s; in chances every margin is the money margin divided by the prize %s", moneyNote, table.FormatNumber(prize)),
		Why, Draw)
	m.Cautions = append(m.Cautions, Caution)
	return nil
}
