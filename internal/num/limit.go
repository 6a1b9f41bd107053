package num

import "math"

// Limits from the interior, by extrapolation.
//
// A formula's value (or derivative) at a boundary point may be 0·Inf,
// Inf − Inf or simply wrong there (exp(0.5·ln x) has the formal slope 0
// at x = 0, whereas its slope tends to +Inf). The callers take the limit
// along a sequence of points approaching the boundary at steps h =
// s·2^-LimitFirst, s·2^-(LimitFirst+2), ..., s·2^-40 (a factor 4 each)
// and hand each value to a Limit, which uses Aitken's delta-squared
// process: exact for a power law h^alpha of any exponent, and fast for
// the usual rates (h, sqrt(h), h ln h) of generator formulas;
// differences that do not shrink (ratio >= 0.99) mark a divergence, as
// -ln h does.

const (
	// LimitFirst is the exponent of the first step: h = s·2^-LimitFirst.
	LimitFirst = 6
	// LimitSteps is the number of steps of a factor 4: the last h is
	// s·2^-40.
	LimitSteps = 18
	// limitDiverge is the ratio of successive differences above which
	// the sequence counts as diverging: a convergent power law h^alpha
	// has ratio 4^-alpha, below this for every alpha > 0.007.
	limitDiverge = 0.99
	// LimitTiny bounds a step scale s from below: 1e-280 times 2^-40 is
	// still a normal number.
	LimitTiny = 1e-280
)

// LimitStep is the step h of step number i (from 0) at scale s.
func LimitStep(s float64, i int) float64 {
	return s * math.Ldexp(1, -LimitFirst-2*i)
}

// Limit follows one sequence of values towards its limit. The zero value
// is ready; Offer the values in order of shrinking step until Done.
type Limit struct {
	v, d, a float64 // last value, last difference, last Aitken estimate
	steps   int
	grow    int // consecutive steps whose difference did not shrink
	agree   int // consecutive Aitken estimates that agreed
	done    bool
	value   float64
	// diverged: the limit is infinite.
	diverged bool
	// err estimates the error of the limit: twice the tail the Aitken
	// estimates still have to move (from their last change and its ratio
	// to the one before), or the rounding noise when the differences
	// themselves vanished. Convergence like sqrt(h) leaves 1e-8 after
	// the last step; a comparison resting on the limit must allow for it.
	err float64
	ch  float64 // last change of the Aitken estimates
}

// Done reports whether the limit is decided.
func (st *Limit) Done() bool { return st.done }

// Diverged reports whether the limit was decided infinite.
func (st *Limit) Diverged() bool { return st.diverged }

// Err is the error estimate of a finite limit (0 for a divergence).
func (st *Limit) Err() float64 { return st.err }

// Offer takes the value v at the next step, with m the size of the terms
// that cancel in it (the rounding scale).
func (st *Limit) Offer(v, m float64) {
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

// Result is the decided limit, or the last estimate when the steps ran
// out.
func (st *Limit) Result() float64 {
	if st.done {
		return st.value
	}
	if st.a == st.a && !math.IsInf(st.a, 0) {
		return st.a
	}
	return st.v
}

// KeepFormal decides between a formula's formal value at a boundary point
// and the limit st found: the formal value stands where it equals the
// limit to 1e-9 relative, where the sequence left the formula's domain
// (NaN), and where a formal infinity met steps that ran out undecided (a
// slow divergence looks like a slow convergence); else the limit replaces
// it. It returns the value to use.
func (st *Limit) KeepFormal(formal float64) float64 {
	lim := st.Result()
	switch {
	case lim != lim:
	case formal == lim:
	case math.IsInf(formal, 0) && !st.done:
	case math.IsInf(lim, 0) || math.IsInf(formal, 0) || formal != formal:
		return lim
	case math.Abs(formal-lim) > 1e-9*(1+math.Abs(lim)):
		return lim
	}
	return formal
}
