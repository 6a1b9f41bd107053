// Package num holds small numeric helpers shared by the engine's packages:
// a JSON-safe float that keeps NaN and ±Inf as data, and formatting and
// parsing of probability vectors.
package num

import (
	"encoding/json"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
)

// Float is a float64 that survives JSON: finite values are numbers, NaN
// and ±Inf are the strings "NaN", "+Inf" and "-Inf" (JSON has no literal
// for them, and dropping them would hide exactly what a check must show).
type Float float64

// MarshalJSON writes finite values as numbers and others as strings.
func (f Float) MarshalJSON() ([]byte, error) {
	v := float64(f)
	switch {
	case math.IsNaN(v):
		return []byte(`"NaN"`), nil
	case math.IsInf(v, 1):
		return []byte(`"+Inf"`), nil
	case math.IsInf(v, -1):
		return []byte(`"-Inf"`), nil
	}
	if v == 0 {
		v = 0 // no "-0" in output
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

// UnmarshalJSON reads what MarshalJSON writes.
func (f *Float) UnmarshalJSON(b []byte) error {
	var s string
	if err := json.Unmarshal(b, &s); err == nil {
		switch s {
		case "NaN":
			*f = Float(math.NaN())
		case "+Inf", "Inf":
			*f = Float(math.Inf(1))
		case "-Inf":
			*f = Float(math.Inf(-1))
		default:
			return fmt.Errorf("num: %q is not a number", s)
		}
		return nil
	}
	var v float64
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	*f = Float(v)
	return nil
}

// Floats converts a slice for JSON output.
func Floats(v []float64) []Float {
	if v == nil {
		return nil
	}
	out := make([]Float, len(v))
	for i, x := range v {
		out[i] = Float(x)
	}
	return out
}

// SimplexTolerance is how far from 1 the entries of a probability vector
// typed by a person may sum: enough for three-decimal inputs such as
// 0.333,0.333,0.334, far too little to hide a mistake.
const SimplexTolerance = 1e-6

// decimal is the one form of number a user types: digits with an
// optional sign, decimal point and exponent. Go's own syntax would also
// take 0x10, 1_000, NaN and Inf, which in a contract are typos.
var decimal = regexp.MustCompile(`^[+-]?([0-9]+\.?[0-9]*|\.[0-9]+)([eE][+-]?[0-9]+)?$`)

// ParseNumber reads a finite decimal number such as 10, -0.5 or 1e-3,
// after trimming white space. Hexadecimal, digit separators, NaN and
// infinities are refused, as are numbers too large for a float64.
func ParseNumber(s string) (float64, error) {
	s = strings.TrimSpace(s)
	if !decimal.MatchString(s) {
		return 0, fmt.Errorf("%q is not a number (write it like 10, 0.5 or 1e-3)", s)
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(x, 0) {
		return 0, fmt.Errorf("%q is out of range", s)
	}
	return x, nil
}

// ParseVector reads a comma-separated list of numbers in ParseNumber's
// form.
func ParseVector(s string) ([]float64, error) {
	parts := strings.Split(s, ",")
	v := make([]float64, len(parts))
	for i, p := range parts {
		x, err := ParseNumber(p)
		if err != nil {
			return nil, fmt.Errorf("entry %d (%q) is not a number", i+1, strings.TrimSpace(p))
		}
		v[i] = x
	}
	return v, nil
}

// ParseDistribution reads a probability vector over n outcomes. For n = 2 a
// single number is the probability of outcome 1. Entries must lie in [0, 1]
// and sum to 1 within SimplexTolerance; the result is renormalised to sum
// to 1, unless the entries already do up to float rounding (then they are
// kept exactly as typed).
func ParseDistribution(s string, n int) ([]float64, error) {
	v, err := ParseVector(s)
	if err != nil {
		return nil, err
	}
	if n == 2 && len(v) == 1 {
		v = append(v, complement(v[0]))
	}
	if len(v) != n {
		return nil, fmt.Errorf("%d entries given for %d outcomes", len(v), n)
	}
	if err := CheckDistribution(v, SimplexTolerance); err != nil {
		return nil, err
	}
	var sum float64
	for _, x := range v {
		sum += x
	}
	// Entries typed as decimals that add up to 1 (0.6, 0.3, 0.1) sum to
	// 0.9999999999999999 in binary; dividing by that would turn them into
	// 0.6000000000000001 and so on. Within float rounding of 1 the entries
	// are kept as typed.
	if math.Abs(sum-1) <= float64(len(v))*0x1p-52 {
		return v, nil
	}
	for i := range v {
		v[i] /= sum
	}
	return v, nil
}

// complement is 1 - x as the decimal it stands for: 1 - 0.7 is
// 0.30000000000000004 in binary, but a report of 0.7 means 0.3 for the
// other outcome. x's shortest decimal form gives the number of decimals.
func complement(x float64) float64 {
	c := 1 - x
	s := strconv.FormatFloat(x, 'f', -1, 64)
	d := 0
	if i := strings.IndexByte(s, '.'); i >= 0 {
		d = len(s) - i - 1
	}
	if d > 15 {
		return c
	}
	p := math.Pow(10, float64(d))
	if r := math.Round(c*p) / p; math.Abs(r-c) <= 0x1p-52 {
		return r
	}
	return c
}

// CheckDistribution reports why v is not a probability vector within tol.
func CheckDistribution(v []float64, tol float64) error {
	var sum float64
	for i, x := range v {
		if math.IsNaN(x) || x < 0 || x > 1 {
			return fmt.Errorf("entry %d is %g, outside [0, 1]", i+1, x)
		}
		sum += x
	}
	if math.Abs(sum-1) > tol {
		return fmt.Errorf("entries sum to %.10g, not 1 (tolerance %g)", sum, tol)
	}
	return nil
}

// Format writes a vector as "(0.3, 0.7)" with up to 6 significant digits.
func Format(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = strconv.FormatFloat(x, 'g', 6, 64)
	}
	return "(" + strings.Join(parts, ", ") + ")"
}

// FormatApart formats two vectors (a belief and a report, say) with the
// fewest significant digits, at least six, that tell them apart, so that a
// witness never reads as the same point twice. ok is false when they are
// equal (then no digits can tell them apart and the caller must not
// present them as two points).
func FormatApart(a, b []float64) (sa, sb string, ok bool) {
	for digits := 6; digits <= 17; digits++ {
		sa, sb = formatDigits(a, digits), formatDigits(b, digits)
		if sa != sb {
			return sa, sb, true
		}
	}
	return sa, sb, false
}

func formatDigits(v []float64, digits int) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = strconv.FormatFloat(x, 'g', digits, 64)
	}
	return "(" + strings.Join(parts, ", ") + ")"
}

// Witness formats where a check found its worst value, a belief and a
// report, for display; named says whether the report is shown. It is shown
// only when it reads differently from the belief: for a failed check with
// the digits that tell the two apart (FormatApart), for a passed check only
// when six digits do. A report equal to the belief is no witness.
func Witness(belief, report []float64, failed bool) (b, r string, named bool) {
	b, r = Format(belief), Format(report)
	named = b != r
	if !named && failed {
		if ab, ar, ok := FormatApart(belief, report); ok {
			b, r, named = ab, ar, true
		}
	}
	return b, r, named
}
