package pointcheck

import (
	"context"
	"fmt"
	"math"

	"scorewright/generator/point"
)

// Settings are the grid and tolerance of a check; the zero value means the
// defaults.
type Settings struct {
	// Resolution K puts outcomes at lo + (hi-lo) i/K, i = 0..K, and reports
	// on a grid four times finer; 0 means 40.
	Resolution int
	// Tolerance is relative to the scale of the rule (the largest effort
	// or payment spread on the grid); 0 means 1e-9.
	Tolerance float64
	// Progress, when set, is called with the work done so far and the
	// total, from the calling goroutine.
	Progress func(done, total int)
}

func (s Settings) resolution() int {
	if s.Resolution <= 0 {
		return 40
	}
	return s.Resolution
}

func (s Settings) tolerance() float64 {
	if s.Tolerance <= 0 {
		return 1e-9
	}
	return s.Tolerance
}

// tick reports progress and checks for cancellation every 256 steps.
func (s Settings) tick(ctx context.Context, n, total int) error {
	if n%256 != 0 {
		return nil
	}
	if s.Progress != nil {
		s.Progress(n, total)
	}
	return ctx.Err()
}

// Verdicts.
const (
	StrictlyProper = "strictly-proper"
	Proper         = "proper"
	Improper       = "improper"
)

// Grid is the grid a report was computed on.
type Grid struct {
	Resolution int     `json:"resolution"`
	Points     int     `json:"points"`
	Tolerance  float64 `json:"tolerance"`
	// Lo and Hi are the interval.
	Lo float64 `json:"lo"`
	Hi float64 `json:"hi"`
}

// At is where a check found its worst value. Outcomes and Weights are the
// forecaster's distribution; Report is the report.
type At struct {
	Outcomes []float64 `json:"outcomes,omitempty"`
	Weights  []float64 `json:"weights,omitempty"`
	Report   []float64 `json:"report,omitempty"`
}

// Check is one named check.
type Check struct {
	Name   string  `json:"name"`
	Passed bool    `json:"passed"`
	Worst  float64 `json:"worst"`
	At     *At     `json:"at,omitempty"`
	// What says in words what Worst measures.
	What string `json:"what"`
}

// Gap is the largest honesty gap of a payout: how much more than the mean
// the best report earns in expectation, for the distribution where that is
// largest.
type Gap struct {
	Max        float64   `json:"max"`
	Outcomes   []float64 `json:"outcomes"`
	Weights    []float64 `json:"weights"`
	Mean       float64   `json:"mean"`
	BestReport float64   `json:"best_report"`
	// Precision says how far the search settled the gap (audits).
	Precision string `json:"precision,omitempty"`
}

// Report is the result of CheckGenerator or AuditPayout.
type Report struct {
	Verdict string  `json:"verdict"`
	Grid    Grid    `json:"grid"`
	Checks  []Check `json:"checks"`
	Gap     *Gap    `json:"gap,omitempty"`
	// Identified is set by an audit that recognised the payout.
	Identified *Identified `json:"identified,omitempty"`
	Notes      []string    `json:"notes,omitempty"`
}

