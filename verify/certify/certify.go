// Package certify proves verdicts over the whole simplex, where the grid
// checks of package verify only sample it. It evaluates the compiled
// formula in interval arithmetic with outward rounding (Moore 1966;
// Hansen & Walster 2004) on boxes of the simplex, parametrised by the
// first n-1 probabilities, and splits a box that does not decide:
//
//   - a generator H is proved concave on a box when an upper bound on the
//     largest eigenvalue of its interval Hessian, projected on the
//     simplex, is at most 0 (Gershgorin bounds, as in the alpha-BB method
//     of Adjiman et al. 1998, also after an eigenvector preconditioning);
//     concave everywhere proves the rule proper (Savage 1971; Gneiting &
//     Raftery 2007, Theorem 1), a strictly negative bound strictly concave
//     there, and a direction of strictly positive curvature over a box
//     proves it improper, with a belief and report whose gain is checked
//     by interval evaluation;
//   - where a min, max or abs is undecided on a box, H is there the min
//     or max of smooth branches (formula.Enclosure.Pieces): a min of
//     concave branches is concave, of strictly concave ones strictly,
//     while a max, or a jump of an if, is tested for a chord H falls
//     below. Branches are taken only where they are apart on the closed
//     box, so a kink never hides on the edge between two boxes, and boxes
//     are cut a little off their middle (splitAt) so that a kink at a
//     round number falls inside a box, where a chord can cross it;
//   - a generator that is a sum of one-variable terms is proved strictly
//     concave term by term (separable.go), which decides the vertices
//     where the power rule's curvature vanishes and no box can;
//   - a generator that is, as a whole formula, a negated power of a
//     weighted a-norm plus affine terms (the spherical and pseudospherical
//     rules) is proved strictly concave by Minkowski's inequality
//     (norm.go), which decides the faces where the pseudospherical rule's
//     curvature vanishes;
//   - a payout is proved honest to within Epsilon when, over pairs of a
//     belief box and a report box, an upper bound of E_q[pay(r)] -
//     E_q[pay(q)] is at most Epsilon, and proved dishonest by a pair whose
//     lower bound exceeds it.
//
// On a line (line.go), an emphasis weight w on [0, 1] is certified by its
// sign (Schervish 1989) and a point forecast's generator phi by the sign
// of phi” (Savage 1971; Gneiting 2011). A point-forecast payout has no
// certificate: its honesty is over every distribution on the interval.
//
// Every result says its kind (certified), what share of the simplex (by
// volume, or of the interval by length) it proved, and what it could not.
package certify

import (
	"context"
	"fmt"
	"math"
	"time"

	"scorewright/internal/pool"
	"scorewright/verify"
)

// Kind names how a verdict was reached.
type Kind string

// Verdict kinds.
const (
	// Certified: proved over the whole simplex by interval arithmetic.
	Certified Kind = "certified"
	// GridEvidence: checked on grid points and samples, as package verify
	// does; it never proves.
	GridEvidence Kind = "grid evidence"
)

// Undecided is the verdict when the certificate could not finish.
const Undecided verify.Verdict = "undecided"

// EpsilonProper is a payout certificate's verdict when it proved that no
// report gains more than Result.Epsilon anywhere: honest to within
// epsilon, which is less than proper (a smaller gain is not ruled out).
const EpsilonProper verify.Verdict = "epsilon-proper"

// Proved reports whether v is a verdict of honesty a certificate proved
// over the whole simplex or interval: proper, strictly proper, or
// epsilon-proper.
func Proved(v verify.Verdict) bool {
	return v == verify.Proper || v == verify.StrictlyProper || v == EpsilonProper
}

// EpsilonVerdict names an epsilon-proper verdict with its epsilon,
// "epsilon-proper to 0.001", as every front end writes it.
func EpsilonVerdict(epsilon float64) string {
	return fmt.Sprintf("%s to %.3g", EpsilonProper, epsilon)
}

// EpsilonClaim is what an epsilon-proper verdict proved, in the words
// every front end uses beside the verdict.
func EpsilonClaim(epsilon float64) string {
	return fmt.Sprintf("no report gains more than %.3g anywhere", epsilon)
}

// DefaultDeadline bounds a run when neither Settings nor the context do.
const DefaultDeadline = 30 * time.Second

// Settings tune a certificate run. The zero value means the defaults.
type Settings struct {
	// Deadline bounds the run (DefaultDeadline when 0); the context's own
	// deadline, if sooner, wins.
	Deadline time.Duration
	// MinWidth is the narrowest box side split further (default 1e-7): a
	// box still undecided there is left undecided.
	MinWidth float64
	// MaxBoxes bounds the boxes waiting at once (default 4,000,000).
	MaxBoxes int
	// Epsilon is the gain a payout may allow (payout mode); 0 means
	// DefaultEpsilon times the spread of the payments.
	Epsilon float64
	// Progress, when set, is called about ten times a second and once at
	// the end (Last), from the calling goroutine: Done is the share of the
	// simplex (or interval) by volume decided so far, of Total 1
	// (pool.UnitShare); Items the boxes examined; Elapsed the time since
	// the start. A payout run that turns from one argument to the next
	// shows the share the new one has proved, from 0 again; the boxes
	// count on.
	Progress pool.Progress
}

