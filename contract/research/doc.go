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
package research
