package risk

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"

	"scorewright/generator/bregman"
)

// Contract is the money side: pay = A - B L(p, k), B > 0.
type Contract struct {
	A, B float64
	// MinPay is the smallest payment the contract can make (its floor); a
	// CRRA forecaster needs Wealth + MinPay > 0.
	MinPay float64
	// ReportFloor is the smallest probability a report may give an
	// outcome (0: none).
	ReportFloor float64
}

// Solver finds expected-utility-maximising reports. It owns scratch space;
// use one per goroutine.
type Solver struct {
	rule   *bregman.Rule
	c      Contract
	u      Utility
	wealth float64
	n      int
	sc     *bregman.Scorer
	// scratch
	p, eff, hess, hp, g, sig []float64
	q                        []float64
	ref                      float64
}

// NewSolver prepares a solver for a rule paid under contract c to a
// forecaster with utility u and initial wealth.
func NewSolver(rule *bregman.Rule, c Contract, u Utility, wealth float64) (*Solver, error) {
	n := rule.Outcomes()
	switch {
	case !(c.B > 0) || math.IsInf(c.B, 0) || math.IsNaN(c.A) || math.IsInf(c.A, 0):
		return nil, fmt.Errorf("risk: contract pay = %g - %g L needs a finite A and B > 0", c.A, c.B)
	case c.ReportFloor < 0 || c.ReportFloor*float64(n) >= 1:
		return nil, fmt.Errorf("risk: report floor %g leaves no reports for %d outcomes", c.ReportFloor, n)
	case u.Kind == CRRA && u.Coef != 0 && !(wealth+c.MinPay > 0):
		return nil, fmt.Errorf("risk: CRRA utility needs positive final wealth; initial wealth %g plus the smallest payment %g is not positive (give --wealth)", wealth, c.MinPay)
	}
	return &Solver{rule: rule, c: c, u: u, wealth: wealth, n: n, sc: rule.NewScorer(),
		p: make([]float64, n), eff: make([]float64, n), hess: make([]float64, n*n), hp: make([]float64, n),
		g: make([]float64, n), sig: make([]float64, n), q: make([]float64, n)}, nil
}

// Result is the best report for one belief. When the best report is a
// corner of the simplex (a risk-seeking forecaster under a bounded rule)
// the softmax coordinates run off to infinity and the report comes within
// about 1e-6 of the corner before the gradient test stops the search.
type Result struct {
	Belief, Report []float64
	// Size is the distortion max_k |report_k - belief_k| in probability
	// points (percent).
	Size float64
	// Status is the optimiser's termination status.
	Status string
	// ExpectedPay is the expected payment of the report under the belief;
	// TruthfulPay that of the truthful report. Their difference is what
	// the forecaster gives up in expected money for less risk.
	ExpectedPay, TruthfulPay float64
}

// report maps softmax coordinates z (length n-1, z_n = 0) to a report
// above the floor: p = f + (1 - n f) softmax(z).
func (s *Solver) report(z []float64) {
	m := 0.0
	for _, v := range z {
		m = math.Max(m, v)
	}
	var t float64
	for i := 0; i < s.n; i++ {
		zi := 0.0
		if i < s.n-1 {
			zi = z[i]
		}
		s.sig[i] = math.Exp(zi - m)
		t += s.sig[i]
	}
	f := s.c.ReportFloor
	for i := range s.sig {
		s.sig[i] /= t
		s.p[i] = f + (1-float64(s.n)*f)*s.sig[i]
	}
}

// objective is minus expected (normalised) utility, in units of effort:
// -sum_k q_k v(W + A - B L_k) / (B v'(ref)).
func (s *Solver) objective(z []float64) float64 {
	s.report(z)
	s.sc.Efforts(s.eff, s.p)
	var eu float64
	for k, qk := range s.q {
		if qk == 0 {
			continue
		}
		v, _ := s.u.normalised(s.wealth+s.c.A-s.c.B*s.eff[k], s.ref)
		eu += qk * v
	}
	if math.IsNaN(eu) {
		return math.Inf(1)
	}
	return -eu / (s.c.B * s.slopeRef())
}

func (s *Solver) slopeRef() float64 {
	_, d := s.u.normalised(s.ref, s.ref)
	return d
}

