package verify

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"gonum.org/v1/gonum/mat"

	"scorewright/generator/bregman"
	"scorewright/internal/num"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// concavity computes, at every grid point, the largest eigenvalue of the
// Hessian of H projected onto the tangent space of the simplex (vectors
// summing to 0), through an orthonormal basis of that space.
//
// Numeric kernel: one pass over the grid (or the lanes) kept whole so
// the arithmetic reads in one place; it stays longer than 80 lines on purpose.
//
// It also returns, for every grid point, the bound on the rounding of an
// effort there (projector.lastEff; 0 on the boundary, where none is
// known), which the pair checks allow for comparison by comparison.
func concavity(ctx context.Context, r *bregman.Rule, g *simplex.Grid, s Settings, scorers []*bregman.Scorer, pr *pool.Meter) (CheckResult, []float64, error) {
	n, G := r.Outcomes(), g.Len()
	lam, effR := make([]float64, G), make([]float64, G)
	projs := make([]*projector, s.Workers)
	for i := range projs {
		projs[i] = newProjector(n)
	}
	err := pool.Run(ctx, s.Workers, G, 128, func(w, lo, hi int) {
		pj, sc := projs[w], scorers[w]
		for j := lo; j < hi; j++ {
			lam[j] = pj.largest(sc, g.Point(j))
			effR[j] = pj.lastEff
		}
		pr.Add(int64(hi-lo) * gradCost)
	})
	if err != nil {
		return CheckResult{}, nil, err
	}
	// Only the grid's efforts meet in the pair checks: the random points
	// below (some far nearer the boundary) do not count.
	off, offLam, err := offGrid(ctx, n, G, s, projs, scorers, pr)
	if err != nil {
		return CheckResult{}, nil, err
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
	return c, effR, nil
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
		ha, ra := sc.Entropy(a), -1.0 // ra: a's rounding bound, once needed
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
			d := (ha+sc.Entropy(b))/2 - sc.Entropy(m)
			// Each value is known only to the rounding of the terms
			// that cancel in it, which can be far above T (a large
			// constant added and taken away again). The bounds are never
			// negative, so the slack is at least T: their interval
			// enclosures (a fifth of a check) are needed only where d
			// is above T, and a's once for all its pairs.
			if !(d > T) {
				continue
			}
			if ra < 0 {
				ra = sc.ValueRounding(a)
			}
			slack := T + (ra+sc.ValueRounding(b))/2 + sc.ValueRounding(m)
			// The worst is the largest implied curvature, so that a kink
			// seen on a short segment is not outranked by a long one.
			if d > slack && (!k.found || d/l2 > k.deficit/k.l2) {
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
func offGrid(ctx context.Context, n, G int, s Settings, projs []*projector, scorers []*bregman.Scorer, pr *pool.Meter) (pts, lam []float64, err error) {
	count := offGridCount(G)
	pts = randomInterior(n, count, s.Seed, 0xc0ca)
	lam = make([]float64, count)
	err = pool.Run(ctx, s.Workers, count, 128, func(w, lo, hi int) {
		pj, sc := projs[w], scorers[w]
		for j := lo; j < hi; j++ {
			lam[j] = pj.largest(sc, pts[j*n:(j+1)*n])
		}
		pr.Add(int64(hi-lo) * gradCost)
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
	// herr bounds the rounding of each Hessian entry at the last point;
	// lastEff bounds the rounding of an effort there (bregman.Scorer.
	// Rounding; 0 where none is known).
	herr    []float64
	lastEff float64
}

func newProjector(n int) *projector {
	pj := &projector{n: n, u: make([]float64, n*(n-1)), hess: make([]float64, n*n), tmp: make([]float64, n*(n-1)),
		sym: mat.NewSymDense(n-1, nil), vals: make([]float64, n-1), herr: make([]float64, n*n)}
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
// when the Hessian is not finite there. An eigenvalue within what the
// rounding of the Hessian's own terms can do is 0: the projection is
// orthonormal, so an error matrix E moves every eigenvalue by at most
// ‖E‖₂ ≤ ‖E‖_F (Weyl), and the machine bounds |E| entrywise. A flat 1e-9
// would be both too loose for a rule with curvature 1e-10 and too tight
// for a constant written as p·exp(-ln p), whose Hessian sums terms of
// size 1/p² that cancel to 0.
func (pj *projector) largest(sc *bregman.Scorer, p []float64) float64 {
	pj.lastEff = 0
	l := pj.eigen(sc, p)
	if !(l == l) || math.IsInf(l, 0) || onBoundary(p) {
		return l
	}
	eff, ok := sc.Rounding(pj.herr, p)
	if !ok {
		return l
	}
	if eff == eff && !math.IsInf(eff, 0) {
		pj.lastEff = eff
	}
	var f float64
	for _, e := range pj.herr {
		f += e * e
	}
	if math.Abs(l) <= math.Sqrt(f) {
		return 0
	}
	return l
}

// eigen is largest before rounding is allowed for.
func (pj *projector) eigen(sc *bregman.Scorer, p []float64) float64 {
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
	}, x0, sharpenEvals, cellSimplex(cell))
	c.Status = status
	if !ok || !improves(-v, c.Worst, true) {
		return
	}
	simplex.FromSquares(q, x)
	c.GridWorst = c.Worst
	c.Worst, c.Belief, c.Sharpened = -v, clone(q), true
}
