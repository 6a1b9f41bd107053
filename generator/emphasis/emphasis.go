package emphasis

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/integrate/quad"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
)

// Layout of the panels the integrals are summed over. The lower end goes
// much closer to 0 than the upper end goes to 1 because floating-point
// numbers are dense near 0 but spaced 1.1e-16 apart near 1: below
// 1 - 2^-33 the rounding of c itself would dominate the error, so the last
// stretch is left to the power-law extrapolation.
const (
	loCut     = 0x1p-64 // first knot: distance from 0
	hiCut     = 0x1p-33 // last knot: distance from 1
	loPow     = 64
	hiPow     = 33
	midPanels = 256 // uniform panels of width 1/256 in [1/256, 1 - 1/256]
	glNodes   = 20  // Gauss–Legendre nodes per panel
)

// Options are the settings of New; the zero value means the defaults.
type Options struct {
	// Params override parameter values set in the formula.
	Params map[string]float64
	// Grid is the number of points in (0, 1) on which w >= 0 is checked,
	// besides the panel knots near both ends; 0 means 2000.
	Grid int
}

// Generator is the binary generator of an emphasis weight. It is
// immutable after New and safe to share; each goroutine takes its own
// Evaluator.
type Generator struct {
	// Source is the weight formula as given.
	Source string
	prog   *formula.Program
	// Gauss–Legendre nodes and weights on [-1, 1].
	glx, glw []float64
	knots    []float64
	// prefixNo[j] = ∫_0^knots[j] c w(c) dc, suffixYes[j] = ∫_knots[j]^1 (1-c) w(c) dc.
	prefixNo, suffixYes []float64
	// Power-law fits of the two integrands at both ends.
	yesLo, yesHi, noLo, noHi EndFit
	diag                     Diagnostics
	// wRound bounds the rounding of the weight formula (rounding.go).
	wRound float64
}

// New compiles the weight formula src (a function of c) and integrates it
// into a generator. It fails on a formula error (*formula.Error) and when
// the weight makes every effort infinite (not integrable against (1-c)
// near 1, or against c near 0). A weight that is negative somewhere, or
// makes the rule unbounded at an end, still gives a Generator; see
// Diagnostics.
func New(src string, opt Options) (*Generator, error) {
	prog, err := formula.CompileString(src, formula.Scope{Vars: []string{"c"}, Params: opt.Params})
	if err != nil {
		return nil, err
	}
	g := &Generator{Source: src, prog: prog, glx: make([]float64, glNodes), glw: make([]float64, glNodes)}
	quad.Legendre{}.FixedLocations(g.glx, g.glw, -1, 1)
	g.knots = knots()
	g.knots = mergeKnots(g.knots, breaks(prog, g.knots))
	ev := &Evaluator{g: g, m: prog.NewMachine()}
	g.yesLo = fitEnd(func(s float64) float64 { return ev.fYes(s) }, loCut)
	g.noLo = fitEnd(func(s float64) float64 { return ev.fNo(s) }, loCut)
	g.yesHi = fitEnd(func(s float64) float64 { return ev.fYes(1 - s) }, hiCut)
	g.noHi = fitEnd(func(s float64) float64 { return ev.fNo(1 - s) }, hiCut)
	g.diag = diagnose(ev, opt.Grid)
	g.wRound = weightRounding(ev)
	g.diag.YesAtZero = g.yesLo
	g.diag.NoAtOne = g.noHi
	if g.yesHi.Diverges() {
		return nil, fmt.Errorf("emphasis weight is not integrable near c = 1: (1-c)·w(c) behaves like (1-c)^%.3g there, so the effort of every forecast is infinite when the event happens; the weight must grow more slowly than 1/(1-c)^2 near 1", g.yesHi.Beta)
	}
	if g.noLo.Diverges() {
		return nil, fmt.Errorf("emphasis weight is not integrable near c = 0: c·w(c) behaves like c^%.3g there, so the effort of every forecast is infinite when the event does not happen; the weight must grow more slowly than 1/c^2 near 0", g.noLo.Beta)
	}
	n := len(g.knots)
	g.prefixNo = make([]float64, n)
	g.suffixYes = make([]float64, n)
	g.prefixNo[0] = g.noLo.integral(0, loCut)
	for j := 1; j < n; j++ {
		g.prefixNo[j] = g.prefixNo[j-1] + ev.panel(ev.fNo, g.knots[j-1], g.knots[j])
	}
	g.suffixYes[n-1] = g.yesHi.integral(0, hiCut)
	for j := n - 2; j >= 0; j-- {
		g.suffixYes[j] = g.suffixYes[j+1] + ev.panel(ev.fYes, g.knots[j], g.knots[j+1])
	}
	return g, nil
}

// knots returns the panel boundaries: 2^-64 .. 2^-9 geometrically, then
// k/256, then 1 - 2^-9 .. 1 - 2^-33 geometrically. Every knot is exactly
// representable, and so is its distance to the near end.
func knots() []float64 {
	var k []float64
	for e := loPow; e > 8; e-- {
		k = append(k, math.Ldexp(1, -e))
	}
	for i := 1; i < midPanels; i++ {
		k = append(k, float64(i)/midPanels)
	}
	for e := 9; e <= hiPow; e++ {
		k = append(k, 1-math.Ldexp(1, -e))
	}
	return k
}

// Outcomes is 2: emphasis designs are for yes/no events.
func (g *Generator) Outcomes() int { return 2 }

// Program is the compiled weight formula.
func (g *Generator) Program() *formula.Program { return g.prog }

