package research

import (
	"context"
	"fmt"
	"math"

	"scorewright/contract/budget"
	"scorewright/generator/bregman"
	"scorewright/internal/num"
)

// Valuer evaluates a fitted rule for one forecaster: the truthful expected
// pay G(q) and what a posterior is worth against the base rate. It is used
// by one goroutine.
type Valuer struct {
	fit    *budget.Fit
	s      *bregman.Scorer
	cp, ef []float64
	prior  []float64
	pprior []float64
	pq     []float64
}

// NewValuer returns a Valuer for fit with base rate q0.
func NewValuer(fit *budget.Fit, q0 []float64) *Valuer {
	n := len(q0)
	v := &Valuer{fit: fit, s: fit.Rule().NewScorer(), cp: make([]float64, n), ef: make([]float64, n), pq: make([]float64, n), prior: append([]float64(nil), q0...)}
	// The payments of the base-rate report, exact (unrounded) and after
	// the menu's clamp, as the table formula pays them.
	v.pprior = v.pays(make([]float64, n), q0)
	return v
}

func (v *Valuer) pays(dst, report []float64) []float64 {
	v.s.Efforts(v.ef, budget.ClampReport(v.cp, report, v.fit.Clamp))
	for k, l := range v.ef {
		dst[k] = v.fit.Exact(l)
	}
	return dst
}

// Truthful is G(q) = A - B·Phi(q, q): what a forecaster with belief q
// expects for reporting it, paid by the formula (unrounded; after the
// menu's clamp when it has one). Without a clamp Phi(q, q) is H(q), taken
// from the generator itself: no effort is needed, so a belief on the
// boundary costs no limit of efforts at a report that rules an outcome
// out (and pay is affine in effort, so A - B·H(q) is the mean payment).
func (v *Valuer) Truthful(q []float64) float64 {
	if v.fit.Clamp == 0 {
		return v.fit.Exact(v.s.Entropy(q))
	}
	return bregman.Dot(q, v.pays(v.pq, q))
}

// GainAt is what the posterior q is worth in the forecaster's own eyes:
// the expected pay of reporting q less that of reporting the base rate,
// both under belief q; B·D(q, q0) for a rule without clamp.
func (v *Valuer) GainAt(q []float64) float64 {
	return v.Truthful(q) - bregman.Dot(q, v.pprior)
}

// Gain is what research is worth under one fitted rule.
type Gain struct {
	// Name is the rule's name as the caller gave it.
	Name string
	// A and B are the fit's pay = A - B·L.
	A, B float64
	// PerForecast is E[G(q)] - G(q0) in currency.
	PerForecast float64
	// Divergence is E[D(q, q0)] in the rule's own units; B·Divergence is
	// PerForecast when the menu has no clamp.
	Divergence float64
	// CostWith is E[G(q)], the buyer's expected cost of one forecast by a
	// forecaster who researches; CostWithout is G(q0), by one who reports
	// the base rate.
	CostWith, CostWithout float64
	// Season holds the same amounts times the forecasts per season.
	Season SeasonAmounts
	// Share is PerForecast / CostWith: the part of the expected cost that
	// pays for research.
	Share float64
}

// SeasonAmounts are per-forecast amounts times the forecasts per season.
type SeasonAmounts struct {
	Forecasts             int
	Gain                  float64
	CostWith, CostWithout float64
}

// Rule is a rule fitted to the budget under a name.
type Rule struct {
	Name string
	Fit  *budget.Fit
}

// Gains computes, for each rule, what research is worth under the
// posterior p, per forecast and over forecasts per season. A rule whose
// truthful pay is not finite at some posterior is an error naming it and
// the posterior. ctx is checked between rules.
func Gains(ctx context.Context, p *Posterior, rules []Rule, forecasts int) ([]Gain, error) {
	out := make([]Gain, 0, len(rules))
	for _, r := range rules {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		g, err := gainOf(p, r, forecasts)
		if err != nil {
			return nil, err
		}
		out = append(out, g)
	}
	return out, nil
}

func gainOf(p *Posterior, r Rule, forecasts int) (Gain, error) {
	if r.Fit.Rule().Outcomes() != p.Outcomes() {
		return Gain{}, fmt.Errorf("research: rule %s has %d outcomes, the research model %d", r.Name, r.Fit.Rule().Outcomes(), p.Outcomes())
	}
	v := NewValuer(r.Fit, p.Prior)
	s := r.Fit.Rule().NewScorer()
	g := Gain{Name: r.Name, A: r.Fit.Exact(0), B: r.Fit.B, CostWithout: v.Truthful(p.Prior)}
	var bad []float64
	g.CostWith = p.Expect(func(q []float64) float64 {
		t := v.Truthful(q)
		if (math.IsNaN(t) || math.IsInf(t, 0)) && bad == nil {
			bad = append([]float64(nil), q...)
		}
		return t
	})
	if bad != nil {
		return Gain{}, fmt.Errorf("research: under rule %s the truthful pay is not finite at the posterior %s", r.Name, num.Format(bad))
	}
	if math.IsNaN(g.CostWithout) || math.IsInf(g.CostWithout, 0) {
		return Gain{}, fmt.Errorf("research: under rule %s the truthful pay is not finite at the base rate %s", r.Name, num.Format(p.Prior))
	}
	// E[D(q, q0)] = H(q0) - E[H(q)] because E[q] = q0 and Phi(., q0) is
	// affine; computed as the mean of D itself so that rounding in the
	// posteriors' mean does not enter.
	g.Divergence = p.Expect(func(q []float64) float64 { return s.Divergence(q, p.Prior) })
	g.PerForecast = g.CostWith - g.CostWithout
	if g.CostWith != 0 {
		g.Share = g.PerForecast / g.CostWith
	}
	f := float64(forecasts)
	g.Season = SeasonAmounts{Forecasts: forecasts, Gain: f * g.PerForecast, CostWith: f * g.CostWith, CostWithout: f * g.CostWithout}
	return g, nil
}

// BelowFloor is the posterior probability that research leads to a belief
// giving some outcome less than floor: such a forecaster's report is off a
// menu that starts at floor and is paid by the formula.
func (p *Posterior) BelowFloor(floor float64) float64 {
	if floor <= 0 {
		return 0
	}
	return p.Expect(func(q []float64) float64 {
		for _, v := range q {
			if v < floor {
				return 1
			}
		}
		return 0
	})
}
