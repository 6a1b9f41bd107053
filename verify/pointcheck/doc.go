// Package pointcheck checks point-forecast rules for a mean on a grid: a
// generator phi(x) on [lo, hi] (concavity, non-negativity of the effort,
// affinity of the expected-effort line in the outcome, and that the mean
// is the best report), and somebody's payout pay(x, y) under audit (is the
// mean the best report, and by how much does it fail?).
//
// The best-report checks use every two-point distribution on the outcome
// grid (five weightings each) and three-point distributions on a coarser
// sub-grid; reports range over a grid four times finer than the outcomes,
// plus the mean itself. A grid check is evidence, not proof: every report
// states its grid, resolution and tolerance.
//
// The findings are verify's types (verify.Report, verify.Grid with the
// interval, a verify.CheckResult per check), so the front ends read a
// point check as they read any other; only the audit's honesty gap over
// distributions on the interval and its identification are this
// package's own. The JSON shapes are the command's.
package pointcheck
