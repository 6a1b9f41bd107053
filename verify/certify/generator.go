package certify

import (
	"context"
	"fmt"
	"math"
	"strings"
	"time"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
	iv "scorewright/internal/interval"
	"scorewright/verify"
)

// Rule certifies a generator rule: r.Gen must be a formula
// (*bregman.Formula), since the certificate reads the compiled program.
func Rule(ctx context.Context, r *bregman.Rule, s Settings) (*Result, error) {
	f, ok := r.Gen.(*bregman.Formula)
	if !ok {
		return nil, fmt.Errorf("certify: the generator is not a formula (%T); only formulas can be certified", r.Gen)
	}
	return Generator(ctx, f.Program(), f.Outcomes(), s)
}

// genRun is the state of one generator certificate.
type genRun struct {
	n    int
	enc  *formula.Encloser
	senc *formula.Encloser
	en   formula.Enclosure
	full formula.Enclosure
	pt   formula.Enclosure
	pbox []iv.Interval
	// fullDone: g.full holds the full Hessian on the current box.
	fullDone bool
	res      *Result
	minW     float64
	witness  *Witness
	// stuck holds the boxes left undecided at the smallest width.
	stuck []box
}

// Generator proves concavity of the program prog, a generator over n
// outcomes (variables p1..pn), box by box on the simplex. Boxes are
// examined breadth first, those off the faces more often than those
// touching one (boxQueue); a box whose
// Hessian does not decide is split, and a box proved concave but not
// strictly is split again after every undecided box is done, to prove
// strictness on as much as the time allows.
func Generator(ctx context.Context, prog *formula.Program, n int, s Settings) (*Result, error) {
	if n < 2 || prog.NumVars() != n {
		return nil, fmt.Errorf("certify: the program reads %d variables, not the %d outcomes", prog.NumVars(), n)
	}
	ctx, cancel := s.deadline(ctx)
	defer cancel()
	start := time.Now()
	if res := structuralResult(ctx, prog, n, s, start); res != nil {
		return res, nil
	}
	g := &genRun{n: n, enc: prog.NewEncloser(), senc: prog.NewSimplexEncloser(), pbox: make([]iv.Interval, n), minW: s.minWidth(),
		res: &Result{Kind: Certified, Outcomes: n}}
	tk := &ticker{fn: s.Progress, start: start}
	open := &boxQueue{}
	open.push(wholeBox(n))
	var notStrict []box
	res := g.res
	for open.len() > 0 || len(notStrict) > 0 {
		if res.Stopped = limits(ctx, s, open.len()+len(notStrict)); res.Stopped != "" {
			break
		}
		strictPass := open.len() == 0
		var b box
		if strictPass {
			b, notStrict = notStrict[0], notStrict[1:]
		} else {
			b = open.pop()
		}
		res.Boxes++
		tk.tick(res.Share, res.Boxes, false)
		if !b.tighten() {
			continue
		}
		switch g.decide(b) {
		case strictlyConcave:
			share := b.simplexShare()
			res.StrictShare += share
			if !strictPass {
				res.Share += share
			}
		case concave:
			if !strictPass {
				res.Share += b.simplexShare()
			}
			if w, _ := b.width(); w > 1.0/1024 {
				l, r := b.split()
				notStrict = append(notStrict, l, r)
			}
		case improper:
			res.Witness = g.witness
			res.Verdict = verify.Improper
			res.Open = open.len()
			res.Elapsed = time.Since(start)
			tk.tick(res.Share, res.Boxes, true)
			return res, nil
		default:
			if strictPass {
				// A sub-box of a concave box: concave, only not proved
				// strict.
				continue
			}
			if w, _ := b.width(); w < g.minW {
				g.stuck = append(g.stuck, b)
				res.Stopped = "smallest box reached"
				continue
			}
			l, r := b.split()
			open.push(l)
			open.push(r)
		}
	}
	res.Open = len(g.stuck) + open.len()
	res.Elapsed = time.Since(start)
	conclude(res, len(notStrict))
	if res.Verdict == Undecided {
		res.Method = g.region(append(append(g.stuck, open.inner...), open.face...))
	}
	tk.tick(res.Share, res.Boxes, true)
	return res, nil
}

