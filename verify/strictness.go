package verify

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
	"scorewright/generator/payout"
	"scorewright/internal/num"
)

// Strictness needs a witness.
//
// A rule is proper but not strictly proper exactly when two different
// reports tie for some belief (Gneiting & Raftery 2007, Sec. 2), and for
// a Bregman rule with concave H a tie between q and p means H is affine
// on the segment [q, p]. A grid pair whose expected efforts agree to
// rounding is only a candidate: near a vertex the power rule with g = 8
// has true differences of 1e-16, which rounding cannot tell from 0. The
// candidate is confirmed with the exact second derivative of H along the
// segment, which no large or affine part of H disturbs: at flatSamples
// points of [q, p] the quadratic form v'∇²H v (v = p - q) must vanish up
// to the rounding of its own terms, and of the terms each Hessian entry
// sums (bregman.Scorer.Rounding: p·exp(-ln p) is affine, but its Hessian
// entries are sums of ±2/p² that cancel only to rounding). For the power rule every term has one
// sign, so it never does; for sqrt(p1 p2) along a ray, or a formula flat
// on a piece, it does.

// flatSamples is how many evenly spaced points of a segment, ends
// included, must show zero curvature for H to count as affine on it.
const flatSamples = 9

// flatSegment reports whether H is affine on [a, b] in the sense above.
// Points of the segment on the boundary where the curvature is not finite
// do not count either way; a segment with no finite curvature is not
// confirmed.
func flatSegment(sc *bregman.Scorer, hess, z, a, b []float64) bool {
	n := len(a)
	herr := make([]float64, n*n)
	seen := false
	for t := 0; t < flatSamples; t++ {
		f := float64(t) / (flatSamples - 1)
		for i := range z {
			z[i] = a[i] + f*(b[i]-a[i])
		}
		if h := sc.Hessian(hess, z); h != h {
			return false
		}
		bound := 0.0
		if _, ok := sc.Rounding(herr, z); ok {
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					if e := math.Abs(b[i]-a[i]) * herr[i*n+j] * math.Abs(b[j]-a[j]); e == e && !math.IsInf(e, 0) {
						bound += e
					}
				}
			}
		}
		var q, size float64
		finite := true
		for i := 0; i < n && finite; i++ {
			vi := b[i] - a[i]
			if vi == 0 {
				continue
			}
			for j := 0; j < n; j++ {
				vj := b[j] - a[j]
				if vj == 0 {
					continue
				}
				term := vi * hess[i*n+j] * vj
				if math.IsNaN(term) || math.IsInf(term, 0) {
					finite = false
					break
				}
				q += term
				size += math.Abs(term)
			}
		}
		if !finite {
			continue
		}
		seen = true
		if math.Abs(q) > 64*0x1p-52*size+bound {
			return false
		}
	}
	return seen
}

// confirmTie returns the first candidate along which H is affine.
func confirmTie(sc *bregman.Scorer, n int, ties []tiePair) (tiePair, bool) {
	hess, z := make([]float64, n*n), make([]float64, n)
	for _, t := range ties {
		if flatSegment(sc, hess, z, t.q, t.p) {
			return t, true
		}
	}
	return tiePair{}, false
}

