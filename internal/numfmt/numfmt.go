// Package numfmt writes numbers for a person to read: no binary noise
// (1.3447999999999998 reads 1.3448), no exponent for the sizes money and
// probabilities take, and one number of decimals for one quantity.
package numfmt

import (
	"math"
	"strconv"
	"strings"
)

// Significant writes v rounded to digits significant digits, trailing
// zeros dropped, in plain decimal form for 1e-6 <= |v| < 1e15 and with an
// exponent outside that. NaN and ±Inf are written as "NaN", "+Inf", "-Inf".
func Significant(v float64, digits int) string {
	if s, ok := special(v); ok {
		return s
	}
	if v == 0 {
		return "0"
	}
	// Binary noise goes first (Clean), so that two values a rounding error
	// apart on either side of a halfway point (0.21875 and
	// 0.21874999999999997) read the same.
	if digits < 12 {
		v = Clean(v)
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', digits, 64), 64)
	if a := math.Abs(r); a >= 1e-6 && a < 1e15 {
		return strconv.FormatFloat(r, 'f', -1, 64)
	}
	return strconv.FormatFloat(r, 'g', -1, 64)
}

// Readable is Significant with ten digits: enough for any amount of
// money a contract names, few enough to hide the noise of a division.
func Readable(v float64) string { return Significant(v, 10) }

// Fixed writes v with exactly decimals decimals (a negative count means
// Readable), and never "-0.00".
func Fixed(v float64, decimals int) string {
	if s, ok := special(v); ok {
		return s
	}
	if decimals < 0 {
		return Readable(v)
	}
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// Small writes a quantity known only up to scale·tol (a margin, a gap):
// anything smaller in size is written "0", the rest Readable, so that
// 3.15e-17 left over from a cancellation does not read as a finding.
func Small(v, scale, tol float64) string {
	if _, ok := special(v); !ok && math.Abs(v) <= math.Abs(scale)*tol {
		return "0"
	}
	return Readable(v)
}

// Decimals is the fewest decimals (at most max) that write every value
// of vs exactly up to binary noise (a relative 1e-12), so that one
// quantity can be written with one count everywhere.
func Decimals(vs []float64, max int) int {
	for d := 0; d < max; d++ {
		scale := math.Pow(10, float64(d))
		fits := true
		for _, v := range vs {
			if _, bad := special(v); bad {
				continue
			}
			if math.Abs(math.Round(v*scale)/scale-v) > 1e-12*math.Max(1, math.Abs(v)) {
				fits = false
				break
			}
		}
		if fits {
			return d
		}
	}
	return max
}

func special(v float64) (string, bool) {
	switch {
	case math.IsNaN(v):
		return "NaN", true
	case math.IsInf(v, 1):
		return "+Inf", true
	case math.IsInf(v, -1):
		return "-Inf", true
	}
	return "", false
}

// Clean rounds v to twelve significant digits, for numbers written to
// machine-readable output that a person will also read: the binary noise
// of a sum (143.25000000000003) goes, every digit a computation on
// amounts in cents can mean stays.
func Clean(v float64) float64 {
	if _, bad := special(v); bad || v == 0 {
		return v
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
	return r
}
