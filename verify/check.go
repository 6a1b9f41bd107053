package verify

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"gonum.org/v1/gonum/mat"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
	"scorewright/internal/num"
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
	pr := startProgress(s.Progress, int64(G)*int64(G)+2*gradCost*int64(G)+gradCost*int64(offGridCount(G)))
	rep, err := checkRule(ctx, r, s, g, pr)
	pr.finish(err == nil)
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
	out := Grid{Resolution: g.K, Points: g.Len(), Tolerance: s.Tolerance, Scale: 1, Sampled: g.Sampled, Pairs: int64(g.Len()) * int64(g.Len())}
	for _, b := range g.Boundary {
		if b {
			out.Boundary++
		} else {
			out.Interior++
		}
	}
	return out
}

func checkRule(ctx context.Context, r *bregman.Rule, s Settings, g *simplex.Grid, pr *progress) (*Report, error) {
	n, G := r.Outcomes(), g.Len()
	rep := &Report{Grid: gridInfo(g, s)}
	rep.Notes = gridNotes(rep.Grid, n)
	if g.Sampled {
		rep.Notes = append(rep.Notes, fmt.Sprintf("the full grid at resolution %d is larger than %d points, so %d random lattice points and the vertices were used, with local optimisation over reports", s.Resolution, s.MaxPoints, g.Len()-n))
	}

	// Efforts of every grid report, and H at every grid point.
	m := newMenu(n, G)
	h := make([]float64, G)
	scorers := make([]*bregman.Scorer, s.Workers)
	for i := range scorers {
		scorers[i] = r.NewScorer()
	}
	err := parallel(ctx, s.Workers, G, 256, func(w, lo, hi int) {
		sc := scorers[w]
		for j := lo; j < hi; j++ {
			h[j] = sc.Efforts(m.rows[j*n:(j+1)*n], g.Point(j))
		}
		pr.add(int64(hi-lo) * gradCost)
	})
	if err != nil {
		return nil, err
	}
	bounded := boundedness(g, m, s.Limit, r.Label, "effort", 1)
	rep.Grid.Scale, rep.Grid.Rounding = scaleOf(m)
	m.seal()
	affTol := s.Tolerance
	s.Tolerance = rep.Grid.Slack()

	// Curvature does not see an added constant, so concavity is judged
	// against the spread alone, without the rounding floor of the sums.
	cs := s
	cs.Tolerance = affTol * rep.Grid.Scale
	conc, err := concavity(ctx, r, g, cs, scorers, pr)
	if err != nil {
		return nil, err
	}
	bs, err := stream(ctx, g, m, s.Workers, pr)
	if err != nil {
		return nil, err
	}
	prop, nonneg := properness(g, m, h, bs, s.Tolerance, rep.Grid.Scale)
	if g.Sampled {
		if err := searchReports(ctx, g, &prop, s, func(int) func(q, p []float64) float64 {
			sc := r.NewScorer()
			eff := make([]float64, n)
			return func(q, p []float64) float64 { sc.Efforts(eff, p); return bregman.Dot(q, eff) }
		}); err != nil {
			return nil, err
		}
	}
	aff := affinity(g, m, affTol, s.Seed)

	// Sharpen the witnesses of failing checks beyond the grid.
	sc := scorers[0]
	effQ, effP := make([]float64, n), make([]float64, n)
	if !prop.Passed && prop.Belief != nil && prop.Report != nil {
		sharpenPair(&prop, n, cellOf(g), func(q, p []float64) float64 {
			sc.Efforts(effQ, q)
			sc.Efforts(effP, p)
			return -(bregman.Dot(q, effQ) - bregman.Dot(q, effP))
		}, -1)
	}
	if !nonneg.Passed && nonneg.Belief != nil && nonneg.Report != nil {
		sharpenPair(&nonneg, n, cellOf(g), func(q, p []float64) float64 {
			sc.Efforts(effP, p)
			return bregman.Dot(q, effP) - sc.Entropy(q)
		}, 1)
	}
	if !conc.Passed && conc.Belief != nil && !math.IsInf(conc.Worst, 1) {
		sharpenConcavity(&conc, r, onBoundary(conc.Belief), cellOf(g))
	}

	conc.Note = joinNotes(concavityWitness(conc), conc.Note)
	if mid := midpoints(g, sc, s.Tolerance, s.Seed); mid.found {
		mid.apply(&conc)
	}
	prop.Note = propernessNote(prop, "effort", "less")
	nonneg.Note = nonnegNote(nonneg)
	rep.Checks = []CheckResult{conc, prop, nonneg, aff, bounded}
	rep.Notes = append(rep.Notes, boundaryNotes(conc, bounded, s.Tolerance)...)
	switch {
	case !conc.Passed || !prop.Passed || !nonneg.Passed || !aff.Passed:
		rep.Verdict = Improper
	case prop.Strict && conc.Strict:
		rep.Verdict = StrictlyProper
	case prop.Strict:
		// Strict properness is strict concavity. The grid's pairs show no
		// tie, but H is flat in some direction at an interior point, and a
		// flat piece narrower than a grid step leaves ties no grid pair
		// can show (min(p(1-p), 0.2499999) is flat on |p - 1/2| < 3.2e-4).
		rep.Verdict = Proper
		rep.Notes = append(rep.Notes, fmt.Sprintf("strict properness is not established: no two grid reports tie, but the curvature of H vanishes at the interior point %s (largest projected eigenvalue %.3g), where nearby reports may do equally well; check at a finer resolution", num.Format(conc.Interior.Belief), conc.Interior.Worst))
	default:
		rep.Verdict = Proper
	}
	return rep, nil
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
	return fmt.Sprintf("sharpened beyond the grid by Nelder–Mead (%s) from %.6g at the unsharpened witness", c.Status, c.GridWorst)
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
		return joinNotes(fmt.Sprintf("a forecaster with belief %s expects %.6g %s %s by reporting %s than by reporting honestly", num.Format(c.Belief), c.Worst, better, what, num.Format(c.Report)), sharpenedNote(c))
	case c.Strict:
		return fmt.Sprintf("at every grid belief the honest report is the unique best grid report, and the closest other report falls short by %.6g, at belief %s (strictness judged against the rounding floor %g, relative)", c.Margin, num.Format(c.MarginBelief), StrictFloor)
	}
	return fmt.Sprintf("the honest report is a best report at every grid belief, but not the only one: at belief %s the report %s does as well (difference %.3g)", num.Format(c.MarginBelief), num.Format(c.MarginReport), c.Margin)
}

