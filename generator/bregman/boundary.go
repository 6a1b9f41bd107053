package bregman

import (
	"math"

	"scorewright/internal/num"
)

// Efforts at a report on the boundary of the simplex.
//
// At a report p with some p_j = 0 the gradient of H may be infinite, or
// finite but no supergradient (the formal partials of sqrt(p1*p2) at
// (0, 0, 1) are all 0, although H rises to 1/2 at (1/2, 1/2, 0)). The
// effort there is defined as the limit from the interior along the segment
// from the centre c of the simplex: L(p, k) = lim_{h -> 0} L(p + h(c - p), k).
// For a concave H the gradients along that segment are supergradients, so
// the limit rule is proper at p too; where a component of the limit is
// infinite (the log rule at a report ruling the outcome out) it is +Inf.
//
// The limit is extrapolated (num.Limit) from the efforts at h = s·2^-6,
// s·2^-8, ..., s·2^-40, where s is the smallest positive coordinate of p (at most 1):
// the segment must stay closer to p than p is to the faces it does not
// lie on, or an effort that converges (-ln p_1 at a small p_1 > 0) looks
// like one that diverges (-ln h) while h is still larger than p_1. The
// steps use Aitken's delta-squared process, which is exact for a power law
// h^alpha of any exponent and the usual rates (h, sqrt(h), h ln h) of
// generator formulas; differences that do not shrink (ratio >= 0.99) mark
// a divergence, as -ln h does. When the formal value — the directional
// form H + sum_j g_j (δ_jk - p_j) with 0·Inf = 0, which is exact wherever
// it is defined — agrees with the limit to within the extrapolation's
// error, it is kept, so that the Brier rule's 2 at a vertex stays 2.

// onBoundary reports whether some coordinate of p is 0.
func onBoundary(p []float64) bool {
	for _, x := range p {
		if x == 0 {
			return true
		}
	}
	return false
}

// segmentScale is the smallest positive coordinate of p, at most 1 and
// at least limitTiny, so that the last step's coordinates stay normal
// floating-point numbers.
func segmentScale(p []float64) float64 {
	s := 1.0
	for _, x := range p {
		if x > 0 && x < s {
			s = x
		}
	}
	return math.Max(s, num.LimitTiny)
}

// directional writes H + sum_j g_j (δ_jk - p_j) for every k, with
// 0 · ±Inf = 0: the formal effort in the form that is exact at a vertex
// (every factor δ_jk - p_j is 0 there, so L(e_k, k) = H(e_k)).
func directional(dst, grad, p []float64, h float64) {
	for k := range dst {
		s := h
		for j, g := range grad {
			t := -p[j]
			if j == k {
				t = 1 - p[j]
			}
			if t != 0 || g != g {
				s += g * t
			}
		}
		dst[k] = s
	}
}

// boundaryEfforts writes the efforts at a boundary report p into dst as
// the limit from the interior (see the comment at the top of the file);
// h is H(p) and s.grad its formal gradient.
func (s *Scorer) boundaryEfforts(dst, p []float64, h float64) {
	n := s.n
	directional(dst, s.grad, p, h)
	if s.limit == nil {
		s.limit = make([]num.Limit, n)
		s.pt = make([]float64, n)
	}
	st := s.limit
	clear(st)
	c := 1 / float64(n)
	scale := segmentScale(p)
	for step := 0; step < num.LimitSteps; step++ {
		t := num.LimitStep(scale, step)
		for j, x := range p {
			s.pt[j] = x + t*(c-x)
		}
		ht := s.ev.Gradient(s.grad, s.pt)
		var gp, mag float64
		for j, g := range s.grad {
			gp += g * s.pt[j]
			mag += math.Abs(g * s.pt[j])
		}
		all := true
		for k := range st {
			st[k].Offer(ht+s.grad[k]-gp, math.Abs(ht)+math.Abs(s.grad[k])+mag)
			all = all && st[k].Done()
		}
		if all {
			break
		}
	}
	s.limitErr = 0
	for k := range dst {
		if lim, e := st[k].Result(), st[k].Err(); lim == lim && !math.IsInf(lim, 0) && e > s.limitErr {
			s.limitErr = e
		}
		dst[k] = st[k].KeepFormal(dst[k])
		dst[k] += 0 // -0 (from -1·0) reads as a negative effort; make it 0
	}
	s.maxLimitErr = math.Max(s.maxLimitErr, s.limitErr)
}

// boundaryValue is H at a boundary point p as the limit from the interior
// along the segment towards the centre, extrapolated as the efforts are.
// It is used only where the formula itself gives no number at p: written
// with an implicit last coordinate (1-p1-p2), a face point can round to
// just outside the simplex, where ln or a fractional power is undefined.
// A concave H that is continuous on the closed simplex equals this limit.
func (s *Scorer) boundaryValue(p []float64) float64 {
	if s.pt == nil {
		s.pt = make([]float64, s.n)
	}
	pt := s.pt
	var st num.Limit
	c := 1 / float64(s.n)
	scale := segmentScale(p)
	for step := 0; step < num.LimitSteps && !st.Done(); step++ {
		t := num.LimitStep(scale, step)
		for j, x := range p {
			pt[j] = x + t*(c-x)
		}
		v := s.ev.Value(pt)
		st.Offer(v, math.Abs(v))
	}
	return st.Result()
}
