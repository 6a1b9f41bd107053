// Package point builds payment rules for point forecasts of a mean: a
// forecaster reports one number x for a quantity y known to lie in an
// interval [lo, hi], and is paid so that the mean of their distribution is
// the best report.
//
// A concave phi on the interval generates the rule (Savage 1971; Gneiting
// 2011, JASA 106:746-762):
//
//	Phi(y, x) = phi(x) + phi'(x) (y - x)      expected-effort line, affine in y
//	D(y, x)   = Phi(y, x) - phi(y) >= 0       effort of report x when y happens
//
// For any distribution of y with mean m, E D(Y, x) = D(m, x) + phi(m) -
// E phi(Y), which is smallest at x = m. phi = -x^2 gives squared error.
// Derivatives of phi are exact, from the formula machine.
package point

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"

	"scorewright/generator/formula"
	"scorewright/internal/num"
)

// Options are the settings of New; the zero value means the defaults.
type Options struct {
	// Params override parameter values set in the formula.
	Params map[string]float64
}

// Generator is a point-forecast generator phi(x) on [Lo, Hi]. It is
// immutable and safe to share; each goroutine takes its own Evaluator.
type Generator struct {
	// Source is the formula as given.
	Source string
	// Lo and Hi bound the quantity forecast.
	Lo, Hi float64
	prog   *formula.Program
}

// New compiles src, a formula in x, as a generator on [lo, hi]. Formula
// errors are *formula.Error values with line and column.
func New(src string, lo, hi float64, opt Options) (*Generator, error) {
	if !(lo < hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil, fmt.Errorf("point: interval [%g, %g] must be finite with lo < hi", lo, hi)
	}
	prog, err := formula.CompileString(src, formula.Scope{Vars: []string{"x"}, Params: opt.Params})
	if err != nil {
		return nil, err
	}
	return &Generator{Source: src, Lo: lo, Hi: hi, prog: prog}, nil
}

// Program is the compiled formula.
func (g *Generator) Program() *formula.Program { return g.prog }

// NewEvaluator returns an Evaluator for one goroutine.
func (g *Generator) NewEvaluator() *Evaluator {
	return &Evaluator{g: g, m: g.prog.NewMachine()}
}

// Evaluator computes phi, its exact derivatives, and the rule built from
// it. It owns scratch space; use one per goroutine. It does not allocate.
type Evaluator struct {
	g             *Generator
	m             *formula.Machine
	v, grad, hess [1]float64
	// ends caches phi' and phi'' at Lo and Hi as limits from the
	// interior (endLimits).
	ends [2]endDerivs
}

// endDerivs are the derivatives at one end of the interval.
type endDerivs struct {
	done   bool
	d1, d2 float64
	// err is the extrapolation's error estimate of a finite d1.
	err float64
}

// Gauss-Legendre nodes and weights on [0, 1], 8 and 16 points, for the
// curvature form of the divergence; computed once by gonum's quad.
var gauss8, gauss16 = gaussRule(8), gaussRule(16)

type gaussNodes struct{ s, w []float64 }

func gaussRule(n int) gaussNodes {
	g := gaussNodes{s: make([]float64, n), w: make([]float64, n)}
	quad.Legendre{}.FixedLocations(g.s, g.w, 0, 1)
	return g
}

// Generator is the generator the evaluator computes.
func (e *Evaluator) Generator() *Generator { return e.g }

// Phi returns phi(x).
func (e *Evaluator) Phi(x float64) float64 {
	e.v[0] = x
	return e.m.Value(e.v[:])
}

// Derivatives returns phi(x), phi'(x) and phi”(x). At an end of the
// interval the derivatives are the one-sided limits from the interior
// (endLimits).
func (e *Evaluator) Derivatives(x float64) (phi, d1, d2 float64) {
	e.v[0] = x
	phi = e.m.Hessian(e.hess[:], e.grad[:], e.v[:])
	d1, d2 = e.grad[0], e.hess[0]
	if end := e.end(x); end != nil {
		d1, d2 = end.d1, end.d2
	}
	return phi, d1, d2
}

