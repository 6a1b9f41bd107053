package certify

import (
	"container/heap"
	"context"
	"fmt"
	"math"
	"time"

	"scorewright/generator/formula"
	"scorewright/generator/payout"
	iv "scorewright/internal/interval"
	"scorewright/internal/num"
	"scorewright/verify"
)

// convexMethod names the generator argument (payout_convex.go).
const convexMethod = "the honest expected pay sum q_y pay_y(q) is proved convex and its first-order condition near enough 0 on every report box"

// PayoutEpsilon is the default payout tolerance relative to the spread
// of the payments, when no budget gives a rounding unit: a hundredth of a
// percent of the spread.
const PayoutEpsilon = 1e-4

// pair is a belief box and a report box with the upper bound found for
// the gain of reporting from r for beliefs in q.
type pair struct {
	q, r box
	u    float64
}

type pairHeap []pair

func (h pairHeap) Len() int           { return len(h) }
func (h pairHeap) Less(i, j int) bool { return h[i].u > h[j].u }
func (h pairHeap) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *pairHeap) Push(x any)        { *h = append(*h, x.(pair)) }
func (h *pairHeap) Pop() any {
	old := *h
	p := old[len(old)-1]
	*h = old[:len(old)-1]
	return p
}

type payRun struct {
	n          int
	encs       []*formula.Encloser
	en         formula.Enclosure
	qb, rb, hb []iv.Interval
	sum        []iv.Interval
	eps        float64
}

// Payout proves that no report gains more than Settings.Epsilon over the
// honest one for any belief. It first tries, briefly, the generator
// argument (payout_convex.go): one pass over report boxes that proves
// every belief at once where the honest expected pay is convex and the
// first-order condition holds closely; then a short hunt for a witness
// over pairs; then the generator argument with most of the time left.
// The report boxes that leaves (or everything, if it did not finish), it
// bounds over pairs of a belief box Q and
// a report box R, the gain E_q[pay(r)] - E_q[pay(q)] from above, first
// directly and then by the mean-value form sum_y q_y ∇pay_y·(r - q) on
// the hull of the two boxes (which shrinks with the square of the box
// size near the diagonal), and splits the pair with the largest bound
// first — the report box when it widens the bound more than the belief
// box, as a jackpot on a few reports does, else the belief box. The share it reports is of (belief, report) pairs by
// volume.
func Payout(ctx context.Context, pay *payout.Payout, s Settings) (*Result, error) {
	n := pay.Outcomes()
	ctx, cancel := s.deadline(ctx)
	defer cancel()
	start := time.Now()
	p := &payRun{n: n, qb: make([]iv.Interval, n), rb: make([]iv.Interval, n), hb: make([]iv.Interval, n), sum: make([]iv.Interval, n)}
	for y := 1; y <= n; y++ {
		p.encs = append(p.encs, pay.Program(y).NewEncloser())
	}
	p.eps = s.Epsilon
	if p.eps <= 0 {
		p.eps = PayoutEpsilon * paySpread(pay)
	}
	res := &Result{Kind: Certified, Outcomes: n, Epsilon: p.eps}
	tk := &ticker{fn: s.Progress, start: start}
	whole := wholeBox(n)
	// The one-pass argument first, briefly: it proves a smooth honest
	// payout such as the quadratic on a few boxes. If it needs longer, a
	// short hunt for a witness over pairs, so that a dishonest payout is
	// caught before the one-pass argument spends the time; then the
	// one-pass argument with the time left, and the pairs take what it
	// leaves.
	h := &pairHeap{}
	found := false
	quick, stop := context.WithTimeout(ctx, runTime(s)/20)
	done := p.convexFirst(quick, pay, s, res, h, whole, tk)
	stop()
	if done && res.Verdict == Undecided && ctx.Err() == nil {
		fresh := func() { *res = Result{Kind: Certified, Outcomes: n, Epsilon: p.eps, Boxes: res.Boxes} }
		fresh()
		*h = pairHeap{{q: whole, r: whole, u: math.Inf(1)}}
		hunt, stop := context.WithTimeout(ctx, runTime(s)/10)
		found = p.pairs(hunt, s, h, res, tk)
		stop()
		if !found && res.Stopped != "" && ctx.Err() == nil {
			// The one-pass argument may take most of the time left; if it
			// does not finish, the pairs start again over everything.
			fresh()
			*h = (*h)[:0]
			left, _ := ctx.Deadline()
			most, stop := context.WithTimeout(ctx, time.Until(left)*4/5)
			done = p.convexFirst(most, pay, s, res, h, whole, tk)
			stop()
			if done && res.Verdict == Undecided && ctx.Err() == nil {
				fresh()
				*h, done = pairHeap{{q: whole, r: whole, u: math.Inf(1)}}, false
			}
		} else {
			done = true
		}
	}
	if !done {
		found = p.pairs(ctx, s, h, res, tk)
	}
	if res.Verdict == EpsilonProper {
		res.Elapsed = time.Since(start)
		tk.tick(1, res.Boxes, true)
		return res, nil
	}
	res.Elapsed = time.Since(start)
	switch {
	case found:
	case res.Verdict == Undecided && res.Stopped != "":
	case res.Open > 0:
		res.Verdict = Undecided
		if res.Stopped == "" {
			res.Stopped = "smallest box reached"
		}
	default:
		res.Verdict, res.Share = EpsilonProper, 1
	}
	tk.tick(res.Share, res.Boxes, true)
	return res, nil
}

