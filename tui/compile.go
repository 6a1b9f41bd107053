package tui

import (
	"fmt"

	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/emphasis"
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

// pointScope is the formula scope of a point-forecast payout: the report
// x and the outcome y, as verify/pointcheck compiles it.
func pointScope(d *design.Design) formula.Scope {
	return formula.Scope{Vars: []string{"x", "y"}, Params: d.Params}
}

// compiled is a design turned into something that can be evaluated: a
// Bregman rule in generator mode, one payout program per outcome in
// payout mode.
type compiled struct {
	d     *design.Design // a private copy
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

// designRule builds the Bregman rule of a generator or emphasis design;
// warnings are remarks to show beside it (an emphasis weight that makes
// the rule unbounded, say).
func designRule(d *design.Design) (r *bregman.Rule, params []formula.ParamValue, warnings []string, err error) {
	switch d.Mode {
	case design.ModeGenerator, "":
		r, err = d.Rule()
		if err != nil {
			return nil, nil, nil, err
		}
		if f, ok := r.Gen.(*bregman.Formula); ok {
			params = f.Program().Params()
		}
		return r, params, nil, nil
	case design.ModeEmphasis:
		if d.N() != 2 {
			return nil, nil, nil, fmt.Errorf("an emphasis weight designs rules for 2 outcomes; the design has %d", d.N())
		}
		g, err := emphasis.New(d.Formula, emphasis.Options{Params: d.Params})
		if err != nil {
			return nil, nil, nil, err
		}
		if err := g.Diagnostics().Problem(); err != nil {
			return nil, nil, nil, err
		}
		return &bregman.Rule{Gen: g, Labels: d.Labels}, g.Program().Params(), g.Diagnostics().Warnings(), nil
	}
	return nil, nil, nil, fmt.Errorf("a %s design has no rule over outcomes", d.Mode)
}

// compileDesign compiles a copy of d. It never panics; trouble is in err.
func compileDesign(d *design.Design) *compiled {
	c := &compiled{d: d}
	switch d.Mode {
	case design.ModeGenerator, design.ModeEmphasis, "":
		c.rule, c.params, c.warnings, c.err = designRule(d)
	case design.ModePoint:
		if len(d.Interval) != 2 || !(d.Interval[0] < d.Interval[1]) {
			c.err = fmt.Errorf("a point-forecast design needs an interval lo < hi (Interval row)")
			return c
		}
		g, err := point.New(d.Formula, d.Interval[0], d.Interval[1], point.Options{Params: d.Params})
		if err != nil {
			c.err = err
			return c
		}
		c.point, c.params = g, g.Program().Params()
	case design.ModePointPayout:
		{
			if !(d.Interval[0] < d.Interval[1]) {
				c.err = fmt.Errorf("a point-forecast payout needs an interval lo < hi (Interval row)")
				return c
			}
			prog, err := formula.CompileString(d.Formula, pointScope(d))
			if err == nil {
				c.pointPay, err = pointcheck.NewPayout(d.Formula, d.Params)
			}
			if err != nil {
				c.err = err
				return c
			}
			c.pointProg, c.params = prog, prog.Params()
			return c
		}
	case design.ModePayout:
		for y := 1; y <= d.N(); y++ {
			prog, err := formula.CompileString(d.Formula, formula.Scope{
				Outcomes: d.N(), Ordered: d.Ordered, Weights: d.Weights, Params: d.Params, Payout: true, Outcome: y,
			})
			if err != nil {
				c.err = err
				return c
			}
			c.payout = append(c.payout, prog)
		}
		c.params = c.payout[0].Params()
	default:
		c.err = fmt.Errorf("mode %q is not one the workbench knows", d.Mode)
	}
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
