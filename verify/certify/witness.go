package certify

import (
	"fmt"
	"math"

	iv "scorewright/internal/interval"
	"scorewright/internal/num"
)

// inside returns a point of b ∩ simplex (in the first n-1 coordinates):
// the box's centre, moved toward its lowest corner until the sum is
// below 1.
func inside(b box) []float64 {
	x := make([]float64, len(b.lo))
	var slo, smid float64
	for i := range x {
		x[i] = b.lo[i] + (b.hi[i]-b.lo[i])/2
		slo += b.lo[i]
		smid += x[i]
	}
	if smid >= 1 {
		t := 0.5 * (1 - slo) / (smid - slo)
		for i := range x {
			x[i] = b.lo[i] + t*(x[i]-b.lo[i])
		}
	}
	return x
}

// full turns the first n-1 probabilities into a point of the simplex.
func full(x []float64) []float64 {
	p := append([]float64(nil), x...)
	var s float64
	for _, v := range x {
		s += v
	}
	return append(p, math.Max(0, 1-s))
}

// valueAt encloses H at the point p.
func (g *genRun) valueAt(p []float64) iv.Interval {
	for k, v := range p {
		g.pbox[k] = iv.Point(v)
	}
	g.enc.Enclose(&g.pt, g.pbox, 0)
	return g.pt.Value
}

// divergence encloses D(q, p) = H(p) + ∇H(p)·(q - p) - H(q), the extra
// expected effort a forecaster with belief q bears by reporting p; it is
// negative exactly when reporting p pays better than honesty.
func (g *genRun) divergence(q, p []float64) (iv.Interval, bool) {
	for k, v := range p {
		g.pbox[k] = iv.Point(v)
	}
	g.enc.Enclose(&g.pt, g.pbox, 1)
	if g.pt.Undefined {
		return iv.Interval{}, false
	}
	d := g.pt.Value
	for k := range p {
		d = iv.Add(d, iv.Mul(g.pt.Grad[k], iv.Sub(iv.Point(q[k]), iv.Point(p[k]))))
	}
	hq := g.valueAt(q)
	if g.pt.Undefined {
		return iv.Interval{}, false
	}
	return iv.Sub(d, hq), d.Bounded() && hq.Bounded()
}

// curvatureWitness records the proof from a box where H curves upward
// along direction v (in the basis e_a - e_j): from a point p of the box,
// a belief q along v inside the box gains by reporting p, because H is
// strictly convex on the segment between them.
func (g *genRun) curvatureWitness(b box, j int, v []float64) {
	n := g.n
	// The direction in all n coordinates, then in the first n-1.
	u := make([]float64, n)
	a := 0
	for k := 0; k < n; k++ {
		if k == j {
			continue
		}
		u[k] += v[a]
		u[j] -= v[a]
		a++
	}
	x := inside(b)
	t := math.Inf(1)
	for i := range x {
		switch {
		case u[i] > 0:
			t = math.Min(t, (b.hi[i]-x[i])/u[i])
		case u[i] < 0:
			t = math.Min(t, (b.lo[i]-x[i])/u[i])
		}
	}
	if un := u[n-1]; un < 0 {
		// p_n falls along u: stay on the simplex.
		t = math.Min(t, full(x)[n-1]/-un)
	}
	t *= 0.9
	p := full(x)
	w := &Witness{Belief: p, Report: p,
		Reason: fmt.Sprintf("the curvature of H along %s is strictly positive on the box %s, so H is not concave (Savage 1971)", num.Format(u), boxString(b))}
	// The box proves it; for a witness that reads as one, try beliefs
	// farther along u too (doubling the step while it stays on the
	// simplex) and keep the largest gain the interval check confirms.
	for step := 0; step < 60; step++ {
		qx := make([]float64, n-1)
		ok := true
		var sum float64
		for i := range qx {
			qx[i] = x[i] + t*u[i]
			ok = ok && qx[i] >= 0
			sum += qx[i]
		}
		if !ok || sum > 1 {
			break
		}
		q := full(qx)
		if d, ok := g.divergence(q, p); ok && d.Hi < 0 && -d.Hi > w.Gain {
			w.Belief, w.Gain = q, -d.Hi
		}
		t *= 2
	}
	if w.Gain > 0 {
		w.Reason += fmt.Sprintf("; belief %s expects at least %.3g less effort reporting %s than honestly (interval-checked)", num.Format(w.Belief), w.Gain, num.Format(p))
	}
	g.witness = w
}

// chordWitness looks, on a box where H may have a kink or a jump, for a
// chord that H falls below: H(m) < (H(a) + H(b))/2 with m the midpoint,
// proved by interval evaluation, so H is not concave. Then D(a, m) +
// D(b, m) = 2H(m) - H(a) - H(b) < 0 whatever gradient m has, and one of
// the two beliefs gains by reporting m.
func (g *genRun) chordWitness(b box) bool {
	if b.simplexShare() <= 0 {
		return false
	}
	n := g.n
	x := inside(b)
	for dir := 0; dir < n-1; dir++ {
		// Along e_dir - e_n, as far as the box allows both ways.
		t := math.Min(b.hi[dir]-x[dir], x[dir]-b.lo[dir])
		t = math.Min(t, full(x)[n-1])
		if !(t > 0) {
			continue
		}
		ax, bx := append([]float64(nil), x...), append([]float64(nil), x...)
		ax[dir] -= t
		bx[dir] += t
		pa, pb, pm := full(ax), full(bx), full(x)
		ha, hb, hm := g.valueAt(pa), g.valueAt(pb), g.valueAt(pm)
		deficit := iv.Sub(iv.Scale(0.5, iv.Add(ha, hb)), hm)
		if !(deficit.Lo > 0) || !deficit.Bounded() {
			continue
		}
		w := &Witness{Report: pm, Belief: pa,
			Reason: fmt.Sprintf("H at %s lies at least %.3g below the chord from %s to %s, so H is not concave (Savage 1971)", num.Format(pm), deficit.Lo, num.Format(pa), num.Format(pb))}
		for _, q := range [][]float64{pa, pb} {
			if d, ok := g.divergence(q, pm); ok && d.Hi < 0 {
				w.Belief, w.Gain = q, -d.Hi
				w.Reason += fmt.Sprintf("; belief %s expects at least %.3g less effort reporting %s than honestly (interval-checked)", num.Format(q), w.Gain, num.Format(pm))
				break
			}
		}
		g.witness = w
		return true
	}
	return false
}

func boxString(b box) string {
	s := ""
	for i := range b.lo {
		if i > 0 {
			s += " × "
		}
		s += fmt.Sprintf("p%d ∈ [%.10g, %.10g]", i+1, b.lo[i], b.hi[i])
	}
	return s
}
