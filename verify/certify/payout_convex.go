package certify

import (
	"context"
	"math"

	"scorewright/generator/formula"
	"scorewright/generator/payout"
	iv "scorewright/internal/interval"
)

// The generator argument for payouts. For any payout, the expected pay
// of report r under belief q is affine in q, so with G(q) = sum_y q_y
// pay_y(q), the honest expected pay,
//
//	gain(q, r) = E_q[pay(r)] - G(q) = -D_G(q, r) - t(r)·(q - r),
//
// where D_G(q, r) = G(q) - G(r) - ∇G(r)·(q - r) is G's Bregman gap and
// t(r) = sum_y r_y ∇pay_y(r) (derivatives along the simplex) is what the
// first-order condition of honesty asks to vanish (Savage 1971; Gneiting
// & Raftery 2007, Theorem 1, in the payout's own terms). If G is convex
// with curvature at least c everywhere along the simplex, D_G(q, r) >=
// c/2 |q - r|², so gain(q, r) <= |t| s - c s²/2 with s = |q - r| <= √2,
// whose maximum is |t|²/(2c) (or √2|t| - c when |t|/c > √2). So one pass
// over report boxes, bounding G's curvature from below and |t| from
// above, proves the payout honest to within Epsilon for every belief at
// once — boxes in n-1 dimensions instead of pairs in 2(n-1). The bound
// needs G convex along every segment, so it is used only once G is
// proved convex on the whole simplex; else every box goes to the pairs. |t| is
// bounded by the mean-value form t(c) + J_t(R)(R - c) around a point c of
// the box, which for an honest payout (t ≡ 0) shrinks with the square of
// the box side. Report boxes this does not decide (a kink, a jump, an
// unbounded payment, G not convex, or t visibly nonzero, as on a
// dishonest payout) go to the pair search, which looks for a witness.

// convexRun is the state of the generator argument for one payout.
type convexRun struct {
	n      int
	encs   []*formula.Encloser
	en     formula.Enclosure
	pb, pt []iv.Interval
	// vals, grads, hesss hold each outcome's enclosure on the box.
	grads [][]iv.Interval
	hesss [][]iv.Interval
	// g0 holds each outcome's gradient at the centre point.
	g0 [][]iv.Interval
}

// rbox is a report box with the bound on |t| found on it.
type rbox struct {
	b   box
	tau float64
}

func newConvexRun(pay *payout.Payout) *convexRun {
	n := pay.Outcomes()
	c := &convexRun{n: n, pb: make([]iv.Interval, n), pt: make([]iv.Interval, n),
		grads: make([][]iv.Interval, n), hesss: make([][]iv.Interval, n), g0: make([][]iv.Interval, n)}
	for y := 1; y <= n; y++ {
		prog := pay.Program(y)
		if prog.NumVars() != n {
			return nil
		}
		c.encs = append(c.encs, prog.NewSimplexEncloser())
	}
	return c
}

// enclose fills c.grads and c.hesss with each outcome's derivatives
// along the simplex over probabilities pb (order 1 or 2); false where a
// payment may kink, jump, be undefined or unbounded there.
func (c *convexRun) enclose(pb []iv.Interval, order int) bool {
	for y, e := range c.encs {
		e.Enclose(&c.en, pb, order)
		if c.en.Kinked || c.en.Undefined || !c.en.Value.Bounded() {
			return false
		}
		c.grads[y] = append(c.grads[y][:0], c.en.Grad...)
		if order == 2 {
			c.hesss[y] = append(c.hesss[y][:0], c.en.Hess...)
		}
	}
	return true
}

// dp is ∂p_y/∂x_b in the coordinates x = (p_1..p_(n-1)).
func dp(y, b, d int) float64 {
	switch {
	case y == d:
		return -1
	case y == b:
		return 1
	}
	return 0
}