// region says where the undecided boxes lie: next to the faces, where a
// curvature that tends to 0 (the pseudospherical rule's, along e_k - p)
// leaves every interval Hessian bound touching 0, or else the hull of
// the boxes.
func (g *genRun) region(boxes []box) string {
	near := 0.0
	lo, hi := make([]float64, g.n), make([]float64, g.n)
	for k := range lo {
		lo[k], hi[k] = 1, 0
	}
	for _, b := range boxes {
		if !b.tighten() {
			continue
		}
		pb := g.pBox(b)
		d := 1.0
		for k, v := range pb {
			d = math.Min(d, v.Hi)
			lo[k], hi[k] = math.Min(lo[k], v.Lo), math.Max(hi[k], v.Hi)
		}
		near = math.Max(near, d)
	}
	if near <= 0.25 {
		return fmt.Sprintf("the undecided boxes lie next to the faces, some p_k <= %.3g at each of their points: there the interval curvature bound cannot be decided (the curvature tends to 0 at a face, or is unbounded)", near)
	}
	var parts []string
	for k := range lo {
		parts = append(parts, fmt.Sprintf("p%d in [%.6g, %.6g]", k+1, lo[k], hi[k]))
	}
	return "the undecided boxes lie within " + strings.Join(parts, ", ")
}

// conclude sets the verdict of a finished or stopped generator run:
// undecided while boxes are open; strictly proper when every box was
// proved strictly concave; else proper, concavity being proved
// everywhere and strictness where the strict pass reached.
func conclude(res *Result, notStrict int) {
	switch {
	case res.Open > 0:
		res.Verdict = Undecided
		if res.Stopped == "" {
			res.Stopped = "smallest box reached"
		}
	case notStrict == 0 && res.StrictShare >= 1-1e-9:
		res.Verdict, res.StrictShare, res.Share, res.Stopped = verify.StrictlyProper, 1, 1, ""
	default:
		res.Verdict, res.Share, res.Stopped = verify.Proper, 1, ""
	}
}

type decision int

const (
	unknown decision = iota
	concave
	strictlyConcave
	improper
)

// pBox fills g.pbox with the probabilities over b: p_k = x_k for k < n
// and p_n = 1 - sum x, clipped to [0, 1].
func (g *genRun) pBox(b box) []iv.Interval {
	sum := iv.Point(0)
	for k := range b.lo {
		g.pbox[k] = iv.Interval{Lo: b.lo[k], Hi: b.hi[k]}
		sum = iv.Add(sum, g.pbox[k])
	}
	last := iv.Sub(iv.Point(1), sum)
	g.pbox[g.n-1] = iv.Interval{Lo: math.Max(0, last.Lo), Hi: math.Min(1, math.Max(0, last.Hi))}
	return g.pbox
}

// decide proves what it can on box b. It first takes the Hessian along
// the simplex by the chain rule (basis e_a - e_n, narrow enclosures);
// where that does not decide — next to a face where H's curvature is
// infinite, as the entropy's is, or tends to 0 — it falls back on the
// full Hessian (curvature). Where a min, max or abs is undecided, H is
// the min or max of smooth branches on the box: a min of concave
// branches is concave (strictly, when every branch is), which is what
// decides a min of strictly concave generators; a max, or any other
// kink, is tested for a chord H falls below.
func (g *genRun) decide(b box) decision {
	g.fullDone = false
	pb := g.pBox(b)
	g.senc.Enclose(&g.en, pb, 2)
	en := &g.en
	if en.Undefined {
		return unknown
	}
	if en.Kinked {
		if en.Piecewise && !en.Max {
			if d := g.decidePieces(b, pb); d != unknown {
				return d
			}
		}
		if g.chordWitness(b) {
			return improper
		}
		return unknown
	}
	hi, m, j, v := g.curvature(en.Hess, pb, func() []iv.Interval { return g.full.Hess })
	switch {
	case hi < 0:
		return strictlyConcave
	case hi <= 0:
		return concave
	}
	if v != nil && quadForm(m, v).Lo > 0 && b.simplexShare() > 0 {
		g.curvatureWitness(b, j, v)
		return improper
	}
	return unknown
}

