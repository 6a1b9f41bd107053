// Package payout compiles a payment formula pay(p, y) — what a contract
// pays for report p when outcome y happens, in reward orientation (more is
// better for the forecaster) — so that it can be audited for honesty.
//
// The formula is compiled once per outcome y with formula.Scope{Payout:
// true, Outcome: y}, so y, hit, hitc and p[y] are constants of each
// compilation and evaluating pay costs one pass of a straight-line
// program per outcome.
package payout

import (
	"fmt"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
)

// Options describe the outcomes a payout formula is compiled for.
type Options struct {
	// Outcomes is n, 2..12.
	Outcomes int
	// Ordered allows csum() and hitc.
	Ordered bool
	// Weights are the outcome weights w seen inside sum(); nil means all 1.
	Weights []float64
	// Params override parameter values set in the formula.
	Params map[string]float64
}

// Payout is a compiled payment formula. It is immutable and shared; each
// goroutine evaluates it through its own Evaluator.
type Payout struct {
	// Source is the formula text as given.
	Source string
	progs  []*formula.Program
}

// New compiles src for every outcome y = 1..opt.Outcomes. A formula error
// is returned as the *formula.Error of the first outcome it occurs for
// (the same for every outcome unless the formula indexes p[k] in a way
// only some outcomes reach), wrapped with the outcome when it is not the
// first.
func New(src string, opt Options) (*Payout, error) {
	if opt.Outcomes < 2 || opt.Outcomes > formula.MaxOutcomes {
		return nil, fmt.Errorf("payout: %d outcomes; need 2..%d", opt.Outcomes, formula.MaxOutcomes)
	}
	p := &Payout{Source: src, progs: make([]*formula.Program, opt.Outcomes)}
	for y := 1; y <= opt.Outcomes; y++ {
		prog, err := formula.CompileString(src, formula.Scope{
			Outcomes: opt.Outcomes, Ordered: opt.Ordered, Weights: opt.Weights, Params: opt.Params,
			Payout: true, Outcome: y,
		})
		if err != nil {
			if y == 1 {
				return nil, err
			}
			return nil, fmt.Errorf("payout for outcome %d: %w", y, err)
		}
		p.progs[y-1] = prog
	}
	return p, nil
}

// Outcomes is the number of outcomes n.
func (p *Payout) Outcomes() int { return len(p.progs) }

// Program returns the compilation for outcome y (1-based).
func (p *Payout) Program(y int) *formula.Program { return p.progs[y-1] }

// Evaluator computes payments without allocating. It is used by one
// goroutine; make one per worker with NewEvaluator.
type Evaluator struct {
	ms  []*formula.Machine
	pay []float64
}

// NewEvaluator returns an Evaluator for p.
func (p *Payout) NewEvaluator() *Evaluator {
	e := &Evaluator{ms: make([]*formula.Machine, len(p.progs)), pay: make([]float64, len(p.progs))}
	for i, prog := range p.progs {
		e.ms[i] = prog.NewMachine()
	}
	return e
}

func (e *Evaluator) check(name string, v []float64) {
	if len(v) != len(e.ms) {
		panic(fmt.Sprintf("payout: %s has %d entries for %d outcomes", name, len(v), len(e.ms)))
	}
}

// Pay returns pay(report, y) for outcome y (1-based). A non-finite payment
// is a value, not an error.
func (e *Evaluator) Pay(report []float64, y int) float64 {
	e.check("report", report)
	return e.ms[y-1].Value(report)
}

// Pays writes pay(report, y) for every outcome into dst (dst[y-1]).
func (e *Evaluator) Pays(dst, report []float64) {
	e.check("report", report)
	e.check("payment", dst)
	for i, m := range e.ms {
		dst[i] = m.Value(report)
	}
}

// Expected returns sum_y q_y pay(report, y), the expected payment of
// report for a forecaster whose belief is q, with the convention that an
// outcome of probability 0 contributes nothing even where its payment is
// infinite.
func (e *Evaluator) Expected(q, report []float64) float64 {
	e.check("belief", q)
	e.Pays(e.pay, report)
	return bregman.Dot(q, e.pay)
}
