package verify

import (
	"context"
	"fmt"
	"math"
	"strings"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
	"scorewright/internal/num"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// Check names, as the command line and JSON show them.
const (
	NameConcavity     = "concavity"
	NameProperness    = "properness"
	NameNonnegativity = "nonnegativity"
	NameAffinity      = "affinity"
	NameBoundedness   = "boundedness"
)

// gradCost is roughly how many stream pairs one gradient or Hessian
// evaluation is worth, for weighting the progress count.
const gradCost = 64

// CheckRule examines a rule built from a generator on a grid of beliefs
// and reports: concavity of H, properness and its strictness from the
// expected effort of every grid report, non-negativity of the divergence,
// affinity of the expected effort in the belief, and boundedness of the
// efforts. It returns ctx.Err() promptly when ctx is cancelled.
func CheckRule(ctx context.Context, r *bregman.Rule, s Settings) (*Report, error) {
	if r == nil || r.Gen == nil {
		return nil, fmt.Errorf("verify: no rule to check")
	}
	s, g, err := prepare(r.Outcomes(), s)
	if err != nil {
		return nil, err
	}
	G := g.Len()
	pr := pool.NewMeter(s.Progress, int64(G)*int64(G)+2*gradCost*int64(G)+gradCost*int64(offGridCount(G)))
	rep, err := checkRule(ctx, r, s, g, pr)
	pr.Finish(err == nil)
	return rep, err
}

func checkOutcomes(n int) error {
	if n < 2 || n > formula.MaxOutcomes {
		return fmt.Errorf("verify: %d outcomes; need 2..%d", n, formula.MaxOutcomes)
	}
	return nil
}

// prepare is the common start of a check and an audit: refuse an outcome
// count outside the engine's range, fill in the default settings for n,
// and build the grid.
func prepare(n int, s Settings) (Settings, *simplex.Grid, error) {
	if err := checkOutcomes(n); err != nil {
		return s, nil, err
	}
	s = s.withDefaults(n)
	g, err := grid(n, s)
	return s, g, err
}

// grid builds the full lattice, or a sample of it when the full one
// would exceed s.MaxPoints.
func grid(n int, s Settings) (*simplex.Grid, error) {
	if c := simplex.Count(n, s.Resolution); c >= 0 && c <= int64(s.MaxPoints) {
		return simplex.Full(n, s.Resolution)
	}
	return simplex.Sample(n, s.Resolution, s.Samples, s.Seed)
}

func gridInfo(g *simplex.Grid, s Settings) Grid {
	out := Grid{Resolution: g.K, Points: g.Len(), Tolerance: s.Tolerance, Scale: 1, Sampled: g.Sampled, Pairs: int64(g.Len()) * int64(g.Len()),
		Lattice: simplex.Count(g.N, g.K), MaxPoints: s.MaxPoints}
	for _, b := range g.Boundary {
		if b {
			out.Boundary++
		} else {
			out.Interior++
		}
	}
	return out
}

func checkRule(ctx context.Context, r *bregman.Rule, s Settings, g *simplex.Grid, pr *pool.Meter) (*Report, error) {
	n := r.Outcomes()
	rep := &Report{Grid: gridInfo(g, s)}
	rep.Notes = gridNotes(rep.Grid, n)
	if g.Sampled {
		rep.Notes = append(rep.Notes, sampledNote(s, n, g.Len())+", with local optimisation over reports")
	}

	m, h, scorers, err := gridEfforts(ctx, r, g, s.Workers, pr)
	if err != nil {
		return nil, err
	}
	rep.Grid.Extrapolation = worstLimitError(scorers)
	bounded := boundedness(g, m, s.Limit, r.Label, "effort", 1)
	rep.Grid.Scale, rep.Grid.Rounding = scaleOf(m)
	m.seal()
	affTol := s.Tolerance

	// Curvature does not see an added constant, so concavity is judged
	// against the spread alone, without the rounding floor of the sums
	// (the rounding of the Hessian's own terms is allowed point by point).
	cs := s
	cs.Tolerance = affTol * rep.Grid.Scale
	conc, effR, err := concavity(ctx, r, g, cs, scorers, pr)
	if err != nil {
		return nil, err
	}
	ps := comparisonSlack(&rep.Grid, effR, cs.Tolerance)
	s.Tolerance = ps.global
	proved := s.Proof.proves()
	var bs []best
	if proved {
		bs, rep.Grid.Pairs, err = provedStream(ctx, g, m, s.Workers, pr)
	} else {
		bs, err = pairStream(ctx, g, m, s, pr)
	}
	if err != nil {
		return nil, err
	}
	prop, nonneg, ties := properness(g, m, h, bs, ps, rep.Grid.Scale, rep.Grid.Rounding, rep.Grid.Extrapolation)
	if g.Sampled && !proved {
		if err := searchEfforts(ctx, r, g, &prop, s); err != nil {
			return nil, err
		}
	}
	aff := affinity(g, m, affTol, s.Seed)

	sc := scorers[0]
	sharpenWitnesses(&prop, &nonneg, &conc, r, sc, g)

	conc.Note = joinNotes(concavityWitness(conc), conc.Note)
	// Each midpoint test allows the rounding of its own three values,
	// besides the tolerance and the values' rounding floor.
	if mid := midpoints(g, sc, math.Max(cs.Tolerance, rep.Grid.Floor), s.Seed); mid.found {
		mid.apply(&conc)
	}
	prop.Note = propernessNote(prop, "effort", "less")
	var strictNote string
	if conc.Passed && prop.Passed && nonneg.Passed && aff.Passed {
		cell := cellOf(g)
		if cell == 0 {
			cell = 0.5 / float64(g.K)
		}
		_, strictNote = decideStrictness(sc, &prop, conc, ties, cell)
	}
	nonneg.Note = nonnegNote(nonneg)
	rep.Checks = []CheckResult{conc, prop, nonneg, aff, bounded}
	rep.Notes = append(rep.Notes, boundaryNotes(conc, bounded, s.Tolerance)...)
	ruleVerdict(rep, strictNote)
	if proved {
		restOnProof(rep, s.Proof, rep.Grid.Boundary)
	}
	return rep, nil
}

// worstLimitError is the worst extrapolation error over the boundary
// reports (their efforts are limits from the interior;
// bregman.Scorer.LimitError), over every worker's scorer.
func worstLimitError(scorers []*bregman.Scorer) float64 {
	worst := 0.0
	for _, sc := range scorers {
		worst = math.Max(worst, sc.MaxLimitError())
	}
	return worst
}

// searchEfforts looks between the points of a sampled grid for a report
// with less expected effort than the honest one (searchReports, with a
// scorer per worker).
func searchEfforts(ctx context.Context, r *bregman.Rule, g *simplex.Grid, prop *CheckResult, s Settings) error {
	n := r.Outcomes()
	return searchReports(ctx, g, prop, s, func(int) func(q, p []float64) float64 {
		sc := r.NewScorer()
		eff := make([]float64, n)
		return func(q, p []float64) float64 { sc.Efforts(eff, p); return bregman.Dot(q, eff) }
	})
}

// gridEfforts computes the effort of every grid report (the menu's rows)
// and H at every grid point, with a scorer per worker.
func gridEfforts(ctx context.Context, r *bregman.Rule, g *simplex.Grid, workers int, pr *pool.Meter) (*menu, []float64, []*bregman.Scorer, error) {
	n, G := r.Outcomes(), g.Len()
	m := newMenu(n, G)
	h := make([]float64, G)
	scorers := make([]*bregman.Scorer, workers)
	for i := range scorers {
		scorers[i] = r.NewScorer()
	}
	err := pool.Run(ctx, workers, G, 256, func(w, lo, hi int) {
		sc := scorers[w]
		for j := lo; j < hi; j++ {
			h[j] = sc.Efforts(m.rows[j*n:(j+1)*n], g.Point(j))
		}
		pr.Add(int64(hi-lo) * gradCost)
	})
	return m, h, scorers, err
}

// ruleVerdict reads the verdict from the checks of rep (concavity,
// properness, nonnegativity, affinity first, in that order).
func ruleVerdict(rep *Report, strictNote string) {
	conc, prop, nonneg, aff := rep.Checks[0], rep.Checks[1], rep.Checks[2], rep.Checks[3]
	switch {
	case !conc.Passed || !prop.Passed || !nonneg.Passed || !aff.Passed:
		rep.Verdict = Improper
	case prop.Strict:
		// Strictly proper unless two different reports tie (a confirmed
		// witness above); a curvature that vanishes at isolated points
		// (-x^4-like) leaves H strictly concave.
		rep.Verdict = StrictlyProper
		if strictNote != "" {
			rep.Notes = append(rep.Notes, strictNote)
		}
	default:
		rep.Verdict = Proper
	}
}

// sharpenWitnesses sharpens the witnesses of failing checks beyond the
// grid by local optimisation.
func sharpenWitnesses(prop, nonneg, conc *CheckResult, r *bregman.Rule, sc *bregman.Scorer, g *simplex.Grid) {
	n := g.N
	effQ, effP := make([]float64, n), make([]float64, n)
	if !prop.Passed && prop.Belief != nil && prop.Report != nil {
		sharpenPair(prop, n, cellOf(g), func(q, p []float64) float64 {
			sc.Efforts(effQ, q)
			sc.Efforts(effP, p)
			return -(bregman.Dot(q, effQ) - bregman.Dot(q, effP))
		}, -1)
	}
	if !nonneg.Passed && nonneg.Belief != nil && nonneg.Report != nil {
		sharpenPair(nonneg, n, cellOf(g), func(q, p []float64) float64 {
			sc.Efforts(effP, p)
			return bregman.Dot(q, effP) - sc.Entropy(q)
		}, 1)
	}
	if !conc.Passed && conc.Belief != nil && !math.IsInf(conc.Worst, 1) {
		sharpenConcavity(conc, r, onBoundary(conc.Belief), cellOf(g))
	}
}

// restOnProof gives a check that streamed only what a proof leaves the
// proof's verdict and kind, unless the grid contradicts it: then the
// grid's improper verdict stands, as grid evidence, and a note says so.
func restOnProof(rep *Report, p *Proof, boundaryReports int) {
	if rep.Verdict == Improper {
		rep.Notes = append(rep.Notes, "the grid contradicts the proof handed in ("+p.Statement+"): the grid's verdict stands")
		return
	}
	rep.Verdict, rep.Proof = p.Verdict, p
	if c := rep.Check(NameProperness); c != nil {
		c.Strict = p.Verdict == StrictlyProper
		c.Note = provedNote(*c, p, boundaryReports)
	}
}

// StrictFloor is the rounding floor strictness is judged against: an
// honest report is the unique best when every other report is worse by
// more than StrictFloor × (Grid.Scale + |honest expected effort|). It is far below
// the tolerance on purpose: near a vertex the closest grid report of a
// strictly proper rule can be worse by only about K^-3.
const StrictFloor = 1e-13

func joinNotes(a ...string) string {
	var out []string
	for _, s := range a {
		if s != "" {
			out = append(out, s)
		}
	}
	return strings.Join(out, "; ")
}

func sharpenedNote(c CheckResult) string {
	if !c.Sharpened {
		return ""
	}
	if fmt.Sprintf("%.6g", c.Worst) == fmt.Sprintf("%.6g", c.GridWorst) {
		return fmt.Sprintf("a local search between the grid points, from the grid's worst case, found nothing worse (the search %s)", c.Status)
	}
	return fmt.Sprintf("worse between the grid points: a local search from the grid's worst case, %.6g, found %.6g (the search %s)", c.GridWorst, c.Worst, c.Status)
}

func concavityWitness(c CheckResult) string {
	if c.Passed {
		return ""
	}
	if math.IsInf(c.Worst, 1) {
		return fmt.Sprintf("concavity fails for want of a curvature: the Hessian of H is not finite (or H is undefined) at the interior point %s", num.Format(c.Belief))
	}
	return joinNotes(fmt.Sprintf("H is not concave: the Hessian projected onto the simplex has eigenvalue %.6g > 0 at %s", c.Worst, num.Format(c.Belief)), sharpenedNote(c))
}

// propernessNote words the properness finding; what is "effort" or
// "pay", better is "less" or "more".
func propernessNote(c CheckResult, what, better string) string {
	switch {
	case !c.Passed && c.Worst != c.Worst:
		return fmt.Sprintf("at belief %s the honest report's expected %s is undefined (NaN): the rule is not defined there, so it cannot be called proper", num.Format(c.Belief), what)
	case !c.Passed:
		return joinNotes(gainNote(c.Belief, c.Report, c.Worst, better, what), sharpenedNote(c))
	case c.Strict:
		return fmt.Sprintf("at every grid belief the honest report is the unique best grid report, and the closest other report falls short by %.6g, at belief %s (strictness judged against the rounding floor %g, relative)", c.Margin, num.Format(c.MarginBelief), StrictFloor)
	}
	// The tie is confirmed (strictness.go: H is affine on the segment), so
	// the computed difference, within StrictFloor of 0, is rounding; its
	// -8.3e-17 must not read as one report doing better.
	return fmt.Sprintf("the honest report is a best report at every grid belief, but not the only one: at belief %s the report %s does as well (difference 0 up to rounding)", num.Format(c.MarginBelief), num.Format(c.MarginReport))
}

// gainNote says what a forecaster gains by a misreport, naming belief and
// report with as many digits as tell them apart; a report equal to the
// belief is no witness, and then none is named.
func gainNote(belief, report []float64, gain float64, better, what string) string {
	b, r, ok := num.FormatApart(belief, report)
	if !ok {
		return fmt.Sprintf("at belief %s the honest report's expected %s falls short by %.6g of what the search found, at a report that cannot be told apart from the belief: no misreport is named (the rule is discontinuous at the honest report)", b, what, gain)
	}
	return fmt.Sprintf("a forecaster with belief %s expects %.6g %s %s by reporting %s than by reporting honestly", b, gain, better, what, r)
}

func nonnegNote(c CheckResult) string {
	if c.Passed && c.Worst < 0 {
		// Passed with a negative least value: within the tolerance, what
		// rounding leaves of H(q) - H(p) - <dH, q - p> (-3e-16 for the
		// quadratic rule), not a negative divergence.
		return "D(q, p) >= 0 over every grid pair (smallest 0, up to the rounding the tolerance allows)"
	}
	if c.Passed {
		return fmt.Sprintf("D(q, p) >= 0 over every grid pair (smallest %.6g)", c.Worst)
	}
	if c.Worst != c.Worst {
		return fmt.Sprintf("D(q, p) is undefined (NaN) at belief %s: H or the efforts are not defined there", num.Format(c.Belief))
	}
	return joinNotes(fmt.Sprintf("D(q, p) = %.6g < 0 at belief %s, report %s", c.Worst, num.Format(c.Belief), num.Format(c.Report)), sharpenedNote(c))
}

// cellOf is the half-width of a grid point's cell: half a grid step on a
// full grid; unlimited on a sampled one, whose points are far apart.
func cellOf(g *simplex.Grid) float64 {
	if g.Sampled {
		return 0
	}
	return 0.5 / float64(g.K)
}

// markPart records a witness found off the grid in the region it lies
// in, so that the interior/boundary split agrees with the overall result.
func markPart(c *CheckResult) {
	p := &c.Interior
	if onBoundary(c.Belief) {
		p = &c.Boundary
	}
	p.Passed = false
	if !(p.Worst >= c.Worst) {
		p.Worst, p.Belief, p.Report = c.Worst, clone(c.Belief), clone(c.Report)
	}
}

// scaleOf measures a menu of values (before seal) for the tolerance: the
// largest spread of one outcome's finite values over the reports (largest
// minus smallest), and the rounding floor 2·n·ε × the largest finite
// |value|. The spread, not the size, is what an affine change pay = A -
// B·L multiplies, so a rule paid in millionths and the same rule paid in
// millions get the same verdict. It is taken outcome by outcome because a
// term that depends on the outcome alone (an affine term a·p in H adds
// a_k to every effort for outcome k) changes no comparison: measured
// across outcomes, 1e10·p + p^2 had a spread of 1e10, a slack of 10, and
// its convex H passed. The floor keeps values far from 0 (1e12 + small)
// from being judged finer than they can be computed. A menu with no
// spread (a constant rule) has scale 1, so that its slack is the plain
// tolerance.
func scaleOf(m *menu) (scale, rounding float64) {
	var big float64
	for k := 0; k < m.n; k++ {
		lo, hi := math.Inf(1), math.Inf(-1)
		for i := k; i < len(m.rows); i += m.n {
			v := m.rows[i]
			if v != v || math.IsInf(v, 0) {
				continue
			}
			lo, hi, big = math.Min(lo, v), math.Max(hi, v), math.Max(big, math.Abs(v))
		}
		if hi-lo > scale {
			scale = hi - lo
		}
	}
	if !(scale > 0) || math.IsInf(scale, 0) {
		scale = 1
	}
	return scale, 2 * float64(m.n) * 0x1p-52 * big
}

// gridNotes warns about grids too coarse to say much.
func gridNotes(g Grid, n int) []string {
	if g.Interior == 0 {
		return []string{fmt.Sprintf("the grid has no interior points (resolution %d, %d outcomes): the verdict covers boundary points only; use a resolution above %d", g.Resolution, n, n)}
	}
	return nil
}

// sharpenPair improves the witness of a pair check by local optimisation
// of f (to be minimised) from the grid witness; sign converts the
// optimised value back to the check's amount (amount = sign * f).
func sharpenPair(c *CheckResult, n int, cell float64, f func(q, p []float64) float64, sign float64) {
	ps := newPairSearch(n)
	ps.onBoundary, ps.cell = true, cell
	q, p, v, status, ok := ps.run(f, c.Belief, c.Report)
	c.Status = status
	if !ok {
		return
	}
	// A witness on a face comes out of the squares map with coordinates
	// like 1e-16 for its zeros: snapWitness tries them as exact zeros. The
	// search minimises f, so -f is the gain it keeps no smaller.
	negV, q, p := snapWitness(-v, q, p, func(q, p []float64) float64 { return -f(q, p) })
	amount := sign * -negV
	if improves(amount, c.Worst, sign < 0) {
		c.GridWorst = c.Worst
		c.Worst, c.Belief, c.Report, c.Sharpened = amount, q, p, true
	}
}

// improves reports whether a sharpened amount is worse (so a better
// witness) than the grid's — larger when bigger is worse, else smaller —
// by more than rounding, so that an exact grid witness is not traded for
// a point a rounding error away.
func improves(amount, grid float64, biggerWorse bool) bool {
	if amount != amount || math.IsInf(amount, 0) {
		return false
	}
	slack := StrictFloor * (1 + math.Abs(grid))
	if biggerWorse {
		return amount > grid+slack
	}
	return amount < grid-slack
}
