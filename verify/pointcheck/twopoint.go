package pointcheck

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"
)

// The worst belief of a point-payout audit. For a fixed report x the
// expected gain E pay(x, Y) - E pay(mean, Y) is not linear in the
// distribution (the mean moves with it), but over distributions with a
// given mean it is, so its largest value is taken at the extreme points of
// that set: distributions on at most two support points. The audit
// therefore searches every pair of outcome grid points with weights in
// twentieths (from the pay table, no formula evaluation per report), then
// the best pair continuously: the two support points and the weight by
// Nelder–Mead (gonum optimize), each value the best report for that
// distribution (the report grid, then golden section between the best
// point's neighbours), restarted until two runs agree to 1e-10 relative.

// twoPointWeights are the weights of the pair scan: 1/20 .. 19/20.
const twoPointWeights = 20

// settle is the relative change between two successive local searches
// below which the gap counts as settled (9 significant digits, with a
// margin of ten); maxRuns bounds the searches.
const (
	settle  = 1e-10
	maxRuns = 40
)

// twoPoint is a two-point distribution: weight 1-w on a, w on b.
type twoPoint struct{ a, b, w float64 }

// worstTwoPoint returns the largest gap over two-point distributions on
// [lo, hi] and says how far it settled.
func worstTwoPoint(ctx context.Context, pr *payer, pm [][]float64, xs, ys []float64) (Gap, string, error) {
	best := Gap{Max: math.Inf(-1)}
	var at twoPoint
	for ja := range ys {
		if err := ctx.Err(); err != nil {
			return best, "", err
		}
		for jb := ja + 1; jb < len(ys); jb++ {
			for k := 1; k < twoPointWeights; k++ {
				w := float64(k) / twoPointWeights
				top, topX := math.Inf(-1), 0.0
				for i, x := range xs {
					if e := (1-w)*pm[i][ja] + w*pm[i][jb]; e > top {
						top, topX = e, x
					}
				}
				d := twoPoint{ys[ja], ys[jb], w}
				if g := top - d.atMean(pr); g > best.Max {
					best, at = d.gap(g, topX), d
				}
			}
		}
	}
	if math.IsInf(best.Max, -1) || !(best.Max > 0) {
		return best, "", nil
	}
	lo, hi := xs[0], xs[len(xs)-1]
	gapOf := func(p []float64) (float64, float64, twoPoint) {
		d := twoPoint{clamp(p[0], lo, hi), clamp(p[1], lo, hi), clamp(p[2], 0, 1)}
		if d.a > d.b {
			d.a, d.b = d.b, d.a
		}
		g, x := d.bestGap(pr, xs)
		return g, x, d
	}
	runs, settled := 0, false
	for runs < maxRuns {
		runs++
		x0 := []float64{at.a, at.b, at.w}
		res, err := optimize.Minimize(optimize.Problem{Func: func(p []float64) float64 {
			g, _, _ := gapOf(p)
			if math.IsNaN(g) {
				return math.Inf(1)
			}
			return -g
		}}, x0, &optimize.Settings{FuncEvaluations: 600}, &optimize.NelderMead{SimplexSize: 0.05 * (hi - lo)})
		if res == nil || err != nil && res.Status != optimize.FunctionEvaluationLimit {
			break
		}
		g, x, d := gapOf(res.X)
		change := g - best.Max
		if g > best.Max {
			best, at = d.gap(g, x), d
		}
		if !(change > settle*math.Abs(best.Max)) {
			settled = true
			break
		}
	}
	if settled {
		return best, fmt.Sprintf("the worst two-point distribution sharpened until a local search changed the gap by less than %.0g relative (%d of at most %d local searches): 9 significant digits", settle, runs, maxRuns), nil
	}
	return best, fmt.Sprintf("the worst two-point distribution: the search stopped after %d local searches without settling the gap to 9 significant digits", runs), nil
}

func clamp(v, lo, hi float64) float64 { return math.Min(hi, math.Max(lo, v)) }

func (d twoPoint) mean() float64 { return d.a + d.w*(d.b-d.a) }

func (d twoPoint) expected(pr *payer, x float64) float64 {
	return (1-d.w)*pr.pay(x, d.a) + d.w*pr.pay(x, d.b)
}

func (d twoPoint) atMean(pr *payer) float64 { return d.expected(pr, d.mean()) }

// bestGap is the gap of the best report for d: the report grid, then
// golden section between the best grid point's neighbours.
func (d twoPoint) bestGap(pr *payer, xs []float64) (float64, float64) {
	top, ti := math.Inf(-1), 0
	for i, x := range xs {
		if e := d.expected(pr, x); e > top {
			top, ti = e, i
		}
	}
	x := xs[ti]
	if gx, gv := goldenMax(func(x float64) float64 { return d.expected(pr, x) }, xs[max(ti-1, 0)], xs[min(ti+1, len(xs)-1)]); gv > top {
		top, x = gv, gx
	}
	return top - d.atMean(pr), x
}

func (d twoPoint) gap(g, x float64) Gap {
	if d.a == d.b || d.w == 0 || d.w == 1 {
		// The search may close the pair into a point mass.
		y := d.a
		if d.w == 1 {
			y = d.b
		}
		return Gap{Max: g, Outcomes: []float64{y}, Weights: []float64{1}, Mean: y, BestReport: x}
	}
	return Gap{Max: g, Outcomes: []float64{d.a, d.b}, Weights: []float64{1 - d.w, d.w}, Mean: d.mean(), BestReport: x}
}
