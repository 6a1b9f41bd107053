package pointcheck

import (
	"context"
	"fmt"
	"math"
	"strings"

	"scorewright/generator/formula"
	"scorewright/generator/point"
	"scorewright/internal/num"
	"scorewright/verify"
)

// Candidate is a known generator an audited payout may turn out to be a
// scaled copy of.
type Candidate struct {
	Name string
	Gen  *point.Generator
}

// Identified says that a payout equals Shift - Scale * D(y, x) for a known
// generator, to within the tolerance on the grid; with OutcomeTerm, it is
// g(y) - Scale * D(y, x) with a term g in the outcome alone (which changes
// no incentive) and Shift is 0.
type Identified struct {
	Preset       string
	Scale, Shift float64
	OutcomeTerm  bool
}

// Payout is a compiled payout formula pay(x, y) for point forecasts.
type Payout struct {
	// Source is the formula as given.
	Source string
	prog   *formula.Program
}

// NewPayout compiles src, a formula in the report x and the outcome y.
// Formula errors are *formula.Error values.
func NewPayout(src string, params map[string]float64) (*Payout, error) {
	prog, err := formula.CompileString(src, formula.Scope{Vars: []string{"x", "y"}, Params: params})
	if err != nil {
		return nil, err
	}
	return &Payout{Source: src, prog: prog}, nil
}

// payer evaluates a payout without allocating.
type payer struct {
	m *formula.Machine
	v [2]float64
}

func (p *Payout) newPayer() *payer { return &payer{m: p.prog.NewMachine()} }

func (p *payer) pay(x, y float64) float64 {
	p.v[0], p.v[1] = x, y
	return p.m.Value(p.v[:])
}

func (p *payer) expected(x float64, ys, ws []float64) float64 {
	var s float64
	for j, y := range ys {
		if ws[j] != 0 {
			s += ws[j] * p.pay(x, y)
		}
	}
	return s
}

// AuditPayout checks whether the mean is the best report under the payout
// on [lo, hi], and measures the honesty gap
// max_x E pay(x, Y) - E pay(mean, Y) over the grid's distributions.
// Candidates, when given, are tried for an exact identification.
func AuditPayout(ctx context.Context, p *Payout, lo, hi float64, s verify.Settings, candidates []Candidate) (*Report, error) {
	if !(lo < hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil, fmt.Errorf("point: interval [%g, %g] must be finite with lo < hi", lo, hi)
	}
	k, tol := resolution(s), tolerance(s)
	a := &payAudit{pr: p.newPayer(), lo: lo, hi: hi, tol: tol}
	a.ys, a.xs = grids(lo, hi, k)
	rep := &Report{Report: verify.Report{Grid: verify.Grid{Resolution: k, Points: len(a.xs), Tolerance: tol, Lo: lo, Hi: hi}}}
	pm, nonFinite, err := fill(ctx, a.xs, a.ys, "pay", func(y, x float64) float64 { return a.pr.pay(x, y) })
	if err != nil {
		return nil, err
	}
	a.pm, a.scale, a.round = pm, paySpread(pm), payRounding(pm)
	nonneg, affine := a.nonnegativity(), a.affinity()
	ds := distributions(k)
	gap, strictMargin, err := a.gap(ctx, s, ds)
	if err != nil {
		return nil, err
	}
	proper := result("properness", fmt.Sprintf("largest honesty gap max_x E pay(x, Y) - E pay(mean, Y) over %d two- and three-point distributions and a search over every two-point distribution (support and weight), where the gap of a point report is largest", len(ds)),
		gap.Max, gap.Max <= a.slack(), a.slack(), &place{gap.Outcomes, gap.Weights, []float64{gap.BestReport}})
	rep.Gap = &gap
	bounded := result("boundedness", "number of grid cells where the pay is not finite", float64(len(nonFinite)), len(nonFinite) == 0, 0, nil)
	if len(nonFinite) > 0 {
		rep.Notes = append(rep.Notes, "not finite at "+joinFirst(nonFinite, 5))
	}
	rep.Checks = []verify.CheckResult{nonneg, affine, proper, bounded}
	a.verdict(rep, strictMargin)
	if id := identify(pm, a.xs, a.ys, a.scale, tol, candidates); id != nil {
		rep.Identified = id
	}
	raised := ""
	if a.round > tol*a.scale {
		raised = fmt.Sprintf(", raised to %.3g for the rounding of payments as large as they are", a.round)
	}
	rep.Notes = append(rep.Notes, fmt.Sprintf("grid check on %d outcomes and %d reports in [%g, %g], tolerance %g relative to the pay spread %.4g (the largest over outcomes of the spread over reports)%s: evidence, not proof", len(a.ys), len(a.xs), lo, hi, tol, a.scale, raised))
	return rep, nil
}

