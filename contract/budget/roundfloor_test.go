package budget

import (
	"errors"
	"math"
	"testing"

	"scorewright/generator/design"
)

// Rounding never takes a payment out of the budget: by brute force over
// small budgets, every payment of the fitted table is a multiple of the
// unit within [floor, cap], and it is the one an independent reference
// picks from the enumerated multiples in that range (the mode's choice
// among all multiples, moved to the nearest admissible one); a budget
// whose range holds no multiple is refused with a *NoRoomError, exactly
// when the enumeration finds none. Derived by hand for the case that was
// wrong: floor 5, unit 10, rounding down paid 0; the smallest multiple of
// 10 at or above 5 is 10.
func TestRoundingStaysWithinTheBudget(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 2)
	m := stepMenu(t, 2, 0.1, 0)
	cases := 0
	for _, unit := range []float64{1, 2, 3, 5, 10} {
		for _, floor := range []float64{0, 3, 5, 7, 12} {
			for span := 1.0; span <= 40; span += 3 {
				for _, mode := range []string{RoundNearest, RoundDown, RoundUp} {
					cap := floor + span
					var admissible []float64 // the multiples of unit in [floor, cap], by enumeration
					for k := 0.0; k*unit <= cap; k++ {
						if k*unit >= floor {
							admissible = append(admissible, k*unit)
						}
					}
					f, err := FitRule(r, m, design.Budget{Floor: floor, Cap: cap, Unit: unit, Rounding: mode})
					var room *NoRoomError
					if len(admissible) == 0 {
						if !errors.As(err, &room) {
							t.Errorf("floor %g cap %g unit %g: no multiple fits, got %v", floor, cap, unit, err)
						}
						continue
					}
					if err != nil {
						t.Fatalf("floor %g cap %g unit %g %s: %v", floor, cap, unit, mode, err)
					}
					cases++
					for i, row := range f.Pays {
						for k, got := range row {
							x := f.Exact(f.Efforts[i][k] + f.Shift)
							if want := referenceRound(x, unit, mode, admissible); got != want {
								t.Errorf("floor %g cap %g unit %g %s: exact %g paid %g, want %g", floor, cap, unit, mode, x, got, want)
							}
						}
					}
					if f.MinPay < floor || f.MaxPay > cap {
						t.Errorf("floor %g cap %g unit %g %s: pays %g..%g", floor, cap, unit, mode, f.MinPay, f.MaxPay)
					}
				}
			}
		}
	}
	if cases < 100 {
		t.Fatalf("only %d budgets fitted", cases)
	}
	f, err := FitRule(r, m, design.Budget{Floor: 5, Cap: 60, Unit: 10, Rounding: RoundDown})
	if err != nil || f.MinPay != 10 {
		t.Errorf("floor 5, unit 10, down: smallest payment %v (%v), want 10", f.MinPay, err)
	}
	if _, err := FitRule(r, m, design.Budget{Floor: 5, Cap: 9, Unit: 10}); err == nil || err.Error() != "budget: rounding: no multiple of the unit 10 lies between the floor 5 and the cap 9; choose a smaller unit or a wider budget" {
		t.Errorf("floor 5, cap 9, unit 10: %v", err)
	}
}

// referenceRound is the payment for exact amount x in [floor, cap]: the
// mode's multiple of unit (an amount within a millionth of a unit of a
// multiple is that multiple, and one within a millionth of a half is a
// half, as Rounder snaps float noise), then the
// nearest admissible multiple when that falls outside the range.
func referenceRound(x, unit float64, mode string, admissible []float64) float64 {
	v := x / unit
	switch w := math.Round(v); {
	case math.Abs(v-w) < 1e-6:
		v = w
	case mode == RoundDown:
		v = math.Floor(v)
	case mode == RoundUp:
		v = math.Ceil(v)
	case math.Abs(v-math.Floor(v)-0.5) < 1e-6:
		v = math.Floor(v) + 1 // a half, float noise and all, away from zero
	default:
		v = math.Round(v)
	}
	lo, hi := admissible[0], admissible[len(admissible)-1]
	return math.Min(math.Max(v*unit, lo), hi)
}