func nonnegNote(c CheckResult) string {
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
// spread of the finite values (largest minus smallest), and the rounding
// floor 2·n·ε × the largest finite |value|. The spread, not the size,
// is what an affine change pay = A - B·L multiplies, so a rule paid in
// millionths and the same rule paid in millions get the same verdict; the
// floor keeps values far from 0 (1e12 + small) from being judged finer
// than they can be computed. A menu with no spread (a constant rule) has
// scale 1, so that its slack is the plain tolerance.
func scaleOf(m *menu) (scale, rounding float64) {
	lo, hi, big := math.Inf(1), math.Inf(-1), 0.0
	for _, v := range m.rows {
		if v != v || math.IsInf(v, 0) {
			continue
		}
		lo, hi, big = math.Min(lo, v), math.Max(hi, v), math.Max(big, math.Abs(v))
	}
	scale = hi - lo
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
	amount := sign * v
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

// concavity computes, at every grid point, the largest eigenvalue of the
// Hessian of H projected onto the tangent space of the simplex (vectors
// summing to 0), through an orthonormal basis of that space.
func concavity(ctx context.Context, r *bregman.Rule, g *simplex.Grid, s Settings, scorers []*bregman.Scorer, pr *progress) (CheckResult, error) {
	n, G := r.Outcomes(), g.Len()
	lam := make([]float64, G)
	projs := make([]*projector, s.Workers)
	for i := range projs {
		projs[i] = newProjector(n)
	}
	err := parallel(ctx, s.Workers, G, 128, func(w, lo, hi int) {
		pj, sc := projs[w], scorers[w]
		for j := lo; j < hi; j++ {
			lam[j] = pj.largest(sc, g.Point(j))
		}
		pr.add(int64(hi-lo) * gradCost)
	})
	if err != nil {
		return CheckResult{}, err
	}
	off, offLam, err := offGrid(ctx, n, G, s, projs, scorers, pr)
	if err != nil {
		return CheckResult{}, err
	}
	T := s.Tolerance
	var in, bd, between part
	nonFiniteIn, nonFiniteBd := 0, 0
	var nfIn, nfBd []float64
	strict := true
	for j, l := range offLam {
		if l != l || math.IsInf(l, 0) {
			l = math.Inf(1) // undefined curvature inside the simplex fails
		}
		between.offer(l, off[j*n:(j+1)*n], nil)
		if !(l < -T) {
			strict = false
		}
	}
	for j := 0; j < G; j++ {
		l, q := lam[j], g.Point(j)
		if math.IsNaN(l) || math.IsInf(l, 0) {
			if g.Boundary[j] {
				nonFiniteBd++
				if nfBd == nil {
					nfBd = clone(q)
				}
				continue
			}
			nonFiniteIn++
			if nfIn == nil {
				nfIn = clone(q)
			}
			l = math.Inf(1) // an interior point where curvature is unknown fails
		}
		if g.Boundary[j] {
			bd.offer(l, q, nil)
		} else {
			in.offer(l, q, nil)
			if !(l < -T) {
				strict = false
			}
		}
	}
	// A failure seen only between the grid points is a failure of the
	// interior: the grid alone would have called H concave there.
	// The random points are interior: a violation there fails the
	// interior. Count stays the number of grid points; the note gives the
	// others, and says when no grid point, interior or boundary, saw it.
	offOnly := between.seen && between.Worst > T && !(in.Worst > T) && !(bd.Worst > T)
	if between.seen && between.Worst > T && !(in.Worst >= between.Worst) {
		in.Worst, in.Belief, in.seen = between.Worst, between.Belief, true
	}
	c := CheckResult{Name: NameConcavity}
	c.Interior = in.result(!(in.Worst > T))
	c.Boundary = bd.result(!(bd.Worst > T))
	c.Passed = c.Interior.Passed && c.Boundary.Passed
	c.Strict = strict && in.seen
	w := c.Interior
	if c.Interior.Passed && (!c.Boundary.Passed || !in.seen) {
		w = c.Boundary
	}
	c.Worst, c.Belief = w.Worst, clone(w.Belief)
	var notes []string
	switch {
	case !c.Passed:
		// The witness sentence is written after sharpening.
	case c.Strict:
		notes = append(notes, fmt.Sprintf("H is strictly concave at every interior grid point (largest projected eigenvalue %.6g)", c.Interior.Worst))
	case in.seen:
		notes = append(notes, fmt.Sprintf("H is concave but not strictly: the projected Hessian has eigenvalue %.6g (within the tolerance of 0) at %s", c.Interior.Worst, num.Format(c.Interior.Belief)))
	default:
		notes = append(notes, "the grid has no interior points: raise the resolution above the number of outcomes")
	}
	if offOnly {
		notes = append(notes, fmt.Sprintf("the grid points alone show no violation: it lies between them, found among %d random interior points; at resolution %d the pair checks cannot see it, so raise the resolution to examine that region", between.Count, g.K))
	} else if between.seen {
		notes = append(notes, fmt.Sprintf("curvature also examined at %d random interior points between the grid points", between.Count))
	}
	if nonFiniteIn > 0 {
		notes = append(notes, fmt.Sprintf("the Hessian is not finite at %d interior points (e.g. %s), so concavity there is unknown", nonFiniteIn, num.Format(nfIn)))
	}
	if nonFiniteBd > 0 {
		notes = append(notes, fmt.Sprintf("the Hessian is not finite at %d boundary points (e.g. %s), where the pair checks stand in for curvature", nonFiniteBd, num.Format(nfBd)))
	}
	c.Note = strings.Join(notes, "; ")
	return c, nil
}

// kink is the worst midpoint violation of concavity: along the segment
// from a to b, H at the midpoint falls short of the mean of H(a) and H(b)
// by deficit. A concave H never does; a convex kink or an upward jump,
// which no Hessian sees, does.
type kink struct {
	found      bool
	deficit    float64
	curvature  float64 // 8·deficit/|b - a|², the average curvature it implies
	l2         float64 // |b - a|²
	mid, a, b  []float64
	tests      int
	onBoundary bool
}

// midpoints tests H(m) >= (H(a) + H(b))/2 - T, m = (a + b)/2, for grid
// points a paired with a random grid point b and with a random nearby
// point b (a few grid steps away, for kinks between grid points).
func midpoints(g *simplex.Grid, sc *bregman.Scorer, T float64, seed uint64) kink {
	n, G := g.N, g.Len()
	rng := rand.New(rand.NewPCG(seed, 0x3d1d))
	tests := min(G, 2000)
	a, b, m := make([]float64, n), make([]float64, n), make([]float64, n)
	var k kink
	for t := 0; t < tests; t++ {
		copy(a, g.Point(rng.IntN(G)))
		for pass := range 8 {
			if pass%2 == 0 {
				copy(b, g.Point(rng.IntN(G)))
			} else if !nearby(b, a, 3/float64(g.K), rng) {
				continue
			}
			var l2 float64
			for i := range m {
				m[i] = (a[i] + b[i]) / 2
				l2 += (b[i] - a[i]) * (b[i] - a[i])
			}
			if l2 == 0 {
				continue
			}
			k.tests++
			d := (sc.Entropy(a)+sc.Entropy(b))/2 - sc.Entropy(m)
			// The worst is the largest implied curvature, so that a kink
			// seen on a short segment is not outranked by a long one.
			if d > T && (!k.found || d/l2 > k.deficit/k.l2) {
				k = kink{found: true, deficit: d, curvature: 8 * d / l2, l2: l2, mid: clone(m), a: clone(a), b: clone(b), tests: k.tests, onBoundary: onBoundary(m)}
			}
		}
	}
	return k
}

// nearby sets b to a plus a random step of at most r in each coordinate
// along the simplex (coordinates still sum to 1); false when it leaves the
// simplex.
func nearby(b, a []float64, r float64, rng *rand.Rand) bool {
	var mean float64
	for i := range b {
		b[i] = (2*rng.Float64() - 1) * r
		mean += b[i]
	}
	mean /= float64(len(b))
	for i := range b {
		b[i] = a[i] + b[i] - mean
		if b[i] < 0 || b[i] > 1 {
			return false
		}
	}
	return true
}

// apply records a midpoint violation in the concavity result: it fails
// the check (in the region of the midpoint) when the Hessian saw nothing,
// and is described in the note either way. The amount kept as Worst is
// the implied average curvature, so that the check's units stay those of
// an eigenvalue.
func (k kink) apply(c *CheckResult) {
	note := fmt.Sprintf("H is not concave between %s and %s: at the midpoint %s it is %.6g below the mean of its ends (an average curvature of %.6g along the segment), a kink or jump the Hessian cannot see (%d midpoint tests)",
		num.Format(k.a), num.Format(k.b), num.Format(k.mid), k.deficit, k.curvature, k.tests)
	if c.Passed {
		// The Hessian's verdict ("H is ... concave") no longer stands.
		rest := strings.Split(c.Note, "; ")
		if len(rest) > 0 && strings.HasPrefix(rest[0], "H is ") {
			rest[0] = fmt.Sprintf("the Hessian alone shows no violation (largest projected eigenvalue %.6g at %s)", c.Interior.Worst, num.Format(c.Interior.Belief))
		}
		c.Note = strings.Join(rest, "; ")
		c.Passed, c.Strict = false, false
		c.Worst, c.Belief = k.curvature, clone(k.mid)
		p := &c.Interior
		if k.onBoundary {
			p = &c.Boundary
		}
		p.Passed, p.Worst, p.Belief = false, k.curvature, clone(k.mid)
	}
	c.Note = joinNotes(note, c.Note)
}

// offGridCount is how many random interior points the concavity check
// examines besides the grid: a non-concave region narrower than a grid
// step is invisible to every grid check, and curvature is cheap next to
// the G² pair stream.
func offGridCount(G int) int { return max(G, 10000) }

// randomInterior draws count points uniformly from the interior of the
// simplex (a flat Dirichlet), flat in one slice; seed and stream fix them.
func randomInterior(n, count int, seed, stream uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, stream))
	pts := make([]float64, count*n)
	for j := 0; j < count; j++ {
		q := pts[j*n : (j+1)*n]
		for {
			var sum float64
			for k := range q {
				q[k] = rng.ExpFloat64()
				sum += q[k]
			}
			for k := range q {
				q[k] /= sum
			}
			if !onBoundary(q) {
				break
			}
		}
	}
	return pts
}