// DefaultEpsilon is the payout tolerance relative to the spread of the
// payments when no budget sets one (a hundredth of the rounding unit).
const DefaultEpsilon = 1e-6

// Witness is a belief and a report that prove a rule dishonest, each
// checked by interval evaluation.
type Witness struct {
	// Belief and Report: a forecaster believing Belief does better, by at
	// least Gain, reporting Report than reporting honestly.
	Belief, Report []float64
	// Gain is a lower bound on the advantage (in effort for a generator,
	// in money for a payout); 0 when the interval check could not
	// separate it from rounding, though the box proof stands.
	Gain float64
	// Reason says what was proved on the box the witness comes from.
	Reason string
}

// Result is what a certificate run proved.
type Result struct {
	// Kind is Certified: the verdict below is proved, or Undecided.
	Kind Kind
	// Verdict: strictly-proper, proper, epsilon-proper (a payout, honest
	// to within Epsilon), improper, or undecided.
	Verdict verify.Verdict
	// Share is the part of the simplex (by volume) proved: concave for a
	// generator, honest to within Epsilon for a payout.
	Share float64
	// StrictShare is the part proved strictly concave (generators).
	StrictShare float64
	// Epsilon is the payout tolerance used.
	Epsilon float64
	// Boxes is the number of boxes examined; Open those left undecided.
	Boxes, Open int
	// Witness proves an improper verdict.
	Witness *Witness
	// Stopped says why an undecided run ended (deadline, smallest box,
	// box limit); empty when it finished.
	Stopped string
	// Elapsed is the run's time.
	Elapsed time.Duration
	// Outcomes is n.
	Outcomes int
	// Method, when set, names the argument that proved the verdict where
	// it is not the box-by-box one, or (Line) what was not proved.
	Method string
	// Line: a certificate on an interval (an emphasis weight, a point
	// forecast), where Share is of the interval's length.
	Line bool
}

// Statement is the one-paragraph account of what was proved. A finished
// certificate's statement does not depend on the clock, so a table that
// records it is reproducible.
func (r *Result) Statement() string {
	pct := func(x float64) string { return fmt.Sprintf("%.6g%%", 100*x) }
	if r.Line {
		return r.lineStatement(pct)
	}
	switch {
	case r.Witness != nil:
		return fmt.Sprintf("certified improper: %s", r.Witness.Reason)
	case r.Verdict == verify.StrictlyProper && r.Method != "":
		return "certified strictly proper over the whole simplex: " + r.Method
	case r.Verdict == verify.StrictlyProper:
		return fmt.Sprintf("certified strictly proper over the whole simplex (%s)", counted(r.Boxes, "box", "boxes"))
	case r.Verdict == EpsilonProper && r.Method != "":
		return fmt.Sprintf("certified %s: %s (a smaller gain is not ruled out): %s (%s)", EpsilonVerdict(r.Epsilon), EpsilonClaim(r.Epsilon), r.Method, counted(r.Boxes, "box", "boxes"))
	case r.Verdict == EpsilonProper:
		return fmt.Sprintf("certified %s: %s (a smaller gain is not ruled out) (%s)", EpsilonVerdict(r.Epsilon), EpsilonClaim(r.Epsilon), counted(r.Boxes, "box pair", "box pairs"))
	case r.Verdict == verify.Proper:
		// Where strictness was not shown is not known to be next to the
		// faces: min(p, 1-p) and p1 (1 - p1) are flat in the interior.
		return fmt.Sprintf("certified proper over the whole simplex; strictly concave proved on %s of it, the rest only concave (no box there showed curvature below 0: H is flat along some direction, or its curvature tends to 0 at a face) (%s)",
			pct(r.StrictShare), counted(r.Boxes, "box", "boxes"))
	}
	what := "concave"
	if r.Epsilon > 0 {
		what = fmt.Sprintf("honest to within %.3g", r.Epsilon)
	}
	where := ""
	if r.Method != "" {
		where = "; " + r.Method
	}
	return fmt.Sprintf("not certified: %s of the simplex proved %s, %s left undecided (%s after %s, %s)%s",
		pct(r.Share), what, counted(r.Open, "box", "boxes"), r.Stopped, counted(r.Boxes, "box", "boxes"), r.Elapsed.Round(time.Millisecond), where)
}

