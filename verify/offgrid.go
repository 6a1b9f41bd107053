package verify

import (
	"context"
	"math"
	"math/rand/v2"

	"scorewright/generator/payout"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// offGridReports pits every grid belief against offGridCount(G) random
// interior reports: a payout can reward a report no grid point is (a
// jackpot on a thin band, pay 2 when p1 is within 2e-4 of 0.5005), and
// the grid stream alone would call it strictly proper. A belief whose
// best random report beats both honesty (by more than the slack) and its
// best grid report takes that report. It returns how many beliefs did.
func offGridReports(ctx context.Context, p *payout.Payout, g *simplex.Grid, bgs []BeliefGap, s Settings, pr *pool.Meter) (int, error) {
	n, G := g.N, g.Len()
	R := offGridCount(G)
	reps := randomInterior(n, R, s.Seed, 0x7e90)
	onFaces(reps, n, s.Seed)
	pays := make([]float64, R*n)
	evs := make([]*payout.Evaluator, s.Workers)
	for i := range evs {
		evs[i] = p.NewEvaluator()
	}
	err := pool.Run(ctx, s.Workers, R, 256, func(w, lo, hi int) {
		for j := lo; j < hi; j++ {
			evs[w].Pays(pays[j*n:(j+1)*n], reps[j*n:(j+1)*n])
		}
	})
	if err != nil {
		return 0, err
	}
	gained := make([]bool, G)
	bestOf := newOffGridBest(reps, pays, n)
	if s.everyPair {
		bestOf = func(q []float64, _ float64) (float64, int) { return offGridScan(q, pays, n) }
	}
	err = pool.Run(ctx, s.Workers, G, 16, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			bg := &bgs[i]
			if bg.Honest != bg.Honest || math.IsInf(bg.Honest, 0) {
				continue // undefined or infinite honest pay: nothing to compare
			}
			best, arg := bestOf(g.Point(i), bg.Honest)
			// Only a clear gain counts: a tie with the grid's best (the
			// linear rule's best reports fill whole faces) is not news.
			if gap := best - bg.Honest; arg >= 0 && gap > s.Tolerance && gap > bg.Gap+s.Tolerance {
				bg.Gap, bg.BestReport, gained[i] = gap, clone(reps[arg*n:(arg+1)*n]), true
			}
		}
		pr.Add(int64(hi-lo) * int64(R))
	})
	count := 0
	for _, b := range gained {
		if b {
			count++
		}
	}
	return count, err
}

// newOffGridBest returns the function that gives, for a belief q and its
// honest expected pay h, the largest expected pay above h over the random
// reports (pays: n per report) and the first report reaching it, or -1
// when none is above h or counts (offGridScan says which do): only a pay
// above h can be a gain (gap = pay - h > Tolerance > 0), and the largest
// above h is the largest of all when there is one. When every pay is
// finite and far from overflow, it is the pruned walk of the main stream
// over a report tree of the random reports, on efforts -pay and starting
// from the cap -h: the same value (negation is exact and the sums are
// rounded alike) and the same report (ties go to the lower index in
// both); otherwise it is offGridScan itself.
func newOffGridBest(reps, pays []float64, n int) func(q []float64, h float64) (float64, int) {
	R := len(pays) / n
	for _, v := range pays {
		if !(math.Abs(v) <= safeLimit) {
			return func(q []float64, h float64) (float64, int) {
				v, a := offGridScan(q, pays, n)
				if !(v > h) {
					return math.Inf(-1), -1
				}
				return v, a
			}
		}
	}
	m := newMenu(n, R)
	for i, v := range pays {
		m.rows[i] = -v
	}
	m.seal()
	t := newReportTree(&simplex.Grid{N: n, Coords: reps, Boundary: make([]bool, R)}, m)
	return func(q []float64, h float64) (float64, int) {
		b, _ := t.walkFrom(q, false, pruneState{m1: -h, m2: -h, a1: -1, a2: -1})
		if b.arg < 0 {
			return math.Inf(-1), -1
		}
		return -b.m1, int(b.arg)
	}
}

// offGridScan is every random report against q: the largest expected pay
// (outcomes q rules out skipped, so 0·Inf never arises), first report
// first; an infinite or NaN expected pay never counts.
func offGridScan(q, pays []float64, n int) (float64, int) {
	best, arg := math.Inf(-1), -1
	for j := 0; j*n < len(pays); j++ {
		row := pays[j*n : (j+1)*n]
		var v float64
		for k, x := range q {
			if x != 0 {
				v += x * row[k]
			}
		}
		if v > best && !math.IsInf(v, 1) { // NaN never compares greater
			best, arg = v, j
		}
	}
	return best, arg
}

// onFaces moves every fourth of the random reports onto a random face of
// the simplex (1..n-2 coordinates set to 0, the rest renormalised): a
// payout can reward a band of reports that rule some outcome out, which
// no interior report reaches. Vertices are grid points already.
func onFaces(reps []float64, n int, seed uint64) {
	if n < 3 {
		return
	}
	rng := rand.New(rand.NewPCG(seed, 0xface))
	for j := 0; j*n < len(reps); j += 4 {
		r := reps[j*n : (j+1)*n]
		zero := 1 + rng.IntN(n-2)
		for _, k := range rng.Perm(n)[:zero] {
			r[k] = 0
		}
		var sum float64
		for _, v := range r {
			sum += v
		}
		for k := range r {
			r[k] /= sum
		}
	}
}
