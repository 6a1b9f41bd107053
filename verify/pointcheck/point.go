package pointcheck

import (
	"context"
	"fmt"
	"math"

	"scorewright/internal/pool"
	"scorewright/verify"
)

// The checks take verify's Settings: Resolution K puts outcomes at
// lo + (hi-lo) i/K, i = 0..K, and reports on a grid four times finer (0
// means 40); Tolerance is relative to the scale of the rule (the largest
// effort or payment spread on the grid; 0 means 1e-9); Progress, when set,
// is told the work done so far and the total, from the calling goroutine.
// The other fields are for checks over outcomes.

func resolution(s verify.Settings) int {
	if s.Resolution <= 0 {
		return 40
	}
	return s.Resolution
}

func tolerance(s verify.Settings) float64 {
	if s.Tolerance <= 0 {
		return 1e-9
	}
	return s.Tolerance
}

// tick reports progress and checks for cancellation every 256 steps.
func tick(ctx context.Context, s verify.Settings, n, total int) error {
	if n%256 != 0 {
		return nil
	}
	if s.Progress != nil {
		s.Progress(pool.Step{Done: float64(n), Total: float64(total), Unit: pool.UnitWork})
	}
	return ctx.Err()
}

// done reports the last step of total: the sweep over distributions is a
// point check's only long part, so it ends the job's progress.
func done(s verify.Settings, total int) {
	if s.Progress != nil {
		s.Progress(pool.Step{Done: float64(total), Total: float64(total), Unit: pool.UnitWork, Last: true})
	}
}

// A point check's findings are verify's types: a verify.CheckResult per
// check, on a verify.Grid with the interval in Lo and Hi. A check that
// locates its worst place has a non-nil Report (empty when it found no
// place); its Outcomes are the outcome values there and Belief their
// weights, when the check is about a distribution.

// place is where a check found its worst value.
type place struct {
	outcomes, weights, report []float64
}

// result is a named check's finding, located at where when where is not
// nil.
func result(name, what string, worst float64, passed bool, slack float64, where *place) verify.CheckResult {
	c := verify.CheckResult{Name: name, Note: what, Worst: worst, Passed: passed, Slack: slack}
	if where != nil {
		c.Outcomes, c.Belief, c.Report = where.outcomes, where.weights, where.report
		if c.Report == nil {
			c.Report = []float64{}
		}
	}
	return c
}

// Shown is a check's Worst as the front ends print it: 0 for a value
// within the comparison's Slack (the -5.6e-17 that rounding leaves of
// D(y, x) is not a finding and must not read as a report beating the
// mean).
func Shown(c verify.CheckResult) float64 {
	if math.Abs(c.Worst) <= c.Slack {
		return 0
	}
	return c.Worst
}

// Gap is the largest honesty gap of a payout: how much more than the mean
// the best report earns in expectation, for the distribution where that is
// largest.
type Gap struct {
	Max        float64
	Outcomes   []float64
	Weights    []float64
	Mean       float64
	BestReport float64
	// Precision says how far the search settled the gap (audits).
	Precision string
}

// Report is the result of CheckGenerator or AuditPayout: verify's report
// (verdict, grid, checks, notes) with what an audit adds.
type Report struct {
	verify.Report
	// Gap is set by an audit.
	Gap *Gap
	// Identified is set by an audit that recognised the payout.
	Identified *Identified
}

// dist is a finite distribution of the outcome.
type dist struct {
	idx []int // outcome grid indices
	w   []float64
}

// distributions lists the two-point distributions on the whole outcome
// grid and three-point ones on a sub-grid of about ten points.
func distributions(k int) []dist {
	var out []dist
	for _, t := range []float64{0.1, 0.25, 0.5, 0.75, 0.9} {
		for i := 0; i <= k; i++ {
			for j := i + 1; j <= k; j++ {
				out = append(out, dist{[]int{i, j}, []float64{t, 1 - t}})
			}
		}
	}
	stride := max(1, k/9)
	var sub []int
	for i := 0; i <= k; i += stride {
		sub = append(sub, i)
	}
	for _, w := range [][]float64{{1.0 / 3, 1.0 / 3, 1.0 / 3}, {0.6, 0.3, 0.1}, {0.1, 0.3, 0.6}, {0.2, 0.6, 0.2}} {
		for a := 0; a < len(sub); a++ {
			for b := a + 1; b < len(sub); b++ {
				for c := b + 1; c < len(sub); c++ {
					out = append(out, dist{[]int{sub[a], sub[b], sub[c]}, w})
				}
			}
		}
	}
	return out
}

// grids returns the outcome grid (K+1 points) and the report grid (4K+1).
func grids(lo, hi float64, k int) (ys, xs []float64) {
	ys = make([]float64, k+1)
	for i := range ys {
		ys[i] = lo + (hi-lo)*float64(i)/float64(k)
	}
	ys[k] = hi
	xs = make([]float64, 4*k+1)
	for i := range xs {
		xs[i] = lo + (hi-lo)*float64(i)/float64(4*k)
	}
	xs[4*k] = hi
	return ys, xs
}

func (d dist) values(ys []float64) ([]float64, float64) {
	v := make([]float64, len(d.idx))
	var m float64
	for j, i := range d.idx {
		v[j] = ys[i]
		m += d.w[j] * ys[i]
	}
	return v, m
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// fill evaluates f(y, x) on the report × outcome grid, listing where it is
// not finite.
func fill(ctx context.Context, xs, ys []float64, name string, f func(y, x float64) float64) ([][]float64, []string, error) {
	m := make([][]float64, len(xs))
	var bad []string
	for i, x := range xs {
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		m[i] = make([]float64, len(ys))
		for j, y := range ys {
			v := f(y, x)
			m[i][j] = v
			if !finite(v) {
				bad = append(bad, fmt.Sprintf("%s(y = %g, x = %g) = %v", name, y, x, v))
			}
		}
	}
	return m, bad, nil
}

// countNaN counts the NaN entries of a matrix.
func countNaN(m [][]float64) int {
	c := 0
	for _, row := range m {
		for _, v := range row {
			if v != v {
				c++
			}
		}
	}
	return c
}

func joinFirst(s []string, n int) string {
	out := ""
	for i, x := range s {
		if i == n {
			out += fmt.Sprintf("; and %d more", len(s)-n)
			break
		}
		if i > 0 {
			out += "; "
		}
		out += x
	}
	return out
}
