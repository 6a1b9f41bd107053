package pointcheck

import (
	"context"
	"fmt"
	"math"

	"scorewright/generator/point"
	"scorewright/verify"
)

// roundoff is the rounding allowance for a result computed from terms
// whose absolute values add up to size: a few units in the last place of
// the largest term. A difference of such terms is known only to this,
// however small the result (-x^2 + 1e8·x has D = (y - x)^2 from terms of
// size 1e8).
func roundoff(size float64) float64 { return 8 * 0x1p-52 * size }

// genGrid is the evaluated grid of a generator check: efforts D(y, x),
// the size of their cancelling terms, and phi” at every report.
type genGrid struct {
	ys, xs   []float64
	d, size  [][]float64 // [report][outcome]
	d2       []float64   // phi''(x) per report, NaN where not finite
	scaleD2  float64     // largest finite |phi''|
	scale    float64     // largest finite |D|
	tol      float64
	nonFinte []string
	endInf   []float64 // end reports whose effort is +Inf (infinite slope there)
	undef    int
	// endErr is the error estimate of a finite end slope taken as the
	// limit from the interior (point.Evaluator.EndSlopeError): an effort
	// D(y, x) at an end report is known only to endErr·|y - x|, allowed
	// for in that report's comparisons.
	endErr float64
}

// CheckGenerator checks a point-forecast generator on the grid. A
// generator not finite at some outcome of its interval is refused with a
// *point.DomainError: no report is usable there, so no verdict applies.
//
// Every comparison allows for rounding in proportion to the terms that
// cancel, besides Tolerance × the largest effort. Strictness (Gneiting &
// Raftery 2007, Sec. 2) fails only with a witness: two different reports
// that tie for some forecaster, which for a Bregman rule means phi is
// affine between them (phi” = 0 along the whole segment, checked with the
// exact second derivative, which no affine term disturbs). phi” = 0 at
// isolated points (-x^4 at 0) leaves phi strictly concave.
func CheckGenerator(ctx context.Context, g *point.Generator, s verify.Settings) (*Report, error) {
	if err := g.Domain(); err != nil {
		return nil, err
	}
	k, tol := resolution(s), tolerance(s)
	ev := g.NewEvaluator()
	gg, err := evaluateGenerator(ctx, ev, g, k, tol)
	if err != nil {
		return nil, err
	}
	rep := &Report{Report: verify.Report{Grid: verify.Grid{Resolution: k, Points: len(gg.xs), Tolerance: tol, Lo: g.Lo, Hi: g.Hi}}}
	concave := gg.concavity()
	nonneg := gg.nonnegativity()
	affine := gg.affinity(ev)
	best, err := gg.properness(ctx, ev, s)
	if err != nil {
		return nil, err
	}
	bounded := result("boundedness", "number of grid points where phi, its derivatives or the effort are not finite", float64(len(gg.nonFinte)), len(gg.nonFinte) == 0, 0, nil)
	if len(gg.nonFinte) > 0 {
		rep.Notes = append(rep.Notes, "not finite at "+joinFirst(gg.nonFinte, 5))
	}
	if len(gg.endInf) > 0 {
		rep.Notes = append(rep.Notes, fmt.Sprintf("unbounded at the end: phi' is infinite at x = %g, so reporting it costs infinite effort for every other outcome; a table needs reports inside the interval", gg.endInf[0]))
	}
	rep.Checks = []verify.CheckResult{concave, nonneg, affine, best, bounded}
	switch {
	case !concave.Passed || !nonneg.Passed || !best.Passed || !affine.Passed:
		rep.Verdict = verify.Improper
	case gg.undef > 0:
		// The other checks skip NaN; a rule undefined somewhere on the
		// interval cannot be called proper there.
		rep.Verdict = verify.Improper
		rep.Notes = append(rep.Notes, fmt.Sprintf("the rule is undefined (NaN) at %d places with a report inside the interval (see boundedness), so it is not proper on [%g, %g]", gg.undef, g.Lo, g.Hi))
	default:
		rep.Verdict = verify.StrictlyProper
		if a, b, ok := gg.tie(ev); ok {
			rep.Verdict = verify.Proper
			rep.Notes = append(rep.Notes, fmt.Sprintf("the mean is a best report but not always the only one: for a forecaster certain that y = %g, the reports %g and %g do equally well (phi is affine between them: phi'' = 0 along the segment)", a, a, b))
		} else if zero := gg.flatAt(); zero == zero {
			rep.Notes = append(rep.Notes, fmt.Sprintf("phi'' reaches 0 at x = %g, but at isolated points only (phi is strictly concave on the grid): no two reports tie", zero))
		}
	}
	extra := ""
	if gg.endErr > 0 {
		extra = fmt.Sprintf(", plus %.3g·|y - x| where an end report's slope is a limit from the interior (extrapolated)", gg.endErr)
	}
	rep.Notes = append(rep.Notes, fmt.Sprintf("grid check on %d outcomes and %d reports in [%g, %g], tolerance %g relative to the largest effort %.4g plus rounding in proportion to the terms that cancel%s: evidence, not proof", len(gg.ys), len(gg.xs), g.Lo, g.Hi, tol, gg.scale, extra))
	return rep, nil
}

