// Package emphasis designs a proper scoring rule for a yes/no event from
// where the rule should put its incentive.
//
// Every proper binary rule is a mixture of cost-weighted misclassification
// losses (Schervish 1989, Ann. Statist. 17:1856-1879); the mixing weight
// w(c) >= 0 on (0, 1) says how much the rule cares about getting the
// forecast on the right side of the threshold c. Given w, the rule is
//
//	L(p, yes) = ∫_p^1 (1-c) w(c) dc,   L(p, no) = ∫_0^p c w(c) dc,
//
// so that a certain, correct forecast costs zero effort, with generator
// H(p) = p L(p, yes) + (1-p) L(p, no), H'(p) = L(p, yes) - L(p, no) and
// H”(p) = -w(p) exactly.
//
// The weight is a formula in c (scorewright's formula language). The two
// integrals are computed once, at construction, as cumulative sums over
// panels (geometric towards both ends, uniform in the middle), each panel
// by Gauss–Legendre quadrature from gonum's integrate/quad, with a knot
// added at every point where the weight formula switches piece (an if
// condition, the argument of abs, the arguments of min or max changing
// sign: formula.Machine.Switches, found by a scan of 1/4096 and
// bisection), so that no panel straddles a jump or a kink; a query adds
// the partial panel from p to the nearest knot. Beyond the last knot at
// each end the integrand is extrapolated as a power law K s^β in the
// distance s to the end, fitted from two exactly representable points;
// the same exponent decides whether the integral converges there. With
// this layout the integrals of smooth weights, including the algebraic
// end singularities of the beta family, are accurate to about 1e-10
// relative (measured against closed forms in the tests).
package emphasis
