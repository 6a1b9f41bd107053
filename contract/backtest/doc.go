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
//
// # Internals: how a backtest runs
//
// What a rule would have paid on a history of forecasts, and why.
//
//	| package | job |
//	|---|---|
//	| `generator/history` | streaming reader of a history CSV: header matched to the rule's outcome labels by name (any column order, byte-order mark allowed), outcome as label or 1-based index, rows validated (field count, empty names, numbers, [0, 1], sum within a stated tolerance, default 1e-6; accepted rows renormalised). Bad rows come back as `*history.RowError{Line, Why}` and reading goes on. |
//	| `contract/backtest` | `Tally` (pay, totals, ranks, bins), `Run` (drives a `history.Reader` into a `Tally`), `Decompose` (uncertainty, resolution, reliability), reliability curves and `Regroup`. |
//	| `contract/backtest/figure` | the reliability picture for n = 2 with gonum/plot (svg, png, pdf). Kept apart so the engine carries no plotting library. |
//	| `tui/reliability` | the same picture as text for the workbench: `reliability.New(outcome, curves).View(width, height)`, axes ticked every 0.2, legend, optional `Styles`; no Bubble Tea state. |
//	| `cmd/scorewright/backtest*.go` | the command; `backtest_fit.go` takes the fit from `contract/budget`, the menu from the table command's `tableMenu`. |
//
// How to use the engine:
//
//	h, err := history.NewReader(file, labels, history.Options{})
//	res, err := backtest.Run(ctx, h, []backtest.Scheme{
//	    {Name: "A", Rule: rule, Pay: fit, OnMenu: onMenu, Low: fit.MinPay, High: fit.MaxPay},
//	}, backtest.Options{Progress: show})
//
// A `Scheme` pays through the one-method `backtest.Payer` interface (effort -> money).
// `*budget.Fit` is one (rounded A - B·effort, as the table pays); `backtest.Affine{A, B}` is the
// unrounded formula, used in tests. `Scheme.Adjust` is the report the contract pays for a forecast
// (the table's clamp); `Scheme.OnMenu` only counts, it never changes pay: a forecast off the menu is
// paid by the formula, and the command says so.
//
// Design notes:
//
//   - Small memory. The CSV reader splits quote-free lines itself out of one string per block of
//     up to 64 KiB of lines (`encoding/csv`, sharing its buffer, reads any record with a quote),
//     so a row allocates at most one string (tested with `testing.AllocsPerRun`). Memory never
//     grows with rows, and past bounds not with forecasters either: a forecaster is its name in
//     one byte arena and an index (names.go, ~16 bytes beside the name); the money of the first
//     `DefaultMaxMoney` forecasters sits in flat arrays, later ones in a table of as many entries;
//     the (forecaster, forecast) outcome counts in a table of `DefaultMaxPairs` entries. A full
//     table is written to one temporary file (removed as soon as it is made, so nothing is left
//     behind) as a run sorted by forecaster (spill.go); the Result merges the runs back in
//     forecaster order with a heap of cursors, one pass for the ranks (keeping the money of the
//     best and worst by bounded heaps), one for the detailed forecasters' decompositions, and
//     `EachForecaster` one more, keeping each forecaster's figures (in memory, or in a second
//     temporary file when many) until they are visited by name (finals.go). Spilling is checked
//     bit for bit against the tables kept in memory, also across a coarsening of forecasts
//     between runs (spill_test.go). Skipped rows are all counted, the first 1000 kept.
//   - Speed. `Run` reads and validates in one goroutine and scores in the caller's, batches of 512
//     rows in flight. What every distinct forecast earns under every scheme and outcome is cached
//     (16384 forecasts at most), so a history written on a menu evaluates each generator once per
//     menu item rather than once per row. Payers and menu tests must therefore be pure functions.
//     Forecasters and bins are found without Go maps on the hot path where it mattered (an
//     open-addressing table keyed by the forecast's bits, one multiplication a word and murmur3's
//     finaliser as hash, a tag of the hash in each slot so that a probe rarely reads another key;
//     the forecaster's map lookup is skipped when consecutive rows share a forecaster). The
//     (forecaster, forecast) table is hashed by the forecast's bits too, so a forecast the
//     forecaster made before is found there by one lookup, without the table of all distinct
//     forecasts; full tables are sorted by radix before they are spilled. On one core
//     the cost is the sum of the two goroutines, so the reading is cheap too: quote-free lines are
//     cut at their commas by the history reader itself (checked against `encoding/csv` on random
//     text) and plain decimals read exactly without `strconv` (history/decimal.go). The Result
//     groups a forecaster's forecasts once for all schemes that pay them as written, and sorts
//     event groups by radix (corp/sort.go).
//   - Money totals use compensated (Neumaier) summation: ten million payments of 0.1 add to 1e6
//     exactly (a test).
//   - Ranks are by mean pay per forecast (forecasters may answer different numbers of questions),
//     ties share the better rank, NaN ranks last.
//   - Decomposition (Bröcker 2009): bins are the distinct forecasts, so the identity
//     mean effort = H(obar) - sum w_k D(obar_k, obar) + sum w_k D(obar_k, p_k) is exact (derivation in
//     the package comment). A forecaster with more than 4096 distinct forecasts has bins coarsened
//     to cells of 1/20 (n = 2) or 1/10 in the first n-1 probabilities, halved while they do not fit;
//     bins then mix forecasts and the `WithinBin` remainder closes the identity. The decomposition
//     splits the efforts that were paid: each bin's forecast becomes the report the contract pays
//     for it (`Scheme.Record`, the report floor; `Scheme.Adjust`, the clamp), bins that become
//     equal are merged (`paidBins`), and `Paid.Effort` is the paid report's effort, so pay =
//     A - B·effort on every row and a forecast of 0 under a floored log rule is finite here as its
//     payment is.
//   - Pictures regroup bins into tenths (`backtest.Regroup`); markers in the text chart sit in the
//     cell whose tick value is nearest, so they agree with the axis labels.
//   - The sample histories (`testdata/histories/orchard-frost.csv`, `harvest-outlook.csv`)
//     are made by `generator/history/sample_test.go`; `go test ./generator/history -run
//     TestSampleHistories -update` rewrites them, and the test fails when the committed files and
//     the generator disagree. Their bad rows are planted on purpose (lines listed in the test).
//
// The command (`cmd/scorewright/backtest*.go`): rule A from the usual RULE flags, rule B from
// `--versus-preset`, `--versus-generator` (same outcomes, `--versus-param` for its parameters) or
// `--versus-design` (which keeps its own budget when it states a cap or mean pay; otherwise both
// rules are fitted to the same budget). Each is fitted with `budget.FitRule` on the menu the
// table command builds (`tableMenu`: `--step` or `--menu`, `--clamp`), and the fitted table's
// re-check is run so that a table the table command would refuse is named in the output.
// `--pay-out FILE.csv` streams every forecast's pay and effort to a temporary file that is
// renamed into place only after the whole history was read (no overwrite without `--force`);
// `--figure` and `--chart` draw the reliability picture (n = 2). A history without one valid
// forecast is an input error (exit 2); skipped rows are not (exit 0, listed). Progress goes to
// stderr when it is a terminal, or with `--progress`. Tests of the command use an explicit
// `A - B·effort` fit (`backtestWith(e, args, explicitFit)`) besides the real one.
//
// Tests with outside values: Murphy (1973) decomposition of the Brier score computed by hand
// (quadratic rule terms are twice the binary form), the log rule against gonum's `stat.Entropy`
// and `stat.KullbackLeibler`, Brier (1950) values for the pay, the identity for quadratic, log,
// spherical, power and ranked generators, and an integration test that every on-menu forecast of
// the sample is paid exactly its entry in the table `scorewright table` exports for the same
// flags.
package backtest