// payAudit is a payout evaluated on the grid: pm[i][j] is the pay of
// report xs[i] when the outcome is ys[j]; scale is the spread of the
// finite payments outcome by outcome, which the tolerance is relative
// to, and round the rounding floor of the comparisons.
type payAudit struct {
	pr                *payer
	pm                [][]float64
	xs, ys            []float64
	lo, hi            float64
	tol, scale, round float64
}

// slack is what a comparison of expected payments allows: the tolerance
// relative to the spread, never less than the rounding of the payments.
func (a *payAudit) slack() float64 { return math.Max(a.tol*a.scale, a.round) }

// paySpread is the largest spread of the finite payments of pm for one
// outcome (over the reports), or, when they are all equal, their size (at
// least 1). A term in the outcome alone (1e10·y) changes no incentive;
// measured across outcomes it made the slack 10 and hid the gap 0.000625
// of -(x - y)^2 + 1e10·y + 0.05·x.
func paySpread(pm [][]float64) float64 {
	var scale, size float64
	for j := range pm[0] {
		minP, maxP := math.Inf(1), math.Inf(-1)
		for _, row := range pm {
			if v := row[j]; finite(v) {
				minP, maxP = math.Min(minP, v), math.Max(maxP, v)
				size = math.Max(size, math.Abs(v))
			}
		}
		if maxP-minP > scale {
			scale = maxP - minP
		}
	}
	if scale > 0 {
		return scale
	}
	return math.Max(size, 1)
}

// payRounding is the rounding floor of a comparison of expected payments:
// a few ulps (8ε, for the sums of two- and three-point expectations and
// their difference) of the largest finite payment.
func payRounding(pm [][]float64) float64 {
	var size float64
	for _, row := range pm {
		for _, v := range row {
			if finite(v) {
				size = math.Max(size, math.Abs(v))
			}
		}
	}
	return 8 * 0x1p-52 * size
}

// nonnegativity: knowing the outcome for certain, the exact report pays
// at least as much as any other, pay(y, y) - pay(x, y) >= 0. Outcome j
// sits at report index 4j.
func (a *payAudit) nonnegativity() verify.CheckResult {
	worst, at := math.Inf(1), place{}
	for j := range a.ys {
		for i := range a.xs {
			if d := a.pm[4*j][j] - a.pm[i][j]; d < worst {
				worst, at = d, place{outcomes: []float64{a.ys[j]}, report: []float64{a.xs[i]}}
			}
		}
	}
	return result("nonnegativity", "smallest pay(y, y) - pay(x, y): what the exact report gains over report x when the outcome y is certain", worst, worst >= -a.slack(), a.slack(), &at)
}

// affinity: the report-dependent part pay(x, y) - pay(x0, y) must be
// affine in y.
func (a *payAudit) affinity() verify.CheckResult {
	i0 := len(a.xs) / 2
	worst, at := 0.0, place{}
	for i := range a.xs {
		f := func(j int) float64 { return a.pm[i][j] - a.pm[i0][j] }
		for j := 0; j+2 < len(a.ys); j++ {
			dev := math.Abs(f(j) - 2*f(j+1) + f(j+2))
			if !finite(dev) {
				continue // counted under boundedness
			}
			if dev > worst {
				worst, at = dev, place{outcomes: []float64{a.ys[j], a.ys[j+2]}, report: []float64{a.xs[i]}}
			}
		}
	}
	return result("affinity", fmt.Sprintf("largest second difference in y of pay(x, y) - pay(%g, y); zero when the report-dependent part is affine in the outcome, which eliciting the mean needs", a.xs[i0]),
		worst, worst <= a.slack(), a.slack(), &at)
}

