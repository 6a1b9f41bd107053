// Package bregman builds a scoring rule from a concave generator H by the
// Bregman construction: effort L(p, k) = H(p) + g_k - <g, p> with g the
// gradient of H, expected effort Phi(q, p) = sum_k q_k L(p, k) and
// divergence D(q, p) = Phi(q, p) - H(q).
//
// The construction needs only H and its exact derivatives, so any source
// of a generator — a compiled formula, a weight integrated twice — plugs in
// through the Generator interface.
package bregman

import (
	"fmt"
	"math"

	"scorewright/generator/formula"
	"scorewright/internal/num"
)

// Evaluator computes a generator and its exact derivatives at a point of
// the simplex. An Evaluator owns scratch space and is used by one goroutine.
type Evaluator interface {
	// Value returns H(p).
	Value(p []float64) float64
	// Gradient writes the formal partial derivatives of H into grad and
	// returns H(p).
	Gradient(grad, p []float64) float64
	// Hessian writes the n×n matrix of second partials (row-major) into
	// hess, the gradient into grad, and returns H(p).
	Hessian(hess, grad, p []float64) float64
}

// Generator is a concave function on the probability simplex over a fixed
// number of outcomes. It is immutable and shared; each goroutine asks it
// for its own Evaluator.
type Generator interface {
	Outcomes() int
	NewEvaluator() Evaluator
}

// Options describe the outcomes a generator formula is compiled for. The
// zero value of each field means its default.
type Options struct {
	// Outcomes is n, 2..12.
	Outcomes int
	// Ordered marks ordinal outcomes and allows csum().
	Ordered bool
	// Weights are the outcome weights w seen inside sum(); nil means all 1.
	Weights []float64
	// Params override parameter values set in the formula.
	Params map[string]float64
}

// Formula is a generator written in scorewright's formula language.
type Formula struct {
	// Source is the formula text as given.
	Source string
	prog   *formula.Program
	n      int
	opt    Options
}

// NewFormula compiles src as a generator over opt.Outcomes outcomes.
// Formula errors are *formula.Error values with line and column.
func NewFormula(src string, opt Options) (*Formula, error) {
	prog, err := formula.CompileString(src, formula.Scope{
		Outcomes: opt.Outcomes, Ordered: opt.Ordered, Weights: opt.Weights, Params: opt.Params,
	})
	if err != nil {
		return nil, err
	}
	return &Formula{Source: src, prog: prog, n: opt.Outcomes, opt: opt}, nil
}

// WithoutConstantTerms returns the generator less the number literals of
// its outermost sum (formula.SplitConstant), and their sum c. It is the
// same scoring rule, every effort smaller by c; the budget fit uses it so
// that "1e12 + 1 - sum(p^2)" pays the cents "1 - sum(p^2)" pays, where the
// literal would otherwise round away the last digits of every effort.
func (f *Formula) WithoutConstantTerms() (*Formula, float64, error) {
	file, err := formula.Parse(f.Source)
	if err != nil {
		return nil, 0, err
	}
	var c float64
	file.Expr, c = formula.SplitConstant(file.Expr)
	prog, err := formula.Compile(file, formula.Scope{
		Outcomes: f.opt.Outcomes, Ordered: f.opt.Ordered, Weights: f.opt.Weights, Params: f.opt.Params,
	})
	if err != nil {
		return nil, 0, err
	}
	return &Formula{Source: f.Source, prog: prog, n: f.n, opt: f.opt}, c, nil
}

// Outcomes is the number of outcomes.
func (f *Formula) Outcomes() int { return f.n }

// Program is the compiled formula.
func (f *Formula) Program() *formula.Program { return f.prog }

// NewEvaluator returns a machine for the compiled formula.
func (f *Formula) NewEvaluator() Evaluator { return f.prog.NewMachine() }

// Rule is a scoring rule in effort orientation: lower is better.
type Rule struct {
	Gen Generator
	// Labels name the outcomes; nil means "1".."n".
	Labels []string
	// Ordered marks ordinal outcomes.
	Ordered bool
}

// Outcomes is the number of outcomes.
func (r *Rule) Outcomes() int { return r.Gen.Outcomes() }

