package payform

import (
	"fmt"
	"math"

	"scorewright/generator/point"
)

// FindPoint states the pay of a point-forecast table, A − B·D(y, x) with
// D(y, x) = phi(x) + phi'(x)(y − x) − phi(y), as a closed formula when phi
// is a quadratic: phi” = c everywhere makes D(y, x) = (−c/2)·(y − x)², so
// pay = A − B·(−c/2)·(y − x)² (derived by hand). The curvature is read at
// probe points across the interval, exactly (the machine's second
// derivative); a generator whose curvature varies gets no formula rather
// than a wrong one.
func FindPoint(g *point.Generator, a, b float64) (*Formula, bool) {
	if g == nil {
		return nil, false
	}
	ev := g.NewEvaluator()
	c := math.NaN()
	for _, s := range []float64{0.13, 0.37, 0.5, 0.61, 0.89} {
		_, _, d2 := ev.Derivatives(g.Lo + s*(g.Hi-g.Lo))
		if math.IsNaN(c) {
			c = d2
		}
		if !(d2 < 0) || math.Abs(d2-c) > matchTolerance*math.Abs(c) {
			return nil, false
		}
	}
	k := b * (-c / 2)
	f := &Formula{Family: "squared error", a: a, b: b,
		point: func(x, y float64) float64 { return a - k*(y-x)*(y-x) }}
	f.Lines = []string{"pay = " + lin(a, -k, "(y − x)²")}
	f.Where = fmt.Sprintf("where x is the value the reported row gives and y the outcome's column, in [%s, %s]", num(g.Lo), num(g.Hi))
	return f, true
}

// PayAt is the exact (unrounded) pay of a point formula for report x when
// the outcome is y; NaN for a formula over outcomes.
func (f *Formula) PayAt(x, y float64) float64 {
	if f.point == nil {
		return math.NaN()
	}
	return f.point(x, y)
}
