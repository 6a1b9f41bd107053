package tui

import (
	"scorewright"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/formula"
	"scorewright/generator/point"
	"scorewright/verify/pointcheck"
)

// onInterval reports whether d is about a number on an interval rather
// than outcomes: a point-forecast generator, or a point-forecast payout
// pay(x, y) under audit (payout mode with an interval).
func onInterval(d *design.Design) bool {
	return d.Mode.OnInterval()
}

// compiled is a design turned into something that can be evaluated: a
// Bregman rule in generator mode, one payout program per outcome in
// payout mode. It is built from scorewright.Open, the one place a
// design's mode is switched on.
type compiled struct {
	d     *design.Design // a private copy
	open  *scorewright.Rule
	rule  *bregman.Rule
	point *point.Generator
	// pointPay is a point-forecast payout pay(x, y) under audit, and
	// pointProg its program (for the picture).
	pointPay  *pointcheck.Payout
	pointProg *formula.Program
	payout    []*formula.Program
	params    []formula.ParamValue
	warnings  []string
	err       error
}

// designRule builds the Bregman rule of a generator or emphasis design.
func designRule(d *design.Design) (*bregman.Rule, error) {
	r, err := outcomesRule(d)
	if err != nil {
		return nil, err
	}
	return r.OverOutcomes()
}

// outcomesRule opens d as a rule over outcomes for the money side (fits,
// backtests, risk); a design of another kind gives a
// *scorewright.NeedsOutcomesError.
func outcomesRule(d *design.Design) (*scorewright.Rule, error) {
	r, err := scorewright.Open(d)
	if err != nil {
		return nil, err
	}
	if _, err := r.OverOutcomes(); err != nil {
		return nil, err
	}
	return r, nil
}

// compileDesign compiles a copy of d. It never panics; trouble is in err.
func compileDesign(d *design.Design) *compiled {
	c := &compiled{d: d}
	r, err := scorewright.Open(d)
	if err != nil {
		c.err = err
		return c
	}
	c.open, c.rule, c.point = r, r.Outcomes(), r.Point()
	c.pointPay, c.pointProg = r.PointPayout()
	if p := r.Payout(); p != nil {
		for y := 1; y <= p.Outcomes(); y++ {
			c.payout = append(c.payout, p.Program(y))
		}
	}
	c.params, c.warnings = r.Params(), r.Warnings()
	return c
}

// onInterval reports whether the compiled design is about a number on an
// interval (drawn over it, one mark for the report).
func (c *compiled) onInterval() bool { return c.point != nil || c.pointPay != nil }

// ok reports whether the design compiled.
func (c *compiled) ok() bool { return c != nil && c.err == nil }

// reward reports whether scores are payments (higher is better) rather
// than efforts (lower is better).
func (c *compiled) reward() bool { return c.payout != nil || c.pointPay != nil }

// sampler evaluates a compiled design at reports. It owns scratch space
// and belongs to one goroutine.
type sampler struct {
	n        int
	reward   bool
	sc       *bregman.Scorer
	machines []*formula.Machine
	vars     []float64
	a, b     []float64
}

func (c *compiled) newSampler() *sampler {
	if c.point != nil || c.pointPay != nil {
		return nil // point designs are drawn by renderPoint and renderPointPayout
	}
	n := c.d.N()
	s := &sampler{n: n, reward: c.reward(), a: make([]float64, n), b: make([]float64, n)}
	if c.rule != nil {
		s.sc = c.rule.NewScorer()
	} else {
		for _, p := range c.payout {
			s.machines = append(s.machines, p.NewMachine())
		}
		s.vars = make([]float64, c.payout[0].NumVars())
	}
	return s
}

// scores writes the score of report p for every outcome into dst: the
// effort L(p, k) in generator mode, the payment in payout mode.
func (s *sampler) scores(dst, p []float64) {
	if s.sc != nil {
		s.sc.Efforts(dst, p)
		return
	}
	copy(s.vars, p)
	for k, m := range s.machines {
		dst[k] = m.Value(s.vars)
	}
}

// regret is what a forecaster with belief q loses in expectation by
// reporting p instead of q: Phi(q, p) - Phi(q, q) for efforts, the
// expected pay of q minus that of p for payments. It is at least 0 for
// every p exactly when the rule is proper.
func (s *sampler) regret(q, p []float64) float64 {
	s.scores(s.a, p)
	s.scores(s.b, q)
	d := bregman.Dot(q, s.a) - bregman.Dot(q, s.b)
	if s.reward {
		d = -d
	}
	return d
}
