// Package backtest replays a forecast history under one or more payment
// rules: what each forecaster would have been paid per forecast and in
// total, how the totals compare with the budget, how the ranking of
// forecasters changes from one rule to another, and how each forecaster's
// mean effort splits into uncertainty, resolution and reliability.
//
// Money comes from a Payer (effort -> payment), so the same code pays by a
// fitted, rounded table or by an explicit A - B·effort. The decomposition
// works for any Bregman generator: with the observed outcome frequencies
// obar (overall) and obar_k (in bin k of n_k forecasts, mean forecast p_k),
//
//	mean effort = H(obar) - sum_k (n_k/N) D(obar_k, obar) + sum_k (n_k/N) D(obar_k, p_k)
//	            = uncertainty - resolution + reliability,
//
// exactly when every forecast in a bin is the same (bins = distinct
// forecasts). Why: the efforts of bin k then sum to n_k Phi(obar_k, p_k) =
// n_k [H(obar_k) + D(obar_k, p_k)]; and since Phi(q, obar) is affine in q and
// the obar_k average to obar, sum_k (n_k/N) H(obar_k) = H(obar) - sum_k
// (n_k/N) D(obar_k, obar). With coarser bins a within-bin remainder is
// reported beside the three terms (Bröcker 2009, "Reliability, sufficiency, and the
// decomposition of proper scores", Q. J. R. Meteorol. Soc. 135:1512-1519).
package backtest
