package certify

import (
	"context"
	"fmt"
	"math"
	"sort"
	"time"

	"scorewright/generator/formula"
	iv "scorewright/internal/interval"
	"scorewright/verify"
)

// Certificates on a line: an emphasis weight w(c) on [0, 1] and a point
// forecast's generator phi(x) on [lo, hi]. Each cuts its interval into
// pieces and classes every piece by an interval enclosure:
//
//   - an emphasis rule is proper exactly when w >= 0, and strictly proper
//     when moreover w vanishes on no interval (Schervish 1989), since the
//     extra expected effort of reporting r under belief q is
//     D(q, r) = ∫_q^r w(c) (c - q) dc (H'' = -w, package emphasis);
//   - a point rule is proper exactly when phi is concave, strictly when
//     strictly concave (Savage 1971; Gneiting 2011), so the pieces class
//     phi'' (a min of concave branches, where a min or max is undecided,
//     is concave).
//
// A piece where the quantity is proved of the wrong sign proves the rule
// improper, with a belief and report whose gain is checked by interval
// arithmetic; a piece where it is exactly 0 (w = 0, phi affine) proves
// two reports tie; a piece where it has the right sign but may vanish is
// strict only by analyticity: with no kink on a chain of adjacent pieces,
// the formula is one real-analytic expression there, so a quantity that
// is nonzero on one piece of the chain has only isolated zeros on it.

// lineClass is what one piece proved.
type lineClass int

const (
	lineUnknown lineClass = iota
	lineWrong             // of the wrong sign throughout: improper
	lineZero              // exactly 0 throughout: a tie
	lineWeak              // the right sign, may vanish
	lineStrict            // the right sign, never 0
)

// segment is one piece of the cover and what it proved.
type segment struct {
	lo, hi float64
	class  lineClass
	smooth bool
}

// lineCover bisects [lo, hi] by eval until every piece is decided, the
// deadline passes or pieces reach the smallest width. Weak pieces wider
// than a 64th of the interval are cut too, so that a chain of them meets
// a strict piece where one exists.
func lineCover(ctx context.Context, s Settings, lo, hi float64, eval func(x iv.Interval) (lineClass, bool), tk *ticker) (segs []segment, boxes int, stopped string) {
	open := []iv.Interval{{Lo: lo, Hi: hi}}
	span := hi - lo
	minW := s.minWidth() * span
	var done float64
	for len(open) > 0 {
		if stopped = limits(ctx, s, len(open)); stopped != "" {
			for _, x := range open {
				segs = append(segs, segment{lo: x.Lo, hi: x.Hi})
			}
			break
		}
		x := open[len(open)-1]
		open = open[:len(open)-1]
		boxes++
		tk.tick(done/span, boxes, false)
		class, smooth := eval(x)
		w := x.Hi - x.Lo
		switch {
		case class == lineUnknown && w > minW, class == lineWeak && w > span/64:
			open = append(open, halves(x)...)
			continue
		case class == lineWrong:
			return append(segs, segment{x.Lo, x.Hi, class, smooth}), boxes, ""
		}
		done += w
		segs = append(segs, segment{x.Lo, x.Hi, class, smooth})
	}
	sort.Slice(segs, func(i, j int) bool { return segs[i].lo < segs[j].lo })
	return segs, boxes, stopped
}

// lineVerdict reads the cover: improper on a wrong piece, undecided on
// an unknown one, proper with a tie on a zero piece, strictly proper when
// every weak piece lies on a smooth chain with a strict piece.
func lineVerdict(segs []segment) (v verify.Verdict, at *segment, open int) {
	for i := range segs {
		switch segs[i].class {
		case lineWrong:
			return verify.Improper, &segs[i], 0
		case lineUnknown:
			open++
			at = &segs[i]
		}
	}
	if open > 0 {
		return Undecided, at, open
	}
	for i := range segs {
		if segs[i].class == lineZero {
			return verify.Proper, &segs[i], 0
		}
	}
	// Chains of adjacent smooth pieces: a weak piece needs a strict one
	// on its chain; a weak piece with a kink is a chain of its own.
	for i := 0; i < len(segs); {
		j := i + 1
		for j < len(segs) && segs[j].smooth && segs[j-1].smooth && segs[j].lo == segs[j-1].hi {
			j++
		}
		strict, weak := false, -1
		for k := i; k < j; k++ {
			switch {
			case segs[k].class == lineStrict:
				strict = true
			case segs[k].class == lineWeak:
				weak = k
			}
		}
		if weak >= 0 && !strict {
			return verify.Proper, &segs[weak], 0
		}
		i = j
	}
	return verify.StrictlyProper, nil, 0
}