// gap is the largest honesty gap over the distributions ds, refined
// between grid reports and by the search over two-point distributions,
// and the smallest margin by which the mean beats every report at least
// two grid steps away (positive when the payout is strictly proper).
func (a *payAudit) gap(ctx context.Context, s verify.Settings, ds []dist) (Gap, float64, error) {
	step := a.xs[1] - a.xs[0]
	gap := Gap{Max: math.Inf(-1)}
	worstD := -1
	strictMargin := math.Inf(1)
	for n, d := range ds {
		if err := tick(ctx, s, n, len(ds)); err != nil {
			return Gap{}, 0, err
		}
		vals, mean := d.values(a.ys)
		atMean := a.pr.expected(mean, vals, d.w)
		if math.IsNaN(atMean) {
			continue // counted under boundedness
		}
		best, bestX, away := a.bestReport(d, mean, step)
		g := best - atMean
		if g > gap.Max || math.IsNaN(g) {
			gap = Gap{Max: g, Outcomes: vals, Weights: d.w, Mean: mean, BestReport: bestX}
			worstD = n
		}
		strictMargin = math.Min(strictMargin, atMean-away)
	}
	done(s, len(ds))
	if worstD >= 0 && gap.Max > 0 {
		// Refine the best report between its grid neighbours.
		d := ds[worstD]
		vals, _ := d.values(a.ys)
		x, v := goldenMax(func(x float64) float64 { return a.pr.expected(x, vals, d.w) }, math.Max(a.lo, gap.BestReport-step), math.Min(a.hi, gap.BestReport+step))
		if v > gap.Max+a.pr.expected(gap.Mean, vals, d.w) {
			gap.BestReport, gap.Max = x, v-a.pr.expected(gap.Mean, vals, d.w)
		}
	}
	two, precision, err := worstTwoPoint(ctx, a.pr, a.pm, a.xs, a.ys)
	if err != nil {
		return Gap{}, 0, err
	}
	if two.Max > gap.Max {
		gap = two
	}
	if gap.Max > a.slack() && precision != "" {
		gap.Precision = precision + verify.SureDigits(gap.Max, a.round)
	}
	return gap, strictMargin, nil
}

// bestReport is the grid report with the largest expected pay under d,
// that pay, and the largest expected pay of a report at least two grid
// steps from the mean.
func (a *payAudit) bestReport(d dist, mean, step float64) (best, bestX, away float64) {
	best, away = math.Inf(-1), math.Inf(-1)
	for i, x := range a.xs {
		var e float64
		for j, yi := range d.idx {
			e += d.w[j] * a.pm[i][yi]
		}
		if math.IsNaN(e) {
			continue // a report the payout does not define; counted under boundedness
		}
		if e > best {
			best, bestX = e, x
		}
		if math.Abs(x-mean) >= 2*step {
			away = math.Max(away, e)
		}
	}
	return best, bestX, away
}

