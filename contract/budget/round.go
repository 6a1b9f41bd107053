package budget

import (
	"fmt"
	"math"
)

// Rounding modes for currency.
const (
	// RoundNearest rounds to the nearest unit, halves away from zero.
	RoundNearest = "nearest"
	// RoundDown rounds toward minus infinity (never pays more than exact).
	RoundDown = "down"
	// RoundUp rounds toward plus infinity (never pays less than exact).
	RoundUp = "up"
)

// snapUnits is how close, in units, an amount must be to a whole number
// of units to count as that number. Pay is computed in binary floating
// point, so 100 - 100·0.3² comes out as 90.99999999999999; rounding it
// "down" to 90 would pay a unit less than the contract's arithmetic says.
// 1e-6 of a unit is far below any amount a contract distinguishes and far
// above float noise.
const snapUnits = 1e-6

// Rounder rounds amounts to a currency unit in a stated mode. Every table
// that pays money (categorical or point forecasts) rounds through it, so
// that the snapping and decimal rules below hold everywhere.
type Rounder struct {
	unit float64
	mode string
	// pow10 is 10^d for the d decimals that write every multiple of the
	// unit, or 0 when there are none; amounts are snapped to d decimals
	// so that k·0.3 reads back as the decimal it is (0.9, not
	// 0.8999999999999999).
	pow10 float64
	// bounded says lo and hi are set (Within): the multiples of the unit
	// that lie in the budget's [floor, cap], which an amount in that range
	// is never rounded out of.
	bounded bool
	lo, hi  float64
	// floor and cap are the range Within was given, for Describe.
	floor, cap float64
}

// NewRounder returns a Rounder for unit (0: no rounding) and mode ("" is
// nearest); a bad mode or unit is an error naming it.
func NewRounder(unit float64, mode string) (Rounder, error) {
	if mode == "" {
		mode = RoundNearest
	}
	switch mode {
	case RoundNearest, RoundDown, RoundUp:
	default:
		return Rounder{}, fmt.Errorf("rounding: %q is not one of %q, %q, %q", mode, RoundNearest, RoundDown, RoundUp)
	}
	if math.IsNaN(unit) || math.IsInf(unit, 0) || unit < 0 {
		return Rounder{}, fmt.Errorf("rounding: unit %g must be a positive number (or 0 for none)", unit)
	}
	r := Rounder{unit: unit, mode: mode}
	if d := r.Decimals(); d >= 0 {
		r.pow10 = math.Pow(10, float64(d))
	}
	return r, nil
}

// NoRoomError is a budget whose [floor, cap] holds no multiple of the
// rounding unit: every rounded payment would fall outside it.
type NoRoomError struct{ Unit, Floor, Cap float64 }

func (e *NoRoomError) Error() string {
	return fmt.Sprintf("rounding: no multiple of the unit %s lies between the floor %s and the cap %s; choose a smaller unit or a wider budget",
		short(e.Unit), short(e.Floor), short(e.Cap))
}

// Within returns r bounded to [floor, cap]: an amount in that range is
// rounded in r's mode, but never out of it; where the mode would take it
// below the floor (5 rounded down to a unit of 10 is 0) it is paid the
// smallest multiple of the unit at or above the floor (10), and where it
// would take it above the cap, the largest multiple at or below the cap.
// A contract promises the floor and the cap; rounding is not allowed to
// break either. Amounts outside [floor, cap] (an off-menu report) are
// rounded as before. A range holding no multiple of the unit is a
// *NoRoomError. With no rounding (unit 0) r is returned as it is.
func (r Rounder) Within(floor, cap float64) (Rounder, error) {
	if r.unit == 0 {
		return r, nil
	}
	up, down := r, r
	up.mode, down.mode = RoundUp, RoundDown
	lo, hi := up.Round(floor), down.Round(cap)
	if lo > hi {
		return Rounder{}, &NoRoomError{Unit: r.unit, Floor: floor, Cap: cap}
	}
	r.bounded, r.lo, r.hi, r.floor, r.cap = true, lo, hi, floor, cap
	return r, nil
}

// Round returns x rounded to the unit in the rounder's mode, kept within
// the bounds of Within; with unit 0 it returns x.
func (r Rounder) Round(x float64) float64 {
	if r.unit == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return x
	}
	v := r.round(x)
	switch {
	case !r.bounded:
	case v < r.lo && x >= r.floor:
		v = r.lo
	case v > r.hi && x <= r.cap:
		v = r.hi
	}
	return v
}

// round is Round without the bounds.
func (r Rounder) round(x float64) float64 {
	v := x / r.unit
	if w := math.Round(v); math.Abs(v-w) < snapUnits {
		v = w
	} else {
		switch r.mode {
		case RoundDown:
			v = math.Floor(v)
		case RoundUp:
			v = math.Ceil(v)
		default:
			// Halves away from zero, a half blurred by float noise
			// included.
			if h := math.Floor(v) + 0.5; math.Abs(v-h) < snapUnits {
				v = h
			}
			v = math.Round(v)
		}
	}
	amount := v * r.unit
	if r.pow10 > 0 {
		// Division by a power of ten gives the float nearest the decimal.
		amount = math.Round(amount*r.pow10) / r.pow10
	}
	return amount
}

// Decimals is the number of decimals that writes every multiple of the
// unit exactly (0.05 -> 2, 1 -> 0, 0.125 -> 3), or -1 when there is no
// rounding or the unit has no short decimal form.
func (r Rounder) Decimals() int {
	if r.unit == 0 {
		return -1
	}
	for d := 0; d <= 9; d++ {
		s := r.unit * math.Pow(10, float64(d))
		if math.Abs(s-math.Round(s)) < 1e-9*math.Max(1, s) {
			return d
		}
	}
	return -1
}

// Describe says in words how amounts are rounded.
func (r Rounder) Describe() string {
	if r.unit == 0 {
		return "none (exact amounts)"
	}
	mode := map[string]string{
		RoundNearest: "nearest, halves away from zero",
		RoundDown:    "down",
		RoundUp:      "up",
	}[r.mode]
	s := fmt.Sprintf("to multiples of %s, %s", short(r.unit), mode)
	if r.bounded && (r.lo != r.floor || r.hi != r.cap) {
		s += fmt.Sprintf(", never out of [%s, %s], the multiples within the floor and the cap", short(r.lo), short(r.hi))
	}
	return s
}

// Unit is the rounding unit (0: none).
func (r Rounder) Unit() float64 { return r.unit }

// Mode is the rounding mode: nearest, down or up.
func (r Rounder) Mode() string { return r.mode }