// offGrid draws offGridCount(G) points uniformly from the interior of the
// simplex (a flat Dirichlet, fixed by s.Seed) and computes the largest
// projected eigenvalue at each.
func offGrid(ctx context.Context, n, G int, s Settings, projs []*projector, scorers []*bregman.Scorer, pr *progress) (pts, lam []float64, err error) {
	count := offGridCount(G)
	pts = randomInterior(n, count, s.Seed, 0xc0ca)
	lam = make([]float64, count)
	err = parallel(ctx, s.Workers, count, 128, func(w, lo, hi int) {
		pj, sc := projs[w], scorers[w]
		for j := lo; j < hi; j++ {
			lam[j] = pj.largest(sc, pts[j*n:(j+1)*n])
		}
		pr.add(int64(hi-lo) * gradCost)
	})
	return pts, lam, err
}

// projector computes the projected Hessian's largest eigenvalue without
// allocating per point (gonum's eigensolver reuses its storage).
type projector struct {
	n    int
	u    []float64 // n × (n-1) orthonormal basis of {v : sum v = 0}
	hess []float64
	tmp  []float64
	sym  *mat.SymDense
	eig  mat.EigenSym
	vals []float64
}

func newProjector(n int) *projector {
	pj := &projector{n: n, u: make([]float64, n*(n-1)), hess: make([]float64, n*n), tmp: make([]float64, n*(n-1)),
		sym: mat.NewSymDense(n-1, nil), vals: make([]float64, n-1)}
	// Helmert basis: column c has c+1 entries 1, then -(c+1), scaled.
	for c := 0; c < n-1; c++ {
		sc := 1 / math.Sqrt(float64((c+1)*(c+2)))
		for k := 0; k <= c; k++ {
			pj.u[k*(n-1)+c] = sc
		}
		pj.u[(c+1)*(n-1)+c] = -float64(c+1) * sc
	}
	return pj
}

