package budget

import (
	"context"
	"fmt"
	"math"

	"scorewright/generator/bregman"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// RecheckSettings tune Recheck. The zero value means the defaults.
type RecheckSettings struct {
	// Resolution is K for the belief grid of step 1/K used for the belief
	// cells and the clamp audit; 0 picks, for two outcomes, 1000 or about
	// ten beliefs per menu item, whichever is finer, and for more the
	// finest grid up to 1/200 that keeps beliefs × items × n <= 5e7.
	Resolution int
	// Tolerance, in currency, below which two expected payments count as
	// equal; 0 means 1e-9 × the largest payment (at least 1e-9).
	Tolerance float64
	// Workers is the number of goroutines; 0 means GOMAXPROCS.
	Workers int
	// Progress, when set, is told the number of menu items and beliefs
	// done and the total, from one goroutine at a time.
	Progress pool.Progress
}

// Recheck is the verdict on a fitted, rounded table.
type Recheck struct {
	// Passed is true when every menu item is the strict best report (by a
	// margin above Tolerance) for a forecaster whose belief is that item.
	Passed bool
	// MinMargin is the smallest incentive margin in currency: over menu
	// items i, the expected pay of reporting i under belief i minus the
	// best expected pay of any other item. Zero or less fails.
	MinMargin float64
	// MinMarginItem is the item with the smallest margin and
	// MinMarginRival the other item that comes closest for that belief.
	MinMarginItem, MinMarginRival int
	// Margins[i] and Rivals[i] are the margin and closest rival of item i.
	Margins []float64
	Rivals  []int
	// Ties are items whose margin is within Tolerance of zero; Beaten are
	// items some other item beats for their own belief.
	Ties, Beaten []int
	// NeverChosen are items that no belief on the grid picks as its
	// unique best report.
	NeverChosen []int
	// Cells[i] says which grid beliefs pick item i as their unique best.
	Cells []Cell
	// TiedBeliefs counts grid beliefs whose best report is a tie.
	TiedBeliefs int
	// Beliefs is the number of grid beliefs; Grid describes them.
	Beliefs int
	Grid    string
	// Tolerance is the tie tolerance used, in currency.
	Tolerance float64
	// ClampGap is the clamp's honesty gap, when the menu has a clamp.
	ClampGap *ClampGap
	// MenuPay is the range over grid beliefs of the expected payment of a
	// forecaster who picks the best menu item for the belief, on the
	// rounded table: what the buyer should expect to pay per forecast.
	MenuPay PayRange
}

// PayRange is a range of expected payments over beliefs.
type PayRange struct {
	Min, Max             float64
	MinBelief, MaxBelief []float64
	// Exact is true when the range is computed exactly (two outcomes)
	// rather than over the grid.
	Exact bool
}

// Cell is the set of beliefs that pick one menu item as their unique best
// report.
type Cell struct {
	// Beliefs is how many grid beliefs pick the item as unique best.
	Beliefs int
	// Lo and Hi bound the first outcome's probability over the cell. For
	// two outcomes they are exact (Exact is true): expected pay is linear
	// in the belief, so the cell is the open interval (Lo, Hi) where the
	// item's line lies above every other by more than the tolerance. For
	// more outcomes they bound the grid beliefs in the cell. NaN when the
	// cell is empty.
	Lo, Hi float64
	Exact  bool
}

// ClampGap measures what a clamp costs honesty: over beliefs q, the most a
// forecaster gains (exact currency, before rounding) by reporting the best
// menu item instead of q itself, when both are paid by the clamped rule.
// A proper rule without a clamp has gap 0.
type ClampGap struct {
	// Max is the largest gap found; Belief is where, Best the menu item
	// that beats the honest report there (BestItem its index).
	Max          float64
	Belief, Best []float64
	BestItem     int
	// Beliefs is the number of beliefs searched; Grid describes them.
	Beliefs int
	Grid    string
}

// flatPays is the table row after row, and the tie tolerance: tol when
// positive, else 1e-9 × the largest payment (at least 1e-9).
func (f *Fit) flatPays(tol float64) (pays []float64, tolerance float64) {
	pays = make([]float64, 0, len(f.Pays)*len(f.Labels))
	scale := 1.0
	for _, row := range f.Pays {
		pays = append(pays, row...)
		for _, v := range row {
			scale = math.Max(scale, math.Abs(v))
		}
	}
	if tol <= 0 {
		tol = 1e-9 * scale
	}
	return pays, tol
}

// Recheck checks the rounded table of f: each item against every other
// for the belief that is that item, then which item each belief on a
// finer grid picks. It is a grid check: evidence, not proof.
func (f *Fit) Recheck(ctx context.Context, set RecheckSettings) (*Recheck, error) {
	m := f.Menu.Reports
	M, n := len(m), len(f.Labels)
	pays, tol := f.flatPays(set.Tolerance)
	K := beliefGrid(set.Resolution, n, M)
	grid := simplex.Vectors(n, K)
	rc := &Recheck{
		Margins: make([]float64, M), Rivals: make([]int, M), Cells: make([]Cell, M),
		Beliefs: len(grid), Tolerance: tol,
		Grid: fmt.Sprintf("beliefs on a simplex grid of step 1/%d (%d points), tie tolerance %.3g", K, len(grid), tol),
	}
	best := make([]int, len(grid)) // -1: a tie
	bestPay := make([]float64, len(grid))
	total := M + len(grid)
	meter := pool.NewMeter(set.Progress, int64(total))
	err := pool.Run(ctx, set.Workers, total, 64, func(_, lo, hi int) {
		for t := lo; t < hi; t++ {
			if t < M {
				rc.Margins[t], rc.Rivals[t] = margin(pays, n, m[t], t)
				continue
			}
			q := grid[t-M]
			b, second, bv, sv := top2(pays, n, q)
			if bv-sv <= tol && second >= 0 {
				b = -1
			}
			best[t-M], bestPay[t-M] = b, bv
		}
		meter.Add(int64(hi - lo))
	})
	meter.Finish(err == nil)
	if err != nil {
		return nil, err
	}
	rc.sortMargins()
	rc.beliefCells(grid, best, bestPay)
	if n == 2 {
		binaryCells(rc, pays, tol)
	}
	for i, c := range rc.Cells {
		if c.Beliefs == 0 && !(c.Exact && c.Lo < c.Hi) {
			rc.NeverChosen = append(rc.NeverChosen, i)
		}
	}
	rc.Passed = len(rc.Ties) == 0 && len(rc.Beaten) == 0
	if f.Clamp > 0 {
		if rc.ClampGap, err = f.clampGap(ctx, grid); err != nil {
			return nil, err
		}
	}
	return rc, nil
}

// beliefGrid is the resolution K of the re-check's belief grid for n
// outcomes and M menu items: the one asked for, or for two outcomes about
// ten beliefs per item and at least 1/1000, for more the finest grid up
// to 1/200 that keeps beliefs × items × n within the same work bound.
func beliefGrid(asked, n, M int) int {
	switch {
	case asked > 0:
		return asked
	case n == 2:
		return max(1000, min(10*(M-1), int(5e7/float64(2*M))))
	}
	return simplex.Resolution(n, 200, math.Max(100, math.Min(50000, 5e7/float64(M*n))))
}

// sortMargins reads the margins: the smallest and its rival, and the
// items tied (within the tolerance, set to exactly 0) or beaten.
func (rc *Recheck) sortMargins() {
	rc.MinMargin, rc.MinMarginItem, rc.MinMarginRival = rc.Margins[0], 0, rc.Rivals[0]
	for i, mg := range rc.Margins {
		if math.Abs(mg) <= rc.Tolerance {
			// A tie reads as a tie, not as float noise.
			mg, rc.Margins[i] = 0, 0
		}
		if mg < rc.MinMargin || i == 0 {
			rc.MinMargin, rc.MinMarginItem, rc.MinMarginRival = mg, i, rc.Rivals[i]
		}
		switch {
		case mg == 0:
			rc.Ties = append(rc.Ties, i)
		case mg < 0:
			rc.Beaten = append(rc.Beaten, i)
		}
	}
}

// beliefCells gathers, from the best item of every grid belief (-1 for a
// tie) and its expected pay, each item's cell of beliefs (on the first
// outcome's probability), the tied beliefs and the range of menu pay.
func (rc *Recheck) beliefCells(grid [][]float64, best []int, bestPay []float64) {
	for i := range rc.Cells {
		rc.Cells[i] = Cell{Lo: math.NaN(), Hi: math.NaN()}
	}
	rc.MenuPay = PayRange{Min: math.Inf(1), Max: math.Inf(-1)}
	for g, v := range bestPay {
		if v < rc.MenuPay.Min {
			rc.MenuPay.Min, rc.MenuPay.MinBelief = v, grid[g]
		}
		if v > rc.MenuPay.Max {
			rc.MenuPay.Max, rc.MenuPay.MaxBelief = v, grid[g]
		}
	}
	for g, b := range best {
		if b < 0 {
			rc.TiedBeliefs++
			continue
		}
		c := &rc.Cells[b]
		x := grid[g][0]
		if c.Beliefs == 0 || x < c.Lo {
			c.Lo = x
		}
		if c.Beliefs == 0 || x > c.Hi {
			c.Hi = x
		}
		c.Beliefs++
	}
}

// binaryCells replaces the grid bounds of two-outcome cells with exact
// ones, and the grid range of menu pay with the exact one. With belief x
// in the first outcome, item j pays y_j(x) = b_j + a_j·x in expectation
// (a_j = pay(j, 1) - pay(j, 2), b_j = pay(j, 2)); item j is the unique best
// where y_j - y_i > tol for every other i, an intersection of half-lines.
// The best expected pay is the upper envelope of the lines, convex in x,
// so its range over [0, 1] is found at the envelope's corners: the ends
// of the cells computed without tolerance, identical rows counted once.
func binaryCells(rc *Recheck, pays []float64, tol float64) {
	ends := []float64{0, 1}
	for j := range rc.Cells {
		c := &rc.Cells[j]
		c.Exact = true
		c.Lo, c.Hi = math.NaN(), math.NaN()
		if lo, hi := lineCell(pays, j, tol, false); lo < hi {
			c.Lo, c.Hi = lo, hi
		}
		if lo, hi := lineCell(pays, j, 0, true); lo < hi {
			ends = append(ends, lo, hi)
		}
	}
	mp := PayRange{Min: math.Inf(1), Max: math.Inf(-1), Exact: true}
	for _, x := range ends {
		q := []float64{x, 1 - x}
		_, _, v, _ := top2(pays, 2, q)
		if v < mp.Min {
			mp.Min, mp.MinBelief = v, q
		}
		if v > mp.Max {
			mp.Max, mp.MaxBelief = v, q
		}
	}
	rc.MenuPay = mp
}

// lineCell returns the interval of x in [0, 1] where item j's expected pay
// exceeds every other item's by more than tol (empty when lo >= hi). With
// skipSame, items whose row equals j's are left out of the comparison.
func lineCell(pays []float64, j int, tol float64, skipSame bool) (lo, hi float64) {
	aj, bj := pays[2*j]-pays[2*j+1], pays[2*j+1]
	lo, hi = 0, 1
	for i := 0; 2*i < len(pays) && lo < hi; i++ {
		if i == j || skipSame && pays[2*i] == pays[2*j] && pays[2*i+1] == pays[2*j+1] {
			continue
		}
		da, db := aj-(pays[2*i]-pays[2*i+1]), bj-pays[2*i+1]
		// Need db + da·x > tol.
		switch {
		case da == 0:
			if !(db > tol) {
				return 1, 0
			}
		case da > 0:
			lo = math.Max(lo, (tol-db)/da)
		default:
			hi = math.Min(hi, (tol-db)/da)
		}
	}
	return lo, hi
}

// expectedPay is sum_k q_k pays[j][k] over the flat n-column pay matrix.
// Payments in a fitted table are finite, so the plain product is exact
// (no 0·Inf convention needed).
func expectedPay(pays []float64, n int, q []float64, j int) float64 {
	row := pays[j*n : j*n+n : j*n+n]
	var s float64
	for k, x := range q[:n] {
		s += x * row[k]
	}
	return s
}

// margin returns, for belief q = menu item i, the expected pay of
// reporting i minus the best expected pay of another item, and that item.
func margin(pays []float64, n int, q []float64, i int) (float64, int) {
	own := expectedPay(pays, n, q, i)
	rival, rv := -1, math.Inf(-1)
	for j := 0; j*n < len(pays); j++ {
		if j == i {
			continue
		}
		if v := expectedPay(pays, n, q, j); v > rv {
			rival, rv = j, v
		}
	}
	if rival < 0 {
		return math.Inf(1), -1
	}
	return own - rv, rival
}

// top2 returns the best and second-best items for belief q and their
// expected pays.
func top2(pays []float64, n int, q []float64) (best, second int, bv, sv float64) {
	best, second = -1, -1
	bv, sv = math.Inf(-1), math.Inf(-1)
	for j := 0; j*n < len(pays); j++ {
		v := expectedPay(pays, n, q, j)
		switch {
		case v > bv:
			second, sv = best, bv
			best, bv = j, v
		case v > sv:
			second, sv = j, v
		}
	}
	return best, second, bv, sv
}

// clampGap searches the clamp's honesty gap over the grid beliefs that
// the clamp touches (an entry below the clamp) and over probes near every
// menu item: the item with one outcome's probability set to 1/4, 1/2 and
// 3/4 of the clamp, the rest scaled to fit.
func (f *Fit) clampGap(ctx context.Context, grid [][]float64) (*ClampGap, error) {
	n := len(f.Labels)
	c := f.Clamp
	var beliefs [][]float64
	for _, q := range grid {
		for _, x := range q {
			if x < c {
				beliefs = append(beliefs, q)
				break
			}
		}
	}
	gridPart := len(beliefs)
	for _, p := range f.Menu.Reports {
		for k := range n {
			if p[k] >= 1 {
				continue
			}
			for _, t := range []float64{0.25, 0.5, 0.75} {
				q := make([]float64, n)
				qk := t * c
				scale := (1 - qk) / (1 - p[k])
				for i := range q {
					q[i] = p[i] * scale
				}
				q[k] = qk
				beliefs = append(beliefs, q)
			}
		}
	}
	s := f.rule.NewScorer()
	cp := make([]float64, n)
	g := &ClampGap{Max: math.Inf(-1), BestItem: -1, Beliefs: len(beliefs),
		Grid: fmt.Sprintf("%d grid beliefs with an entry below the clamp %g, and %d probes with one entry at 1/4, 1/2, 3/4 of the clamp next to each menu item", gridPart, c, len(beliefs)-gridPart)}
	for b, q := range beliefs {
		if b%256 == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		honest := s.Expected(q, ClampReport(cp, q, c))
		bestItem, bestEff := -1, math.Inf(1)
		for j, eff := range f.Efforts {
			if v := bregman.Dot(q, eff); v < bestEff {
				bestItem, bestEff = j, v
			}
		}
		if gap := f.B * (honest - bestEff); gap > g.Max {
			g.Max, g.Belief, g.BestItem = gap, q, bestItem
			g.Best = f.Menu.Reports[bestItem]
		}
	}
	if !(g.Max > 0) {
		// Honesty wins everywhere searched.
		g.Max, g.Belief, g.Best, g.BestItem = 0, nil, nil, -1
	}
	return g, nil
}
