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

// Round returns x rounded to the unit in the rounder's mode; with unit 0
// it returns x.
func (r Rounder) Round(x float64) float64 {
	if r.unit == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return x
	}
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
	return fmt.Sprintf("to multiples of %s, %s", short(r.unit), mode)
}

// Unit is the rounding unit (0: none).
func (r Rounder) Unit() float64 { return r.unit }

// Mode is the rounding mode: nearest, down or up.
func (r Rounder) Mode() string { return r.mode }