// flatNear looks for a short segment through the interior point z0 along
// which H is affine, in the directions where its projected curvature is
// largest (the flattest): half-lengths from cell down by halves. It finds
// the flat piece of min(p(1-p), 0.2499999) around 1/2, narrower than a
// grid step, and finds nothing at an isolated zero of the curvature, such
// as that of -(p - 1/2)^4 at 1/2.
func flatNear(sc *bregman.Scorer, z0 []float64, cell float64) (tiePair, bool) {
	n := len(z0)
	if n < 2 || cell <= 0 {
		return tiePair{}, false
	}
	pj := newProjector(n)
	hess := make([]float64, n*n)
	if h := sc.Hessian(hess, z0); h != h {
		return tiePair{}, false
	}
	m := n - 1
	sym := mat.NewSymDense(m, nil)
	for a := 0; a < m; a++ {
		for b := a; b < m; b++ {
			var s float64
			for i := 0; i < n; i++ {
				for k := 0; k < n; k++ {
					s += pj.u[i*m+a] * hess[i*n+k] * pj.u[k*m+b]
				}
			}
			if math.IsNaN(s) || math.IsInf(s, 0) {
				return tiePair{}, false
			}
			sym.SetSym(a, b, s)
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(sym, true) {
		return tiePair{}, false
	}
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	z, a, b := make([]float64, n), make([]float64, n), make([]float64, n)
	for c := m - 1; c >= 0 && c >= m-2; c-- {
		v := make([]float64, n)
		for i := 0; i < n; i++ {
			for k := 0; k < m; k++ {
				v[i] += pj.u[i*m+k] * vecs.At(k, c)
			}
		}
		for s := cell; s > cell/4096; s /= 2 {
			inside := true
			for i := range a {
				a[i], b[i] = z0[i]-s*v[i], z0[i]+s*v[i]
				inside = inside && a[i] >= 0 && b[i] >= 0
			}
			if inside && flatSegment(sc, hess, z, a, b) {
				return tiePair{q: clone(a), p: clone(b)}, true
			}
		}
	}
	return tiePair{}, false
}

// decideStrictness settles properness's strictness with a witness: a
// confirmed tie among the grid's candidates, or a flat segment near the
// flattest interior point when the curvature vanishes there. It returns
// whether the rule is strictly proper and the note to add.
func decideStrictness(sc *bregman.Scorer, prop *CheckResult, conc CheckResult, ties []tiePair, cell float64) (strict bool, note string) {
	n := len(conc.Belief)
	if n == 0 && len(ties) > 0 {
		n = len(ties[0].q)
	}
	if !prop.Strict {
		if w, ok := confirmTie(sc, n, ties); ok {
			prop.Margin, prop.MarginBelief, prop.MarginReport = w.margin, clone(w.q), clone(w.p)
			return false, ""
		}
		// Every candidate was rounding.
		prop.Strict = prop.Passed
		prop.Note = fmt.Sprintf("at every grid belief the honest report is the unique best grid report: the closest other report, %s at belief %s, agrees to within rounding (difference %.3g), but H is strictly curved along the segment between them (exact second derivative), so that is rounding, not a tie", num.Format(prop.MarginReport), num.Format(prop.MarginBelief), prop.Margin)
	}
	if conc.Strict || conc.Interior.Belief == nil {
		return true, ""
	}
	if w, ok := flatNear(sc, conc.Interior.Belief, cell); ok {
		prop.Strict = false
		prop.Margin, prop.MarginBelief, prop.MarginReport = 0, w.q, w.p
		prop.Note = fmt.Sprintf("the honest report is a best report but not the only one: H is affine between %s and %s (exact second derivative 0 along the segment), so for a belief at one end both ends do equally well", num.Format(w.q), num.Format(w.p))
		return false, ""
	}
	return true, fmt.Sprintf("the curvature of H vanishes at %s (largest projected eigenvalue %.3g), but H is curved along every short segment there: an isolated zero, so no two reports tie", num.Format(conc.Interior.Belief), conc.Interior.Worst)
}

// flatPayout is flatSegment for a payout under audit: the expected pay
// f(r) = sum_k q_k pay(r, k) of the belief q at one end, whose second
// derivative along the segment [q, p] (exact, from each outcome's
// compiled formula) must vanish up to the rounding of its terms at
// flatSamples points. With f(q) = f(p) to rounding, f is then constant on
// the segment: a tie.
func flatPayout(progs []*formula.Program, q, p []float64) bool {
	n := len(q)
	hess, grad, z := make([]float64, n*n), make([]float64, n), make([]float64, n)
	machines := make([]*formula.Machine, len(progs))
	for k, pr := range progs {
		if pr.NumVars() != n {
			return false
		}
		machines[k] = pr.NewMachine()
	}
	for t := 1; t < flatSamples-1; t++ {
		f := float64(t) / (flatSamples - 1)
		for i := range z {
			z[i] = q[i] + f*(p[i]-q[i])
		}
		var sum, size float64
		for k, m := range machines {
			if q[k] == 0 {
				continue
			}
			m.Hessian(hess, grad, z)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					vi, vj := p[i]-q[i], p[j]-q[j]
					if vi == 0 || vj == 0 {
						continue
					}
					term := q[k] * vi * hess[i*n+j] * vj
					if math.IsNaN(term) || math.IsInf(term, 0) {
						return false
					}
					sum += term
					size += math.Abs(term)
				}
			}
		}
		if math.Abs(sum) > 64*0x1p-52*size {
			return false
		}
	}
	return true
}

// confirmPayoutTie settles an audit's strictness as decideStrictness does
// a check's: a candidate tie counts only when the payout is flat along
// the segment; otherwise the near-equal pays are rounding.
func confirmPayoutTie(pay *payout.Payout, prop *CheckResult, ties []tiePair) {
	if prop.Strict || !prop.Passed {
		return
	}
	progs := make([]*formula.Program, pay.Outcomes())
	for k := range progs {
		progs[k] = pay.Program(k + 1)
	}
	for _, t := range ties {
		if flatPayout(progs, t.q, t.p) {
			prop.Margin, prop.MarginBelief, prop.MarginReport = t.margin, clone(t.q), clone(t.p)
			return
		}
	}
	prop.Strict = true
}