// examine bounds, on report box b, G's curvature along the simplex from
// below (curv; negative when not proved convex) and above (top), |t|
// from above (tau), and |t| at one point x0 of the box from below (at). ok is false when the payments cannot be enclosed
// smoothly. Every sum over outcomes that cancels for an honest payout —
// sum_y ∂p_y ∇pay_y and sum_y p_y ∇²pay_y against the same sums at x0 —
// is taken in centred form around x0 (value at x0 plus the Hessians
// times R - x0) and intersected with the direct form: the quadratic
// payout's sums then come out exact instead of as wide as the box.
func (c *convexRun) examine(b box) (curv, top, tau, at float64, ok bool) {
	d := c.n - 1
	x0 := inside(b)
	for k := range x0 {
		x0[k] = math.Min(math.Max(x0[k], b.lo[k]), b.hi[k])
	}
	pt := probs(c.pt, box{x0, x0})
	if !c.enclose(pt, 1) {
		return 0, 0, 0, 0, false
	}
	for y := range c.g0 {
		c.g0[y] = append(c.g0[y][:0], c.grads[y]...)
	}
	pb := probs(c.pb, b)
	if !c.enclose(pb, 2) {
		return 0, 0, 0, 0, false
	}
	dx := make([]iv.Interval, d)
	for k := range dx {
		dx[k] = iv.Sub(iv.Interval{Lo: b.lo[k], Hi: b.hi[k]}, iv.Point(x0[k]))
	}
	g, h, g0 := c.grads, c.hesss, c.g0
	// cross[a][bb] = sum_y ∂_bb p_y ∂_a pay_y = ∂_a (pay_bb - pay_n);
	// pm[a][bb] = sum_y p_y ∂_a∂_bb pay_y.
	cross := make([]iv.Interval, d*d)
	pm := make([]iv.Interval, d*d)
	for a := 0; a < d; a++ {
		for bb := 0; bb < d; bb++ {
			direct := iv.Sub(g[bb][a], g[d][a])
			centred := iv.Sub(g0[bb][a], g0[d][a])
			for k := 0; k < d; k++ {
				centred = iv.Add(centred, iv.Mul(iv.Sub(h[bb][a*d+k], h[d][a*d+k]), dx[k]))
			}
			cross[a*d+bb] = meet(direct, centred)
			direct, centred = iv.Point(0), iv.Point(0)
			for y := 0; y < c.n; y++ {
				direct = iv.Add(direct, iv.Mul(pb[y], h[y][a*d+bb]))
				centred = iv.Add(centred, iv.Mul(pt[y], h[y][a*d+bb]))
			}
			for k := 0; k < d; k++ {
				centred = iv.Add(centred, iv.Mul(dx[k], iv.Sub(h[k][a*d+bb], h[d][a*d+bb])))
			}
			pm[a*d+bb] = meet(direct, centred)
		}
	}
	neg := make([]iv.Interval, d*d)
	jt := make([]iv.Interval, d*d)
	for a := 0; a < d; a++ {
		for bb := 0; bb < d; bb++ {
			k := a*d + bb
			neg[k] = iv.Neg(iv.Add(iv.Add(cross[k], cross[bb*d+a]), pm[k]))
			jt[k] = iv.Add(cross[k], pm[k])
		}
	}
	hi, _ := curvatureSign(neg, d)
	pos := make([]iv.Interval, d*d)
	for k, v := range neg {
		pos[k] = iv.Neg(v)
	}
	tau, at = c.residual(b, x0, pt, pb, jt)
	return -hi, gershgorin(pos, d), tau, at, true
}

// residual bounds |t| on b from above, by the mean-value form around x0
// met with the direct sum, and at x0 from below.
func (c *convexRun) residual(b box, x0 []float64, pt, pb, jt []iv.Interval) (tau, at float64) {
	d := c.n - 1
	var sq, sqAt iv.Interval
	for a := 0; a < d; a++ {
		t0, direct := iv.Point(0), iv.Point(0)
		for y := 0; y < c.n; y++ {
			t0 = iv.Add(t0, iv.Mul(pt[y], c.g0[y][a]))
			direct = iv.Add(direct, iv.Mul(pb[y], c.grads[y][a]))
		}
		if t0.Lo > 0 || t0.Hi < 0 {
			m := math.Min(math.Abs(t0.Lo), math.Abs(t0.Hi))
			sqAt = iv.Add(sqAt, iv.Sq(iv.Point(m)))
		}
		for k := 0; k < d; k++ {
			t0 = iv.Add(t0, iv.Mul(jt[a*d+k], iv.Sub(iv.Interval{Lo: b.lo[k], Hi: b.hi[k]}, iv.Point(x0[k]))))
		}
		sq = iv.Add(sq, iv.Sq(iv.Point(meet(t0, direct).Mag())))
	}
	r, _ := iv.Sqrt(sq)
	ra, _ := iv.Sqrt(sqAt)
	if math.IsNaN(r.Hi) {
		return math.Inf(1), ra.Lo
	}
	return r.Hi, ra.Lo
}

// meet is the intersection of two enclosures of the same quantity (the
// first when they do not meet, which rounding alone cannot cause).
func meet(a, b iv.Interval) iv.Interval {
	if m, ok := iv.Intersect(a, b); ok {
		return m
	}
	return a
}

// probs writes the probabilities over b into dst (p_n = 1 - sum x,
// clipped to [0, 1]).
func probs(dst []iv.Interval, b box) []iv.Interval {
	sum := iv.Point(0)
	for k := range b.lo {
		dst[k] = iv.Interval{Lo: b.lo[k], Hi: b.hi[k]}
		sum = iv.Add(sum, dst[k])
	}
	last := iv.Sub(iv.Point(1), sum)
	dst[len(dst)-1] = iv.Interval{Lo: math.Max(0, last.Lo), Hi: math.Min(1, math.Max(0, last.Hi))}
	return dst
}

