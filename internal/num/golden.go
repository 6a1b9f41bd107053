package num

// goldenRatio is 1/φ = (√5 - 1)/2, the golden section ratio.
const goldenRatio = 0.6180339887498949

// Golden is the state of a golden-section search for a maximum: the
// bracket [A, B] and its two inner points C < D with their values.
type Golden struct {
	A, B, C, D float64
	FC, FD     float64
}

// GoldenMax narrows [a, b] around a maximum of f by golden-section search
// (f unimodal there is assumed; callers use it to refine a grid maximum),
// for at most steps steps and while more(A, B) says the bracket is still
// too wide. A numeric kernel shared by the payout audits and the risk
// solver, which each read their answer from the final state.
func GoldenMax(f func(float64) float64, a, b float64, steps int, more func(a, b float64) bool) Golden {
	g := Golden{A: a, B: b, C: b - goldenRatio*(b-a), D: a + goldenRatio*(b-a)}
	g.FC, g.FD = f(g.C), f(g.D)
	for i := 0; i < steps && more(g.A, g.B); i++ {
		if g.FC >= g.FD {
			g.B, g.D, g.FD = g.D, g.C, g.FC
			g.C = g.B - goldenRatio*(g.B-g.A)
			g.FC = f(g.C)
		} else {
			g.A, g.C, g.FC = g.C, g.D, g.FD
			g.D = g.A + goldenRatio*(g.B-g.A)
			g.FD = f(g.D)
		}
	}
	return g
}
