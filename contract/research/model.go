package research

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"scorewright/contract/backtest/history"
	"scorewright/internal/num"
)

// Posterior is a research model held as a finite distribution of
// posteriors: after research the forecaster believes Beliefs[i] with
// probability Weights[i]. Prior is the belief before research, the
// weighted mean of the posteriors.
type Posterior struct {
	// Kind names the model: "dirichlet", "signal" or "history".
	Kind string
	// Describe says in words what the model is and what it assumes.
	Describe string
	Prior    []float64
	Beliefs  [][]float64
	Weights  []float64
	// Kappa is the Dirichlet concentration (0 for the other models).
	Kappa float64
	// Exact is true when the posteriors are the model itself (signal,
	// history) rather than quadrature nodes standing for a density.
	Exact bool
}

// Outcomes is n.
func (p *Posterior) Outcomes() int { return len(p.Prior) }

// Expect returns the weighted mean of f over the posteriors. f must not
// keep its argument.
func (p *Posterior) Expect(f func(q []float64) float64) float64 {
	var s, c float64
	for i, q := range p.Beliefs {
		// Neumaier summation: tens of thousands of small terms.
		t := p.Weights[i] * f(q)
		if u := s + t; math.Abs(s) >= math.Abs(t) {
			c += (s - u) + t
			s = u
		} else {
			c += (t - u) + s
			s = u
		}
	}
	return s + c
}

// MaxDirichletOutcomes is the largest n a Dirichlet posterior is
// integrated for: the quadrature is a product of n - 1 Beta rules.
const MaxDirichletOutcomes = 4

// Dirichlet is the posterior Dirichlet(kappa·q0): research worth kappa past
// cases around the base rate q0 (for n = 2 a Beta(kappa q0, kappa (1 -
// q0))). The expectation is a product quadrature by stick-breaking:
// q1 ~ Beta(α1, κ - α1), and given q1 the rest is (1 - q1) times a
// Dirichlet of the remaining α (Wilks 1962, the Dirichlet's aggregation
// property), each Beta integrated by betaRule. o sets the Beta rule;
// its zero value is a default that shrinks with n to keep the product
// near 10^5 nodes.
func Dirichlet(q0 []float64, kappa float64, o Quadrature) (*Posterior, error) {
	n := len(q0)
	if err := checkPrior(q0); err != nil {
		return nil, err
	}
	if n > MaxDirichletOutcomes {
		return nil, fmt.Errorf("research: a Dirichlet posterior is integrated for at most %d outcomes, not %d", MaxDirichletOutcomes, n)
	}
	if !(kappa > 0) || math.IsInf(kappa, 0) {
		return nil, fmt.Errorf("research: the concentration kappa must be a positive number, got %g", kappa)
	}
	for k, v := range q0 {
		if v == 0 {
			return nil, fmt.Errorf("research: the base rate gives outcome %d probability 0; a Dirichlet posterior needs every outcome possible", k+1)
		}
	}
	if o == (Quadrature{}) {
		switch n {
		case 3:
			o = Quadrature{Nodes: 6, Ends: 20, Middle: 4}
		case 4:
			o = Quadrature{Nodes: 4, Ends: 8, Middle: 2}
		}
	}
	p := &Posterior{Kind: "dirichlet", Kappa: kappa, Prior: append([]float64(nil), q0...)}
	alpha := make([]float64, n)
	for k, v := range q0 {
		alpha[k] = kappa * v
	}
	// One Beta rule per stick-breaking step: the step-k Beta is
	// Beta(α_k, α_{k+1} + ... + α_n) whatever the earlier sticks were.
	rules := make([][]betaNode, n-1)
	for k := range rules {
		var tail float64
		for _, a := range alpha[k+1:] {
			tail += a
		}
		rules[k] = betaRule(alpha[k], tail, o)
	}
	stick(p, rules, make([]float64, n), 0, 1, 1)
	p.Describe = fmt.Sprintf("posterior Dirichlet with concentration %g around the base rate %s (research worth %g past cases); expectations by %s",
		kappa, num.Format(q0), kappa, o.Describe())
	if n > 2 {
		p.Describe += fmt.Sprintf(" for each of the %d stick-breaking Betas, %d posteriors in all", n-1, len(p.Beliefs))
	}
	return p, nil
}

// stick adds the posteriors of the Dirichlet left after k sticks, scaled
// by rest, to p, with prefix q[:k] fixed and weight w.
func stick(p *Posterior, rules [][]betaNode, q []float64, k int, rest, w float64) {
	if k == len(rules) {
		q[k] = rest
		p.Beliefs = append(p.Beliefs, append([]float64(nil), q...))
		p.Weights = append(p.Weights, w)
		return
	}
	for _, nd := range rules[k] {
		q[k] = rest * nd.x
		stick(p, rules, q, k+1, rest*nd.xc, w*nd.w)
	}
}

