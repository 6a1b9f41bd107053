package tui

import (
	"context"
	"fmt"
	"math"
	"strings"

	"scorewright/internal/num"
)

// pictureGrid is the report grid step the honesty gap is searched on.
const pictureGrid = 40

// renderPicture draws c for spec. It checks ctx between rows so that a
// picture for an outdated design stops early.
func renderPicture(ctx context.Context, st Styles, c *compiled, spec pictureSpec, pay func(float64) float64) string {
	if c.point != nil {
		return renderPoint(st, c, spec)
	}
	if c.pointPay != nil {
		return renderPointPayout(st, c, spec)
	}
	n := c.d.N()
	s := c.newSampler()
	orient := "effort"
	if c.reward() {
		orient = "pay"
	}
	switch {
	case n == 2:
		return renderBinary(ctx, st, c, s, spec, pay, orient)
	case n == 3:
		return renderTernary(ctx, st, c, s, spec)
	default:
		return renderSlice(st, c, s, spec, orient)
	}
}

// renderTernary shades the simplex of three outcomes: the honesty gap by
// belief, or the loss by report for the chosen belief.
func renderTernary(ctx context.Context, st Styles, c *compiled, s *sampler, spec pictureSpec) string {
	n, w, h := c.d.N(), spec.w, spec.h
	rows := max(3, min(h-5, (w-1)/2)) // vertex labels, legend, remarks and a note take five lines
	t := newTernaryCells(rows, max(2*rows+1, min(w-1, 4*rows+1)))
	vals := make([][]float64, t.rows)
	var what, note string
	var worst float64
	var worstAt []float64
	scores := gridScores(s, n, pictureGrid)
	for r := range vals {
		if ctx.Err() != nil {
			return "(cancelled)"
		}
		vals[r] = make([]float64, t.cols)
		for col, q := range t.p[r] {
			if q == nil {
				continue
			}
			var v float64
			if spec.measure == mGap {
				v = gapOnGrid(s, scores, q)
				if v > worst {
					worst, worstAt = v, q
				}
			} else {
				v = cleanZero(s.regret(spec.belief, q))
			}
			vals[r][col] = v
		}
	}
	var mark []float64
	if spec.measure == mGap {
		what = "gap by belief"
		if worstAt != nil {
			// The cells drawn are a coarse sample of beliefs: this is the largest
			// shown, not the checks' worst case, and says so.
			note = fmt.Sprintf("largest shown %s at belief %s", fmtTick(worst), num.Format(round2(worstAt)))
		} else {
			note = "no gain from misreporting (1/40 grid)"
		}
	} else {
		what = "loss by report"
		mark = spec.belief
		note = fmt.Sprintf("belief %s (%s: [ ] to move, p to pick)", num.Format(round2(spec.belief)), c.d.Labels[spec.active])
	}
	pic := drawTernary(st, t, vals, c.d.Labels, mark, what)
	return pic + "\n" + st.Dim.Render(note)
}

// renderSlice draws n > 3 outcomes along a pair of them, the rest at the
// belief: effort (or pay) per outcome, or the loss for the belief.
func renderSlice(st Styles, c *compiled, s *sampler, spec pictureSpec, orient string) string {
	n, w, h := c.d.N(), spec.w, spec.h
	pr := pairs(n)[spec.pair%len(pairs(n))]
	i, j := pr[0], pr[1]
	base := spec.belief
	m := base[i] + base[j]
	cols := max(10, w-8)
	var ss []series
	p := make([]float64, n)
	eff := make([]float64, n)
	if spec.measure == mScores {
		ss = []series{{name: orient + " if " + c.d.Labels[i], y: make([]float64, cols)}, {name: orient + " if " + c.d.Labels[j], y: make([]float64, cols)}}
	} else {
		ss = []series{{name: "loss for the belief", y: make([]float64, cols)}}
	}
	for k := 0; k < cols; k++ {
		t := (float64(k) + 0.5) / float64(cols)
		copy(p, base)
		p[i], p[j] = t*m, (1-t)*m
		if spec.measure == mScores {
			s.scores(eff, p)
			ss[0].y[k], ss[1].y[k] = eff[i], eff[j]
		} else {
			ss[0].y[k] = cleanZero(s.regret(base, p))
		}
	}
	chart, clipped := drawLines(st, w, max(4, h-3), 0, 1, ss, base[i]/m)
	head := st.Dim.Render(fmt.Sprintf("slice %s–%s (p: next pair), rest at belief", c.d.Labels[i], c.d.Labels[j]))
	lg := legend(st, ss)
	if clipped {
		lg += st.Dim.Render("  (y cut)")
	}
	foot := fmt.Sprintf("x: share of %s in the pair; belief %s", c.d.Labels[i], num.Format(round2(base)))
	return head + "\n" + lg + "\n" + chart + "\n" + foot
}