// runTime is the run's time, which the phases share.
func runTime(s Settings) time.Duration {
	if s.Deadline <= 0 {
		return DefaultDeadline
	}
	return s.Deadline
}

// pairs runs the pair search on h until it is empty, the context ends
// or a witness is found (then it returns true, with res.Witness set).
func (p *payRun) pairs(ctx context.Context, s Settings, h *pairHeap, res *Result, tk *ticker) bool {
	minW := math.Max(s.minWidth(), 1e-9)
	for h.Len() > 0 {
		if res.Stopped = limits(ctx, s, h.Len()); res.Stopped != "" {
			break
		}
		pr := heap.Pop(h).(pair)
		res.Boxes++
		tk.tick(res.Share, res.Boxes, false)
		if u := p.bound(pr.q, pr.r, false, false); u <= p.eps {
			res.Share += pr.q.simplexShare() * pr.r.simplexShare()
			continue
		}
		if w := p.witness(pr.q, pr.r); w != nil {
			res.Witness, res.Verdict = w, verify.Improper
			res.Open = h.Len()
			return true
		}
		if !p.split(h, pr, minW, res) {
			res.Open++
		}
	}
	res.Open += h.Len()
	return false
}

// convexFirst runs the generator argument (payout_convex.go) and, when
// it leaves report boxes, puts them in h against every belief. It
// reports whether res is final: proved, or stopped by the deadline.
func (p *payRun) convexFirst(ctx context.Context, pay *payout.Payout, s Settings, res *Result, h *pairHeap, whole box, tk *ticker) bool {
	cr := newConvexRun(pay)
	if cr == nil {
		*h = pairHeap{{q: whole, r: whole, u: math.Inf(1)}}
		return false
	}
	tk.base = res.Boxes
	share, left, boxes, stopped := cr.run(ctx, s, p.eps, tk)
	tk.base = 0
	res.Share = share
	res.Boxes += boxes
	switch {
	case len(left) == 0 && stopped == "":
		res.Verdict, res.Share, res.Method = EpsilonProper, 1, convexMethod
		return true
	case stopped != "":
		res.Open, res.Stopped, res.Verdict = len(left), stopped, Undecided
		return true
	}
	*h = (*h)[:0]
	for _, r := range left {
		*h = append(*h, pair{q: whole, r: r, u: math.Inf(1)})
	}
	heap.Init(h)
	return false
}

// split replaces pr by its two halves — of the report box when it widens
// the bound more than the belief box (as a jackpot on a few reports
// does), else of the belief box — certifying at once a half whose bound
// is within Epsilon. It reports false when both boxes are already at
// the smallest width.
func (p *payRun) split(h *pairHeap, pr pair, minW float64, res *Result) bool {
	wq, _ := pr.q.width()
	wr, _ := pr.r.width()
	if wq < minW && wr < minW {
		return false
	}
	splitR := wr >= minW && (wq < minW || p.bound(pr.q, pr.r, true, false) > p.bound(pr.q, pr.r, false, true))
	var kids [2]pair
	if splitR {
		a, b := pr.r.split()
		kids = [2]pair{{q: pr.q, r: a}, {q: pr.q, r: b}}
	} else {
		a, b := pr.q.split()
		kids = [2]pair{{q: a, r: pr.r}, {q: b, r: pr.r}}
	}
	for _, k := range kids {
		if !k.q.tighten() || !k.r.tighten() {
			continue
		}
		if k.u = p.bound(k.q, k.r, false, false); k.u <= p.eps {
			res.Share += k.q.simplexShare() * k.r.simplexShare()
			continue
		}
		heap.Push(h, k)
	}
	return true
}