// slope returns phi(x) and phi'(x), at an end of the interval the limit
// from the interior.
func (e *Evaluator) slope(x float64) (phi, d1 float64) {
	e.v[0] = x
	phi = e.m.Gradient(e.grad[:], e.v[:])
	d1 = e.grad[0]
	if end := e.end(x); end != nil {
		d1 = end.d1
	}
	return phi, d1
}

// EndSlopeError is the error estimate of phi' at the ends of the interval
// where it is a finite extrapolated limit (endLimits), 0 where the formal
// derivative agreed with the limit to rounding or the limit is infinite.
// An effort resting on an end report's slope is known only to this times
// |y - x|.
func (e *Evaluator) EndSlopeError() float64 {
	e.end(e.g.Lo)
	e.end(e.g.Hi)
	return math.Max(e.ends[0].err, e.ends[1].err)
}

// end returns the derivatives at x when x is an end of the interval, else
// nil.
func (e *Evaluator) end(x float64) *endDerivs {
	var i int
	switch x {
	case e.g.Lo:
		i = 0
	case e.g.Hi:
		i = 1
	default:
		return nil
	}
	if !e.ends[i].done {
		e.ends[i] = e.endLimits(x, 1-2*float64(i))
	}
	return &e.ends[i]
}

// endLimits takes phi' and phi” at the end x as the limits from the
// interior, towards which side points: the formal derivative at an end
// can be wrong where the formula reads 0·Inf there (exp(0.5·ln x) has the
// formal slope 0 at x = 0, where its slope tends to +Inf, and calling
// that slope 0 makes reporting 0 look cheap). For a concave phi the slope
// is monotone, so the one-sided limit exists, possibly infinite; it is
// extrapolated (num.Limit) from points at distances (Hi - Lo)·2^-6 down
// to (Hi - Lo)·2^-40, and the formal value kept where it agrees.
func (e *Evaluator) endLimits(x, side float64) endDerivs {
	e.v[0] = x
	e.m.Hessian(e.hess[:], e.grad[:], e.v[:])
	f1, f2 := e.grad[0], e.hess[0]
	var l1, l2 num.Limit
	w := e.g.Hi - e.g.Lo
	for step := 0; step < num.LimitSteps && !(l1.Done() && l2.Done()); step++ {
		e.v[0] = x + side*num.LimitStep(w, step)
		e.m.Hessian(e.hess[:], e.grad[:], e.v[:])
		l1.Offer(e.grad[0], math.Abs(e.grad[0]))
		l2.Offer(e.hess[0], math.Abs(e.hess[0]))
	}
	out := endDerivs{done: true, d1: l1.KeepFormal(f1), d2: l2.KeepFormal(f2)}
	if out.d1 != f1 && finite(out.d1) {
		out.err = l1.Err()
	}
	return out
}

func finite(v float64) bool { return v == v && !math.IsInf(v, 0) }

// Line returns Phi(y, x) = phi(x) + phi'(x)(y - x), the expected effort
// line of report x evaluated at outcome y.
func (e *Evaluator) Line(y, x float64) float64 {
	phi, d1 := e.slope(x)
	return phi + mul0(d1, y-x)
}

// Divergence returns D(y, x) = Phi(y, x) - phi(y), the effort of report x
// when the outcome is y; it is >= 0 for every x, y exactly when phi is
// concave, and 0 at x = y.
//
// Far from 0 the direct form phi(x) + phi'(x)(y - x) - phi(y) cancels
// large terms: on [1e6, 1e6 + 1] squared error subtracts numbers near 1e12
// and keeps only about four of its digits, enough to move a cent. The
// divergence is also the curvature integral (Taylor's theorem with the
// integral remainder)
//
//	D(y, x) = (y - x)^2 ∫_0^1 (1 - s) (-phi”(x + s(y - x))) ds,
//
// in which nothing large cancels, as phi” is exact. Divergence computes
// both, with an error estimate for each — a few ulps of the largest term
// for the direct form, the gap between 8- and 16-point Gauss-Legendre for
// the integral — and returns the one with the smaller estimate.
func (e *Evaluator) Divergence(y, x float64) float64 {
	if x == y {
		return 0
	}
	px, d1 := e.slope(x)
	lin := mul0(d1, y-x)
	py := e.Phi(y)
	direct := px + lin - py
	directErr := 4 * 0x1p-52 * (math.Abs(px) + math.Abs(lin) + math.Abs(py))
	if !(directErr > 1e-13*math.Abs(direct)) {
		// Less than three digits lost (or not finite): the direct
		// form is as good as the integral and cheaper.
		return direct
	}
	q16, q8 := e.curvature(y, x, gauss16), e.curvature(y, x, gauss8)
	if math.IsNaN(q16) || math.IsInf(q16, 0) || math.Abs(q16-q8) >= directErr {
		return direct
	}
	return q16
}