// evaluateGenerator fills the grid: phi” per report and D with its term
// sizes per report and outcome.
func evaluateGenerator(ctx context.Context, ev *point.Evaluator, g *point.Generator, k int, tol float64) (*genGrid, error) {
	ys, xs := grids(g.Lo, g.Hi, k)
	gg := &genGrid{ys: ys, xs: xs, tol: tol, d2: make([]float64, len(xs)), d: make([][]float64, len(xs)), size: make([][]float64, len(xs)),
		endErr: ev.EndSlopeError()}
	// undef counts the interior reports where phi, a derivative or D is
	// NaN. At an end of the interval ∞ - ∞ is how an unbounded rule such
	// as -x ln x at 0 shows, reported under boundedness, not failed.
	for i, x := range xs {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		inner := i > 0 && i < len(xs)-1
		phi, d1, d2 := ev.Derivatives(x)
		if (phi != phi || d1 != d1 || d2 != d2) && inner {
			gg.undef++
		}
		gg.d2[i] = math.NaN()
		switch {
		case !inner && finite(phi) && d1 == d1 && d2 == d2 && (!finite(d1) || !finite(d2)):
			// An infinite slope at an end of the interval (-x ln x at 0)
			// makes that one report's effort infinite, as a report ruling
			// an outcome out does for the log rule: reported, not failed.
			gg.endInf = append(gg.endInf, x)
		case !finite(phi) || !finite(d1) || !finite(d2):
			gg.nonFinte = append(gg.nonFinte, fmt.Sprintf("x = %g (phi %v, phi' %v, phi'' %v)", x, phi, d1, d2))
		default:
			gg.d2[i] = d2
			gg.scaleD2 = math.Max(gg.scaleD2, math.Abs(d2))
		}
		gg.d[i], gg.size[i] = make([]float64, len(ys)), make([]float64, len(ys))
		for j, y := range ys {
			v, m := ev.DivergenceTerms(y, x)
			if !inner {
				// The limit's error as a size whose roundoff is that error.
				m += gg.endErr * math.Abs(y-x) / roundoff(1)
			}
			gg.d[i][j], gg.size[i][j] = v, m
			switch {
			case v != v && inner:
				gg.undef++
				gg.nonFinte = append(gg.nonFinte, fmt.Sprintf("D(y = %g, x = %g) = %v", y, x, v))
			case math.IsInf(v, 1) && !inner:
				// Counted with the report above.
			case !finite(v):
				gg.nonFinte = append(gg.nonFinte, fmt.Sprintf("D(y = %g, x = %g) = %v", y, x, v))
			default:
				gg.scale = math.Max(gg.scale, math.Abs(v))
			}
		}
	}
	gg.scale = math.Max(gg.scale, math.SmallestNonzeroFloat64)
	return gg, nil
}

// slack is the allowance of a comparison whose terms add up to size.
func (gg *genGrid) slack(size float64) float64 { return gg.tol*gg.scale + roundoff(size) }

func (gg *genGrid) concavity() verify.CheckResult {
	maxD2, at := math.Inf(-1), 0.0
	for i, d2 := range gg.d2 {
		if d2 == d2 && d2 > maxD2 {
			maxD2, at = d2, gg.xs[i]
		}
	}
	const what = "largest phi''(x) on the report grid (<= 0 for a concave generator)"
	slack := gg.tol * math.Max(gg.scaleD2, 1)
	if math.IsInf(maxD2, -1) {
		return result("concavity", what, math.NaN(), false, slack, nil)
	}
	return result("concavity", what, maxD2, maxD2 <= slack, slack, &place{report: []float64{at}})
}

func (gg *genGrid) nonnegativity() verify.CheckResult {
	minD, passed, slack := math.Inf(1), true, 0.0
	var at place
	for i, x := range gg.xs {
		for j, y := range gg.ys {
			v := gg.d[i][j]
			if !finite(v) {
				continue
			}
			if v < minD {
				minD, at, slack = v, place{outcomes: []float64{y}, report: []float64{x}}, gg.slack(gg.size[i][j])
			}
			if v < -gg.slack(gg.size[i][j]) {
				passed = false
			}
		}
	}
	return result("nonnegativity", "smallest effort D(y, x) on the grid (>= 0)", minD, passed, slack, &at)
}

