package certify

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"
	"time"

	"scorewright/generator/formula"
	iv "scorewright/internal/interval"
	"scorewright/verify"
)

// Generators over two outcomes with an if that breaks inside (0, 1).
//
// A box whose face holds the break of an if (p1 < 0.5) never decides the
// comparison, however small it is cut: the generic search stops there,
// undecided, though the formula may be concave, even C1, across the
// break. Here the interval [0, 1] of p1 is cut at the formula's own break
// points instead. Each break must come from a comparison whose two sides
// are affine in p (formula.Program.ComparisonSwitch): its quantity a - b
// then changes sign once, and the break is checked to lie exactly on a
// floating-point number (a - b encloses to [0, 0] there). On each piece
// the comparisons are forced to the piece's side (the branch extended to
// the closed piece) and the branch is proved strictly concave box by box;
// at each break the two branches must take the same value exactly and the
// slope must not rise (left slope >= right slope: a concave kink, or C1).
// A continuous function concave on each piece with no rising slope at the
// joins is concave (along the line its derivative never increases), and
// strictly so when every piece is. Anything this does not prove falls
// back on the generic search.

const (
	// breakScan is the number of points of (0, 1) at which the switching
	// quantities are scanned for sign changes.
	breakScan = 4096
	// breakBoxes bounds the boxes the pieces may use together.
	breakBoxes = 1 << 16
	// breakMinWidth is the narrowest box split further.
	breakMinWidth = 1e-12
)

// lineBreak is one break of the formula on (0, 1): switching quantity j
// changes side between the adjacent floats before at and at.
type lineBreak struct {
	j     int
	at    float64
	holds func(q float64) bool
}

// structuralResult is the first proof without the box search that
// applies: term by term (separable.go), cut at the formula's breaks
// (here), or as a negated norm (norm.go); nil when none does.
func structuralResult(ctx context.Context, prog *formula.Program, n int, s Settings, start time.Time) *Result {
	if res := separableResult(prog, n, s, start); res != nil {
		return res
	}
	if res := breakResult(ctx, prog, n, s, start); res != nil {
		return res
	}
	return normResult(prog, n, s, start)
}

// breakResult is the certificate of a two-outcome generator proved
// concave piece by piece between its breaks (strictly proper when every
// piece is strictly concave, else proper), or nil.
func breakResult(ctx context.Context, prog *formula.Program, n int, s Settings, start time.Time) *Result {
	if n != 2 {
		return nil
	}
	bp := &breakProof{enc: prog.NewSimplexEncloser(), lo: 0, hi: 1,
		vars: func(x float64) []float64 { return []float64{x, 1 - x} },
		box: func(a, b float64) []iv.Interval {
			x := iv.Interval{Lo: a, Hi: b}
			last := iv.Sub(iv.Point(1), x)
			return []iv.Interval{x, {Lo: math.Max(0, last.Lo), Hi: math.Min(1, math.Max(0, last.Hi))}}
		}}
	strict, at, ok := bp.run(ctx, prog)
	if !ok {
		return nil
	}
	if strict < 1-1e-12 {
		// Concave everywhere, strictly only on part: proper, as the
		// box-by-box search says it (its Statement names the share).
		res := &Result{Kind: Certified, Outcomes: n, Verdict: verify.Proper, Share: 1, StrictShare: strict, Boxes: bp.boxes}
		res.Elapsed = time.Since(start)
		(&ticker{fn: s.Progress, start: start}).tick(1, bp.boxes, true)
		return res
	}
	res := provedStrict(n, fmt.Sprintf("H is smooth between the breaks of its if at p1 = %s; each piece proved strictly concave (interval Hessian below 0, %s), and at each break the two branches take the same value and the slope does not rise (checked exactly at the break), so H is strictly concave across it", at, counted(bp.boxes, "box", "boxes")), s, start)
	res.Boxes = bp.boxes
	return res
}