// verdict sets the report's verdict from its checks, with the notes that
// explain it.
func (a *payAudit) verdict(rep *Report, strictMargin float64) {
	nonneg, proper, gap := rep.Checks[0], rep.Checks[2], rep.Gap
	undefined := countNaN(a.pm[1 : len(a.pm)-1])
	switch {
	case !proper.Passed || !nonneg.Passed:
		rep.Verdict = verify.Improper
		if m, x, ok := num.FormatApart([]float64{gap.Mean}, []float64{gap.BestReport}); ok {
			rep.Notes = append(rep.Notes, fmt.Sprintf("the mean is not the best report: with outcomes %s weighted %s (mean %s) the report %s earns %.9g more in expectation", num.Format(gap.Outcomes), num.Format(gap.Weights), strings.Trim(m, "()"), strings.Trim(x, "()"), gap.Max))
		} else {
			rep.Notes = append(rep.Notes, fmt.Sprintf("the mean is not the best report: with outcomes %s weighted %s (mean %s) the mean's expected pay falls short by %.9g of what the search found at a report that cannot be told apart from the mean: no misreport is named (the payout is discontinuous at the honest report)", num.Format(gap.Outcomes), num.Format(gap.Weights), strings.Trim(m, "()"), gap.Max))
		}
		if gap.Precision != "" {
			rep.Notes = append(rep.Notes, gap.Precision)
		}
	case undefined > 0:
		// The other checks skip NaN; a payout undefined for a report
		// inside the interval cannot be called proper (at the ends, ∞ - ∞
		// is how an unbounded payout shows, reported under boundedness).
		rep.Verdict = verify.Improper
		rep.Notes = append(rep.Notes, fmt.Sprintf("the payout is undefined (NaN) in %d grid cells with a report inside the interval (see boundedness), so it is not proper on [%g, %g]", undefined, a.lo, a.hi))
	case strictMargin > a.slack():
		rep.Verdict = verify.StrictlyProper
	default:
		rep.Verdict = verify.Proper
		rep.Notes = append(rep.Notes, "some report at least two grid steps from the mean earns as much as the mean: a best report, not always the only one")
	}
}

// goldenMax maximises f on [a, b] by golden-section search (f unimodal
// there is assumed; it is a refinement of a grid maximum): the middle of
// the final bracket and its value.
func goldenMax(f func(float64) float64, a, b float64) (float64, float64) {
	g := num.GoldenMax(f, a, b, 60, func(a, b float64) bool { return b-a > 1e-12*(1+math.Abs(a)) })
	x := (g.A + g.B) / 2
	return x, f(x)
}

// identify fits pay[i][j] ≈ g_j - Scale·D(y_j, x_i) for each candidate by
// least squares on the grid, with g a free term per outcome (which does
// not change any incentive), and returns the first candidate that fits
// every cell to within tol·scale with Scale > 0. When g is constant the
// payout is Shift - Scale·D.
func identify(pm [][]float64, xs, ys []float64, scale, tol float64, cands []Candidate) *Identified {
	limit := math.Max(tol, 1e-9) * scale
	for _, c := range cands {
		if c.Gen.Lo > xs[0] || c.Gen.Hi < xs[len(xs)-1] {
			continue
		}
		ev := c.Gen.NewEvaluator()
		dm, bad, _ := fill(context.Background(), xs, ys, "D", ev.Divergence)
		if len(bad) > 0 {
			continue
		}
		// Centre each outcome column, then fit the common slope.
		var sdp, sdd float64
		mp, md := make([]float64, len(ys)), make([]float64, len(ys))
		for j := range ys {
			for i := range xs {
				if !finite(pm[i][j]) {
					return nil
				}
				mp[j] += pm[i][j] / float64(len(xs))
				md[j] += dm[i][j] / float64(len(xs))
			}
			for i := range xs {
				sdp += (pm[i][j] - mp[j]) * (dm[i][j] - md[j])
				sdd += (dm[i][j] - md[j]) * (dm[i][j] - md[j])
			}
		}
		if !(sdd > 0) {
			continue
		}
		s := -sdp / sdd
		if !(s > 0) {
			continue
		}
		worst, gmin, gmax := 0.0, math.Inf(1), math.Inf(-1)
		for j := range ys {
			g := mp[j] + s*md[j]
			gmin, gmax = math.Min(gmin, g), math.Max(gmax, g)
			for i := range xs {
				worst = math.Max(worst, math.Abs(pm[i][j]-(g-s*dm[i][j])))
			}
		}
		if worst > limit {
			continue
		}
		id := &Identified{Preset: c.Name, Scale: s}
		if gmax-gmin <= limit {
			// A shift within the fit's tolerance of 0 is rounding: the
			// squared-error payout's 1.4e-17 must read 0.
			if id.Shift = (gmin + gmax) / 2; math.Abs(id.Shift) <= limit {
				id.Shift = 0
			}
		} else {
			id.OutcomeTerm = true
		}
		return id
	}
	return nil
}
