package budget

import (
	"math"
	"strconv"
	"strings"
)

// distinct writes vals (ascending, as menu reports and outcome columns
// are) with as few digits as keep every two of them apart and each within
// a thousandth of its spacing to its neighbours, but never fewer than six
// significant digits' worth: 1000000 and 1000000.1 both print, not two
// "1e+06". Values between 1e-4 and 1e15 in size print in positional
// notation, others in exponent form.
func distinct(vals []float64) []string {
	out := make([]string, len(vals))
	for prec := 6; prec <= 17; prec++ {
		for i, v := range vals {
			out[i] = formatPrec(v, prec)
		}
		if separated(vals, out) {
			return out
		}
	}
	for i, v := range vals {
		out[i] = strconv.FormatFloat(v+0, 'g', -1, 64)
	}
	return out
}

// formatPrec writes v with prec significant digits, trailing zeros
// dropped.
func formatPrec(v float64, prec int) string {
	a := math.Abs(v)
	if a == 0 {
		return "0"
	}
	if a < 1e-4 || a >= 1e15 {
		return strconv.FormatFloat(v, 'g', prec, 64)
	}
	decimals := prec - 1 - int(math.Floor(math.Log10(a)))
	if decimals < 0 {
		decimals = 0
	}
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	return s
}

// separated reports whether the texts are pairwise distinct and each reads
// back within a thousandth of the gap to its nearest neighbour.
func separated(vals []float64, texts []string) bool {
	seen := make(map[string]bool, len(texts))
	for i, t := range texts {
		if seen[t] {
			return false
		}
		seen[t] = true
		back, err := strconv.ParseFloat(t, 64)
		if err != nil {
			return false
		}
		gap := math.Inf(1)
		if i > 0 {
			gap = math.Abs(vals[i] - vals[i-1])
		}
		if i+1 < len(vals) {
			gap = math.Min(gap, math.Abs(vals[i+1]-vals[i]))
		}
		if !math.IsInf(gap, 0) && math.Abs(back-vals[i]) > 1e-3*gap {
			return false
		}
	}
	return true
}
