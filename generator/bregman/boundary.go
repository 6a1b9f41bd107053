package bregman

import "math"

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
// The limit is extrapolated from the efforts at h = s·2^-6, s·2^-8, ...,
// s·2^-40, where s is the smallest positive coordinate of p (at most 1):
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

const (
	limitFirst = 6  // first step h = 2^-limitFirst
	limitSteps = 18 // steps of a factor 4: the last h is 2^-40
	// limitDiverge is the ratio of successive differences above which
	// the sequence counts as diverging: a convergent power law h^alpha
	// has ratio 4^-alpha, below this for every alpha > 0.007.
	limitDiverge = 0.99
	// limitTiny bounds the segment's scale from below: 1e-280 times
	// 2^-40 is still a normal number.
	limitTiny = 1e-280
)

// limitState follows one outcome's effort along the segment.
type limitState struct {
	v, d, a  float64 // last value, last difference, last Aitken estimate
	steps    int
	grow     int // consecutive steps whose difference did not shrink
	agree    int // consecutive Aitken estimates that agreed
	done     bool
	value    float64
	diverged bool
	// err estimates the error of the limit: twice the tail the Aitken
	// estimates still have to move (from their last change and its ratio
	// to the one before), or the rounding noise when the differences
	// themselves vanished. Convergence like sqrt(h) leaves 1e-8 after
	// the last step; a comparison resting on the limit must allow for it.
	err float64
	ch  float64 // last change of the Aitken estimates
}

// offer takes the effort v at the next step, with m the size of the terms
// that cancel in it (the rounding scale), and reports whether the limit
// is decided.
func (st *limitState) offer(v, m float64) {
	if st.done {
		return
	}
	st.steps++
	if v != v {
		st.done, st.value = true, math.NaN()
		return
	}
	noise := 64 * 0x1p-52 * m
	if st.steps == 1 {
		st.v, st.a = v, v
		return
	}
	d := v - st.v
	if math.IsInf(v, 0) || math.IsInf(d, 0) {
		st.done, st.value = true, v
		return
	}
	prevGrow, prevAgree := st.grow, st.agree
	a := v
	if st.steps >= 3 && math.Abs(d) > noise {
		if den := d - st.d; den != 0 {
			a = v - d*d/den
		}
	}
	// Two rates of opposite sign can cross, so that one difference
	// matches the last: divergence needs three in a row, agreement of the
	// estimates two.
	st.grow, st.agree = 0, 0
	if st.steps >= 3 && d*st.d > 0 && math.Abs(d) >= limitDiverge*math.Abs(st.d) {
		st.grow = prevGrow + 1
	}
	if st.steps >= 4 && math.Abs(a-st.a) <= 1e3*0x1p-52*(m+math.Abs(a)) {
		st.agree = prevAgree + 1
	}
	st.err = noise
	if st.steps >= 4 {
		// The Aitken estimates approach the limit with changes that
		// shrink by about r a step; what is left is the geometric tail
		// change·r/(1 - r), counted at least as one more change, doubled.
		ch := math.Abs(a - st.a)
		tail := ch
		if st.ch > 0 {
			if r := math.Min(ch/st.ch, 0.99); r > 0.5 {
				tail = ch * r / (1 - r)
			}
		}
		st.err = math.Max(noise, 2*tail)
		st.ch = ch
	}
	switch {
	case math.Abs(d) <= noise:
		st.done, st.value = true, v
	case st.grow >= 3:
		st.done, st.diverged, st.value, st.err = true, true, math.Copysign(math.Inf(1), d), 0
	case st.agree >= 2:
		st.done, st.value = true, a
	}
	st.v, st.d, st.a = v, d, a
}

// result is the decided limit, or the last estimate when the steps ran
// out.
func (st *limitState) result() float64 {
	if st.done {
		return st.value
	}
	if st.a == st.a && !math.IsInf(st.a, 0) {
		return st.a
	}
	return st.v
}

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
	return math.Max(s, limitTiny)
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
		s.limit = make([]limitState, n)
		s.pt = make([]float64, n)
	}
	st := s.limit
	clear(st)
	c := 1 / float64(n)
	scale := segmentScale(p)
	for step := 0; step < limitSteps; step++ {
		t := scale * math.Ldexp(1, -limitFirst-2*step)
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
			st[k].offer(ht+s.grad[k]-gp, math.Abs(ht)+math.Abs(s.grad[k])+mag)
			all = all && st[k].done
		}
		if all {
			break
		}
	}
	s.limitErr = 0
	for k := range dst {
		lim := st[k].result()
		formal := dst[k]
		if e := st[k].err; lim == lim && !math.IsInf(lim, 0) && e > s.limitErr {
			s.limitErr = e
		}
		switch {
		case lim != lim:
			// The segment leaves the formula's domain: keep the formal
			// value (NaN stays NaN).
		case formal == lim:
		case math.IsInf(formal, 0) && !st[k].done:
			// Steps ran out without a decision: a slow divergence looks
			// like a slow convergence, and the formal infinity stands.
		case math.IsInf(lim, 0) || math.IsInf(formal, 0) || formal != formal:
			dst[k] = lim
		case math.Abs(formal-lim) > 1e-9*(1+math.Abs(lim)):
			dst[k] = lim
		}
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
	var st limitState
	c := 1 / float64(s.n)
	scale := segmentScale(p)
	for step := 0; step < limitSteps && !st.done; step++ {
		t := scale * math.Ldexp(1, -limitFirst-2*step)
		for j, x := range p {
			pt[j] = x + t*(c-x)
		}
		v := s.ev.Value(pt)
		st.offer(v, math.Abs(v))
	}
	return st.result()
}