// curvature is the curvature integral of Divergence by the rule g.
func (e *Evaluator) curvature(y, x float64, g gaussNodes) float64 {
	var sum float64
	for i, s := range g.s {
		e.v[0] = x + s*(y-x)
		e.m.Hessian(e.hess[:], e.grad[:], e.v[:])
		sum += g.w[i] * (1 - s) * -e.hess[0]
	}
	return (y - x) * (y - x) * sum
}

// DivergenceTerms returns D(y, x) and the size of the terms that cancel in
// it, |phi(x)| + |phi'(x)(y - x)| + |phi(y)|: the scale of its rounding
// error. An affine part of phi (1e8·x) leaves D alone but makes those
// terms, and so the rounding, large.
func (e *Evaluator) DivergenceTerms(y, x float64) (d, size float64) {
	phi, d1 := e.slope(x)
	slope := mul0(d1, y-x)
	py := e.Phi(y)
	return phi + slope - py, math.Abs(phi) + math.Abs(slope) + math.Abs(py)
}

// Expected returns sum_j w_j D(y_j, x), the expected effort of report x
// for a forecaster who gives outcome y_j probability w_j. It panics if the
// lengths differ.
func (e *Evaluator) Expected(x float64, ys, ws []float64) float64 {
	if len(ys) != len(ws) {
		panic("point: outcomes and weights differ in length")
	}
	phi, d := e.slope(x)
	var s float64
	for j, y := range ys {
		if ws[j] == 0 {
			continue
		}
		s += ws[j] * (phi + mul0(d, y-x) - e.Phi(y))
	}
	return s
}

// Mean returns sum_j w_j y_j / sum_j w_j.
func Mean(ys, ws []float64) float64 {
	var s, t float64
	for j, y := range ys {
		s += ws[j] * y
		t += ws[j]
	}
	return s / t
}

func mul0(a, b float64) float64 {
	if a == 0 && b == b || b == 0 && a == a {
		return 0
	}
	return a * b
}

// DomainError says that the generator is not finite at an outcome inside
// the interval: there every report's effort D(y, x) = ... - phi(y) is
// infinite or undefined, so the rule cannot be used on the interval at
// all (qlike, ln x, on an interval reaching 0).
type DomainError struct {
	Lo, Hi float64
	// Y is the first outcome found where phi is not finite, Phi its value.
	Y, Phi float64
}

func (e *DomainError) Error() string {
	what := "infinite"
	if e.Phi != e.Phi {
		what = "undefined"
	}
	return fmt.Sprintf("the generator is not finite at the outcome y = %g of [%g, %g] (phi = %v): every report's effort is %s when y = %g happens, so the rule cannot be used on this interval; choose an interval inside the generator's domain",
		e.Y, e.Lo, e.Hi, e.Phi, what, e.Y)
}

// domainPoints is how many evenly spaced outcomes inside the interval
// Domain examines besides its ends.
const domainPoints = 1024

// Domain returns a *DomainError when phi is not finite at an end of the
// interval or at one of domainPoints outcomes between them, else nil. An
// infinite derivative is allowed: it makes the effort of that one report
// infinite (as ln p does at p = 0 for the log rule), not every report's.
func (g *Generator) Domain() error {
	e := g.NewEvaluator()
	try := func(y float64) error {
		if v := e.Phi(y); v != v || math.IsInf(v, 0) {
			return &DomainError{Lo: g.Lo, Hi: g.Hi, Y: y, Phi: v}
		}
		return nil
	}
	if err := try(g.Lo); err != nil {
		return err
	}
	if err := try(g.Hi); err != nil {
		return err
	}
	for i := 1; i < domainPoints; i++ {
		if err := try(g.Lo + (g.Hi-g.Lo)*float64(i)/domainPoints); err != nil {
			return err
		}
	}
	return nil
}
