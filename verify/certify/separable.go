package certify

import (
	"time"

	"scorewright/generator/formula"
	iv "scorewright/internal/interval"
	"scorewright/verify"
)

// A generator that is a sum of one-variable terms, H(p) = sum h_k(p_k)
// (formula.Program.Separable), curves along a direction v of the simplex
// by sum h_k''(p_k) v_k², and such a direction moves at least two
// coordinates. So H is strictly concave on the simplex when every h_k is
// concave on [0, 1] and all but one strictly: no segment can then be
// flat. Each h_k is a function of one variable, and its strict concavity
// needs no box to decide the points where h_k'' vanishes (the vertices,
// for 1 - sum(p^3)): where the program has no kink and stays defined on
// (0, 1), h_k'' is real-analytic there, so if h_k'' <= 0 everywhere and
// < 0 on one interval, its zeros are isolated (the identity theorem) and
// h_k' strictly decreases — h_k is strictly concave. This is the proof the
// boxes of the simplex cannot give next to a vertex, where every
// interval Hessian touches 0.

// separableResult is the certificate of a generator proved strictly
// concave term by term, or nil.
func separableResult(prog *formula.Program, n int, s Settings, start time.Time) *Result {
	if !separableStrict(prog, n) {
		return nil
	}
	return provedStrict(n, "H is a sum of one-variable terms, each proved strictly concave on [0, 1] (curvature at most 0 there, below 0 on an interval, analytic in between)", s, start)
}

// provedStrict is the result of a structural proof (no boxes) that the
// generator is strictly concave over the whole simplex, by method.
func provedStrict(n int, method string, s Settings, start time.Time) *Result {
	res := &Result{Kind: Certified, Outcomes: n, Verdict: verify.StrictlyProper, Share: 1, StrictShare: 1, Method: method}
	res.Elapsed = time.Since(start)
	(&ticker{fn: s.Progress, start: start}).tick(1, 0, true)
	return res
}

// maxSeparableIntervals bounds the intervals of [0, 1] one term may use.
const maxSeparableIntervals = 1 << 14

// separableStrict reports whether prog (over n outcomes) is proved
// strictly concave by the argument above.
func separableStrict(prog *formula.Program, n int) bool {
	if !prog.Separable() {
		return false
	}
	enc := prog.NewEncloser()
	box := make([]iv.Interval, n)
	var en formula.Enclosure
	flat := 0
	for k := 0; k < n; k++ {
		concave, strict := termCurvature(enc, &en, box, k, n)
		if !concave {
			return false
		}
		if !strict {
			flat++
		}
	}
	return flat <= 1
}

// termCurvature bisects [0, 1] in p_k (the other variables held at 1/n,
// which h_k” does not read) and reports whether h_k” <= 0 was proved on
// all of it, with no kink and nothing undefined, and whether it was < 0
// on some interval.
func termCurvature(enc *formula.Encloser, en *formula.Enclosure, box []iv.Interval, k, n int) (concave, strict bool) {
	for j := range box {
		box[j] = iv.Point(1 / float64(n))
	}
	open := []iv.Interval{{Lo: 0, Hi: 1}}
	for used := 0; len(open) > 0; used++ {
		if used > maxSeparableIntervals {
			return false, false
		}
		x := open[len(open)-1]
		open = open[:len(open)-1]
		box[k] = x
		enc.Enclose(en, box, 2)
		if en.Undefined || en.Kinked {
			return false, false
		}
		c := en.Hess[k*n+k]
		switch {
		case c.Hi < 0:
			strict = true
		case c.Hi <= 0:
			// Concave here; cut it while no interval has shown h_k''
			// strictly negative yet.
			if !strict && x.Hi-x.Lo > 1.0/1024 {
				open = append(open, halves(x)...)
			}
		case c.Lo > 0 || x.Hi-x.Lo < 1e-9:
			return false, false
		default:
			open = append(open, halves(x)...)
		}
	}
	return true, strict
}

// halves cuts x where boxes are cut (splitAt).
func halves(x iv.Interval) []iv.Interval {
	m := x.Lo + (x.Hi-x.Lo)*splitAt
	return []iv.Interval{{Lo: x.Lo, Hi: m}, {Lo: m, Hi: x.Hi}}
}
