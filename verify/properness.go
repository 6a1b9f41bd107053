package verify

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"scorewright/internal/num"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// maxTies is how many tie candidates properness keeps for confirmation:
// the first ones met and the closest.
const maxTies = 16

// tiePair is a grid belief and another grid report whose expected effort
// is within the rounding floor of the honest one's: a tie candidate.
type tiePair struct {
	q, p   []float64
	margin float64
}

// properness reduces the stream: for each belief the honesty gap (honest
// expected effort minus the best) and the margin (best other report minus
// honest), and for non-negativity the smallest divergence m1 - H(q).
//
// Numeric kernel: one pass over the grid (or the lanes) kept whole so
// the arithmetic reads in one place; it stays longer than 80 lines on purpose.
// The candidate ties it returns are confirmed or dismissed by the check
// (strictness.go). A margin within round (the rounding bound of the
// compared values, Grid.Rounding) is a tie too: rounding alone can make it.
// ext is the error estimate of the efforts extrapolated at boundary
// reports (Grid.Extrapolation): a gap or divergence that rests on such a
// report and exceeds T by no more than ext is within that error, and
// counts as 0.
func properness(g *simplex.Grid, m *menu, h []float64, bs []best, ps pairSlack, scale, round, ext float64) (prop, nonneg CheckResult, ties []tiePair) {
	var gapIn, gapBd, negIn, negBd part
	// failing[k] holds the comparisons beyond their own slack (gap in,
	// gap on the boundary, divergence in, on the boundary).
	var failing [4]part
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
		limitReport := false
		if b.arg >= 0 {
			rp = g.Point(int(b.arg))
			limitReport = g.Boundary[b.arg]
		}
		T := ps.at(g, i, int(b.arg))
		if (limitReport || g.Boundary[i]) && gap > T && gap <= T+ext {
			gap = 0
		}
		bd := 0
		if g.Boundary[i] {
			bd = 1
			gapBd.offer(gap, q, rp)
		} else {
			gapIn.offer(gap, q, rp)
		}
		if !(gap <= T) {
			failing[bd].offer(gap, q, rp)
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
		tieRound := round
		if ps.eff != nil && oarg >= 0 {
			tieRound = math.Min(round, ps.at(g, i, int(oarg)))
		}
		if !(margin > math.Max(StrictFloor*(scale+math.Abs(honest)), tieRound)) {
			if strict || margin < tieMargin {
				tieMargin, tieQ, tieP = margin, q, op
			}
			if op != nil && len(ties) < maxTies-1 {
				ties = append(ties, tiePair{q, op, margin})
			}
			strict = false
		}
		d := b.m1 - h[i]
		if b.arg < 0 {
			d = math.Inf(1)
		}
		if limitReport && d < -T && d >= -T-ext {
			d = 0
		}
		if g.Boundary[i] {
			negBd.offer(-d, q, rp)
		} else {
			negIn.offer(-d, q, rp)
		}
		if !(-d <= T) {
			failing[2+bd].offer(-d, q, rp)
		}
	}
	prop = CheckResult{Name: NameProperness}
	prop.Interior = judged(gapIn, failing[0])
	prop.Boundary = judged(gapBd, failing[1])
	prop.Passed = prop.Interior.Passed && prop.Boundary.Passed
	pickWorst(&prop, gapIn, gapBd)
	prop.Margin, prop.MarginBelief, prop.MarginReport = marginMin, clone(marginQ), clone(marginP)
	prop.Strict = prop.Passed && strict
	if !strict {
		prop.Margin, prop.MarginBelief, prop.MarginReport = tieMargin, clone(tieQ), clone(tieP)
	}
	nonneg = CheckResult{Name: NameNonnegativity}
	nonneg.Interior = flip(judged(negIn, failing[2]))
	nonneg.Boundary = flip(judged(negBd, failing[3]))
	nonneg.Passed = nonneg.Interior.Passed && nonneg.Boundary.Passed
	pickWorst(&nonneg, negIn, negBd)
	nonneg.Worst = -nonneg.Worst
	if tieP != nil {
		ties = append(ties, tiePair{tieQ, tieP, tieMargin})
	}
	return prop, nonneg, ties
}

// judged is a region's part: failed, with the worst of the comparisons
// beyond their own slack as its witness, when there is one; else passed
// with the region's worst amount.
func judged(all, failing part) Part {
	if !failing.seen {
		return all.result(true)
	}
	out := failing.result(false)
	out.Count = all.Count
	return out
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
	err := pool.Run(ctx, s.Workers, count, 1, func(w, lo, hi int) {
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
			prop.Status = "found off the sampled grid by a local search over reports"
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
	st := make([]boundStat, n)
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
	// The headline is the largest payment anywhere on the grid: a boundary
	// report's (finite, or of the bad sign) counts as much as an interior
	// one's, though only the interior is held to the limit.
	c.Worst, c.Report = c.Interior.Worst, clone(c.Interior.Report)
	if c.Boundary.Worst > c.Worst || c.Worst != c.Worst && c.Boundary.Worst == c.Boundary.Worst {
		c.Worst, c.Report = c.Boundary.Worst, clone(c.Boundary.Report)
	}
	c.Note = boundNote(st, nan, nanAt, limit, label, what, sign)
	return c
}

// boundStat is what boundedness finds for one outcome: the finite range,
// and how many reports give an infinite value in the interior, an
// infinite value of the good sign on the boundary (reported, not failed),
// one of the bad sign (an infinite payment), or one beyond the limit.
type boundStat struct {
	lo, hi         float64
	inf, bdUp, neg int
	beyond         int
}

// roundingZero is v, or 0 when v is within a relative 1e-12 of scale: the
// size of what rounding leaves of terms of that size that cancel.
func roundingZero(v, scale float64) float64 {
	if math.Abs(v) <= 1e-12*scale {
		return 0
	}
	return v
}

// boundNote says what boundedness found, outcome by outcome.
func boundNote(st []boundStat, nan int, nanAt []float64, limit float64, label func(int) string, what string, sign float64) string {
	var notes, ranges, unb []string
	for k, a := range st {
		if a.lo <= a.hi {
			// What a cancellation leaves (2.5e-16 for the spherical
			// rule's effort at a vertex) is 0, not a finding.
			s := math.Max(math.Abs(a.lo), math.Abs(a.hi))
			ranges = append(ranges, fmt.Sprintf("%s: [%.6g, %.6g]", label(k), roundingZero(a.lo, s), roundingZero(a.hi, s)))
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
	return strings.Join(notes, "; ")
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
