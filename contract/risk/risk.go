package risk

import (
	"context"
	"errors"
	"fmt"
	"math"

	"scorewright/generator/bregman"
	"scorewright/internal/num"
	"scorewright/internal/pool"
)

// Contract is the money side: pay = A - B L(p, k), B > 0.
type Contract struct {
	A, B float64
	// MinPay is the smallest payment the contract can make (its floor); a
	// CRRA forecaster needs Wealth + MinPay > 0 (>= 0 below R = 1).
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
	// tie is the difference in certainty equivalent below which two
	// reports count as equally good: rounding of the money amounts.
	tie float64
	// scratch
	q, eff, x, pi, hess, g, trial, dir []float64
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
	case math.IsNaN(wealth) || math.IsInf(wealth, 0):
		return nil, fmt.Errorf("risk: initial wealth %g is not a finite number", wealth)
	case u.Kind == CRRA && u.Coef >= 1 && !(wealth+c.MinPay > 0):
		return nil, fmt.Errorf("risk: CRRA utility with coefficient %g needs positive final wealth; initial wealth %g plus the smallest payment %g is not positive (give --wealth)", u.Coef, wealth, c.MinPay)
	case u.Kind == CRRA && u.Coef != 0 && !(wealth+c.MinPay >= 0):
		return nil, fmt.Errorf("risk: CRRA utility is not defined at negative wealth; initial wealth %g plus the smallest payment %g is negative (give --wealth)", wealth, c.MinPay)
	}
	scale := math.Abs(wealth) + math.Abs(c.A) + math.Abs(c.MinPay)
	mk := func() []float64 { return make([]float64, n) }
	return &Solver{rule: rule, c: c, u: u, wealth: wealth, n: n, sc: rule.NewScorer(),
		tie: 64*0x1p-52*scale + 1e-300,
		q:   mk(), eff: mk(), x: mk(), pi: mk(), hess: make([]float64, n*n), g: mk(), trial: mk(), dir: mk()}, nil
}

// Result is the best report for one belief.
type Result struct {
	Belief, Report []float64
	// Size is the distortion max_k |report_k - belief_k| in probability
	// points (percent).
	Size float64
	// Status says in words how the report was confirmed (the first-order
	// condition and its residual, or why it could not be checked).
	Status string
	// ExpectedPay is the expected payment of the report under the belief;
	// TruthfulPay that of the truthful report. Their difference is what
	// the forecaster gives up in expected money for the risk they prefer.
	ExpectedPay, TruthfulPay float64
}

// ErrNotConverged says that the search ended where the first-order
// condition does not hold.
var ErrNotConverged = errors.New("risk: the search did not reach a best report")

// value is the certainty equivalent of report p for the solver's belief:
// final wealth W + A - B L(p, k) for each outcome k.
func (s *Solver) value(p []float64) float64 {
	s.sc.Efforts(s.eff, p)
	for k, l := range s.eff {
		s.x[k] = s.wealth + s.c.A - s.c.B*l
	}
	return s.u.certainty(s.x, s.q)
}

// slope writes into s.g a positive multiple of the gradient of expected
// utility in the report, G = -H”(pi - p) with pi the belief tilted by
// marginal utility (see weights), and returns the largest |H”| entry; it
// returns false where the curvature is not finite.
func (s *Solver) slope(p []float64) (float64, bool) {
	s.sc.Efforts(s.eff, p)
	for k, l := range s.eff {
		s.x[k] = s.wealth + s.c.A - s.c.B*l
	}
	s.u.weights(s.pi, s.x, s.q)
	s.sc.Hessian(s.hess, p)
	n, big := s.n, 0.0
	for j := 0; j < n; j++ {
		var v float64
		for i := 0; i < n; i++ {
			h := s.hess[j*n+i]
			if math.IsNaN(h) || math.IsInf(h, 0) || math.IsNaN(s.pi[i]) {
				return 0, false
			}
			big = math.Max(big, math.Abs(h))
			v += h * (s.pi[i] - p[i])
		}
		s.g[j] = -v
	}
	return big, true
}

// setBelief stores q and returns the truthful report (raised to the report
// floor, the difference taken from the largest entry) and its expected pay.
func (s *Solver) setBelief(q []float64) ([]float64, float64) {
	copy(s.q, q)
	truth := append([]float64(nil), q...)
	normalise(truth)
	big := 0
	for i, v := range truth {
		if v > truth[big] {
			big = i
		}
	}
	for i, v := range truth {
		if i != big && v < s.c.ReportFloor {
			truth[big] -= s.c.ReportFloor - v
			truth[i] = s.c.ReportFloor
		}
	}
	return truth, s.c.A - s.c.B*s.sc.Expected(q, truth)
}