// pointBreakResult is the certificate of a point generator phi on [lo,
// hi] proved concave piece by piece between its breaks, or nil.
func pointBreakResult(ctx context.Context, prog *formula.Program, enc *formula.Encloser, lo, hi float64, start time.Time) *Result {
	bp := &breakProof{enc: enc, lo: lo, hi: hi,
		vars: func(x float64) []float64 { return []float64{x} },
		box:  func(a, b float64) []iv.Interval { return []iv.Interval{{Lo: a, Hi: b}} }}
	strict, at, ok := bp.run(ctx, prog)
	if !ok {
		return nil
	}
	res := &Result{Kind: Certified, Verdict: verify.StrictlyProper, Share: 1, StrictShare: 1, Boxes: bp.boxes, Line: true, Elapsed: time.Since(start)}
	if strict < (1-1e-12)*(hi-lo) {
		res.Verdict, res.StrictShare = verify.Proper, strict/(hi-lo)
		res.Method = fmt.Sprintf("phi is smooth between the breaks of its if at x = %s and concave on each piece, and at each break the branches meet with a slope that does not rise; phi'' is proved below 0 on %.6g%% of the interval only, so strictness is not proved", at, 100*res.StrictShare)
	}
	return res
}

// breakProof is the state of one run on a line: the interval [lo, hi]
// of one variable, the machine's variables at a point of it, and the
// encloser's box over a stretch of it.
type breakProof struct {
	enc    *formula.Encloser
	lo, hi float64
	vars   func(x float64) []float64
	box    func(a, b float64) []iv.Interval
	m      *formula.Machine
	qs     []float64
	bs     []lineBreak
	en     formula.Enclosure
	boxes  int
}

// run proves the program concave piece by piece between its breaks and
// across them; it returns the length proved strictly concave and the
// breaks in words, ok false when it proved less than concavity
// everywhere.
func (bp *breakProof) run(ctx context.Context, prog *formula.Program) (strict float64, at string, ok bool) {
	if prog.Switches() == 0 {
		return 0, "", false
	}
	bp.m, bp.qs = prog.NewMachine(), make([]float64, prog.Switches())
	if bp.bs, ok = bp.lineBreaks(prog); !ok || len(bp.bs) == 0 {
		return 0, "", false
	}
	ends := []float64{bp.lo}
	for _, b := range bp.bs {
		ends = append(ends, b.at)
	}
	ends = append(ends, bp.hi)
	for i := 0; i+1 < len(ends); i++ {
		ok, st := bp.piece(ctx, ends[i], ends[i+1])
		if ctx.Err() != nil || !ok {
			return 0, "", false
		}
		strict += st
	}
	var where []string
	for i, b := range bp.bs {
		if !bp.join(b, ends[i], ends[i+1], ends[i+2]) {
			return 0, "", false
		}
		where = append(where, fmt.Sprintf("%.10g", b.at))
	}
	return strict, strings.Join(where, ", "), true
}

// lineBreaks scans (lo, hi) for the points where a switching quantity
// changes sign and narrows each to adjacent floats; ok is false when one
// is not an affine comparison (or changes sign twice, which an affine one
// cannot).
func (bp *breakProof) lineBreaks(prog *formula.Program) ([]lineBreak, bool) {
	ns := prog.Switches()
	at := func(x float64, dst []float64) { bp.m.Switches(dst, bp.vars(x)) }
	point := func(i float64) float64 { return bp.lo + (bp.hi-bp.lo)*i/breakScan }
	prev, cur, buf := make([]float64, ns), make([]float64, ns), make([]float64, ns)
	at(point(0.5), prev)
	seen := make([]bool, ns)
	var out []lineBreak
	for i := 1; i < breakScan; i++ {
		x := point(float64(i) + 0.5)
		at(x, cur)
		for j := range cur {
			if prev[j] != prev[j] || cur[j] != cur[j] || (prev[j] < 0) == (cur[j] < 0) {
				continue
			}
			affine, holds := prog.ComparisonSwitch(j)
			if !affine || seen[j] {
				return nil, false
			}
			seen[j] = true
			lo, hi := point(float64(i)-0.5), x
			for {
				mid := lo + (hi-lo)/2
				if mid <= lo || mid >= hi {
					break
				}
				at(mid, buf)
				if (buf[j] < 0) == (cur[j] < 0) {
					hi = mid
				} else {
					lo = mid
				}
			}
			out = append(out, lineBreak{j: j, at: hi, holds: holds})
		}
		prev, cur = cur, prev
	}
	sort.Slice(out, func(a, b int) bool { return out[a].at < out[b].at })
	return out, true
}