// gradient writes d objective / dz.
func (s *Solver) gradient(grad, z []float64) {
	s.report(z)
	s.sc.Efforts(s.eff, s.p)
	s.sc.Hessian(s.hess, s.p)
	n := s.n
	for j := 0; j < n; j++ {
		var v float64
		for i := 0; i < n; i++ {
			v += s.hess[j*n+i] * s.p[i]
		}
		s.hp[j] = v
	}
	// G_j = sum_k q_k (v'(x_k)/v'(ref)) dL_k/dp_j, dL_k/dp_j = H_kj - (Hp)_j.
	d0 := s.slopeRef()
	for j := 0; j < n; j++ {
		s.g[j] = 0
	}
	for k, qk := range s.q {
		if qk == 0 {
			continue
		}
		_, d := s.u.normalised(s.wealth+s.c.A-s.c.B*s.eff[k], s.ref)
		wk := qk * d / d0
		for j := 0; j < n; j++ {
			s.g[j] += wk * (s.hess[k*n+j] - s.hp[j])
		}
	}
	// Chain through p = f + (1 - n f) softmax(z).
	scale := 1 - float64(n)*s.c.ReportFloor
	var mean float64
	for i := 0; i < n; i++ {
		mean += s.g[i] * s.sig[i]
	}
	for m := 0; m < n-1; m++ {
		grad[m] = scale * s.sig[m] * (s.g[m] - mean)
	}
}

// stallGradient is the largest gradient (in effort units per softmax
// coordinate) at which a stalled optimiser's result is accepted: the line
// search has hit floating-point resolution of the objective, and a gradient
// this small is negligible next to efforts of order 1.
const stallGradient = 1e-8

// ErrNotConverged wraps an optimiser that stopped without converging.
var ErrNotConverged = errors.New("risk: the optimiser did not converge")

// setBelief stores q and sets the reference wealth to the truthful
// forecaster's expected final wealth; it returns the truthful report
// (raised to the report floor) and its expected pay.
func (s *Solver) setBelief(q []float64) ([]float64, float64) {
	copy(s.q, q)
	truth := make([]float64, s.n)
	for i, v := range q {
		truth[i] = math.Max(v, s.c.ReportFloor)
	}
	normalise(truth)
	pay := s.c.A - s.c.B*s.sc.Expected(q, truth)
	s.ref = s.wealth + pay
	return truth, pay
}

// Best returns the report that maximises the forecaster's expected utility
// for belief q (a probability vector over the rule's outcomes).
func (s *Solver) Best(q []float64) (*Result, error) {
	if len(q) != s.n {
		panic(fmt.Sprintf("risk: belief has %d entries for %d outcomes", len(q), s.n))
	}
	truth, truthPay := s.setBelief(q)
	if s.u.Kind == CRRA && s.u.Coef != 0 && !(s.ref > 0) {
		return nil, fmt.Errorf("risk: expected final wealth %g is not positive; CRRA needs positive wealth", s.ref)
	}
	f := s.c.ReportFloor
	z0 := make([]float64, s.n-1)
	last := math.Max((truth[s.n-1]-f)/(1-float64(s.n)*f), 1e-12)
	for i := range z0 {
		z0[i] = math.Log(math.Max((truth[i]-f)/(1-float64(s.n)*f), 1e-12) / last)
	}
	prob := optimize.Problem{Func: s.objective, Grad: s.gradient}
	set := &optimize.Settings{GradientThreshold: 1e-11, MajorIterations: 2000,
		Converger: &optimize.FunctionConverge{Absolute: 1e-15, Relative: 1e-15, Iterations: 50}}
	res, err := optimize.Minimize(prob, z0, set, &optimize.BFGS{})
	if res == nil {
		return nil, fmt.Errorf("%w: %v", ErrNotConverged, err)
	}
	status := res.Status.String()
	switch res.Status {
	case optimize.GradientThreshold, optimize.FunctionConvergence, optimize.Success, optimize.MethodConverge, optimize.StepConvergence:
	default:
		// A line search that stalls at the limit of floating-point
		// resolution has converged if the gradient there is negligible.
		gr := make([]float64, len(res.X))
		s.gradient(gr, res.X)
		gmax := 0.0
		for _, v := range gr {
			gmax = math.Max(gmax, math.Abs(v))
		}
		if !(gmax <= stallGradient) {
			return nil, fmt.Errorf("%w: status %v, gradient %.3g (%v)", ErrNotConverged, res.Status, gmax, err)
		}
		status = fmt.Sprintf("%v, accepted: gradient %.2g <= %g", res.Status, gmax, stallGradient)
	}
	s.report(res.X)
	out := &Result{Belief: append([]float64(nil), q...), Report: append([]float64(nil), s.p...), Status: status, TruthfulPay: truthPay}
	out.ExpectedPay = s.c.A - s.c.B*s.sc.Expected(q, out.Report)
	for i := range q {
		out.Size = math.Max(out.Size, 100*math.Abs(out.Report[i]-q[i]))
	}
	return out, nil
}