func renderBinary(ctx context.Context, st Styles, c *compiled, s *sampler, spec pictureSpec, pay func(float64) float64, orient string) string {
	w, h := spec.w, spec.h
	cols := max(10, w-8)
	var ss []series
	l := c.d.Labels
	var sc interface {
		Binary(float64) (float64, float64, float64)
	}
	if s.sc != nil {
		sc = s.sc
	}
	ylabel := orient
	var scores [][]float64
	switch spec.measure {
	case mScores, mPay:
		ss = []series{{name: "if " + l[0], y: make([]float64, cols)}, {name: "if " + l[1], y: make([]float64, cols)}}
		if spec.measure == mPay {
			ylabel = "pay"
		}
	case mGenerator:
		ss, ylabel = []series{{name: "H(p)", y: make([]float64, cols)}}, "generator"
	case mEmphasis:
		ss, ylabel = []series{{name: "-H''(p)", y: make([]float64, cols)}}, "weight"
	case mGap:
		ss, ylabel = []series{{name: "gap", y: make([]float64, cols)}}, "gap"
		scores = gridScores(s, 2, 200)
	}
	at := func(x float64) (float64, float64) { return binaryAt(s, sc, scores, spec.measure, pay, x) }
	for k := 0; k < cols; k++ {
		if ctx.Err() != nil {
			return "(cancelled)"
		}
		a, b := at((float64(k) + 0.5) / float64(cols))
		ss[0].y[k] = a
		if len(ss) > 1 {
			ss[1].y[k] = b
		}
	}
	q := spec.belief[0]
	chart, clipped := drawLines(st, w, max(4, h-2), 0, 1, ss, q)
	// Values at the belief mark, so the picture can be read exactly.
	va, vb := at(q)
	value := fmtTick(va)
	if len(ss) > 1 {
		value += " / " + fmtTick(vb)
	}
	xl := "report"
	if spec.measure == mGap {
		xl = "belief"
	}
	head := st.Dim.Render("y: "+ylabel+"  ") + legend(st, ss)
	if clipped {
		head += st.Dim.Render("  (y cut)")
	}
	foot := fmt.Sprintf("x: %s p(%s) ┊ %.2f: %s", xl, l[0], q, value)
	return head + "\n" + chart + "\n" + foot
}

// binaryAt is what the two-outcome picture shows at p = (x, 1-x) for
// measure m: effort (or pay) per outcome, the generator, the emphasis
// weight (minus the second derivative of H) or the honesty gap on the
// grid (the second value is used only by the first).
func binaryAt(s *sampler, sc interface {
	Binary(float64) (float64, float64, float64)
}, scores [][]float64, m measure, pay func(float64) float64, x float64) (float64, float64) {
	p := []float64{x, 1 - x}
	switch m {
	case mScores, mPay:
		eff := make([]float64, 2)
		s.scores(eff, p)
		if m == mPay && pay != nil {
			eff[0], eff[1] = pay(eff[0]), pay(eff[1])
		}
		return eff[0], eff[1]
	case mGenerator:
		v, _, _ := sc.Binary(x)
		return v, 0
	case mEmphasis:
		_, _, v := sc.Binary(x)
		return v, 0
	case mGap:
		return gapOnGrid(s, scores, p), 0
	}
	return 0, 0
}

// gridScores evaluates the scores of every report on the simplex grid of
// step 1/k (n = 2: k+1 points).
func gridScores(s *sampler, n, k int) [][]float64 {
	var out [][]float64
	p := make([]float64, n)
	var rec func(i, left int)
	rec = func(i, left int) {
		if i == n-1 {
			p[i] = float64(left) / float64(k)
			sc := make([]float64, n)
			s.scores(sc, p)
			out = append(out, append(sc, p...))
			return
		}
		for a := 0; a <= left; a++ {
			p[i] = float64(a) / float64(k)
			rec(i+1, left-a)
		}
	}
	rec(0, k)
	return out
}