// Label returns the name of outcome k (0-based).
func (r *Rule) Label(k int) string {
	if k < len(r.Labels) {
		return r.Labels[k]
	}
	return fmt.Sprint(k + 1)
}

// Scorer evaluates a rule at points of the simplex without allocating. It
// is used by one goroutine; make one per worker with NewScorer.
type Scorer struct {
	ev   Evaluator
	n    int
	grad []float64
	eff  []float64
	hess []float64
	// Scratch for the limit at boundary reports, made on first use.
	limit []num.Limit
	pt    []float64
	// limitErr is the error estimate of the last Efforts call's limits,
	// maxLimitErr the largest over every call.
	limitErr, maxLimitErr float64
}

// NewScorer returns a Scorer for r.
func (r *Rule) NewScorer() *Scorer {
	n := r.Outcomes()
	return &Scorer{ev: r.Gen.NewEvaluator(), n: n, grad: make([]float64, n), eff: make([]float64, n), hess: make([]float64, n*n)}
}

func (s *Scorer) check(name string, v []float64) {
	if len(v) != s.n {
		panic(fmt.Sprintf("bregman: %s has %d entries for %d outcomes", name, len(v), s.n))
	}
}

// Entropy returns H(q). On the boundary, where the formula may leave its
// domain by rounding (1-p1-p2 is -5.6e-17 at (0.07, 0.93, 0)), a value
// that is not a number is replaced by the limit from the interior
// (boundary.go).
func (s *Scorer) Entropy(q []float64) float64 {
	s.check("belief", q)
	h := s.ev.Value(q)
	if h != h && onBoundary(q) {
		h = s.boundaryValue(q)
	}
	return h + 0 // -0 (the power rule's (1-1-0)/(g-1) at a vertex) reads as a negative entropy
}

// Efforts writes L(p, k) for every outcome k into dst and returns H(p).
// An outcome the report rules out (p_k = 0) may cost +Inf; that is a value,
// not an error. At a report on the boundary (some p_j = 0) the efforts
// are the limit from the interior (boundary.go), where the gradient of H
// may be infinite or no supergradient.
func (s *Scorer) Efforts(dst, p []float64) float64 {
	s.check("report", p)
	s.check("effort", dst)
	h := s.ev.Gradient(s.grad, p)
	s.limitErr = 0
	if onBoundary(p) {
		s.boundaryEfforts(dst, p, h)
		if h != h {
			h = s.boundaryValue(p)
		}
		return h + 0 // -0 reads as a negative entropy
	}
	gp := Dot(s.grad, p)
	for k := range dst {
		dst[k] = h + s.grad[k] - gp
	}
	return h
}

// LimitError is the error estimate of the efforts the last Efforts call
// extrapolated (a boundary report's limits from the interior,
// boundary.go): the largest over its finite efforts, 0 at an interior
// report or where every limit was exact to rounding.
func (s *Scorer) LimitError() float64 { return s.limitErr }

// MaxLimitError is the largest LimitError over every Efforts call so far.
func (s *Scorer) MaxLimitError() float64 { return s.maxLimitErr }

// Gradient writes grad H(p) into dst and returns H(p).
func (s *Scorer) Gradient(dst, p []float64) float64 {
	s.check("report", p)
	s.check("gradient", dst)
	return s.ev.Gradient(dst, p)
}

// Hessian writes the n×n Hessian of H at p into dst (row-major) and
// returns H(p).
func (s *Scorer) Hessian(dst, p []float64) float64 {
	s.check("report", p)
	if len(dst) != s.n*s.n {
		panic(fmt.Sprintf("bregman: Hessian needs %d entries, got %d", s.n*s.n, len(dst)))
	}
	return s.ev.Hessian(dst, s.grad, p)
}

// RoundingEvaluator is an Evaluator that can also bound the rounding of
// the derivatives it computes (formula.Machine.HessianRounding). The
// terms a derivative sums can cancel to far less than their size (a
// constant written as p·(1/p - 1)); a tolerance must allow for their
// size, not only the result's.
type RoundingEvaluator interface {
	HessianRounding(hess, grad, p []float64) float64
}

