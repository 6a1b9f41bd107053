// Package research measures what a payment rule is worth to a forecaster
// who does research before reporting, rather than reporting the buyer's
// base rate q0.
//
// A research model is a distribution of the posterior q the forecaster
// holds after the work; its mean is q0 (a Bayesian's posterior averages to
// the prior). Three models are offered: a Beta (n = 2) or Dirichlet
// posterior with concentration kappa around q0 ("research worth kappa past
// cases"), a signal of stated accuracy (a confusion matrix from outcome to
// signal, posteriors by Bayes' rule) and the spread of forecasts in a
// history file. Every model is held as a finite set of posteriors with
// weights (a Posterior): exact for a signal and a history, a deterministic
// quadrature for Beta and Dirichlet, so that every expectation is a
// weighted sum and no result depends on a random seed.
//
// For a rule fitted to a budget, pay = A - B·L, a truthful forecaster with
// belief q expects G(q) = A - B·H(q). Research is worth
//
//	E[G(q)] - G(q0) = B·E[D(q, q0)]
//
// per forecast: the expected Bregman divergence of the posterior from the
// base rate, in currency (the affine part of G averages out because
// E[q] = q0). Gains computes it for rules side by side at one budget.
//
// # Internals
//
//	| package | job |
//	|---|---|
//	| `contract/research` | research models as finite sets of weighted posteriors (`Posterior`): `Dirichlet(q0, kappa, Quadrature{})`, `Signal(q0, confusion)`, `History(reader, labels)`; `Gains` (E[G(q)] - G(q0) per forecast and season, beside E[G(q)] and G(q0)) and `Valuer` (`Truthful`, `GainAt`) for fitted rules |
//	| `contract/research/optimum` | the best rule with payments in [floor, cap]: `Solve(ctx, post, floor, cap, Settings{Grid})`, a linear program over convex piecewise-linear G (gonum `optimize/convex/lp`), `Result.Formula()` / `Mix(share)` as formula designs |
//	| `contract/research/steps` | observations bought one at a time: `Solve(ctx, G, a, b, Settings{Cost, MaxSteps})`, backward induction and a forward pass (observations bought, E|report - θ|) |
//	| `contract/research/study` | the comparison the command and the workbench share: every rule fitted to one floor and cap on one menu, measured, plus the optimum and its mix |
//
// Numerics. Beta expectations integrate f(F⁻¹(u)) in the cumulative probability u (gonum
// `mathext.InvRegIncBeta`): the density's end singularities vanish there; panels are graded
// geometrically toward both ends of u and, mapped through F, of x, with the mean and 1/2 as
// panel ends (the optimum bends at the mean). Nodes in the upper half come from the mirrored
// Beta so 1 - x keeps its digits. 880–1700 nodes for n = 2 give the Beta moments to 1e-15 and
// E[q ln q] to 1e-11; the Dirichlet is a product of stick-breaking Betas (one rule per level,
// about 180,000 posteriors for n = 3, E[D] to 1e-10). No Monte Carlo anywhere.
//
// The program. Nodes: the grid 0, 1/K, ..., 1 (n = 2) or the uniform triangulation (n = 3),
// the base rate added as a node (a triangle split in three, or the two beside an edge in two).
// On a cell G(q) = Σ g_k q_k pays g_k for outcome k. Rows: convexity across every interior facet
// (the far vertex of the next cell on or above this cell's plane), the cap at each vertex e_k,
// the floor on cells touching the face q_k = 0 — enough by convexity (package comment), and
// the solution is checked against every cell's payments. Most right-hand sides are 0, and
// gonum's simplex then stalls on degenerate pivots (its anti-cycling step computes a condition
// number per candidate, or stops on a singular basis); rows are relaxed by a fixed tiny pattern
// (convexity by 1e-8/K², so that slopes drift by at most 1e-8 over a line), and the rule is
// rebuilt as the maximum of its cells' pieces — convex whatever the noise — with payments
// tidied to 9 digits and clamped into the budget; its gain is measured on those pieces. n = 2
// runs in slope form (values from y_0, the first slope and slope increases δ >= 0: four rows),
// the general form being the cross-check (`TestBinaryFormsAgree`) and the benchmark's reference.
//
// Tests with outside values: E[D] of the quadratic rule 2·q0(1-q0)/(kappa+1) (n = 2) and
// (1 - Σq0²)/(kappa+1) (n = 3), by hand from the Beta and Dirichlet variances; the log rule's
// E[KL] from E[q ln q] = q0(ψ(α+1) - ψ(α+β+1)) with gonum's digamma; Bayes' rule for signals;
// the V-shaped optimum at the base rate (Hartline, Li, Shan & Wu, EC 2022) with value
// (MAD/2)·(cap - floor)/max(q0, 1 - q0), MAD the Beta mean absolute deviation, checked in turn
// against gonum's Beta density and quadrature; the optimum never below a bounded preset (random
// priors and budgets, n = 2 and 3); the dynamic program against brute force over every stopping
// policy on four observations. The command (`cmd/scorewright/research*.go`) checks the optimum
// and its mix with `verify.CheckRule` (an improper verdict exits 1) and writes either as a
// design through `design.Save` (no overwrite without `--force`). The workbench's research view
// (`tui/research.go`, `tui/researchview.go`) is a `ResearchRoom` that owns its inputs, runs
// and drawing; the root model forwards keys and run messages, calls `Edited` on every edit and
// `Maybe` after the debounce. `.ci/e2e-research.sh` runs the README's example.
package research