// lineResult builds the Result of a line certificate.
func lineResult(segs []segment, boxes int, stopped string, start time.Time, what string) *Result {
	v, at, open := lineVerdict(segs)
	res := &Result{Kind: Certified, Verdict: v, Boxes: boxes, Open: open, Outcomes: 2, Elapsed: time.Since(start), Line: true}
	var span, proved float64
	for _, sg := range segs {
		span += sg.hi - sg.lo
		if sg.class != lineUnknown {
			proved += sg.hi - sg.lo
		}
	}
	if span > 0 {
		res.Share = proved / span
	}
	switch v {
	case Undecided:
		res.Stopped = stopped
		if res.Stopped == "" {
			res.Stopped = "smallest piece reached"
		}
		res.Method = fmt.Sprintf("%s not decided on [%.10g, %.10g] and %s", what, at.lo, at.hi, counted(open-1, "more piece", "more pieces"))
	case verify.StrictlyProper:
		res.Share, res.StrictShare = 1, 1
	case verify.Proper:
		res.Share = 1
		if at.class == lineZero {
			q, r := at.lo+(at.hi-at.lo)/4, at.lo+3*(at.hi-at.lo)/4
			res.Method = fmt.Sprintf("%s is exactly 0 on [%.10g, %.10g], so for belief %.6g the report %.6g ties with the honest one (not strictly proper)", what, at.lo, at.hi, q, r)
		} else {
			res.Method = fmt.Sprintf("%s is proved of the right sign everywhere but may vanish on [%.10g, %.10g], so strictness is not proved", what, at.lo, at.hi)
		}
	}
	return res
}

// Emphasis certifies the binary rule of an emphasis weight: prog is w, a
// formula in one variable c on [0, 1].
func Emphasis(ctx context.Context, prog *formula.Program, s Settings) (*Result, error) {
	if prog.NumVars() != 1 {
		return nil, fmt.Errorf("certify: an emphasis weight reads one variable, this one %d", prog.NumVars())
	}
	ctx, cancel := s.deadline(ctx)
	defer cancel()
	start := time.Now()
	tk := &ticker{fn: s.Progress, start: start}
	enc := prog.NewEncloser()
	var en formula.Enclosure
	box := make([]iv.Interval, 1)
	eval := func(x iv.Interval) (lineClass, bool) {
		box[0] = x
		enc.Enclose(&en, box, 0)
		w := en.Value
		switch {
		case en.Undefined || math.IsNaN(w.Lo) || math.IsNaN(w.Hi):
			return lineUnknown, false
		case w.Hi < 0:
			return lineWrong, !en.Kinked
		case w.IsZero():
			return lineZero, !en.Kinked
		case w.Lo > 0:
			return lineStrict, !en.Kinked
		case w.Lo >= 0:
			return lineWeak, !en.Kinked
		}
		return lineUnknown, !en.Kinked
	}
	segs, boxes, stopped := lineCover(ctx, s, 0, 1, eval, tk)
	res := lineResult(segs, boxes, stopped, start, "the weight w")
	if res.Verdict == verify.Improper {
		res.Witness = emphasisWitness(enc, segs[len(segs)-1])
	}
	tk.tick(res.Share, res.Boxes, true)
	return res, nil
}

