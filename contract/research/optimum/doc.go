// Package optimum finds the proper rule with payments in [floor, cap]
// that pays most for research under a research model: it maximises
// E[G(q)] - G(q0) over convex expected-pay functions G, the posterior q
// drawn from the model and q0 its mean.
//
// G is taken piecewise linear on a mesh of the simplex (n = 2: the grid
// 0, 1/K, ..., 1; n = 3: the uniform triangulation of step 1/K), with the
// base rate added as a node. On a cell where G(q) = Σ_k g_k q_k the rule
// pays g_k when outcome k happens, so the program is linear in the values
// of G at the nodes: G convex (across every interior facet, the next
// cell's far vertex lies on or above this cell's plane), and every
// payment within the budget. By convexity the budget needs checking only
// where it can bind: the largest payment for outcome k is G(e_k) (every
// supporting plane lies under G, at e_k too), and the smallest is on a
// cell touching the face q_k = 0 (moving a belief toward e_k raises the
// plane's value at e_k, since G is convex along the segment). The
// program is solved with gonum's simplex method
// (gonum.org/v1/gonum/optimize/convex/lp) from the all-slack basis (G at
// the floor everywhere is feasible, so no first phase is needed), and the
// solution is checked against the full set of payment bounds.
//
// The result is a formula design: G is the maximum of its affine pieces,
// written as the generator -max(g_1·p1 + ... + g_n·pn, ...) in the formula
// language, so it is checked, fitted, tabled and exported like any other
// rule. For one binary question the optimum is V-shaped with its kink at
// the base rate (Hartline, Li, Shan & Wu, "Optimization of Scoring Rules",
// EC 2022); such a rule is proper but not strictly proper (a forecaster on
// one side of the kink is indifferent between all reports on that side),
// and Mix blends in a share of the quadratic rule to make it strict.
package optimum
