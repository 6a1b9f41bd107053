// Package corp splits the mean score of probability forecasts of a yes/no
// event into miscalibration, discrimination and uncertainty by isotonic
// recalibration (Dimitriadis, Gneiting and Jordan 2021, "Stable
// reliability diagrams for probabilistic classifiers", PNAS 118,
// e2016191118): the forecasts are recalibrated by the pool-adjacent-
// violators algorithm (PAV), and with S̄ the mean score of the forecasts,
// S̄_C that of the recalibrated ones and S̄_R that of the base rate,
//
//	S̄ = MCB − DSC + UNC,  MCB = S̄ − S̄_C,  DSC = S̄_R − S̄_C,  UNC = S̄_R.
//
// The identity is exact for any scoring rule; for a proper one MCB >= 0
// and DSC >= 0, because the PAV recalibration is the best score among
// nondecreasing recalibrations, which include the identity map and the
// constant base rate (the paper's Theorem 1). The reliability picture is
// the PAV curve, with consistency bands from resampling the outcomes under
// the hypothesis that the forecasts are calibrated.
//
// Forecasts come as groups (a distinct probability with how often it was
// given and how often the event followed), so a history of a million rows
// on a menu of twenty reports is twenty groups.
package corp

import (
	"fmt"
	"math"

	"scorewright/internal/num"
)

// Group is every forecast that gave the event one probability.
type Group struct {
	// X is the forecast probability of the event, in [0, 1].
	X float64
	// Count is how many forecasts gave X; Hits how many of them were
	// followed by the event (0 <= Hits <= Count).
	Count, Hits int
}

// Loss is a negatively oriented score of a forecast x of the event: what
// it costs if the event happens and if it does not. It is called once per
// distinct probability, so one evaluation may serve both outcomes.
type Loss func(x float64) (ifEvent, ifNot float64)

// SquaredError is the squared error of the event's probability, (x − y)²
// with y = 1 for the event: the quadratic score of a yes/no forecast.
func SquaredError(x float64) (ifEvent, ifNot float64) { return (1 - x) * (1 - x), x * x }

// Sorted returns groups sorted by X with equal probabilities merged; it
// checks that every group is a valid one.
func Sorted(groups []Group) ([]Group, error) {
	out := make([]Group, 0, len(groups))
	for _, g := range groups {
		if !(g.X >= 0 && g.X <= 1) || g.Count < 0 || g.Hits < 0 || g.Hits > g.Count {
			return nil, fmt.Errorf("corp: group %+v is not a forecast in [0, 1] with 0 <= hits <= count", g)
		}
		if g.Count > 0 {
			out = append(out, g)
		}
	}
	out = sortByX(out)
	merged := out[:0]
	for _, g := range out {
		if k := len(merged) - 1; k >= 0 && merged[k].X == g.X {
			merged[k].Count += g.Count
			merged[k].Hits += g.Hits
			continue
		}
		merged = append(merged, g)
	}
	return merged, nil
}

// PAV returns the isotonic recalibration of groups sorted by strictly
// increasing X: for each group the event frequency of the block it is
// pooled into, nondecreasing in X, the weighted least-squares (and, for
// every proper score, the best-scoring) nondecreasing fit of the hit
// frequencies. It allocates the result and one block stack.
func PAV(groups []Group) []float64 {
	out := make([]float64, len(groups))
	pavInto(out, groups, nil, make([]block, 0, len(groups)))
	return out
}

// block is a run of pooled groups: groups [start, start+len), with count
// forecasts and hits events.
type block struct{ start, len, count, hits int }

// pavInto is PAV writing into dst, with the hits taken from hits when it
// is non-nil (resampled outcomes) and the block stack reused.
func pavInto(dst []float64, groups []Group, hits []int, stack []block) []block {
	stack = stack[:0]
	for i, g := range groups {
		h := g.Hits
		if hits != nil {
			h = hits[i]
		}
		stack = append(stack, block{start: i, len: 1, count: g.Count, hits: h})
		// Pool while the last block's frequency is below the one before:
		// hits/count < hits'/count' compared by cross-multiplying, exactly.
		for len(stack) > 1 {
			a, b := stack[len(stack)-2], stack[len(stack)-1]
			if int64(a.hits)*int64(b.count) <= int64(b.hits)*int64(a.count) {
				break
			}
			stack = stack[:len(stack)-1]
			stack[len(stack)-1] = block{start: a.start, len: a.len + b.len, count: a.count + b.count, hits: a.hits + b.hits}
		}
	}
	for _, b := range stack {
		f := float64(b.hits) / float64(b.count)
		for i := b.start; i < b.start+b.len; i++ {
			dst[i] = f
		}
	}
	return stack
}

// Decomposition is the CORP split of a mean score.
type Decomposition struct {
	// Count is the number of forecasts and BaseRate the event's frequency.
	Count    int
	BaseRate float64
	// Score is the mean score of the forecasts as given.
	Score float64
	// Miscalibration (MCB) is Score minus the mean score of the PAV-
	// recalibrated forecasts: what recalibration would save (>= 0).
	Miscalibration float64
	// Discrimination (DSC) is the base rate's score minus the recalibrated
	// forecasts' score: what the forecasts tell beyond the base rate (>= 0).
	Discrimination float64
	// Uncertainty (UNC) is the mean score of always forecasting the base
	// rate: how hard the questions were.
	Uncertainty float64
}

// Identity returns MCB − DSC + UNC, which equals Score.
func (d Decomposition) Identity() float64 {
	return d.Miscalibration - d.Discrimination + d.Uncertainty
}

// Decompose computes the CORP decomposition of the forecasts in groups
// (sorted by strictly increasing X, as Sorted returns them) under loss.
// With no forecasts every term is NaN. A score that is infinite (a log
// score of a forecast that ruled out what happened) makes Score and
// Miscalibration +Inf; the recalibrated forecasts never rule out what
// happened, so the other terms stay finite.
func Decompose(groups []Group, loss Loss) Decomposition {
	calibrated := PAV(groups)
	var total, hits int
	var score, cal num.Sum
	for i, g := range groups {
		total += g.Count
		hits += g.Hits
		score.Add(weighted(g, loss, g.X))
		cal.Add(weighted(g, loss, calibrated[i]))
	}
	if total == 0 {
		nan := math.NaN()
		return Decomposition{BaseRate: nan, Score: nan, Miscalibration: nan, Discrimination: nan, Uncertainty: nan}
	}
	n := float64(total)
	r := float64(hits) / n
	var unc num.Sum
	unc.Add(weighted(Group{X: r, Count: total, Hits: hits}, loss, r))
	s, c, u := score.Value()/n, cal.Value()/n, unc.Value()/n
	return Decomposition{Count: total, BaseRate: r, Score: s, Miscalibration: s - c, Discrimination: u - c, Uncertainty: u}
}

// weighted is the summed score of g's forecasts had they all said x:
// hits times the cost if the event happens plus the rest times the cost if
// not. A term with no forecasts adds nothing, even at an infinite cost.
func weighted(g Group, loss Loss, x float64) float64 {
	ifEvent, ifNot := loss(x)
	var s float64
	if g.Hits > 0 {
		s += float64(g.Hits) * ifEvent
	}
	if miss := g.Count - g.Hits; miss > 0 {
		s += float64(miss) * ifNot
	}
	return s
}