// Best returns the report that maximises the forecaster's expected utility
// for belief q (a probability vector over the rule's outcomes), over every
// report that gives each outcome at least the report floor.
func (s *Solver) Best(q []float64) (*Result, error) {
	if len(q) != s.n {
		panic(fmt.Sprintf("risk: belief has %d entries for %d outcomes", len(q), s.n))
	}
	truth, truthPay := s.setBelief(q)
	p, v := s.search(truth)
	if math.IsInf(v, -1) || math.IsNaN(v) {
		return nil, fmt.Errorf("%w: no report has a defined utility for belief %s", ErrNotConverged, num.Format(q))
	}
	status, err := s.confirm(p)
	if err != nil {
		return nil, err
	}
	out := &Result{Belief: append([]float64(nil), q...), Report: p, Status: status, TruthfulPay: truthPay}
	out.ExpectedPay = s.c.A - s.c.B*s.sc.Expected(q, p)
	for i := range q {
		out.Size = math.Max(out.Size, 100*math.Abs(p[i]-q[i]))
	}
	return out, nil
}

// foc is the largest first-order residual, relative to the curvature,
// accepted as a best report: a millionth of a probability point's worth.
const foc = 1e-8

// confirm checks the first-order (Karush–Kuhn–Tucker) condition at p: the
// gradient is equal on the outcomes above the floor and no larger on the
// outcomes at it.
func (s *Solver) confirm(p []float64) (string, error) {
	big, ok := s.slope(p)
	if !ok {
		return "best value of a grid and bracketed line searches; the rule's curvature is not finite at the report, so the first-order condition was not checked", nil
	}
	if big == 0 {
		return "first-order condition met (the rule is flat there)", nil
	}
	lo, hi, top := math.Inf(1), math.Inf(-1), math.Inf(-1)
	for j, x := range p {
		if x > s.c.ReportFloor+1e-12 {
			lo, hi = math.Min(lo, s.g[j]), math.Max(hi, s.g[j])
		} else {
			top = math.Max(top, s.g[j])
		}
	}
	res := hi - lo
	if top > lo {
		res = math.Max(res, top-lo)
	}
	res /= big
	if !(res <= foc) {
		return "", fmt.Errorf("%w: the first-order condition is off by %.2g (relative to the curvature) at report %s", ErrNotConverged, res, num.Format(p))
	}
	return fmt.Sprintf("first-order condition met (residual %.1g relative to the curvature)", res), nil
}

// Certainty returns the certainty equivalent of report p for belief q: the
// sure final wealth the forecaster values as much as W + A - B L(p, k).
func (s *Solver) Certainty(q, p []float64) float64 {
	if len(q) != s.n || len(p) != s.n {
		panic(fmt.Sprintf("risk: belief and report need %d entries", s.n))
	}
	copy(s.q, q)
	return s.value(p)
}

// BestOf returns the index of the row of pays (pays[i][k]: what menu item
// i pays when outcome k happens, e.g. a rounded table) with the largest
// expected utility for belief q: what a forecaster held to the menu picks.
// It ranks rows by the same certainty equivalent as Best, so the two agree
// in direction for every utility.
func (s *Solver) BestOf(q []float64, pays [][]float64) int {
	if len(q) != s.n {
		panic(fmt.Sprintf("risk: belief has %d entries for %d outcomes", len(q), s.n))
	}
	best, at := math.Inf(-1), -1
	for i, row := range pays {
		if len(row) != s.n {
			panic(fmt.Sprintf("risk: pay row %d has %d entries for %d outcomes", i, len(row), s.n))
		}
		for k, v := range row {
			s.x[k] = s.wealth + v
		}
		if u := s.u.certainty(s.x, q); u > best {
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
	// Largest is the point of largest distortion (the first of those
	// within 1e-9 points of it).
	Largest Result
	// Failed are the beliefs the search could not settle, each with the
	// reason; they are left out of Points.
	Failed []Failure
}

// Failure is a belief whose best report was not found.
type Failure struct {
	Belief []float64
	Err    error
}

// Distortion solves Best for every belief, honouring ctx and calling
// progress (when not nil) after each. A belief that fails goes to
// Curve.Failed and the curve goes on; only a cancelled ctx is an error.
func (s *Solver) Distortion(ctx context.Context, beliefs [][]float64, progress pool.Progress) (*Curve, error) {
	c := &Curve{Largest: Result{Size: -1}}
	for i, q := range beliefs {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if r, err := s.Best(q); err != nil {
			c.Failed = append(c.Failed, Failure{Belief: append([]float64(nil), q...), Err: err})
		} else {
			c.Points = append(c.Points, *r)
			// Ties (a symmetric rule at q and 1 - q) keep the first, so
			// rounding noise does not pick the side.
			if r.Size > c.Largest.Size+1e-9 {
				c.Largest = *r
			}
		}
		if progress != nil {
			progress(pool.Step{Done: float64(i + 1), Total: float64(len(beliefs)), Unit: pool.UnitWork, Last: i == len(beliefs)-1})
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