// Signal is the posterior after one signal of stated accuracy: confusion
// [k][s] is the chance of signal s when outcome k is the truth (each row
// sums to 1). A forecaster who starts at q0 and sees signal s believes
// q_k ∝ q0_k·confusion[k][s] (Bayes' rule); signal s comes with
// probability Σ_k q0_k confusion[k][s], so the posteriors average to q0
// exactly. Signals no outcome can give are left out.
func Signal(q0 []float64, confusion [][]float64) (*Posterior, error) {
	n := len(q0)
	if err := checkPrior(q0); err != nil {
		return nil, err
	}
	if len(confusion) != n {
		return nil, fmt.Errorf("research: the confusion matrix has %d rows for %d outcomes (one row per outcome)", len(confusion), n)
	}
	m := len(confusion[0])
	if m < 2 {
		return nil, errors.New("research: a signal needs at least 2 values (columns of the confusion matrix)")
	}
	for k, row := range confusion {
		if len(row) != m {
			return nil, fmt.Errorf("research: confusion row %d has %d entries, row 1 has %d", k+1, len(row), m)
		}
		if err := num.CheckDistribution(row, 1e-9); err != nil {
			return nil, fmt.Errorf("research: confusion row %d (chances of each signal when outcome %d is the truth): %v", k+1, k+1, err)
		}
	}
	p := &Posterior{Kind: "signal", Exact: true, Prior: append([]float64(nil), q0...)}
	for s := 0; s < m; s++ {
		var ps float64
		for k := range q0 {
			ps += q0[k] * confusion[k][s]
		}
		if ps == 0 {
			continue
		}
		q := make([]float64, n)
		for k := range q0 {
			q[k] = q0[k] * confusion[k][s] / ps
		}
		p.Beliefs = append(p.Beliefs, q)
		p.Weights = append(p.Weights, ps)
	}
	p.Describe = fmt.Sprintf("one signal with %d values and the stated confusion matrix (chance of each signal given each outcome); from the base rate %s the forecaster updates by Bayes' rule, %d posteriors averaging to the base rate exactly",
		m, num.Format(q0), len(p.Beliefs))
	return p, nil
}

// Accuracy is the symmetric confusion matrix of a signal that names the
// true outcome with chance acc and each other outcome with chance
// (1 - acc)/(n - 1).
func Accuracy(n int, acc float64) ([][]float64, error) {
	if !(acc >= 0 && acc <= 1) {
		return nil, fmt.Errorf("research: the accuracy %g is not a probability in [0, 1]", acc)
	}
	c := make([][]float64, n)
	for k := range c {
		c[k] = make([]float64, n)
		for s := range c[k] {
			if s == k {
				c[k][s] = acc
			} else {
				c[k][s] = (1 - acc) / float64(n-1)
			}
		}
	}
	return c, nil
}

// ParseConfusion reads a confusion matrix written as rows separated by
// ";" and entries by ",": "0.8,0.2; 0.3,0.7".
func ParseConfusion(s string) ([][]float64, error) {
	var rows [][]float64
	for i, r := range strings.Split(s, ";") {
		v, err := num.ParseVector(r)
		if err != nil {
			return nil, fmt.Errorf("row %d: %v", i+1, err)
		}
		rows = append(rows, v)
	}
	return rows, nil
}

// MaxHistoryForecasts is how many forecasts a history model keeps; a
// longer file is refused rather than read without bound.
const MaxHistoryForecasts = 200000

// History is the spread of the forecasts in a history file taken as the
// distribution of posteriors: every valid row's forecast is one posterior
// of equal weight, and the base rate is their mean. It assumes that each
// forecast is the honest posterior of a forecaster who began at the base
// rate and that the crowd's mean forecast is that base rate (as for a
// calibrated crowd, whose mean forecast equals the outcome frequency).
// Invalid rows are skipped and counted; the first error of each is kept in
// skipped (at most 1000).
func History(r io.Reader, labels []string) (p *Posterior, skipped []error, err error) {
	h, err := history.NewReader(r, labels, history.Options{})
	if err != nil {
		return nil, nil, err
	}
	n := len(labels)
	p = &Posterior{Kind: "history", Exact: true, Prior: make([]float64, n)}
	count := 0
	for {
		row, err := h.Next()
		if err == io.EOF {
			break
		}
		var re *history.RowError
		if errors.As(err, &re) {
			count++
			if len(skipped) < 1000 {
				skipped = append(skipped, re)
			}
			continue
		}
		if err != nil {
			return nil, skipped, err
		}
		if len(p.Beliefs) == MaxHistoryForecasts {
			return nil, skipped, fmt.Errorf("research: the history has more than %d forecasts; a research model keeps at most that many", MaxHistoryForecasts)
		}
		p.Beliefs = append(p.Beliefs, append([]float64(nil), row.P...))
	}
	if len(p.Beliefs) == 0 {
		return nil, skipped, errors.New("research: the history has no valid forecast")
	}
	w := 1 / float64(len(p.Beliefs))
	p.Weights = make([]float64, len(p.Beliefs))
	for i, q := range p.Beliefs {
		p.Weights[i] = w
		for k, v := range q {
			p.Prior[k] += v
		}
	}
	for k := range p.Prior {
		p.Prior[k] /= float64(len(p.Beliefs))
	}
	p.Describe = fmt.Sprintf("the spread of %d forecasts in a history file (%d rows skipped), each taken as the honest posterior of a forecaster who began at the base rate, which is their mean %s (assumed: the crowd's mean forecast is the base rate)",
		len(p.Beliefs), count, num.Format(p.Prior))
	return p, skipped, nil
}

func checkPrior(q0 []float64) error {
	if len(q0) < 2 {
		return fmt.Errorf("research: a base rate needs at least 2 outcomes, got %d", len(q0))
	}
	if err := num.CheckDistribution(q0, num.SimplexTolerance); err != nil {
		return fmt.Errorf("research: base rate: %v", err)
	}
	return nil
}