// largest returns the largest eigenvalue of U^T Hess U at p, or NaN/Inf
// when the Hessian is not finite there.
func (pj *projector) largest(sc *bregman.Scorer, p []float64) float64 {
	n, m := pj.n, pj.n-1
	if h := sc.Hessian(pj.hess, p); h != h {
		// H itself is undefined here: its derivatives can still come out
		// finite (the machine skips terms multiplied by a structural zero,
		// as in sqrt(p - 0.3)*0), but a curvature of nothing is no
		// evidence of concavity.
		return math.NaN()
	}
	for _, v := range pj.hess {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return v
		}
	}
	// tmp = Hess U (n × m), then sym = U^T tmp.
	for i := 0; i < n; i++ {
		for c := 0; c < m; c++ {
			var s float64
			for k := 0; k < n; k++ {
				s += pj.hess[i*n+k] * pj.u[k*m+c]
			}
			pj.tmp[i*m+c] = s
		}
	}
	for a := 0; a < m; a++ {
		for b := a; b < m; b++ {
			var s float64
			for i := 0; i < n; i++ {
				s += pj.u[i*m+a] * pj.tmp[i*m+b]
			}
			var t float64
			for i := 0; i < n; i++ {
				t += pj.u[i*m+b] * pj.tmp[i*m+a]
			}
			pj.sym.SetSym(a, b, (s+t)/2) // symmetrise away rounding
		}
	}
	if m == 1 {
		return pj.sym.At(0, 0)
	}
	// Scale to entries of size 1 before the eigensolver: LAPACK's own
	// scaling panics on matrices of entries near 1e-300 (the power
	// generator with g = 1e-300 has them), and the eigenvalues of c·A are
	// c times those of A.
	var big float64
	for a := 0; a < m; a++ {
		for b := a; b < m; b++ {
			big = math.Max(big, math.Abs(pj.sym.At(a, b)))
		}
	}
	if big == 0 {
		return 0
	}
	for a := 0; a < m; a++ {
		for b := a; b < m; b++ {
			pj.sym.SetSym(a, b, pj.sym.At(a, b)/big)
		}
	}
	if !pj.factorize() {
		return math.NaN()
	}
	pj.eig.Values(pj.vals)
	return pj.vals[m-1] * big
}

