// Package scorewright turns a design into the engine's objects. Open is
// the one place the design's mode is switched on: the command line and
// the workbench open a design here and ask the Rule it returns for
// engine work (Check, Audit, Table, Backtest, Distort, Certify), so that
// adding a mode touches this package and generator/design only.
//
// The packages below it each hold one job: generator/ turns what the
// user writes into a rule, verify/ checks and audits it, contract/ turns
// it into money, presets/ names known rules. See DEVELOPERS.md for the map.
//
// # Point forecasts, emphasis, risk attitude, lotteries
//
// Five small packages, each usable from the workbench without the command line.
//
// # Designing by emphasis: generator/emphasis, n = 2
//
// `emphasis.New(src, emphasis.Options{Params})`
// compiles a weight w(c) (formula scope `Vars: ["c"]`) and returns a `*Generator` that is a
// `bregman.Generator`, so `bregman.Rule{Gen: g}` and every check, table and backtest take it.
// L(p, yes) = ∫_p^1 (1-c) w dc and L(p, no) = ∫_0^p c w dc (Schervish 1989), so a certain,
// correct forecast costs 0. The integrals are cumulative sums, built once in `New` (about 1 ms),
// over panels — geometric from 2^-64 to 2^-9, 255 uniform panels, geometric from 1 - 2^-9 to
// 1 - 2^-33 — each by 20-node Gauss–Legendre (nodes from gonum `integrate/quad`); a query adds
// the partial panel (40 formula evaluations, no allocation). Beyond the last knot at each end
// the integrand is extrapolated as K s^β fitted at two exactly representable points; the same β
// decides integrability. The upper end stops at 2^-33 because c near 1 is only known to 1.1e-16,
// which dominates below that. Measured against closed forms (tests): relative error < 1e-11 for a
// constant weight, < 1e-9 for the log and boosting (a = b = -1/2) weights at every report from
// 1e-22 to 1 - 1e-12, < 1e-9 for beta weights against gonum `mathext.RegIncBeta`. Weights with
// kinks (`if`, `abs`) or an integrable singularity inside (0, 1) converge more slowly in the panel
// that holds it.
//
// As a function on the simplex the generator is extended homogeneously, H(p1, p2) = s h(p1/s):
// its gradient is (L(p, yes), L(p, no)) and its Hessian -w(t)/s [(1-t)², -t(1-t); -t(1-t), t²]
// (w exactly from the formula). That keeps the Bregman construction exact at both ends: an
// infinite effort sits in the component of the outcome the report rules out, and bregman.Dot's
// 0·Inf = 0 keeps the other at 0 (with a gradient (H', 0) one end gives NaN).
//
// `g.Diagnostics()` reports `Negative` and `NonFinite` stretches of a grid (2000 midpoints plus
// the end knots), `UnboundedAtZero()` / `UnboundedAtOne()` (∫ (1-c) w diverges at 0, or ∫ c w at
// 1: the rule needs a report floor), `Warnings()` in words and `Problem()` as an error. `New`
// itself fails when ∫ (1-c) w diverges at 1 or ∫ c w at 0 (every effort infinite). `g.NewBinary()`
// gives `Weight(c)`, `Losses(p)` and `Binary(p)` for plots. In the command, `categoricalRule`
// builds it for `ModeEmphasis` (`--emphasis EXPR` or `--preset beta`), refuses a negative weight
// naming where, and `ruleWarnings(rule)` gives the unbounded-end notes `eval` prints.
//
// # Point forecasts of a mean: generator/point, verify/pointcheck
//
// `point.New(src, lo, hi,
// point.Options{Params})`, scope `Vars: ["x"]`; an `Evaluator` gives `Phi`, `Derivatives` (exact,
// from the formula machine), `Line` Phi(y, x) = phi(x) + phi'(x)(y - x), `Divergence` D(y, x) and
// `Expected(x, ys, ws)`. `verify/pointcheck.CheckGenerator(ctx, g, Settings{Resolution, Tolerance,
// Progress})` checks concavity (phi” on a grid of 4K+1 reports), non-negativity and affinity on
// the K+1 outcome grid × reports, that the mean beats every grid report on all two-point
// distributions (5 weightings) and three-point ones on a ~10-point sub-grid, and finiteness;
// verdicts and JSON follow cli.md (`at` carries `outcomes`, `weights`, `report`). `NewPayout` +
// `AuditPayout(ctx, p, lo, hi, s, candidates)` audits pay(x, y): honesty gap max_x E pay - E
// pay(mean) (grid, then golden-section refinement), pay(y, y) >= pay(x, y), affinity of the
// report-dependent part, and identification as Shift - Scale·D of a point preset (least squares on
// the grid). Presets of kind point: `squared-error`, `patton` (b), `qlike`, `exponential` (a).
// `budget.FitPoint(ctx, g, PointSpec)` (contract/budget) fits pay = Cap - B·D to [Floor, Cap] over reports lo, lo+step,
// ... × 11 outcome columns and rounds with `budget.Rounder` (the same rounding as every table);
// `t.Recheck(ctx)` checks each menu report against every rival for every forecaster whose mean
// is that report — exact, because with pay interpolated between columns the worst such belief
// is a point mass or a two-column mixture (a linear program's vertex); `t.Export(rc, PointInfo)` is a
// `table.Table` with `ReportName` set (one number per report, `Labels` the outcome columns), so
// point tables have every format, the metadata block, the warning of a forced table and the
// lottery conversion (`lottery.Convert`) of tables over outcomes; `t.WriteCSV`, `t.WriteMarkdown` and
// JSON encoding of `t` re-check and write the same export without version or date. In the command all of this sits in
// `cmd/scorewright/point.go`; `check`, `audit` (`--interval`), `table` and `eval` call it with a
// one-line hook when the design is in point mode. A point design's `--step` is in the units of
// the interval: `Design.ValidateBudget` reads the step by mode.
//
// # Risk attitude: contract/risk, scorewright distort
//
// `risk.ParseUtility("crra:R" |
// "cara:A" | "linear")`, `risk.NewSolver(rule, risk.Contract{A, B, MinPay, ReportFloor}, u,
// wealth)`; `Best(q)` maximises sum_k q_k u(W + A - B L(p, k)) over reports above the report
// floor, comparing reports by their certainty equivalent (money; log-sum-exp with expm1/log1p, so
// CARA -1e6 and 1e-9 both keep their digits; CRRA below 1 is defined at zero wealth). The search
// (`search.go`, `bracket.go`) moves probability between two outcomes at a time with a bracketing
// line search — a grid, golden section, then bisection on the sign of the exact derivative
// (dL_k/dp_j = H_kj - (Hp)_j) — sweep after sweep, plus a line along each sweep's step; for n > 2
// it starts from the better of the truthful report and the best point of a lattice of at most 2000
// reports. Every line keeps the best value seen, so nothing stalls on a flat gradient; the answer
// is confirmed by the first-order (KKT) condition, and a belief where that fails is an error for
// that belief only (`Curve.Failed`; `distort` prints it on its own line and exits 1). `BestOf`
// ranks menu rows by the same certainty equivalent, so best report and menu pick agree. `Distortion(ctx, beliefs,
// progress)` gives the curve and its largest size in probability points (max_k |p_k - q_k| × 100);
// `BinaryBeliefs(step, floor)` and `DirectionBeliefs(n, steps)` (centre towards each vertex) make
// the belief sets; `BestOf(q, menu)` is the menu item a forecaster held to the menu picks. The
// command fits the budget with `budget.FitRule` on the `--step` menu; without `--step` there is
// no menu and the exact formula pays (`budget.StepTerms` fits over the finest simplex grid of at most
// `budget.MaxMenu` reports, unrounded).
//
// # Lottery payments: contract/lottery, table --lottery
//
// `lottery.Convert(t, floor, cap)`
// turns a money `table.Table` into chances (pay - floor)/(cap - floor) (`KindChance`, value name
// "chance"), rescales the smallest margin, restates the payment, and appends `lottery.Why` (the
// Hossain & Okui 2013 argument), `lottery.Draw` (how to settle the draw verifiably) and
// `lottery.Caution` (may be regulated as gambling). The command applies it to `tb` right after
// `fit.Table(...)` with bounds min(fit.Floor, fit.MinPay) and max(fit.Cap, fit.MaxPay); point
// tables go through the same `lottery.Convert`.
//
// Shaky or missing: the emphasis end fit cannot decide weights within 1e-9 of the integrability
// border (e.g. 1/(c ln²c)); `distort` takes no `--clamp`
// and no point designs.
package scorewright