// Utility returns the forecaster's expected utility of report p under
// belief q, normalised as in Best (comparable between reports for the same
// belief only).
func (s *Solver) Utility(q, p []float64) float64 {
	if len(q) != s.n || len(p) != s.n {
		panic(fmt.Sprintf("risk: belief and report need %d entries", s.n))
	}
	s.setBelief(q)
	s.sc.Efforts(s.eff, p)
	for k := range s.eff {
		s.eff[k] = s.c.A - s.c.B*s.eff[k]
	}
	return s.utilityOf(q, s.eff)
}

func (s *Solver) utilityOf(q, pays []float64) float64 {
	var eu float64
	for k, qk := range q {
		if qk != 0 {
			v, _ := s.u.normalised(s.wealth+pays[k], s.ref)
			eu += qk * v
		}
	}
	return eu
}

// BestOf returns the index of the row of pays (pays[i][k]: what menu item
// i pays when outcome k happens, e.g. a rounded table) with the largest
// expected utility for belief q: what a forecaster held to the menu picks.
func (s *Solver) BestOf(q []float64, pays [][]float64) int {
	if len(q) != s.n {
		panic(fmt.Sprintf("risk: belief has %d entries for %d outcomes", len(q), s.n))
	}
	s.setBelief(q)
	best, at := math.Inf(-1), -1
	for i, row := range pays {
		if len(row) != s.n {
			panic(fmt.Sprintf("risk: pay row %d has %d entries for %d outcomes", i, len(row), s.n))
		}
		if u := s.utilityOf(q, row); u > best {
			best, at = u, i
		}
	}
	return at
}

func normalise(p []float64) {
	var t float64
	for _, v := range p {
		t += v
	}
	for i := range p {
		p[i] /= t
	}
}

// Curve is the distortion over a set of beliefs.
type Curve struct {
	Points []Result
	// Largest is the point of largest distortion.
	Largest Result
}

// Distortion solves Best for every belief, honouring ctx and calling
// progress (when not nil) after each.
func (s *Solver) Distortion(ctx context.Context, beliefs [][]float64, progress func(done, total int)) (*Curve, error) {
	c := &Curve{Largest: Result{Size: -1}}
	for i, q := range beliefs {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		r, err := s.Best(q)
		if err != nil {
			return nil, fmt.Errorf("belief %v: %w", q, err)
		}
		c.Points = append(c.Points, *r)
		if r.Size > c.Largest.Size {
			c.Largest = *r
		}
		if progress != nil {
			progress(i+1, len(beliefs))
		}
	}
	return c, nil
}

// BinaryBeliefs are beliefs q = floor, floor + step, ..., 1 - floor for
// n = 2 (the end points kept inside the report range).
func BinaryBeliefs(step, floor float64) [][]float64 {
	if !(step > 0) {
		step = 0.01
	}
	lo := math.Max(floor, step)
	// When 1/step and lo/step are whole (0.01, a 1 % floor), belief i is
	// the integer ratio (i + lo/step)/(1/step), the float nearest the
	// decimal: 0.06, not 0.060000000000000005 as lo + 5·step gives.
	K, L := math.Round(1/step), math.Round(lo/step)
	whole := math.Abs(K*step-1) < 1e-9 && math.Abs(L*step-lo) < 1e-9*math.Max(1, lo)
	var out [][]float64
	for i := 0; ; i++ {
		q := lo + float64(i)*step
		if whole {
			q = (L + float64(i)) / K
		}
		if q > 1-lo+1e-12 {
			break
		}
		out = append(out, []float64{q, 1 - q})
	}
	return out
}

// DirectionBeliefs are beliefs on the segments from the uniform belief
// towards each outcome's certainty, at steps fractions of the way
// (excluding both ends); Labels[i] names the direction of belief i by the
// outcome index it heads for.
func DirectionBeliefs(n, steps int) (beliefs [][]float64, toward []int) {
	for k := 0; k < n; k++ {
		for s := 1; s < steps; s++ {
			t := float64(s) / float64(steps)
			q := make([]float64, n)
			for i := range q {
				q[i] = (1 - t) / float64(n)
			}
			q[k] += t
			beliefs = append(beliefs, q)
			toward = append(toward, k)
		}
	}
	return beliefs, toward
}