// force sets every break's comparison to its side at x (inside a piece,
// where no affine quantity with its zero elsewhere changes sign).
func (bp *breakProof) force(x float64) {
	bp.enc.ClearForced()
	bp.m.Switches(bp.qs, bp.vars(x))
	for _, b := range bp.bs {
		bp.enc.ForceComparison(b.j, b.holds(bp.qs[b.j]))
	}
}

// enclose encloses the program (forced) on [a, b], to the given order.
func (bp *breakProof) enclose(a, b float64, order int) {
	bp.enc.Enclose(&bp.en, bp.box(a, b), order)
}

// piece proves the branch of the piece [lo, hi] concave, and returns the
// length of p1 on which it proved it strictly concave.
func (bp *breakProof) piece(ctx context.Context, lo, hi float64) (ok bool, strict float64) {
	bp.force(lo + (hi-lo)/2)
	defer bp.enc.ClearForced()
	open := [][2]float64{{lo, hi}}
	for len(open) > 0 {
		if bp.boxes++; bp.boxes > breakBoxes || ctx.Err() != nil {
			return false, 0
		}
		x := open[len(open)-1]
		open = open[:len(open)-1]
		bp.enclose(x[0], x[1], 2)
		c := iv.Entire()
		if !bp.en.Undefined && !bp.en.Kinked && len(bp.en.Hess) == 1 {
			c = bp.en.Hess[0]
		}
		m := x[0] + (x[1]-x[0])/2
		switch {
		case c.Hi < 0:
			strict += x[1] - x[0]
		case c.Hi <= 0:
			// Concave here; cut it while strictness may still show.
			if x[1]-x[0] > (bp.hi-bp.lo)/1024 {
				open = append(open, [2]float64{x[0], m}, [2]float64{m, x[1]})
			}
		case c.Lo > 0 || x[1]-x[0] < breakMinWidth*(bp.hi-bp.lo):
			// Convex somewhere, or not decided: the generic search
			// finds the witness or says what it could not prove.
			return false, 0
		default:
			open = append(open, [2]float64{x[0], m}, [2]float64{m, x[1]})
		}
	}
	return true, strict
}

// join checks break b, between the pieces [lo, b.at] and [b.at, hi]: the
// break lies exactly at b.at, and there the branches of every if on the
// comparison meet with the same value and gradient (H is C1 across, what
// surrounds the if being the same on both sides), or else H's two
// branches take the same value and its slope along the simplex does not
// rise (a concave kink).
func (bp *breakProof) join(b lineBreak, lo, at, hi float64) bool {
	bp.enc.ClearForced()
	bp.enclose(at, at, 1)
	if q, ok := bp.enc.ComparisonQuantity(b.j); !ok || q.Lo != 0 || q.Hi != 0 {
		return false
	}
	found, sameValue, sameGrad := bp.enc.BranchesMeet(b.j)
	if sameGrad {
		return true
	}
	if found && !sameValue {
		return false
	}
	left, ls, okL := bp.sideAt(lo+(at-lo)/2, at)
	right, rs, okR := bp.sideAt(at+(hi-at)/2, at)
	if !okL || !okR {
		return false
	}
	exact := sameValue || left.Lo == left.Hi && right.Lo == right.Hi && left.Lo == right.Lo
	return exact && ls.Lo >= rs.Hi
}

// sideAt is H's value and slope at the point at with the comparisons
// forced to their side at x.
func (bp *breakProof) sideAt(x, at float64) (v, slope iv.Interval, ok bool) {
	bp.force(x)
	defer bp.enc.ClearForced()
	bp.enclose(at, at, 1)
	if bp.en.Undefined || len(bp.en.Grad) != 1 {
		return v, slope, false
	}
	return bp.en.Value, bp.en.Grad[0], true
}