// emphasisWitness: w < 0 on the piece [a, b], so for belief q = a the
// report b costs D(q, b) = ∫_a^b w(c) (c - a) dc <= w.Hi (b - a)²/2 < 0.
func emphasisWitness(enc *formula.Encloser, sg segment) *Witness {
	var en formula.Enclosure
	// Widen the piece while w stays negative on it, for a gain that
	// reads as one rather than one at the scale of the smallest piece.
	for range 60 {
		grown := false
		for _, x := range []iv.Interval{{Lo: sg.lo, Hi: math.Min(1, sg.hi+2*(sg.hi-sg.lo))}, {Lo: math.Max(0, sg.lo-2*(sg.hi-sg.lo)), Hi: sg.hi}} {
			if enc.Enclose(&en, []iv.Interval{x}, 0); x != (iv.Interval{Lo: sg.lo, Hi: sg.hi}) && en.Value.Hi < 0 {
				sg.lo, sg.hi, grown = x.Lo, x.Hi, true
			}
		}
		if !grown {
			break
		}
	}
	enc.Enclose(&en, []iv.Interval{{Lo: sg.lo, Hi: sg.hi}}, 0)
	d := iv.Mul(iv.Point(en.Value.Hi), iv.Scale(0.5, iv.Sq(iv.Sub(iv.Point(sg.hi), iv.Point(sg.lo)))))
	w := &Witness{Belief: []float64{sg.lo, 1 - sg.lo}, Report: []float64{sg.hi, 1 - sg.hi}, Gain: math.Max(0, -d.Hi)}
	w.Reason = fmt.Sprintf("the weight is negative on [%.10g, %.10g] (Schervish 1989): belief %.10g expects at least %.3g less effort reporting %.10g (interval-checked)", sg.lo, sg.hi, sg.lo, w.Gain, sg.hi)
	return w
}

// Point certifies a point forecast's generator: prog is phi, a formula
// in one variable x, on [lo, hi].
func Point(ctx context.Context, prog *formula.Program, lo, hi float64, s Settings) (*Result, error) {
	if prog.NumVars() != 1 || !(lo < hi) {
		return nil, fmt.Errorf("certify: a point generator reads one variable on an interval lo < hi")
	}
	ctx, cancel := s.deadline(ctx)
	defer cancel()
	start := time.Now()
	tk := &ticker{fn: s.Progress, start: start}
	enc := prog.NewEncloser()
	if lo >= 0 {
		enc.AtEdge(0)
	}
	if res := pointBreakResult(ctx, prog, enc, lo, hi, start); res != nil {
		tk.tick(1, res.Boxes, true)
		return res, nil
	}
	var en formula.Enclosure
	box := make([]iv.Interval, 1)
	eval := func(x iv.Interval) (lineClass, bool) {
		box[0] = x
		enc.Enclose(&en, box, 2)
		switch {
		case en.Undefined:
			return lineUnknown, false
		case en.Piecewise && !en.Max:
			worst := math.Inf(-1)
			for _, pc := range en.Pieces {
				worst = math.Max(worst, pc.Hess[0].Hi)
			}
			if c := curvatureClass(iv.Interval{Lo: math.Inf(-1), Hi: worst}); c != lineUnknown {
				return c, false
			}
		case !en.Kinked:
			return curvatureClass(en.Hess[0]), true
		}
		// A kink or jump: wrong when phi lies below a chord across it.
		if chordWitness1(enc, x) != nil {
			return lineWrong, false
		}
		return lineUnknown, false
	}
	segs, boxes, stopped := lineCover(ctx, s, lo, hi, eval, tk)
	res := lineResult(segs, boxes, stopped, start, "phi''")
	res.Outcomes = 0
	if res.Verdict == verify.Improper {
		last := segs[len(segs)-1]
		if res.Witness = pointWitness(enc, last); res.Witness == nil {
			res.Witness = chordWitness1(enc, iv.Interval{Lo: last.lo, Hi: last.hi})
		}
		if res.Witness == nil {
			res.Verdict, res.Stopped, res.Open = Undecided, "a convex piece whose witness the interval check could not separate from rounding", 1
		}
	}
	tk.tick(res.Share, res.Boxes, true)
	return res, nil
}