// gapOnGrid is the honesty gap of belief q searched over the grid reports:
// how much better than the honest report the best grid report does, in
// expectation under q (0 when the honest report is best).
func gapOnGrid(s *sampler, grid [][]float64, q []float64) float64 {
	n := len(q)
	honest := make([]float64, n)
	s.scores(honest, q)
	hv := expect(q, honest)
	best := 0.0
	for _, row := range grid {
		d := expect(q, row[:n]) - hv
		if !s.reward {
			d = -d
		}
		if d > best {
			best = d
		}
	}
	return cleanZero(best)
}

func expect(q, sc []float64) float64 {
	var t float64
	for k, x := range q {
		if x == 0 {
			continue
		}
		t += x * sc[k]
	}
	return t
}

// cleanZero maps rounding noise around zero to zero.
func cleanZero(v float64) float64 {
	if math.Abs(v) < 1e-12 {
		return 0
	}
	return v
}

func round2(q []float64) []float64 {
	out := make([]float64, len(q))
	for i, v := range q {
		out[i] = math.Round(v*100) / 100
	}
	return out
}

// renderPoint draws a point-forecast design over its interval: the effort
// D(y, x) against the report x for three outcome values, or phi(x).
func renderPoint(st Styles, c *compiled, spec pictureSpec) string {
	g := c.point
	ev := g.NewEvaluator()
	lo, hi := g.Lo, g.Hi
	cols := max(10, spec.w-8)
	ys := []float64{lo + (hi-lo)/4, lo + (hi-lo)/2, lo + 3*(hi-lo)/4}
	var ss []series
	if spec.measure == mGenerator {
		ss = []series{{name: "phi(x)", y: make([]float64, cols)}}
	} else {
		for _, y := range ys {
			ss = append(ss, series{name: "y = " + fmtTick(y), y: make([]float64, cols)})
		}
	}
	for k := 0; k < cols; k++ {
		x := lo + (float64(k)+0.5)/float64(cols)*(hi-lo)
		if spec.measure == mGenerator {
			ss[0].y[k] = ev.Phi(x)
			continue
		}
		for j, y := range ys {
			ss[j].y[k] = ev.Divergence(y, x)
		}
	}
	x := lo + spec.belief[0]*(hi-lo)
	chart, clipped := drawLines(st, spec.w, max(4, spec.h-2), lo, hi, ss, x)
	ylabel := "effort D(y, x)"
	if spec.measure == mGenerator {
		ylabel = "phi"
	}
	head := st.Dim.Render("y: "+ylabel+"  ") + legend(st, ss)
	if clipped {
		head += st.Dim.Render("  (y cut)")
	}
	var at string
	if spec.measure == mGenerator {
		at = "phi " + fmtTick(ev.Phi(x))
	} else {
		var parts []string
		for _, y := range ys {
			parts = append(parts, fmtTick(ev.Divergence(y, x)))
		}
		at = "effort " + strings.Join(parts, " / ")
	}
	foot := fmt.Sprintf("x: report  ┊ %s: %s", fmtTick(x), at)
	return head + "\n" + chart + "\n" + foot
}

// renderPointPayout draws a point-forecast payout under audit: pay(x, y)
// against the report x for three outcome values. The verdict is the
// checks pane's.
func renderPointPayout(st Styles, c *compiled, spec pictureSpec) string {
	lo, hi := c.d.Interval[0], c.d.Interval[1]
	m := c.pointProg.NewMachine()
	vars := make([]float64, c.pointProg.NumVars())
	cols := max(10, spec.w-8)
	ys := []float64{lo + (hi-lo)/4, lo + (hi-lo)/2, lo + 3*(hi-lo)/4}
	ss := make([]series, len(ys))
	for j, y := range ys {
		ss[j] = series{name: "y = " + fmtTick(y), y: make([]float64, cols)}
		for k := 0; k < cols; k++ {
			vars[0], vars[1] = lo+(float64(k)+0.5)/float64(cols)*(hi-lo), y
			ss[j].y[k] = m.Value(vars)
		}
	}
	x := lo + spec.belief[0]*(hi-lo)
	chart, clipped := drawLines(st, spec.w, max(4, spec.h-2), lo, hi, ss, x)
	head := st.Dim.Render("y: pay(x, y)  ") + legend(st, ss)
	if clipped {
		head += st.Dim.Render("  (y cut)")
	}
	var parts []string
	for _, y := range ys {
		vars[0], vars[1] = x, y
		parts = append(parts, fmtTick(m.Value(vars)))
	}
	return head + "\n" + chart + "\n" + fmt.Sprintf("x: report  ┊ %s: pay %s", fmtTick(x), strings.Join(parts, " / "))
}
