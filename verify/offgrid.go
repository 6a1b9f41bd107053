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
// beliefs is the main stream's report tree over g, whose leaves are the
// blocks of nearby beliefs the pruned pass walks; nil when every pair is
// to be scanned.
func offGridReports(ctx context.Context, p *payout.Payout, g *simplex.Grid, beliefs *reportTree, bgs []BeliefGap, s Settings, pr *pool.Meter) (int, error) {
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
	honest := make([]float64, G)
	for i := range bgs {
		honest[i] = bgs[i].Honest
	}
	found, err := offGridBests(ctx, g, beliefs, reps, pays, honest, s.Workers, pr)
	if err != nil {
		return 0, err
	}
	count := 0
	for i, f := range found {
		bg := &bgs[i]
		// Only a clear gain counts: a tie with the grid's best (the
		// linear rule's best reports fill whole faces) is not news.
		if gap := f.pay - bg.Honest; f.arg >= 0 && gap > s.Tolerance && gap > bg.Gap+s.Tolerance {
			bg.Gap, bg.BestReport = gap, clone(reps[f.arg*n:(f.arg+1)*n])
			count++
		}
	}
	return count, nil
}

// offBest is the best random report for one belief: its expected pay, and
// its index (-1 for none).
type offBest struct {
	pay float64
	arg int
}

// offGridBests gives, for every grid belief i with a finite honest pay
// h[i], the largest expected pay above h[i] over the random reports (pays:
// n per report) and the first report reaching it, or arg -1 when none is
// above h[i] or counts (offGridScan says which do): only a pay above h can
// be a gain (gap = pay - h > Tolerance > 0), and the largest above h is the
// largest of all when there is one.
//
// When every pay is finite and far from overflow and beliefs is not nil,
// this is the main stream's pruned block walk (prune_block.go) over a
// report tree of the random reports, on efforts -pay, every belief of a
// block starting from its cap -h[i]: the same value (negation is exact
// and the sums are rounded alike) and the same report (ties go to the
// lower index in both). Otherwise it is offGridScan for every belief.
func offGridBests(ctx context.Context, g *simplex.Grid, beliefs *reportTree, reps, pays, h []float64, w int, pr *pool.Meter) ([]offBest, error) {
	n, G, R := g.N, g.Len(), len(pays)/g.N
	out := make([]offBest, G)
	for i := range out {
		out[i] = offBest{math.Inf(-1), -1}
	}
	finite := func(x float64) bool { return x == x && !math.IsInf(x, 0) }
	scanAll := beliefs == nil
	for _, v := range pays {
		if !(math.Abs(v) <= safeLimit) {
			scanAll = true
			break
		}
	}
	if scanAll {
		return out, pool.Run(ctx, w, G, 16, func(_, lo, hi int) {
			for i := lo; i < hi; i++ {
				if !finite(h[i]) {
					continue // undefined or infinite honest pay: nothing to compare
				}
				if v, a := offGridScan(g.Point(i), pays, n); v > h[i] {
					out[i] = offBest{v, a}
				}
			}
			pr.Add(int64(hi-lo) * int64(R))
		})
	}
	m := newMenu(n, R)
	for i, v := range pays {
		m.rows[i] = -v
	}
	m.seal()
	t := newReportTree(&simplex.Grid{N: n, Coords: reps, Boundary: make([]bool, R)}, m)
	w = pool.Workers(w)
	work := make([]*blockWork, w)
	for i := range work {
		work[i] = newBlockWork(n)
	}
	return out, beliefs.eachLeaf(ctx, w, func(id, node int) {
		bw := work[id]
		bw.reset()
		for p := beliefs.start[node]; p < beliefs.end[node]; p++ {
			if i := beliefs.idx[p]; finite(h[i]) {
				bw.hold(i, pruneState{m1: -h[i], m2: -h[i], a1: -1, a2: -1}, g.Point(int(i)))
			}
		}
		bw.settleHeld(t, g, -1)
		for _, b := range bw.held {
			if b.st.a1 >= 0 {
				out[b.i] = offBest{-b.st.m1, int(b.st.a1)}
			}
		}
		pr.Add(int64(beliefs.end[node]-beliefs.start[node]) * int64(R))
	})
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
