package history

// pow10 holds the powers of ten a float64 represents exactly (10^0 to
// 10^22).
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// parseDecimal reads a plain decimal (digits with at most one point, at
// most 15 digits after any leading zeros, no sign or exponent: how probabilities are written) and
// reports whether s was one (at most 20 bytes); anything else is left to
// strconv.ParseFloat. The result is the one ParseFloat gives: the digits
// make an integer m below 10^15 < 2^53 and the point a power 10^k with
// k < 20, both exact in
// a float64, so m / 10^k is a single correctly rounded division, the
// nearest float64 to the decimal (the exact fast path of W. D. Clinger,
// "How to read floating point numbers accurately", PLDI 1990, which
// strconv takes too).
func parseDecimal(s string) (float64, bool) {
	if len(s) == 0 || len(s) > 20 {
		return 0, false
	}
	var m uint64
	point, digits := -1, 0
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= '0' && c <= '9':
			if m != 0 || c != '0' { // leading zeros are not digits of m
				digits++
			}
			m = m*10 + uint64(c-'0')
		case c == '.' && point < 0:
			point = i
		default:
			return 0, false
		}
	}
	if digits > 15 || len(s) == 1 && point == 0 {
		return 0, false
	}
	x := float64(m)
	if point >= 0 {
		x /= pow10[len(s)-point-1]
	}
	return x, true
}