// ValueRoundingEvaluator is an Evaluator that can bound the rounding of
// the value it computes (formula.Machine.ValueRounding): H written as
// (1e8 - sum(p^2)) - 1e8 is near 1 but known only to about 1e-8.
type ValueRoundingEvaluator interface {
	ValueRounding(p []float64) (float64, bool)
}

// ValueRounding bounds the rounding error of H(p) by the size of the terms
// that cancel in it; where the evaluator gives no bound, a few ulps of
// |H(p)| (all that is known without one).
func (s *Scorer) ValueRounding(p []float64) float64 {
	s.check("belief", p)
	if re, ok := s.ev.(ValueRoundingEvaluator); ok {
		if b, ok := re.ValueRounding(p); ok {
			return b
		}
	}
	return 4 * 0x1p-52 * math.Abs(s.ev.Value(p))
}

// Rounding writes into dst (n×n, row-major) a bound on the rounding error
// of each Hessian entry at the interior point p, and returns a bound on
// the rounding error of every effort L(p, k): the gradient's own bound,
// the bound on H's own value (ValueRounding), plus one rounding of each of
// the terms H, g_k and <g, p> that the effort sums. ok is false when the
// evaluator cannot bound its rounding.
func (s *Scorer) Rounding(dst, p []float64) (effort float64, ok bool) {
	re, ok := s.ev.(RoundingEvaluator)
	if !ok {
		return 0, false
	}
	s.check("report", p)
	h := s.ev.Gradient(s.grad, p)
	gp := Dot(s.grad, p)
	re.HessianRounding(dst, s.eff, p)
	var ge float64
	for k, e := range s.eff {
		ge += e * p[k]
	}
	hr := s.ValueRounding(p)
	u := 0x1p-52
	for k, e := range s.eff {
		b := e + ge + hr + u*(3*math.Abs(h)+math.Abs(s.grad[k])+math.Abs(gp))
		if b > effort {
			effort = b
		}
	}
	return effort, true
}

// Expected returns Phi(q, p) = sum_k q_k L(p, k), the expected effort of
// report p for a forecaster whose belief is q.
func (s *Scorer) Expected(q, p []float64) float64 {
	s.check("belief", q)
	s.Efforts(s.eff, p)
	return Dot(q, s.eff)
}

// Divergence returns D(q, p) = Phi(q, p) - H(q), which is at least 0 for
// every q, p exactly when H is concave.
func (s *Scorer) Divergence(q, p []float64) float64 {
	return s.Expected(q, p) - s.Entropy(q)
}

// BinaryEvaluator is an Evaluator that knows its binary form directly,
// as an emphasis-designed generator does (its weight is the formula).
// Scorer.Binary uses it instead of recombining the Hessian, which would
// give the weight 1 as 0.9999999999999999.
type BinaryEvaluator interface {
	Binary(p float64) (h, dh, w float64)
}

// Binary returns, for n = 2 and p the probability of outcome 1, the
// generator h = H(p, 1-p), its derivative dh = H'(p) and the emphasis
// weight w = -H”(p).
func (s *Scorer) Binary(p float64) (h, dh, w float64) {
	if s.n != 2 {
		panic("bregman: Binary needs 2 outcomes")
	}
	if b, ok := s.ev.(BinaryEvaluator); ok {
		return b.Binary(p)
	}
	x := [2]float64{p, 1 - p}
	h = s.ev.Hessian(s.hess, s.grad, x[:]) + 0 // -0 reads as a negative entropy
	dh = s.grad[0] - s.grad[1]
	// 0 - x, not -x: a linear h has weight +0, not the -0 that reads as
	// a negative weight wherever it is printed.
	w = 0 - (s.hess[0] - s.hess[1] - s.hess[2] + s.hess[3])
	return h, dh, w
}

// Dot returns sum_k a_k b_k with the convention 0 · ±Inf = 0, so that an
// outcome of probability zero contributes nothing even where its effort is
// infinite. NaN stays NaN.
func Dot(a, b []float64) float64 {
	var s float64
	for k, x := range a {
		y := b[k]
		if x == 0 && y == y || y == 0 && x == x {
			continue
		}
		s += x * y
	}
	return s
}
