// Package steps answers how much research a forecaster buys when it comes
// one observation at a time: before reporting on a yes/no question the
// forecaster may pay a cost per observation, each an outcome drawn from
// the question's true chance θ, and updates a Beta belief about θ. Paid
// by a rule whose truthful expected pay at belief μ is G(μ), a forecaster
// who maximises pay minus cost stops at the state (observations, events
// seen) where G(μ) is at least the expected value of going on. The
// optimal stopping problem is solved exactly by dynamic programming over
// those states (backward induction up to a cap on the number of
// observations), and a forward pass gives the expected number of
// observations bought and the expected error E|report − θ| of the final
// report — the quantity whose small-cost behaviour Neyman, Noarov &
// Weinberg ("Binary Scoring Rules that Incentivize Precision", EC 2021)
// measure with their incentivization index; here it is computed at the
// stated cost, not in the limit.
package steps

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// Settings are the cost and the cap. The zero value of MaxSteps means the
// default.
type Settings struct {
	// Cost is the price of one observation in currency (>= 0).
	Cost float64
	// MaxSteps caps the observations (default 1000, at most 5000): a
	// forecaster at the cap must stop.
	MaxSteps int
}

// DefaultMaxSteps is the cap used when Settings.MaxSteps is 0.
const DefaultMaxSteps = 1000

// Result is what a pay-minus-cost maximiser does under one rule.
type Result struct {
	// Steps is the expected number of observations bought.
	Steps float64
	// Error is E|report − θ| after the forecaster stops; Before is the
	// same with no research (the prior's mean absolute deviation).
	Error, Before float64
	// Value is the expected pay minus cost of the optimal policy; Pay and
	// Spent split it.
	Value, Pay, Spent float64
	// AtCap is the chance of being stopped by the cap, not by choice.
	AtCap float64
	// Buys says whether the forecaster buys any observation at all.
	Buys bool
	// MaxSteps is the cap used.
	MaxSteps int
}

// Solve runs the dynamic program for a forecaster whose belief about θ
// is Beta(a, b) and whose truthful expected pay at belief μ is G(μ). A
// forecaster who is indifferent stops (pays for nothing that gains
// nothing). ctx is checked every few rows.
func Solve(ctx context.Context, G func(mu float64) float64, a, b float64, s Settings) (*Result, error) {
	if !(a > 0 && b > 0) || math.IsInf(a+b, 0) {
		return nil, fmt.Errorf("steps: the Beta belief needs positive finite parameters, got %g, %g", a, b)
	}
	if !(s.Cost >= 0) || math.IsInf(s.Cost, 0) {
		return nil, fmt.Errorf("steps: the cost per observation must be a finite amount of at least 0, got %g", s.Cost)
	}
	T := s.MaxSteps
	if T == 0 {
		T = DefaultMaxSteps
	}
	if T < 1 || T > 5000 {
		return nil, fmt.Errorf("steps: the cap on observations must be in 1..5000, got %d", T)
	}
	mu := func(t, k int) float64 { return (a + float64(k)) / (a + b + float64(t)) }
	// Backward induction. next[k] is the value at t+1 with k events seen;
	// stop[t][k] records the decision.
	next := make([]float64, T+1)
	for k := 0; k <= T; k++ {
		next[k] = G(mu(T, k))
		if math.IsNaN(next[k]) || math.IsInf(next[k], 0) {
			return nil, fmt.Errorf("steps: the rule's expected pay is %v at belief %g", next[k], mu(T, k))
		}
	}
	stop := make([][]bool, T)
	cur := make([]float64, T+1)
	for t := T - 1; t >= 0; t-- {
		if t%64 == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		stop[t] = make([]bool, t+1)
		for k := 0; k <= t; k++ {
			m := mu(t, k)
			here := G(m)
			if math.IsNaN(here) || math.IsInf(here, 0) {
				return nil, fmt.Errorf("steps: the rule's expected pay is %v at belief %g", here, m)
			}
			goOn := -s.Cost + m*next[k+1] + (1-m)*next[k]
			// Going on must win by more than rounding in the sums.
			if goOn > here+1e-12*(math.Abs(here)+math.Abs(goOn)) {
				cur[k] = goOn
			} else {
				cur[k], stop[t][k] = here, true
			}
		}
		next, cur = cur, next
	}
	r := &Result{Value: next[0], MaxSteps: T, Before: betaMAD(a, b), Buys: !stop[0][0]}
	forward(r, stop, G, a, b, T, s.Cost)
	if math.IsNaN(r.Error) {
		return nil, errors.New("steps: the expected error is not a number")
	}
	return r, nil
}

// forward passes the chance of each state through the policy, adding up
// the stopping states' observations, pay and error.
func forward(r *Result, stop [][]bool, G func(float64) float64, a, b float64, T int, cost float64) {
	p := []float64{1}
	for t := 0; ; t++ {
		q := make([]float64, t+2)
		for k, pk := range p {
			if pk == 0 {
				continue
			}
			m := (a + float64(k)) / (a + b + float64(t))
			if t == T || stop[t][k] {
				r.Steps += pk * float64(t)
				r.Pay += pk * G(m)
				r.Error += pk * betaMAD(a+float64(k), b+float64(t-k))
				if t == T {
					r.AtCap += pk
				}
				continue
			}
			q[k+1] += pk * m
			q[k] += pk * (1 - m)
		}
		if t == T {
			break
		}
		p = q
	}
	r.Spent = cost * r.Steps
}

// betaMAD is E|θ − μ| for θ ~ Beta(a, b), μ its mean: 2 a^a b^b /
// (B(a, b)(a + b)^(a+b+1)) (the Beta distribution's mean absolute
// deviation, Johnson, Kotz & Balakrishnan, Continuous Univariate
// Distributions vol. 2, ch. 25), in logarithms.
func betaMAD(a, b float64) float64 {
	la, _ := math.Lgamma(a)
	lb, _ := math.Lgamma(b)
	lab, _ := math.Lgamma(a + b)
	return math.Exp(math.Ln2 + a*math.Log(a) + b*math.Log(b) - (la + lb - lab) - (a+b+1)*math.Log(a+b))
}