// affinity: Phi(y, x) at the midpoint of two outcomes equals the mean of
// its values there, for every report on the grid.
func (gg *genGrid) affinity(ev *point.Evaluator) verify.CheckResult {
	worst, passed, slack := 0.0, true, 0.0
	var at place
	ys := gg.ys
	for _, x := range gg.xs {
		phi, d1, _ := ev.Derivatives(x)
		for j := 0; j+2 < len(ys); j++ {
			a, m, b := ev.Line(ys[j], x), ev.Line((ys[j]+ys[j+2])/2, x), ev.Line(ys[j+2], x)
			if !finite(a) || !finite(m) || !finite(b) {
				continue // counted under boundedness
			}
			dev := math.Abs(m - (a+b)/2)
			size := math.Abs(a) + math.Abs(m) + math.Abs(b) + 3*math.Abs(phi) + math.Abs(d1)*(math.Abs(ys[j]-x)+math.Abs(ys[j+2]-x))
			if dev > gg.slack(size) {
				passed = false
			}
			if dev > worst {
				worst, at, slack = dev, place{outcomes: []float64{ys[j], ys[j+2]}, report: []float64{x}}, gg.slack(size)
			}
		}
	}
	return result("affinity", "largest departure of the expected-effort line Phi(y, x) from affine in y", worst, passed, slack, &at)
}

// properness: over the two- and three-point distributions, no grid report
// beats the mean by more than the slack of the terms involved.
func (gg *genGrid) properness(ctx context.Context, ev *point.Evaluator, s verify.Settings) (verify.CheckResult, error) {
	ds := distributions(len(gg.ys) - 1)
	worst, passed, slack := math.Inf(-1), true, 0.0
	var at place
	for n, d := range ds {
		if err := tick(ctx, s, n, len(ds)); err != nil {
			return verify.CheckResult{}, err
		}
		vals, mean := d.values(gg.ys)
		var atMean, sizeMean float64
		for j, y := range vals {
			v, m := ev.DivergenceTerms(y, mean)
			atMean += d.w[j] * v
			sizeMean += d.w[j] * m
		}
		best, bestX, bestSize := math.Inf(1), 0.0, 0.0
		for i := range gg.xs {
			var e, size float64
			for j, yi := range d.idx {
				e += d.w[j] * gg.d[i][yi]
				size += d.w[j] * gg.size[i][yi]
			}
			if e < best { // NaN never wins; it is counted under boundedness
				best, bestX, bestSize = e, gg.xs[i], size
			}
		}
		if math.IsNaN(atMean) || !finite(atMean) && !finite(best) {
			continue // undefined, or both infinite: counted under boundedness
		}
		gap := atMean - best
		if gap > gg.slack(sizeMean+bestSize) {
			passed = false
		}
		if gap > worst {
			worst, at, slack = gap, place{vals, d.w, []float64{bestX}}, gg.slack(sizeMean+bestSize)
		}
	}
	done(s, len(ds))
	return result("properness", fmt.Sprintf("largest amount by which a report on the grid beats the mean in expected effort, over %d two- and three-point distributions", len(ds)), worst, passed, slack, &at), nil
}

// tieSamples is how many points of a segment between neighbouring
// reports must show phi” = 0 for the two reports to count as tied.
const tieSamples = 9

// tie looks for two neighbouring grid reports between which phi is
// affine: phi” within Tolerance × the largest |phi”| of 0 at every one of
// tieSamples points of the segment (all of them 0 when phi” is 0
// everywhere, as for an affine phi), and D(a, b), D(b, a) zero up to the
// rounding of their terms. A forecaster certain of y = a then gets the
// same expected effort, D(a, b) = 0, from a and from b.
func (gg *genGrid) tie(ev *point.Evaluator) (a, b float64, ok bool) {
	flat := func(v float64) bool { return v == v && math.Abs(v) <= gg.tol*gg.scaleD2 }
	for i := 0; i+1 < len(gg.xs); i++ {
		if !flat(gg.d2[i]) || !flat(gg.d2[i+1]) {
			continue
		}
		x0, x1 := gg.xs[i], gg.xs[i+1]
		all := true
		for t := 1; t < tieSamples && all; t++ {
			_, _, d2 := ev.Derivatives(x0 + (x1-x0)*float64(t)/tieSamples)
			all = flat(d2)
		}
		// The filter above is relative to the largest curvature, which an
		// exponential generator makes huge; the tie itself must show in
		// the efforts: D both ways within the rounding of their terms.
		d01, s01 := ev.DivergenceTerms(x0, x1)
		d10, s10 := ev.DivergenceTerms(x1, x0)
		if all && math.Abs(d01) <= roundoff(s01) && math.Abs(d10) <= roundoff(s10) {
			return x0, x1, true
		}
	}
	return 0, 0, false
}

// flatAt is a report where phi” is 0 within the tolerance, NaN if none.
func (gg *genGrid) flatAt() float64 {
	for i, v := range gg.d2 {
		if v == v && math.Abs(v) <= gg.tol*gg.scaleD2 {
			return gg.xs[i]
		}
	}
	return math.NaN()
}