// curvatureClass classes an enclosure of phi”.
func curvatureClass(c iv.Interval) lineClass {
	switch {
	case math.IsNaN(c.Lo) || math.IsNaN(c.Hi):
		return lineUnknown
	case c.Lo > 0:
		return lineWrong
	case c.IsZero():
		return lineZero
	case c.Hi < 0:
		return lineStrict
	case c.Hi <= 0:
		return lineWeak
	}
	return lineUnknown
}

// pointWitness: phi” > 0 on [a, b], so phi lies above its tangent at x
// = b: for the mean m = a (a belief concentrated there) the report b
// costs D(m, b) = phi(b) + phi'(b)(m - b) - phi(m) < 0, checked by
// interval evaluation.
func pointWitness(enc *formula.Encloser, sg segment) *Witness {
	var en formula.Enclosure
	m, x := sg.lo, sg.hi
	if enc.Enclose(&en, []iv.Interval{{Lo: m, Hi: x}}, 2); en.Kinked || !(en.Hess[0].Lo > 0) {
		return nil // not convex throughout: the chord proved it
	}
	enc.Enclose(&en, []iv.Interval{iv.Point(x)}, 1)
	if en.Undefined || en.Kinked {
		return nil
	}
	d := iv.Add(en.Value, iv.Mul(en.Grad[0], iv.Sub(iv.Point(m), iv.Point(x))))
	enc.Enclose(&en, []iv.Interval{iv.Point(m)}, 0)
	d = iv.Sub(d, en.Value)
	if !(d.Hi < 0) || en.Undefined {
		return nil
	}
	return &Witness{Belief: []float64{m}, Report: []float64{x}, Gain: -d.Hi,
		Reason: fmt.Sprintf("phi is strictly convex on [%.10g, %.10g] (Savage 1971): a forecaster whose mean is %.10g expects at least %.3g less effort reporting %.10g (interval-checked)", sg.lo, sg.hi, m, -d.Hi, x)}
}

// chordWitness1: phi at the midpoint m of x lies below the chord from
// its ends a, b (checked by interval evaluation), so D(a, m) + D(b, m) =
// 2 phi(m) - phi(a) - phi(b) < 0 whatever slope phi has at m, and one of
// the two means gains by reporting m; the witness names the one whose
// divergence, with phi'(m), is proved negative (else the chord alone).
func chordWitness1(enc *formula.Encloser, x iv.Interval) *Witness {
	var en formula.Enclosure
	a, b := x.Lo, x.Hi
	m := a + (b-a)/2
	val := func(t float64) iv.Interval {
		enc.Enclose(&en, []iv.Interval{iv.Point(t)}, 0)
		return en.Value
	}
	deficit := iv.Sub(iv.Scale(0.5, iv.Add(val(a), val(b))), val(m))
	if !(deficit.Lo > 0) || !deficit.Bounded() {
		return nil
	}
	w := &Witness{Belief: []float64{a}, Report: []float64{m},
		Reason: fmt.Sprintf("phi at %.10g lies at least %.3g below its chord from %.10g to %.10g, so phi is not concave (Savage 1971)", m, deficit.Lo, a, b)}
	enc.Enclose(&en, []iv.Interval{iv.Point(m)}, 1)
	if en.Kinked || en.Undefined {
		return w
	}
	pm, slope := en.Value, en.Grad[0]
	for _, q := range []float64{a, b} {
		d := iv.Sub(iv.Add(pm, iv.Mul(slope, iv.Sub(iv.Point(q), iv.Point(m)))), val(q))
		if d.Hi < 0 {
			w.Belief, w.Gain = []float64{q}, -d.Hi
			w.Reason += fmt.Sprintf("; a forecaster whose mean is %.10g expects at least %.3g less effort reporting %.10g (interval-checked)", q, w.Gain, m)
			break
		}
	}
	return w
}