// Failed reports whether any check failed.
func (r *Report) Failed() bool {
	for _, c := range r.Checks {
		if !c.Passed {
			return true
		}
	}
	return false
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

// CheckGenerator checks a point-forecast generator on the grid.
func CheckGenerator(ctx context.Context, g *point.Generator, s Settings) (*Report, error) {
	k, tol := s.resolution(), s.tolerance()
	ys, xs := grids(g.Lo, g.Hi, k)
	ev := g.NewEvaluator()
	rep := &Report{Grid: Grid{Resolution: k, Points: len(xs), Tolerance: tol, Lo: g.Lo, Hi: g.Hi}}

	// Concavity: phi'' <= 0 on the report grid; strict where < 0.
	maxD2, atD2, scaleD2 := math.Inf(-1), 0.0, 0.0
	strict := true
	var nonFinite []string
	// undefined counts the interior reports where phi, a derivative or D
	// is NaN. At an end of the interval ∞ - ∞ is how an unbounded rule
	// such as ln x at 0 shows, reported under boundedness, not failed.
	undefined := 0
	for i, x := range xs {
		phi, d1, d2 := ev.Derivatives(x)
		if (phi != phi || d1 != d1 || d2 != d2) && i > 0 && i < len(xs)-1 {
			undefined++
		}
		if !finite(phi) || !finite(d1) || !finite(d2) {
			nonFinite = append(nonFinite, fmt.Sprintf("x = %g (phi %v, phi' %v, phi'' %v)", x, phi, d1, d2))
			continue
		}
		if d2 > maxD2 {
			maxD2, atD2 = d2, x
		}
		scaleD2 = math.Max(scaleD2, math.Abs(d2))
		if !(d2 < 0) {
			strict = false
		}
	}
	concave := Check{Name: "concavity", What: "largest phi''(x) on the report grid (<= 0 for a concave generator)", Worst: maxD2, At: &At{Report: []float64{atD2}}}
	concave.Passed = maxD2 <= tol*math.Max(scaleD2, 1)
	if math.IsInf(maxD2, -1) {
		concave.Passed, concave.Worst, concave.At = false, math.NaN(), nil
	}

	// Effort matrix D[i][j] = D(ys[j], xs[i]), without assuming its form.
	dm, bad, err := fill(ctx, xs, ys, "D", ev.Divergence)
	if err != nil {
		return nil, err
	}
	nonFinite = append(nonFinite, bad...)
	undefined += countNaN(dm[1 : len(dm)-1])
	minD, scaleD := math.Inf(1), 0.0
	var minAt At
	for i, x := range xs {
		for j, y := range ys {
			v := dm[i][j]
			if !finite(v) {
				continue
			}
			scaleD = math.Max(scaleD, math.Abs(v))
			if v < minD {
				minD, minAt = v, At{Outcomes: []float64{y}, Report: []float64{x}}
			}
		}
	}
	scale := math.Max(scaleD, math.SmallestNonzeroFloat64)
	nonneg := Check{Name: "nonnegativity", What: "smallest effort D(y, x) on the grid (>= 0)", Worst: minD, At: &minAt, Passed: minD >= -tol*scale}

	// Affinity: Phi(y, x) at the midpoint of two outcomes equals the mean of
	// its values there, for every report on the grid.
	worstAff, affAt := 0.0, At{}
	for i, x := range xs {
		for j := 0; j+2 < len(ys); j++ {
			a, m, b := ev.Line(ys[j], x), ev.Line((ys[j]+ys[j+2])/2, x), ev.Line(ys[j+2], x)
			if !finite(a) || !finite(m) || !finite(b) {
				continue // counted under boundedness
			}
			if dev := math.Abs(m - (a+b)/2); dev > worstAff {
				worstAff, affAt = dev, At{Outcomes: []float64{ys[j], ys[j+2]}, Report: []float64{xs[i]}}
			}
		}
	}
	affine := Check{Name: "affinity", What: "largest departure of the expected-effort line Phi(y, x) from affine in y", Worst: worstAff, At: &affAt, Passed: worstAff <= tol*scale}

	// The mean is the best report.
	ds := distributions(k)
	worstGap, gapAt := math.Inf(-1), At{}
	for n, d := range ds {
		if err := s.tick(ctx, n, len(ds)); err != nil {
			return nil, err
		}
		vals, mean := d.values(ys)
		atMean := ev.Expected(mean, vals, d.w)
		best, bestX := math.Inf(1), 0.0
		for i := range xs {
			var e float64
			for j, yi := range d.idx {
				e += d.w[j] * dm[i][yi]
			}
			if e < best { // NaN never wins; it is counted under boundedness
				best, bestX = e, xs[i]
			}
		}
		gap := atMean - best
		if math.IsNaN(atMean) || !finite(atMean) && !finite(best) {
			continue // undefined, or both infinite: counted under boundedness
		}
		if gap > worstGap {
			worstGap, gapAt = gap, At{Outcomes: vals, Weights: d.w, Report: []float64{bestX}}
		}
	}
	if s.Progress != nil {
		s.Progress(len(ds), len(ds))
	}
	best := Check{Name: "properness", What: fmt.Sprintf("largest amount by which a report on the grid beats the mean in expected effort, over %d two- and three-point distributions", len(ds)), Worst: worstGap, At: &gapAt, Passed: worstGap <= tol*scale}

	bounded := Check{Name: "boundedness", What: "number of grid points where phi, its derivatives or the effort are not finite", Worst: float64(len(nonFinite)), Passed: len(nonFinite) == 0}
	if len(nonFinite) > 0 {
		rep.Notes = append(rep.Notes, "not finite at "+joinFirst(nonFinite, 5))
	}
	rep.Checks = []Check{concave, nonneg, affine, best, bounded}
	switch {
	case !concave.Passed || !nonneg.Passed || !best.Passed || !affine.Passed:
		rep.Verdict = Improper
	case undefined > 0:
		// The other checks skip NaN; a rule undefined somewhere on the
		// interval cannot be called proper there.
		rep.Verdict = Improper
		rep.Notes = append(rep.Notes, fmt.Sprintf("the rule is undefined (NaN) at %d places with a report inside the interval (see boundedness), so it is not proper on [%g, %g]", undefined, g.Lo, g.Hi))
	case strict:
		rep.Verdict = StrictlyProper
	default:
		rep.Verdict = Proper
		rep.Notes = append(rep.Notes, "phi'' reaches 0 on the grid: the mean is a best report but not always the only one")
	}
	rep.Notes = append(rep.Notes, fmt.Sprintf("grid check on %d outcomes and %d reports in [%g, %g], tolerance %g relative to the largest effort %.4g: evidence, not proof", len(ys), len(xs), g.Lo, g.Hi, tol, scaleD))
	return rep, nil
}

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