// Diagnostics describes where the weight is negative or not finite and
// whether the rule is bounded at each end.
func (g *Generator) Diagnostics() Diagnostics { return g.diag }

// NewEvaluator returns an Evaluator for one goroutine.
func (g *Generator) NewEvaluator() bregman.Evaluator { return g.NewBinary() }

// NewBinary returns the concrete Evaluator, with the binary methods
// (Weight, Losses, Binary) besides the bregman.Evaluator ones.
func (g *Generator) NewBinary() *Evaluator {
	return &Evaluator{g: g, m: g.prog.NewMachine()}
}

// Evaluator computes the generator of an emphasis weight and its exact
// derivatives. It owns scratch space; use one per goroutine.
//
// As a function on the simplex the generator is extended to be positively
// homogeneous, H(p1, p2) = s h(p1/s) with s = p1 + p2. Its gradient is then
// (L(p, yes), L(p, no)), so the Bregman construction hands back the two
// integrals themselves, and an infinite effort sits in the component of
// the outcome the report rules out (0 · Inf = 0 in bregman.Dot keeps the
// other one finite).
type Evaluator struct {
	g *Generator
	m *formula.Machine
	v [1]float64
}

// Weight returns w(c) from the formula.
func (e *Evaluator) Weight(c float64) float64 {
	e.v[0] = c
	return e.m.Value(e.v[:])
}

func (e *Evaluator) fYes(c float64) float64 { return mul0(1-c, e.Weight(c)) }
func (e *Evaluator) fNo(c float64) float64  { return mul0(c, e.Weight(c)) }

// panel integrates f over [a, b] by Gauss–Legendre.
func (e *Evaluator) panel(f func(float64) float64, a, b float64) float64 {
	if a == b {
		return 0
	}
	h, m := (b-a)/2, (a+b)/2
	var s float64
	for i, x := range e.g.glx {
		s += e.g.glw[i] * f(m+h*x)
	}
	return h * s
}

// find returns j with knots[j] <= p < knots[j+1], for knots[0] <= p < knots[last].
func (g *Generator) find(p float64) int {
	i := sort.SearchFloat64s(g.knots, p)
	if i < len(g.knots) && g.knots[i] == p {
		return i
	}
	return i - 1
}

// Losses returns the two efforts of reporting probability p for the event:
// yes = L(p, yes) = ∫_p^1 (1-c) w(c) dc and no = L(p, no) = ∫_0^p c w(c) dc.
// Outside [0, 1] both are NaN; at an end where the rule is unbounded the
// effort of the outcome ruled out is +Inf.
func (e *Evaluator) Losses(p float64) (yes, no float64) {
	g := e.g
	if !(p >= 0 && p <= 1) {
		return math.NaN(), math.NaN()
	}
	last := len(g.knots) - 1
	switch {
	case p < g.knots[0]:
		yes = g.suffixYes[0] + g.yesLo.integral(p, loCut)
		no = g.noLo.integral(0, p)
	case p >= g.knots[last]:
		yes = g.yesHi.integral(0, 1-p)
		no = g.prefixNo[last] + g.noHi.integral(1-p, hiCut)
	default:
		j := g.find(p)
		yes = e.panel(e.fYes, p, g.knots[j+1]) + g.suffixYes[j+1]
		no = g.prefixNo[j] + e.panel(e.fNo, g.knots[j], p)
	}
	return yes, no
}

// Binary returns h(p) = H(p, 1-p), its derivative h'(p) and the weight
// w(p) = -h”(p).
func (e *Evaluator) Binary(p float64) (h, dh, w float64) {
	yes, no := e.Losses(p)
	return mul0(p, yes) + mul0(1-p, no), yes - no, e.Weight(p)
}

func (e *Evaluator) split(p []float64) (s, t float64) {
	if len(p) != 2 {
		panic(fmt.Sprintf("emphasis: %d probabilities given; the generator is for 2 outcomes", len(p)))
	}
	s = p[0] + p[1]
	if !(s > 0) {
		return math.NaN(), math.NaN()
	}
	return s, p[0] / s
}

// Value returns H(p).
func (e *Evaluator) Value(p []float64) float64 {
	s, t := e.split(p)
	h, _, _ := e.Binary(t)
	return s * h
}

// Gradient writes (L(p, yes), L(p, no)) into grad and returns H(p).
func (e *Evaluator) Gradient(grad, p []float64) float64 {
	s, t := e.split(p)
	if len(grad) != 2 {
		panic("emphasis: gradient needs 2 entries")
	}
	yes, no := e.Losses(t)
	grad[0], grad[1] = yes, no
	return s * (mul0(t, yes) + mul0(1-t, no))
}

// Hessian writes the second partials of the homogeneous extension,
// -w(t)/s · [(1-t)², -t(1-t); -t(1-t), t²] with t = p1/s, into hess
// (row-major), the gradient into grad, and returns H(p).
func (e *Evaluator) Hessian(hess, grad, p []float64) float64 {
	if len(hess) != 4 {
		panic("emphasis: Hessian needs 4 entries")
	}
	h := e.Gradient(grad, p)
	s, t := e.split(p)
	w := -e.Weight(t) / s
	u := 1 - t
	hess[0] = mul0(w, u*u)
	hess[1] = -mul0(w, t*u)
	hess[2] = hess[1]
	hess[3] = mul0(w, t*t)
	return h
}

// mul0 multiplies with the convention 0 · ±Inf = 0; NaN stays NaN.
func mul0(a, b float64) float64 {
	if a == 0 && b == b || b == 0 && a == a {
		return 0
	}
	return a * b
}