// factorize runs the eigensolver, reporting a failure — including a panic
// inside it, which a user's formula must never turn into a crash — as
// false.
func (pj *projector) factorize() (ok bool) {
	defer func() {
		if recover() != nil {
			ok = false
		}
	}()
	return pj.eig.Factorize(pj.sym, false)
}

// sharpenConcavity climbs the largest projected eigenvalue from the grid
// witness within its grid cell, staying in the interior when the witness
// is interior.
func sharpenConcavity(c *CheckResult, r *bregman.Rule, boundary bool, cell float64) {
	n := r.Outcomes()
	sc, pj := r.NewScorer(), newProjector(n)
	q := make([]float64, n)
	x0 := make([]float64, n)
	simplex.ToSquares(x0, c.Belief)
	x, v, status, ok := minimise(func(x []float64) float64 {
		simplex.FromSquares(q, x)
		if !boundary && onBoundary(q) || !inCell(q, c.Belief, cell) {
			return math.Inf(1)
		}
		l := pj.largest(sc, q)
		if math.IsInf(l, 0) {
			return math.Inf(1)
		}
		return -l
	}, x0, sharpenEvals)
	c.Status = status
	if !ok || !improves(-v, c.Worst, true) {
		return
	}
	simplex.FromSquares(q, x)
	c.GridWorst = c.Worst
	c.Worst, c.Belief, c.Sharpened = -v, clone(q), true
}