// lineStatement is Statement for a certificate on an interval.
func (r *Result) lineStatement(pct func(float64) string) string {
	switch {
	case r.Witness != nil:
		return "certified improper: " + r.Witness.Reason
	case r.Verdict == verify.StrictlyProper:
		return fmt.Sprintf("certified strictly proper over the whole interval (%s)", counted(r.Boxes, "piece", "pieces"))
	case r.Verdict == verify.Proper:
		return fmt.Sprintf("certified proper over the whole interval; %s (%s)", r.Method, counted(r.Boxes, "piece", "pieces"))
	}
	return fmt.Sprintf("not certified: %s of the interval decided; %s (%s after %s, %s)",
		pct(r.Share), r.Method, r.Stopped, counted(r.Boxes, "piece", "pieces"), r.Elapsed.Round(time.Millisecond))
}

// counted is a count with its noun, singular for one: "1 piece",
// "21 boxes". A statement is read by the people who sign on it, and
// "(1 pieces)" reads as a slip.
func counted(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

// box is an axis-parallel box in the first n-1 probabilities.
type box struct{ lo, hi []float64 }

// wholeBox is [0, 1]^(n-1), which holds the simplex.
func wholeBox(n int) box {
	b := box{make([]float64, n-1), make([]float64, n-1)}
	for i := range b.hi {
		b.hi[i] = 1
	}
	return b
}

func (b box) width() (float64, int) {
	w, at := -1.0, 0
	for i := range b.lo {
		if d := b.hi[i] - b.lo[i]; d > w {
			w, at = d, i
		}
	}
	return w, at
}

// splitAt is where a box is cut across its widest side, as a fraction of
// the side: not a half, so that a kink or jump at a round number (p1 =
// 0.5, 0.25) falls inside a box, where a chord can cross it, rather than
// on the edge between two boxes for ever.
const splitAt = 0.4951

// split cuts b across its widest side.
func (b box) split() (box, box) {
	_, i := b.width()
	m := b.lo[i] + (b.hi[i]-b.lo[i])*splitAt
	l := box{append([]float64(nil), b.lo...), append([]float64(nil), b.hi...)}
	r := box{append([]float64(nil), b.lo...), append([]float64(nil), b.hi...)}
	l.hi[i], r.lo[i] = m, m
	return l, r
}

// tighten shrinks b to the smallest box holding b ∩ simplex's
// projection (x >= 0, sum x <= 1) and reports whether that is non-empty.
func (b box) tighten() bool {
	var slo float64
	for _, v := range b.lo {
		slo += v
	}
	if slo > 1 {
		return false
	}
	for i := range b.hi {
		b.hi[i] = math.Min(b.hi[i], 1-(slo-b.lo[i]))
		if b.hi[i] < b.lo[i] {
			return false
		}
	}
	return true
}

// simplexShare is the volume of b ∩ {x >= 0, sum x <= 1} over the
// simplex's volume 1/d!, by inclusion–exclusion over the box's corners:
// vol = sum over subsets S of (-1)^|S| (1 - sum_S hi - sum_notS lo)_+^d / d!.
func (b box) simplexShare() float64 {
	d := len(b.lo)
	var v float64
	for mask := 0; mask < 1<<d; mask++ {
		s, sign := 1.0, 1.0
		for i := 0; i < d; i++ {
			if mask&(1<<i) != 0 {
				s -= b.hi[i]
				sign = -sign
			} else {
				s -= b.lo[i]
			}
		}
		if s > 0 {
			v += sign * math.Pow(s, float64(d))
		}
	}
	return math.Max(0, v)
}

// deadline returns the run's context with its deadline.
func (s Settings) deadline(ctx context.Context) (context.Context, context.CancelFunc) {
	d := s.Deadline
	if d <= 0 {
		d = DefaultDeadline
	}
	return context.WithTimeout(ctx, d)
}

func (s Settings) minWidth() float64 {
	if s.MinWidth > 0 {
		return s.MinWidth
	}
	return 1e-7
}

func (s Settings) maxBoxes() int {
	if s.MaxBoxes > 0 {
		return s.MaxBoxes
	}
	return 4_000_000
}

// ticker calls Progress about ten times a second.
type ticker struct {
	fn    pool.Progress
	start time.Time
	last  time.Time
	// base is the boxes examined by earlier phases of the run, added to
	// those of a phase that counts its own from 0 (the payout's one-pass
	// argument when it runs a second time), so that the boxes shown never
	// fall.
	base int
}

func (t *ticker) tick(share float64, boxes int, done bool) {
	if t.fn == nil {
		return
	}
	now := time.Now()
	if !done && now.Sub(t.last) < 100*time.Millisecond {
		return
	}
	t.last = now
	t.fn(pool.Step{Done: math.Min(1, share), Total: 1, Unit: pool.UnitShare, Items: int64(t.base + boxes), Elapsed: now.Sub(t.start), Last: done})
}