// gainBound is the largest gain |t| s - c s²/2 over 0 <= s <= √2, rounded
// up; c < 0 (convexity not proved) gives +Inf.
func gainBound(tau, c float64) float64 {
	const diam = math.Sqrt2
	switch {
	case c < 0 || math.IsNaN(tau) || math.IsInf(tau, 0):
		return math.Inf(1)
	case c > 0 && tau/c <= diam:
		return up(tau * tau / (2 * c))
	}
	return up(tau*diam - c)
}

func up(x float64) float64 { return math.Nextafter(x*(1+1e-12), math.Inf(1)) }

// Widths below which a report box goes to the pair search: not proved
// convex by then (handConvex), or |t| still too large (handTau).
const (
	handConvex = 1.0 / 512
	// handKink: a box whose payments kink or jump is cut only this far;
	// the pair search takes kinks better than the curvature argument.
	handKink = 1.0 / 32
	handTau  = 1e-6
)

// run proves what it can: it returns the share of report boxes proved
// for every belief, the boxes left to the pair search, the number of
// boxes examined, and whether the deadline or box limit stopped it
// (then left also holds what was not examined).
func (c *convexRun) run(ctx context.Context, s Settings, eps float64, tk *ticker) (share float64, left []box, boxes int, stopped string) {
	cglob, store, left, boxes, stopped := c.convexity(ctx, s, eps, tk)
	if stopped != "" {
		return 0, append(left, boxesOf(store)...), boxes, stopped
	}
	if len(left) > 0 {
		// G is not proved convex everywhere, and a segment from a report
		// to a belief may cross where it is not: the bound below needs
		// convexity along the whole segment, so every box goes to the
		// pair search.
		return share, append(left, boxesOf(store)...), boxes, ""
	}
	// Phase B: |t| small enough on every box for the curvature found.
	for len(store) > 0 {
		if stopped = limits(ctx, s, len(store)); stopped != "" {
			return share, append(left, boxesOf(store)...), boxes, stopped
		}
		rb := store[0]
		store = store[1:]
		if gainBound(rb.tau, cglob) <= eps {
			share += rb.b.simplexShare()
			continue
		}
		if w, _ := rb.b.width(); w < handTau {
			left = append(left, rb.b)
			continue
		}
		l, r := rb.b.split()
		for _, k := range []box{l, r} {
			boxes++
			tk.tick(share, boxes, false)
			if !k.tighten() || k.simplexShare() <= 0 {
				continue
			}
			// The curvature was proved on the parent; only t is needed.
			// Where t at a point already accounts for most of the bound,
			// cutting cannot bring it down: the first-order condition
			// fails there, and the pair search looks for the witness.
			_, _, tau, at, ok := c.examine(k)
			if ok && !(at > tau/2) {
				store = append(store, rbox{k, tau})
			} else {
				left = append(left, k)
			}
		}
	}
	return share, left, boxes, ""
}

// convexity is the first phase of run: G proved convex box by box; the
// least curvature found (cglob) is a lower bound of G's curvature over
// the whole simplex when no box is left.
func (c *convexRun) convexity(ctx context.Context, s Settings, eps float64, tk *ticker) (cglob float64, store []rbox, left []box, boxes int, stopped string) {
	cglob = math.Inf(1)
	queue := []box{wholeBox(c.n)}
	for len(queue) > 0 {
		if stopped = limits(ctx, s, len(queue)); stopped != "" {
			return cglob, store, append(left, queue...), boxes, stopped
		}
		b := queue[0]
		queue = queue[1:]
		boxes++
		tk.tick(0, boxes, false)
		if !b.tighten() || b.simplexShare() <= 0 {
			continue
		}
		curv, top, tau, at0, ok := c.examine(b)
		w, _ := b.width()
		// The curvature at a point of the box, for comparison: a box is
		// kept once its bound is within a factor 8 of it (so the least
		// bound over the boxes is near G's least curvature), and handed
		// to the pair search at once where G visibly curves downward.
		at := math.NaN()
		if ok {
			x := inside(b)
			at, _, _, _, _ = c.examine(box{x, x})
		}
		switch {
		case ok && curv >= 0 && (curv >= at/8 || w < handConvex):
			cglob = math.Min(cglob, curv)
			store = append(store, rbox{b, tau})
		// Where t at a point is large enough that a small step gains
		// about at0²/(2 top) > eps, the payout is visibly dishonest: the
		// pair search takes over and finds the witness.
		case w < handConvex || ok && (at < 0 || at0*at0 > 8*eps*top) || !ok && w < handKink:
			left = append(left, b)
		default:
			l, r := b.split()
			queue = append(queue, l, r)
		}
	}
	return cglob, store, left, boxes, ""
}

// limits says why a run must stop now, or "".
func limits(ctx context.Context, s Settings, waiting int) string {
	switch {
	case ctx.Err() != nil:
		return "deadline reached"
	case waiting > s.maxBoxes():
		return "box limit reached"
	}
	return ""
}

func boxesOf(rs []rbox) []box {
	out := make([]box, len(rs))
	for i, r := range rs {
		out[i] = r.b
	}
	return out
}