// properness reduces the stream: for each belief the honesty gap (honest
// expected effort minus the best) and the margin (best other report minus
// honest), and for non-negativity the smallest divergence m1 - H(q).
func properness(g *simplex.Grid, m *menu, h []float64, bs []best, T, scale float64) (prop, nonneg CheckResult) {
	var gapIn, gapBd, negIn, negBd part
	marginMin := math.Inf(1)
	var marginQ, marginP []float64
	strict, tieMargin := true, math.Inf(1)
	var tieQ, tieP []float64
	for i, b := range bs {
		q := g.Point(i)
		honest := m.phi(q, i)
		gap := honest - b.m1
		if b.arg < 0 || honest == b.m1 {
			gap = 0 // every report infinite, or the honest one is the best
		}
		if math.IsInf(honest, 1) && math.IsInf(b.m1, 1) {
			gap = 0
		}
		if m.bad[i] {
			// The honest report's row is undefined (set to +Inf for the
			// stream): its expected effort is NaN, not "infinitely worse".
			// A NaN amount fails the comparisons below (NaN <= T is false).
			gap = math.NaN()
		}
		var rp []float64
		if b.arg >= 0 {
			rp = g.Point(int(b.arg))
		}
		if g.Boundary[i] {
			gapBd.offer(gap, q, rp)
		} else {
			gapIn.offer(gap, q, rp)
		}
		// Margin: how much worse the best other report is.
		other, oarg := b.m1, b.arg
		if int(b.arg) == i {
			other, oarg = b.m2, b.arg2
		}
		margin := other - honest
		if math.IsInf(other, 1) && !math.IsInf(honest, 1) {
			margin = math.Inf(1)
		}
		var op []float64
		if oarg >= 0 {
			op = g.Point(int(oarg))
		}
		if margin < marginMin || marginQ == nil && oarg >= 0 {
			marginMin, marginQ, marginP = margin, q, op
		}
		if !(margin > StrictFloor*(scale+math.Abs(honest))) {
			if strict || margin < tieMargin {
				tieMargin, tieQ, tieP = margin, q, op
			}
			strict = false
		}
		d := b.m1 - h[i]
		if b.arg < 0 {
			d = math.Inf(1)
		}
		if g.Boundary[i] {
			negBd.offer(-d, q, rp)
		} else {
			negIn.offer(-d, q, rp)
		}
	}
	prop = CheckResult{Name: NameProperness}
	prop.Interior = gapIn.result(gapIn.Worst <= T)
	prop.Boundary = gapBd.result(gapBd.Worst <= T)
	prop.Passed = prop.Interior.Passed && prop.Boundary.Passed
	pickWorst(&prop, gapIn, gapBd)
	prop.Margin, prop.MarginBelief, prop.MarginReport = marginMin, clone(marginQ), clone(marginP)
	prop.Strict = prop.Passed && strict
	if !strict {
		prop.Margin, prop.MarginBelief, prop.MarginReport = tieMargin, clone(tieQ), clone(tieP)
	}
	nonneg = CheckResult{Name: NameNonnegativity}
	nonneg.Interior = flip(negIn.result(negIn.Worst <= T))
	nonneg.Boundary = flip(negBd.result(negBd.Worst <= T))
	nonneg.Passed = nonneg.Interior.Passed && nonneg.Boundary.Passed
	pickWorst(&nonneg, negIn, negBd)
	nonneg.Worst = -nonneg.Worst
	return prop, nonneg
}

// pickWorst sets the witness of c from the interior part unless the
// boundary part is worse.
func pickWorst(c *CheckResult, in, bd part) {
	w := in
	if !in.seen || bd.seen && bd.Worst > in.Worst {
		w = bd
	}
	c.Worst, c.Belief, c.Report = w.Worst, clone(w.Belief), clone(w.Report)
}

func flip(p Part) Part {
	p.Worst = -p.Worst
	return p
}