// fill writes the probabilities over b into dst (p_n = 1 - sum x).
func fill(dst []iv.Interval, b box, point bool) {
	sum := iv.Point(0)
	x := b.lo
	if point {
		x = inside(b)
	}
	for k := range b.lo {
		dst[k] = iv.Interval{Lo: x[k], Hi: b.hi[k]}
		if point {
			dst[k] = iv.Point(x[k])
		}
		sum = iv.Add(sum, dst[k])
	}
	last := iv.Sub(iv.Point(1), sum)
	dst[len(dst)-1] = iv.Interval{Lo: math.Max(0, last.Lo), Hi: math.Min(1, math.Max(0, last.Hi))}
}

// bound is an upper bound of E_q[pay(r)] - E_q[pay(q)] over q in Q, r in
// R (q at Q's centre alone when qCentre, r at R's when rCentre).
func (p *payRun) bound(q, r box, qCentre, rCentre bool) float64 {
	fill(p.qb, q, qCentre)
	fill(p.rb, r, rCentre)
	direct, mv := iv.Point(0), iv.Point(0)
	smooth := true
	for k := range p.hb {
		p.hb[k] = iv.Hull(p.qb[k], p.rb[k])
		p.sum[k] = iv.Point(0)
	}
	for y, e := range p.encs {
		e.Enclose(&p.en, p.rb, 0)
		pr, bad := p.en.Value, p.en.Undefined
		e.Enclose(&p.en, p.qb, 0)
		pq := p.en.Value
		if bad || p.en.Undefined {
			return math.Inf(1)
		}
		direct = iv.Add(direct, iv.Mul(p.qb[y], iv.Sub(pr, pq)))
		if !smooth {
			continue
		}
		e.Enclose(&p.en, p.hb, 1)
		if p.en.Kinked || p.en.Undefined {
			smooth = false
			continue
		}
		// Sum q_y ∇pay_y over outcomes first: for an honest payout it
		// vanishes along the simplex, so the bound is second order.
		for k, g := range p.en.Grad {
			p.sum[k] = iv.Add(p.sum[k], iv.Mul(p.qb[y], g))
		}
	}
	if smooth {
		for k, s := range p.sum {
			mv = iv.Add(mv, iv.Mul(s, iv.Sub(p.rb[k], p.qb[k])))
		}
	}
	u := direct.Hi
	if smooth {
		u = math.Min(u, mv.Hi)
	}
	if math.IsNaN(u) {
		return math.Inf(1)
	}
	return u
}

// witness checks the pair's centres: a gain above Epsilon there, proved
// by interval evaluation, proves the payout dishonest.
func (p *payRun) witness(q, r box) *Witness {
	fill(p.qb, q, true)
	fill(p.rb, r, true)
	gain := iv.Point(0)
	for y, e := range p.encs {
		e.Enclose(&p.en, p.rb, 0)
		pr := p.en.Value
		e.Enclose(&p.en, p.qb, 0)
		gain = iv.Add(gain, iv.Mul(p.qb[y], iv.Sub(pr, p.en.Value)))
	}
	if !(gain.Lo > p.eps) || !gain.Bounded() {
		return nil
	}
	belief, report := make([]float64, p.n), make([]float64, p.n)
	for k := range belief {
		belief[k], report[k] = p.qb[k].Lo, p.rb[k].Lo
	}
	return &Witness{Belief: belief, Report: report, Gain: gain.Lo,
		Reason: fmt.Sprintf("belief %s expects at least %.6g more by reporting %s than by reporting honestly (interval-checked; the tolerance is %.3g)", num.Format(belief), gain.Lo, num.Format(report), p.eps)}
}

// paySpread is the spread of the finite payments on a coarse lattice
// (steps of 1/8), the scale of the default tolerance; 1 when they are
// all equal.
func paySpread(pay *payout.Payout) float64 {
	n := pay.Outcomes()
	ev := pay.NewEvaluator()
	lo, hi := math.Inf(1), math.Inf(-1)
	pays := make([]float64, n)
	pt := make([]int, n)
	var walk func(k, left int)
	walk = func(k, left int) {
		if k == n-1 {
			pt[k] = left
			x := make([]float64, n)
			for i, v := range pt {
				x[i] = float64(v) / 8
			}
			ev.Pays(pays, x)
			for _, v := range pays {
				if !math.IsInf(v, 0) && !math.IsNaN(v) {
					lo, hi = math.Min(lo, v), math.Max(hi, v)
				}
			}
			return
		}
		for v := 0; v <= left; v++ {
			pt[k] = v
			walk(k+1, left-v)
		}
	}
	walk(0, 8)
	if !(hi > lo) {
		return 1
	}
	return hi - lo
}
