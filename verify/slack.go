package verify

import (
	"math"

	"scorewright/internal/simplex"
)

// pairSlack is the allowance of one comparison of expected efforts (or
// payments) between the rows of grid points i and j, scaled to the terms
// that cancel in those two rows, not in the worst row of the grid: a
// generator with huge cancelling terms near one face (p·(1e12/p - 1),
// whose gradient sums terms of size 1e12/p) once made the slack 9.78
// everywhere and hid a convex kink of gap 3e-4 in the middle of the
// simplex. Where no bound is known for a row (the boundary, whose efforts
// are limits, or an evaluator that gives none) the global slack stands.
type pairSlack struct {
	// global is the grid's slack (Grid.Slack): Tolerance × Scale, or the
	// rounding floor of the values and twice the worst effort bound.
	global float64
	// base is Tolerance × Scale; floor the rounding of a sum of values as
	// large as the largest (scaleOf).
	base, floor float64
	// eff bounds the rounding of an effort at each grid point, 0 where
	// none is known; nil: every comparison takes the global slack.
	eff []float64
}

// at is the slack of comparing rows i and j (j < 0: no other row).
func (ps pairSlack) at(g *simplex.Grid, i, j int) float64 {
	if ps.eff == nil || j < 0 || g.Boundary[i] || g.Boundary[j] || ps.eff[i] == 0 || ps.eff[j] == 0 {
		return ps.global
	}
	return math.Max(ps.base, ps.floor+ps.eff[i]+ps.eff[j])
}

// comparisonSlack is the slack of a check's comparisons, from the bounds
// eff on the rounding of the efforts at each grid point and tolScale,
// Tolerance × Scale. The pair checks compare efforts, whose gradients can
// sum terms far larger than the result: each comparison allows the
// bounds of its own two rows; the grid line states the worst, twice the
// largest bound (Grid.Rounding), and keeps the values' own floor apart
// (Grid.Floor).
func comparisonSlack(grid *Grid, eff []float64, tolScale float64) pairSlack {
	floor := grid.Rounding
	grid.Rounding = math.Max(grid.Rounding, 2*maxOf(eff))
	grid.Floor = floor
	return pairSlack{global: grid.Slack(), base: tolScale, floor: floor, eff: eff}
}

// globalSlack is the slack of every comparison alike (audits: a payout's
// values are not derivatives, and have no bound by row).
func globalSlack(t float64) pairSlack { return pairSlack{global: t} }

// maxOf is the largest entry of v (0 when empty).
func maxOf(v []float64) float64 {
	var m float64
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}