// searchReports is the optimisation over reports used on a sampled grid:
// for a spread of beliefs, Nelder–Mead looks for a report off the sample
// whose expected effort beats the honest one. phiFor(worker) returns an
// expected-effort function private to one goroutine.
func searchReports(ctx context.Context, g *simplex.Grid, prop *CheckResult, s Settings, phiFor func(int) func(q, p []float64) float64) error {
	n, G := g.N, g.Len()
	count := min(G, 200)
	step := max(1, G/count)
	type found struct {
		gap  float64
		q, p []float64
	}
	res := make([]found, count)
	fns := make([]func(q, p []float64) float64, s.Workers)
	for i := range fns {
		fns[i] = phiFor(i)
	}
	err := parallel(ctx, s.Workers, count, 1, func(w, lo, hi int) {
		f := fns[w]
		ps := newPairSearch(n)
		ps.fixBelief, ps.evals = true, searchEvals
		for t := lo; t < hi; t++ {
			q := g.Point(t * step)
			honest := f(q, q)
			_, p, v, _, ok := ps.run(f, q, q)
			if ok {
				res[t] = found{honest - v, clone(q), p}
			}
		}
	})
	if err != nil {
		return err
	}
	for _, fd := range res {
		if fd.q != nil && fd.gap > s.Tolerance && fd.gap > prop.Worst {
			prop.GridWorst = prop.Worst
			prop.Worst, prop.Belief, prop.Report = fd.gap, fd.q, fd.p
			prop.Passed, prop.Strict, prop.Sharpened = false, false, true
			prop.Status = "found off the sampled grid by Nelder–Mead over reports"
			markPart(prop)
		}
	}
	return nil
}

// affinity tests Phi(q, p) for affinity in q by midpoints: for sampled
// belief pairs (a, b) and reports p, Phi((a+b)/2, p) must equal the mean
// of Phi(a, p) and Phi(b, p). Expected effort built from efforts is
// affine by construction, so for a generator rule this confirms the
// evaluation (in particular the 0·Inf convention at the boundary); it is
// a real test for an effort handed in with two arguments.
func affinity(g *simplex.Grid, m *menu, T float64, seed uint64) CheckResult {
	n, G := g.N, g.Len()
	rng := rand.New(rand.NewPCG(seed, 0xaff1))
	reports := min(G, 2000)
	const pairs = 8
	mid := make([]float64, n)
	var in, bd part
	for t := 0; t < reports; t++ {
		j := t
		if reports < G {
			j = rng.IntN(G)
		}
		if m.bad[j] {
			continue
		}
		p := g.Point(j)
		for range pairs {
			a, b := g.Point(rng.IntN(G)), g.Point(rng.IntN(G))
			for k := range mid {
				mid[k] = (a[k] + b[k]) / 2
			}
			fa, fb, fm := m.phi(a, j), m.phi(b, j), m.phi(mid, j)
			avg := (fa + fb) / 2
			var dev float64
			switch {
			case fm == avg:
			case math.IsInf(fm, 0) || math.IsInf(avg, 0) || fm != fm || avg != avg:
				dev = math.Inf(1)
			default:
				dev = math.Abs(fm-avg) / (1 + math.Abs(avg))
			}
			if onBoundary(mid) {
				bd.offer(dev, mid, p)
			} else {
				in.offer(dev, mid, p)
			}
		}
	}
	c := CheckResult{Name: NameAffinity}
	c.Interior = in.result(!(in.Worst > T))
	c.Boundary = bd.result(!(bd.Worst > T))
	c.Passed = c.Interior.Passed && c.Boundary.Passed
	pickWorst(&c, in, bd)
	if c.Passed {
		c.Note = fmt.Sprintf("Phi(q, p) is affine in q on %d midpoint tests (largest relative deviation %.3g)", in.Count+bd.Count, c.Worst)
	} else {
		c.Note = fmt.Sprintf("Phi(q, p) is not affine in q: at report %s the midpoint %s deviates by %.6g (relative)", num.Format(c.Report), num.Format(c.Belief), c.Worst)
	}
	return c
}

