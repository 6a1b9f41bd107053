// Package verify examines scoring rules for the properties that make them
// safe to pay with: a rule built from a generator (CheckRule) and a payout
// formula someone hands in (Audit).
//
// Both work on a grid of beliefs and reports on the probability simplex,
// every coordinate a multiple of 1/K. Expected effort is computed from the
// per-outcome efforts L(p, k) of every grid report, precomputed once (G×n
// floats), and then streamed against every belief on all cores: G² pairs
// with no G² memory. A failing check names its worst witness, sharpened
// beyond the grid by local optimisation (gonum optimize, Nelder–Mead).
//
// Every result states its resolution, point count and tolerance, and keeps
// the boundary of the simplex (some p_k = 0) apart from the interior. A
// grid check is evidence, not a proof: it can miss trouble between grid
// points, and it says so.
//
// verify does not know the preset library; Audit takes the candidate rules
// to identify a payout against as a parameter.
//
// # Internals: how a check and an audit run
//
// Packages: `verify` (CheckRule, Audit, the report types), `internal/simplex` (lattice grids,
// samples, the squares map used by the optimiser) and `generator/payout` (payout formulas).
// `verify/pointcheck` belongs to the point-forecast part. `verify` never imports `presets`: Audit takes
// its candidate rules as `[]verify.Candidate` (Name, Rule, and for a family Param, Value, Lo, Hi,
// At); the command and the workbench build them with `presets.Rules`, whose `NamedRule` has the
// same fields, so `verify.Candidate(r)` converts.
//
//	rep, err := verify.CheckRule(ctx, rule, verify.Settings{Resolution: 200, Progress: fn})
//	a, err := verify.Audit(ctx, pay, cands, verify.Settings{})   // pay from payout.New(src, opts)
//
// How a check runs:
//
//  1. Grid. Every lattice point of resolution K (`simplex.Full`, C(K+n-1, n-1) points) while that
//     is at most `Settings.MaxPoints` (default `MaxFullPoints`: what half the available memory holds); above it, and said so in the grid statement and a note, `simplex.Sample`: the vertices plus
//     `Samples` distinct lattice points from a flat Dirichlet, a quarter of them on random faces.
//     Defaults per n: `DefaultResolution` (1000, 100, 30, 16, 12 for n = 2..6, then a sampled 10n).
//  2. Menu. L(p, k) and H(p) for every grid report, once: G×n floats (`menu`). The beliefs are the
//     same points. Rows with NaN (or both +Inf and −Inf) are set to +Inf for the stream and
//     reported by boundedness.
//  3. Stream. For every belief row the best and second-best report row (`stream`). The reports
//     sit in a tree of boxes holding each box's smallest effort per outcome (prune.go); a box
//     whose bound sum_k q_k lo_k is above the second best so far is skipped whole. The bound is
//     rounded like the pair sums (no fused multiply-adds), so it never exceeds a computed pair
//     value, and ties go to the smaller grid index: the result is bit for bit that of the full
//     stream (`streamFull`, `scan`: every pair, four reports per step), which
//     the tests hold it to (stream for stream, and whole reports against a run visiting every
//     pair). Beliefs go a leaf of the tree at a time (prune_block.go): one walk per block with a
//     bound valid for all its beliefs, then each belief through the candidate boxes, sorted;
//     a narrow leaf also bounds its efforts by a fitted plane plus the least remainder, less a
//     rounding margin (prune_linear.go), which a proper rule's flat slope makes tight.
//     At n = 3, K = 400 it evaluates about 0.5 % of the pairs. No G² memory; a block is at most
//     64 beliefs, so cancellation is seen within 64·G pairs. Beliefs with zero coordinates use
//     `menu.safe` (±Inf replaced by ±1e300, exact in order because 0 × 1e300 = 0; winners'
//     values recomputed with 0·Inf = 0), or `scanSupport` when a finite effort is too large for
//     that. With `Settings.Proof` (a certificate's proof of properness) only what the proof
//     leaves is streamed: boundary beliefs against every report, interior beliefs against the
//     boundary reports (`provedStream`); the verdict is then of kind certified. An audit's
//     off-grid pass (offgrid.go) takes the same blocks of beliefs through a tree of its random
//     reports by the same walk, each belief capped at its honest pay. Every n from 2 to 12
//     has its own pair kernels (`scanN` for the full stream, `leafN` for a leaf; kernels_scan.go
//     and kernels_leaf.go, written by `go generate` from internal/kernelgen): the belief in
//     locals and each sum spelled out in dotN's order, so any n costs about what n = 3 costs
//     per pair and outcome, and the values stay dotN's bit for bit.
//  4. Reductions. T is `Grid.Slack()`: `Tolerance` × `Grid.Scale`, the scale being the spread
//     of the finite efforts or payments on the grid (largest − smallest; 1 when they are all
//     equal), but at least `Grid.Rounding` = 2·n·ε × the largest finite |value|, and in a check
//     at least twice the largest bound on an effort's rounding from the size of the terms its
//     gradient sums (`bregman.Scorer.Rounding`, `formula.Machine.HessianRounding`: p·(1/p − 1)
//     is constant, but its gradient is 1/p − 1 − 1/p). So the rule in
//     millionths and in millions, or with 1e12 added, gets the same verdict (a spread-free
//     max(1, |value|) scale once called `1e-12*p[y]` proper). Concavity uses Tolerance × Scale
//     alone (curvature does not see an added constant), and an eigenvalue within the Frobenius
//     norm of the Hessian's own rounding bound counts as 0. A margin within `Grid.Rounding` is
//     a candidate tie, confirmed along the segment with the same bound. properness: gap = Phi(q, q) − min_p
//     Phi(q, p) from L, must be ≤ T; strict when
//     every other report is worse by more than `StrictFloor`·(Scale + |Phi(q,q)|) (a rounding floor,
//     1e-13, deliberately far below T: near a vertex the closest grid report of a strictly proper
//     rule can be worse by only ~K⁻³). nonnegativity: min_p Phi(q, p) − H(q) ≥ −T. concavity:
//     largest eigenvalue of Uᵀ∇²H U (U a Helmert basis of {v : Σv = 0}, gonum `mat.EigenSym`) ≤ T
//     at every grid point and at max(G, 10000) random interior points (flat Dirichlet, `Seed`):
//     a non-concave band narrower than a grid step is invisible to every grid check, and when
//     only the random points see it the note says so and asks for a finer resolution; and a
//     midpoint test H((a+b)/2) ≥ (H(a)+H(b))/2 − T on 16,000 segments (half between random grid
//     points, half a few grid steps long) for the convex kinks and upward jumps of `if`, `max`
//     and `abs` that no Hessian sees (its Worst is the implied curvature 8·deficit/|b−a|²),
//     strict when < −T at every interior point; a non-finite Hessian on the boundary (log) is
//     counted and left to the pair checks, in the interior it fails. affinity: midpoint tests of
//     Phi in q on sampled triples (relative deviation, against `Tolerance` itself). boundedness:
//     per outcome finite range; +Inf effort at a report that gives the outcome probability 0 is
//     reported ("unbounded on the boundary"), not failed; NaN, infinity in the interior, −Inf
//     effort (an infinite payment) and `Limit` fail.
//  5. Witnesses. Failing concavity, properness and nonnegativity checks (and an audit's gap)
//     are sharpened from the grid witness by Nelder–Mead (gonum `optimize`) in the squares
//     parametrisation p = θ²/|θ|² (reaches faces exactly), confined to the witness's grid cell (half a step each way; unconfined on sampled grids) so
//     that an amount unbounded near a face does not drag the witness onto it;
//     a run counts only when `result.Status` is a convergence or budget status, and a sharpened
//     witness replaces the grid one only if it is worse. On sampled grids Nelder–Mead also
//     searches reports for 200 spread beliefs. Affinity and boundedness keep their grid
//     witnesses.
//  6. Verdict: improper when concavity, properness, nonnegativity or affinity fails; else
//     proper-but-not-strict only with a witness, two different reports that tie (Gneiting &
//     Raftery 2007, Sec. 2), else strictly-proper (strictness.go). A grid pair within the
//     rounding floor is a candidate only; it is confirmed when the exact second derivative of
//     H along the segment between the two vanishes, up to the rounding of its own terms, at 9
//     points (H affine there), so the power rule's 1e-16 differences near a vertex are
//     rounding, not ties. Where the curvature vanishes at an interior point and no pair tied,
//     short segments through it along the flattest directions are tried (a flat piece
//     narrower than a grid step); an isolated zero (-(p - 1/2)^4) leaves the rule strictly
//     proper, with a note. Each check carries `Interior` and
//     `Boundary` parts (by the belief; by the report for boundedness).
//
// Audit runs the same stream on −pay, then pits every grid belief against max(G, 10000) random
// reports, a quarter of them on faces (a payout can hide a jackpot on a band of reports between
// the grid points; only a gain beyond the grid's best by more than T counts, not a tie),
// refines the best report of the 300 worst beliefs by
// Nelder–Mead, searches 200 spread beliefs off the grid, sharpens the largest gap jointly over
// (belief, report), classifies n = 2 misreports (exaggerates / hedges / flips / mixed), keeps
// V(q) = Σ q_k pay(q, k) per belief (`Beliefs[i].Honest`, the implied expected pay), and fits
// pay ≈ shift − scale·L for every candidate by least squares (gonum `stat.LinearRegression`)
// over finite (report, outcome) pairs; accepted when the relative residual is below 1e-6, the
// scale is positive and the infinities coincide; never for an improper payout (an affine image
// of a proper rule is proper, so such a fit only says the two agree on the grid). Accepted fits keep the candidates' order (the
// quadratic and power-3 rules coincide up to scale for n = 2).
//
// Fitted parameters (`verify/identify.go`). A candidate with `At` is a one-parameter family: the
// power rule's g over [0.1, 10] and the pseudospherical a over [1.05, 10] (`Preset.Fit`; g = 1, the
// log limit, is undefined as written and simply scores +Inf). Per family, on at most 400 grid
// reports (every k-th), `fitParam` minimises first the count of report–outcome pairs whose
// infinities differ, then the relative residual (at most 1 with a fitted shift), over the
// parameter, in two stages: located on a coarse sub-lattice of those reports (every 8th, at
// least 40 reports) — 33 values spread geometrically over the range plus the default, then
// Nelder–Mead in that coordinate from the best (the existing `minimise`, gonum `optimize`, ≤ 100
// evaluations; derivative-free because the engine has no derivative in a parameter and takes no
// finite differences) — then polished on all of them by Nelder–Mead (≤ 12 evaluations). An exact
// member's residual is 0 on any subset, so the coarse stage finds its parameter. A stage's value
// is kept only for a convergence or budget status, else the one it started from, and
// `Identification.Status` says which. The chosen member (and every fixed rule) is fitted on the
// subset first: when its infinities already differ there, or its least sum of squared misfits
// (which no fit on more points goes below) exceeds (10 × 1e-6)² times the spread of all the
// grid's finite payments (an upper bound on the spread a whole-grid fit is judged against), the
// whole grid cannot fit to within 1e-5 and that subset fit is reported, its note saying so.
// Otherwise it is fitted on every grid report and judged by the same rule as a fixed one (residual < 1e-6, positive scale,
// matching infinities); `Identification.Param`/`Value` carry it, `WithParam()` phrases it, the
// JSON has `identified.params: {"g": 1.5}`. It finds g and a to about 1e-14 for n = 2..6 (g from
// 0.5 to 8, a from 1.2 to 8); its cost is in BENCHMARKS.md (audit against check).
// Note the power preset's normalisation: its score is (S − 1)/(g − 1) with S Gneiting & Raftery's
// power score, so 5 + 2S is identified with scale 2(g − 1) and shift 7. A log payout also fits
// power with g ≈ 1 (the limit), which the "also fits" note says.
//
// Progress: one goroutine calls `Settings.Progress` about ten times a second (never
// concurrently) with a `pool.Step` in `pool.UnitWork`, and once with Done = Total and Last at
// the end. The command prints it on stderr only
// when stderr is a terminal; Ctrl-C cancels through the context.
//
// Tests (`verify/verify_test.go`): the hand-derived values are in comments beside each case
// (linear payout gap 1/8 at (3/4, 1/4) and 1/6 for n = 3; h = p² − 4(p − ½)⁴ not concave on
// (0.2959, 0.7041); the flat piece of min(p1 p2, 0.16) on [0.2, 0.8]; 7 − 3L identified;
// power-3 flat on the boundary). Kernel tests compare the generated loops (n = 2..12) and the substituted
// rows with the obvious loops, and check zero allocation. `.ci/e2e-verify.sh` runs both
// commands as a user would and checks exit statuses and the JSON fields of the contract.
package verify
