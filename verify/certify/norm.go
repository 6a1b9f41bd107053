package certify

import (
	"fmt"
	"math"
	"strings"
	"time"

	"scorewright/generator/formula"
)

// A generator that is, as a whole formula, a negated power of a weighted
// a-norm,
//
//	H(p) = c · (sum_k w_k p_k^a)^e + (affine terms),  c < 0, 1 < a, every w_k > 0, a·e >= 1,
//
// is strictly concave on the simplex, where no box proof can finish: at a
// face p_k = 0 the curvature along e_k - p is exactly 0 for a > 2. Write
// N(p) = (sum_k w_k p_k^a)^(1/a), the a-norm of (w_k^(1/a) p_k). By
// Minkowski's inequality N(x + y) <= N(x) + N(y), with equality for
// 1 < a < ∞ only when x and y are proportional (Hardy, Littlewood & Pólya,
// Inequalities, 1934, Sec. 2.11, Theorem 24 — the number from memory, the
// statement as in the Encyclopedia of Mathematics, "Minkowski
// inequality"). With N's homogeneity, N(t p + (1-t) q) <= t N(p) +
// (1-t) N(q), strictly unless p and q are proportional; two points of the
// simplex are proportional only when equal (both sum to 1). So N is
// strictly convex on the simplex, and so is N^(a·e), s -> s^(a·e) being
// increasing and convex on [0, ∞) when a·e >= 1; c < 0 makes c·N^(a·e)
// strictly concave, and affine terms change no curvature. N > 0 on the
// simplex (every weight is positive), so nothing there is singular. A sum
// of such terms, each with its own c, w, a and e, is strictly concave as
// each term is.
//
// The recogniser (formula.Program.NormForm) matches the compiled program
// cell by cell; a formula with any other term falls to the box search.

// outerTolerance is how far below 1 a·e may fall and still be read as 1:
// the exponent 1/a as a double, e = fl(1/a), has |a·e - 1| <= 2^-53, so
// one unit of 1/a's last place (2^-52) accepts it and nothing
// meaningfully different. Read so, the certificate is for the exponent
// 1/a the formula writes, not for the double, whose a·e < 1 would leave a
// curvature of order 1e-16 at the faces.
const outerTolerance = 0x1p-52

// maxNormExponent bounds the inner exponent a accepted: beyond it p^a
// underflows over much of the simplex in double precision, and the
// program no longer computes the norm it writes.
const maxNormExponent = 100

// minNormTerm bounds the terms of the sum from below (and 1/minNormTerm
// the weights from above), far from where doubles underflow or overflow.
const minNormTerm = 1e-250

// normResult is the certificate of a generator recognised as a negated
// power of a weighted norm, or nil.
func normResult(prog *formula.Program, n int, s Settings, start time.Time) *Result {
	terms, ok := prog.NormTerms()
	if !ok {
		return nil
	}
	conds := make([]string, len(terms))
	for j, t := range terms {
		if conds[j], ok = normTheorem(t, n); !ok {
			return nil
		}
	}
	const why = "strictly concave on the simplex by Minkowski's inequality (Hardy, Littlewood & Pólya, Inequalities, Theorem 24), " +
		"which is strict unless the two points are proportional, as no two points of the simplex are"
	if len(terms) == 1 {
		return provedStrict(n, "H was recognised as c·(sum_k w_k p_k^a)^e plus affine terms, with "+conds[0]+
			": c times a weighted a-norm to the power a·e >= 1, "+why, s, start)
	}
	for j := range conds {
		conds[j] = fmt.Sprintf("term %d with %s", j+1, conds[j])
	}
	return provedStrict(n, fmt.Sprintf("H was recognised as a sum of %d terms c·(sum_k w_k p_k^a)^e, each with its own c, w and a, plus affine terms: %s; "+
		"each is c times a weighted a-norm to the power a·e >= 1, %s, and a sum of strictly concave functions is strictly concave",
		len(terms), strings.Join(conds, ", "), why), s, start)
}

// normTheorem checks the conditions of the argument above on one
// recognised term over n outcomes, and that the program's doubles
// neither underflow nor overflow there (minNormTerm), and returns them
// as met.
func normTheorem(nf formula.NormForm, n int) (string, bool) {
	finite := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	a, e, c := nf.Inner, nf.Outer, nf.Coef
	if len(nf.Weights) != n || !finite(c) || c >= 0 || !finite(a) || a <= 1 || a > maxNormExponent || !finite(e) || e <= 0 {
		return "", false
	}
	var total float64
	for _, w := range nf.Weights {
		// In double precision the sum must stay a normal number on the
		// whole simplex (each term is at least w_k·n^-a somewhere near
		// the centre), or the program computes 0 or Inf, not the norm.
		if !finite(w) || w <= 0 || w*math.Pow(float64(n), -a) < minNormTerm || w > 1/minNormTerm {
			return "", false
		}
		total += w
	}
	if !finite(math.Abs(c) * math.Pow(total, e)) {
		return "", false
	}
	// a·e - 1 with one rounding: its sign is exact.
	gap := math.FMA(a, e, -1)
	var power string
	switch {
	case gap < -outerTolerance:
		return "", false
	case gap < 0:
		power = fmt.Sprintf("the outer exponent e = %.17g is 1/a rounded to a double (|a·e - 1| <= %.2g), read as 1/a", e, outerTolerance)
	case gap == 0:
		power = "a·e = 1"
	default:
		power = fmt.Sprintf("a·e = %.6g > 1", a*e)
	}
	return fmt.Sprintf("c = %.6g < 0, a = %.6g > 1, every w_k > 0 and %s", c, a, power), true
}