// boundedness summarises the menu's values per outcome: the finite range,
// and where they are infinite, NaN or beyond the limit, interior reports
// apart from boundary ones. what names the values ("effort" or "payment")
// and sign is +1 for effort, -1 for payment, so that sign×value is an
// effort: +Inf effort at a report that rules out an outcome is how
// unbounded rules such as the log rule behave, and is reported, not
// failed; -Inf effort (an infinite payment) fails anywhere, and so does
// any infinity in the interior or a NaN.
func boundedness(g *simplex.Grid, m *menu, limit float64, label func(int) string, what string, sign float64) CheckResult {
	n, G := g.N, g.Len()
	type stat struct {
		lo, hi         float64
		inf, bdUp, neg int
		beyond         int
	}
	st := make([]stat, n)
	for k := range st {
		st[k].lo, st[k].hi = math.Inf(1), math.Inf(-1)
	}
	nan := 0
	var nanAt []float64
	var in, bd part
	for j := 0; j < G; j++ {
		p, r := g.Point(j), m.rows[j*n:(j+1)*n]
		boundary := g.Boundary[j]
		for k, v := range r {
			a, e := &st[k], sign*v
			switch {
			case v != v:
				nan++
				if nanAt == nil {
					nanAt = clone(p)
				}
				continue
			case math.IsInf(e, -1):
				a.neg++
			case math.IsInf(e, 1) && boundary:
				a.bdUp++
				continue // reported, not failed
			case math.IsInf(e, 1):
				a.inf++
			default:
				a.lo, a.hi = math.Min(a.lo, v), math.Max(a.hi, v)
				if limit > 0 && math.Abs(v) > limit && !boundary {
					a.beyond++
				}
			}
			if boundary {
				bd.offer(math.Abs(v), nil, p)
			} else {
				in.offer(math.Abs(v), nil, p)
			}
		}
	}
	c := CheckResult{Name: NameBoundedness}
	neg := 0
	for _, a := range st {
		neg += a.neg
	}
	inOK := !(in.Worst > math.MaxFloat64) && (limit <= 0 || !(in.Worst > limit))
	c.Interior = in.result(inOK && nan == 0)
	c.Boundary = bd.result(neg == 0 && nan == 0)
	c.Passed = c.Interior.Passed && c.Boundary.Passed
	c.Worst, c.Report = c.Interior.Worst, clone(c.Interior.Report)
	var notes, ranges, unb []string
	for k, a := range st {
		if a.lo <= a.hi {
			ranges = append(ranges, fmt.Sprintf("%s: [%.6g, %.6g]", label(k), a.lo, a.hi))
		} else {
			ranges = append(ranges, fmt.Sprintf("%s: no finite value", label(k)))
		}
	}
	notes = append(notes, "finite range of "+what+" per outcome over the grid reports: "+strings.Join(ranges, ", "))
	if nan > 0 {
		notes = append(notes, fmt.Sprintf("%s is NaN (undefined) in %d places, e.g. at report %s", what, nan, num.Format(nanAt)))
	}
	infWord := map[float64]string{1: "+Inf", -1: "-Inf"}
	for k, a := range st {
		if a.inf > 0 {
			notes = append(notes, fmt.Sprintf("%s for outcome %s is %s at %d interior reports", what, label(k), infWord[sign], a.inf))
		}
		if a.neg > 0 {
			notes = append(notes, fmt.Sprintf("%s for outcome %s is %s at %d reports: an infinite payment", what, label(k), infWord[-sign], a.neg))
		}
		if a.beyond > 0 {
			notes = append(notes, fmt.Sprintf("%s for outcome %s exceeds the limit %g in absolute value at %d interior reports", what, label(k), limit, a.beyond))
		}
		if a.bdUp > 0 {
			unb = append(unb, fmt.Sprintf("%s (%s at the %d reports giving it probability 0)", label(k), infWord[sign], a.bdUp))
		}
	}
	if len(unb) > 0 {
		notes = append(notes, "unbounded on the boundary: "+what+" for outcome "+strings.Join(unb, ", ")+", so a report floor (or a clamp, whose effect on honesty must then be checked) is needed before fitting a budget")
	}
	c.Note = strings.Join(notes, "; ")
	return c
}

// boundaryNotes pulls the boundary findings that are not failures into
// the report's notes, so that a reader of the verdict alone sees them.
func boundaryNotes(conc, bounded CheckResult, tol float64) []string {
	var notes []string
	if bounded.Passed && strings.Contains(bounded.Note, "unbounded on the boundary") {
		notes = append(notes, "the rule is unbounded on the boundary (see boundedness): honest reports stay finite, but a report that rules out an outcome which then happens costs infinite effort")
	}
	if conc.Passed && conc.Boundary.Count > 0 && conc.Boundary.Worst >= -tol {
		// Curvature vanishes somewhere on the boundary: strictness there
		// rests on the pair checks, which count the boundary separately.
		notes = append(notes, fmt.Sprintf("on the boundary the projected Hessian reaches %.3g at %s (flat in some direction there); properness on the boundary rests on the pair checks", conc.Boundary.Worst, num.Format(conc.Boundary.Belief)))
	}
	return notes
}
