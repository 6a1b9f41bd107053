package emphasis

import "math"

// Rounding bounds for the tolerance of a check.
//
// The efforts are integrals of the weight, summed panel by panel, so two
// things limit what they are known to: the rounding of the sums (a few
// ulps per term, their terms all of one sign for a weight >= 0) and the
// rounding of the weight itself. A weight written with terms that cancel,
// (1e12 + c) - 1e12, is c computed to within an ulp of 1e12 (1.2e-4): a
// staircase, whose integrals differ from those of c by up to 1.2e-4 · ∫
// (1 - c) dc, far above a tolerance scaled to the efforts. Both are
// bounded here; verify allows for them (bregman.RoundingEvaluator and
// ValueRoundingEvaluator).

// weightScan is the number of points of (0, 1) at which the rounding of
// the weight is bounded (formula.Machine.ValueRounding) once, in New; the
// largest bound stands for the whole of (0, 1).
const weightScan = 2048

// weightRounding is the largest rounding bound of the weight formula over
// weightScan points of (0, 1). The points are offset by a fraction of the
// golden ratio so that none is a short binary fraction: at c = k/4096,
// 1e12 + c happens to be exact, and a scan there would see no rounding.
func weightRounding(ev *Evaluator) float64 {
	var worst float64
	v := make([]float64, 1)
	for i := 0; i < weightScan; i++ {
		v[0] = (float64(i) + 0.6180339887498949) / weightScan
		if b, ok := ev.m.ValueRounding(v); ok && b > worst {
			worst = b
		}
	}
	return worst
}

// sumRounding is the relative rounding of an effort's sum: one rounding
// per panel and per Gauss node, for terms of one sign.
func (g *Generator) sumRounding() float64 {
	return float64(len(g.knots)+glNodes+4) * 0x1p-53
}

// lossRounding bounds the rounding of Losses(t): the sums' own rounding,
// and the weight's, integrated against (1 - c) over [t, 1] (yes) and c
// over [0, t] (no).
func (e *Evaluator) lossRounding(t, yes, no float64) (byes, bno float64) {
	g, dw := e.g, e.g.wRound
	u := g.sumRounding()
	return u*math.Abs(yes) + dw*(1-t)*(1-t)/2, u*math.Abs(no) + dw*t*t/2
}

// ValueRounding bounds the rounding of Value(p) (bregman
// ValueRoundingEvaluator). ok is false where the value is not finite.
func (e *Evaluator) ValueRounding(p []float64) (float64, bool) {
	s, t := e.split(p)
	yes, no := e.Losses(t)
	h := s * (mul0(t, yes) + mul0(1-t, no))
	if h != h || math.IsInf(h, 0) {
		return 0, false
	}
	by, bn := e.lossRounding(t, yes, no)
	return s*(mul0(t, by)+mul0(1-t, bn)) + 4*0x1p-52*math.Abs(h), true
}

// HessianRounding writes bounds on the rounding of the Hessian and the
// gradient (the two efforts) at p into hess and grad, and returns H(p)
// (bregman.RoundingEvaluator). The Hessian is the weight times a factor,
// so its bound is the weight's rounding times that factor, plus a few
// ulps.
func (e *Evaluator) HessianRounding(hess, grad, p []float64) float64 {
	h := e.Hessian(hess, grad, p)
	s, t := e.split(p)
	by, bn := e.lossRounding(t, grad[0], grad[1])
	grad[0], grad[1] = by, bn
	u := 1 - t
	f := [4]float64{u * u, t * u, t * u, t * t}
	for k := range hess {
		hess[k] = e.g.wRound/s*f[k] + 4*0x1p-52*math.Abs(hess[k])
	}
	return h
}