// curvature bounds the largest eigenvalue of the Hessian along the
// simplex: from the chain-rule Hessian hess (basis e_a - e_n) and, where
// that does not decide next to a face, from the full Hessian (which
// full returns after g.full has been enclosed), bounded by Gershgorin
// directly (negative definite on all directions is more than enough), as
// a diagonal (every tangent direction moves two coordinates, so one
// vanishing entry cannot make it flat) and projected on the basis e_a -
// e_j that eliminates the coordinate farthest from 0. It returns the
// bound, the matrix and elimination j it came from, and a direction of
// positive curvature at the centre, if any.
func (g *genRun) curvature(hess []iv.Interval, pb []iv.Interval, full func() []iv.Interval) (hi float64, m []iv.Interval, j int, v []float64) {
	d := g.n - 1
	m, j = hess, d
	hi, v = curvatureSign(m, d)
	if !(hi > 0) || !touchesFace(pb) {
		return hi, m, j, v
	}
	if !g.fullDone {
		g.enc.Enclose(&g.full, pb, 2)
		g.fullDone = true
	}
	fh := full()
	if fh == nil {
		return hi, m, j, v
	}
	bound := math.Min(gershgorin(fh, g.n), diagonalTangent(fh, g.n))
	j = 0
	for k := range pb {
		if pb[k].Lo > pb[j].Lo {
			j = k
		}
	}
	m = project(fh, g.n, j)
	hi, v = curvatureSign(m, d)
	return math.Min(hi, bound), m, j, v
}

// decidePieces decides a box where H is the min of smooth branches: all
// concave proves concave, all strictly concave strictly.
func (g *genRun) decidePieces(b box, pb []iv.Interval) decision {
	pieces := g.en.Pieces
	worst := math.Inf(-1)
	for k, pc := range pieces {
		hi, _, _, _ := g.curvature(pc.Hess, pb, func() []iv.Interval {
			if !g.full.Piecewise || len(g.full.Pieces) != len(pieces) {
				return nil
			}
			return g.full.Pieces[k].Hess
		})
		if !(hi <= 0) {
			return unknown
		}
		worst = math.Max(worst, hi)
	}
	if worst < 0 {
		return strictlyConcave
	}
	return concave
}

// touchesFace reports whether some probability reaches 0 on the box.
func touchesFace(pb []iv.Interval) bool {
	for _, v := range pb {
		if v.Lo <= 0 {
			return true
		}
	}
	return false
}

// boxQueue holds the boxes waiting, breadth first, in two queues, and
// takes a box inside the simplex fifteen times for every box touching a
// face. Next to a face a curvature that tends to 0 (the pseudospherical
// rule's) or is unbounded leaves every box there undecided however
// small, and their number doubles with every halving of the width; taken
// in one queue they would hold back the boxes inside, where a convex
// patch far smaller than the grid step is found once its boxes are small
// enough. The faces are not starved either: a kink along a curve inside
// can keep boxes undecided down to the smallest width in such numbers
// that the inside queue does not end, while the chord that proves a
// convex kink is often found on a larger box at a face.
type boxQueue struct {
	inner, face []box
	// pops counts the boxes taken.
	pops int
}

// faceEvery: every faceEvery-th box is taken from the face queue while
// both queues hold boxes (measured on convex bumps of width 1e-3 and a
// convex kink at n = 3, 4: 4 is too slow for the bumps, 64 for n = 4).
const faceEvery = 16

func (q *boxQueue) len() int { return len(q.inner) + len(q.face) }

func (q *boxQueue) push(b box) {
	if b.touchesFace() {
		q.face = append(q.face, b)
	} else {
		q.inner = append(q.inner, b)
	}
}

func (q *boxQueue) pop() box {
	var b box
	q.pops++
	if len(q.inner) > 0 && (len(q.face) == 0 || q.pops%faceEvery != 0) {
		b, q.inner = q.inner[0], q.inner[1:]
	} else {
		b, q.face = q.face[0], q.face[1:]
	}
	return b
}

// touchesFace reports whether b reaches a face of the simplex: some
// p_k = x_k at 0, or p_n = 1 - sum x at 0.
func (b box) touchesFace() bool {
	var hi float64
	for i, lo := range b.lo {
		if lo <= 0 {
			return true
		}
		hi += b.hi[i]
	}
	return hi >= 1
}
