// Package budget turns a proper scoring rule into money a contract can
// promise: it builds the report menu the contract allows, fits
// pay = A - B·L(p, k) (B > 0) to a budget, rounds payments to a currency
// unit, and re-checks that scaling and rounding left every menu item the
// strict best report for a forecaster who believes it.
//
// An affine change of pay with B > 0 keeps a rule proper, so the fit
// itself costs no honesty; a finite menu, rounding and a clamp can, and
// the re-check measures by how much. The re-check compares every menu item
// with every other, and for two outcomes finds the belief cells exactly;
// what is searched over beliefs (cells for more outcomes, the truthful pay
// range, a clamp's honesty gap) is computed on a stated grid with a stated
// tolerance: evidence, not proof.
//
// # Internals: menus, fit, rounding, re-check and tables
//
// The path from a rule to a contract annex is four calls, and `cmd/scorewright/table.go` is
// little more than them:
//
//	m, _ := budget.StepMenu(n, 0.05, 0.01)         // or budget.FileMenu(path, n); m.Clamp = P
//	f, _ := budget.FitRule(rule, m, d.Budget)       // A, B, rounded table, truthful pay range
//	rc, _ := f.Recheck(ctx, budget.RecheckSettings{}) // margins, ties, belief cells, clamp gap
//	t := f.Table(rc, budget.Info{Formula: ..., Version: ..., Date: ...})
//	t.Write(w, "csv")                                // csv md json tex svg png pdf
//
// # Menus
//
// `StepMenu` is the simplex grid of step 1/K (K whole; 0.3 is refused) in
// lexicographic order, so for n = 2 the event probability ascends. A report floor raises every
// entry below it to the floor and takes the difference from the largest entry; the other grid
// values stay as they read, so a 0.05 menu with a 1 % floor is 0.01, 0.05, ..., 0.95, 0.99.
// Repeats are dropped. `FileMenu` reads CSV, one report per line (n = 2: one number), `#`
// comments; every error names file:line; repeats are refused; entries are renormalised as in
// `num.ParseDistribution`. `MaxMenu` = 5000 items.
//
// # Fit
//
// Over the menu (and every outcome) Lmin and Lmax of L(p, k). Cap mode:
// B = (cap - floor)/(Lmax - Lmin). Mean-pay mode: B = (M - floor)/(Lmax - Phi(ref, ref~)), so a
// truthful forecaster at the reference belief expects M and the largest effort pays the floor.
// Pay is computed as `floor + B·(Lmax - L)` (the same line as A - B·L, A = floor + B·Lmax) so that
// the floor comes out exactly. `Fit.Pay(effort)` is what the table pays; `Fit.Exact` skips
// rounding. Off-menu reports (backtest): use `f.NewPayer().Pay(dst, report)`, which applies
// the clamp before the effort; `Pay(effort)` alone is right only when `f.Clamp == 0`.
// Rounding (`Rounder`, bounded by `Rounder.Within`) never takes a payment in [floor, cap] out of
// it: where the mode would go below the floor or above the cap, the payment is the nearest
// multiple of the unit inside; a budget with no multiple inside is a `*NoRoomError`.
// `f.BestItem(q)` is the menu item a forecaster with belief q picks on the rounded table, for a
// contract that accepts only menu reports.
// `Truthful` is A - B·H(q) over a belief grid (1/1000 for n = 2, at most 20000 points
// otherwise) plus the uniform belief and the menu; `MaxPay` (largest table entry) is the buyer's
// worst case per forecast, and `Recheck.MenuPay` the range of what a forecaster who picks the best
// menu item for the belief expects on the rounded table.
//
// # Unbounded rules
//
// Any non-finite effort on the menu is an `*UnboundedError`; with
// `AtZero` (the report gives the outcome 0) the message offers the two ways out, and the CLI
// rewrites it with the flags. The clamp is defined on the report, for every generator alike:
// report p is paid as report p~ = max(p, c) / sum max(p, c) (`ClampReport`); reports with every
// entry >= c are unchanged. For the log rule this is -ln(max(p_k, c)/Z), which equals the usual
// -ln max(p_k, c) wherever no entry is below c. Its honesty gap is measured in
// `Recheck.ClampGap`: over beliefs q, B·(Phi(q, q~) - min over menu items r of Phi(q, r~)), the
// most a forecaster gains by reporting a menu item instead of q, both paid by the clamped rule
// (0 for a proper rule without clamp). Beliefs searched: grid beliefs with an entry below c,
// and probes next to every menu item with one entry at 1/4, 1/2, 3/4 of c. Plain loop, no
// verify import. For log, c = 0.01, step 0.05, [0, 50]: gap 0.00027 at belief (0.995, 0.005),
// best report (1, 0) — the known failure of a clamped log rule, made visible.
//
// # Rounding
//
// `budget.Rounder`, shared by point tables: `nearest` (halves away from zero), `down`, `up` to a unit. Amounts within 1e-6
// of a unit of a whole number of units (or, for nearest, of a half) count as exactly that:
// 100 - 100·0.3² is 90.99999999999999 in binary and must read 91 in every mode. When 1/unit is
// whole, the result is k/(1/unit), the float nearest the decimal amount, so CSV numbers written
// with the unit's decimals read back bit for bit.
//
// # Re-check
//
// On the rounded table: for each item i, margin_i = E_i[pay(i)] - max_{j != i}
// E_i[pay(j)] in currency; ties are |margin| <= tolerance (default 1e-9 × largest payment),
// beaten are below. Passed iff no ties and none beaten. Belief cells: which item each belief
// on a finer grid picks as unique best (n = 2: step 1/1000 or about ten beliefs per item,
// whichever is finer; n > 2: the finest grid up to 1/200 with beliefs × items × n <= 5e7);
// items no belief picks are `NeverChosen`. For n = 2 the cells and the range of expected pay
// on the table (`MenuPay`) are exact: expected pay is linear in the belief, so a cell is an
// intersection of half-lines and the best pay is an upper envelope whose corners are cell
// ends (`binaryCells`). Work is split
// over GOMAXPROCS goroutines in chunks, with ctx cancellation and a progress callback. It is a
// grid check: the verdict text says which grid and tolerance. Typical findings: the Brier rule
// on [0, 100] passes with step 0.1 and unit 1 (smallest margin 1) but fails with step 0.05
// (the exact margin between 0 and 0.05 is 50·2·0.05² = 0.25, less than a unit).
//
// # Proposals
//
// `Propose`, the workbench's budget pane key: when rounding breaks the table (or to make it
// simpler), budgets one field away from the given one: the coarsest unit of a ladder of round
// amounts (100 … 0.001, at most half the range) that passes with the cap kept, and for a failing budget
// the smallest cap (or mean pay) above it, every whole step of CapGrain (a hundredth of the range in whole units) up to five times it, at the given
// unit — a larger one only costs the buyer more; when none passes, the unit proposal's NoLarger
// says which were tried. A candidate passes when every item beats every other
// for its own belief (the menu part of the re-check, which decides Passed). Tested against an exact
// integer brute force of the Brier table (propose_test.go).
//
// # Tables
//
// `table.Table` holds Kind (`money`), ValueName (`pay`, heading "pay if frost"), ReportName
// (set for point forecasts: one number per report, Labels then name the outcome columns),
// Decimals (-1: shortest exact form), Labels, Reports, Values and `Meta` (formula, preset,
// parameters, outcomes, menu, payment, A, B, budget, rounding, re-check verdict and margin,
// warnings, notes, tool version, date, cautions; outcome weights and order when the rule has them). `Meta.Fields()` is the one ordered list that
// every text format writes, warnings first. CSV: metadata as `# key: value` lines (read with
// `encoding/csv` and `Comment = '#'`), then a header row; Markdown: warning quote, table, list;
// JSON: top-level `warnings`, `rows`, `metadata`; LaTeX: metadata as `%` comments and again
// as visible text under the tabular, warning in bold above it. Figures (gonum/plot): n = 2 a
// curve per outcome over the event probability; n = 3 a simplex triangle per outcome coloured
// by pay; n > 3 a panel per outcome of pay against the probability the report gave it; the
// metadata block is drawn underneath in a monospaced face, warnings in red; curve legends sit in a
// strip between the panel and the metadata (up to three columns), never over the data.
//
// # Adding a transform, such as the lottery conversion
//
// Write a function that takes a
// `*table.Table` (and the fit's floor and cap), returns a copy with Values replaced
// ((pay - floor)/(cap - floor)), `Kind` set to a new kind, `ValueName` to e.g. "chance of the
// prize", `Decimals` chosen, `Meta.Payment` restated, and one line appended to
// `Meta.Cautions`; every format follows (see `TestTransformFriendly`). Re-check the transformed
// values if the transform rounds. In the command, add the flag in `addTableFlags` and apply the
// transform to `tb` in `runTable` right after `fit.Table(...)`; writing, refusal and the summary
// need no change.
//
// # Terms
//
// `Terms` is the one shape of a fitted table that the backtest, the risk computations, the
// command and the workbench share: the `Fit`, its `Recheck` (nil when nothing was re-checked),
// whether the formula pays every forecast (`ByFormula`, no menu), the payment bounds, the report
// floor forecasts are recorded at, notes and the re-check warning. `TableTerms` is the payment
// table itself (fit on the menu, re-checked); `FormulaTerms` fits on the grid of `FitStep` and
// pays every forecast by the formula (the backtest without a menu); `StepTerms` fits on the step
// menu or, without a step, unrounded over the finest grid of at most `MaxMenu` reports (the risk
// computations). `backtest.TermsScheme` and `risk.TermsContract` read them.
//
// # Point tables
//
// `FitPoint(ctx, g, PointSpec)` fits a point-forecast generator (generator/point) to a floor and
// a cap over reports lo, lo+step, ... and outcome columns, rounding with the same `Rounder`;
// `PointTable.Recheck` is exact (with pay interpolated between columns the worst belief whose
// mean is an item is a point mass or a two-column mixture), and `Export` gives the `table.Table`
// every format writes.
//
// # Command
//
// `scorewright table RULE BUDGET [--menu FILE] [--clamp P] [--format F] [--out FILE]
// [--force] [--json]`. Format from `--format`, else the `--out` extension, else Markdown;
// figures need `--out`. Without `--out` the table goes to stdout; with it, a summary (fit,
// verdict, notes, per-item margins and cells for short binary menus, failing items otherwise)
// goes to stdout. `--json` prints the summary (A, B, budget, truthful range, re-check with
// margins, cells, ties, clamp gap, output) instead. A failed re-check refuses the table (exit
// 1, nothing written); `--force` writes it with the warning inside and still exits 1. An
// existing file is kept unless `--force` (exit 2). `SOURCE_DATE_EPOCH` fixes the export date
// (reproducible-builds convention).
//
// # Tests
//
// Brier table (A = 100, B = 50, 91/51 at 0.7, derived in the test comment), log rule
// with a 1 % floor against `math.Log`, coarse rounding tie (step 0.2, unit 25: margin exactly 0),
// mean pay, clamp gap recomputed from -ln, rounding modes, menus, file-menu errors. Golden files:
// `go test ./contract/table -update` rewrites `contract/table/testdata/*`; review the diff.
// `.ci/e2e-table.sh` runs the built binary through every format and refusal.
//
// # Benchmarks
//
// Measured with `go test ./contract/budget -run '^$' -bench . -benchtime 5x`, 2 shared cores,
// Brier rule, unit 0.01, default grids: re-check n = 2 with 21 items 0.32 ms, 101 items
// 0.75 ms; n = 3 with 66 items 8.6 ms, 231 items 15 ms; n = 4 with 286 items 50 ms. FitRule
// (log, 1 % floor) n = 2 0.25 ms, n = 3 with 231 items 4.8 ms.
package budget
