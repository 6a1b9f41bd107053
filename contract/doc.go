// Package contract is the money side of a scoring rule: the packages
// below it turn a proper rule into something two parties can sign and
// settle.
//
//   - budget: the report menu, the fit pay = A - B·L to a floor and a cap
//     (or a mean pay), report floors and clamps, currency rounding, and the
//     re-check that honesty survived the rounding
//   - table: the payment table and its exports (CSV, Markdown, JSON,
//     LaTeX, figures)
//   - lottery: a bounded table as drawable chances of a fixed prize
//   - annex, payform, cost: the annex document, closed pay formulas, and
//     what a season of forecasts costs
//   - backtest: paying a history of forecasts under one or two rules
//   - risk: what a risk-averse forecaster reports under a fitted table
//   - research: what paying for research is worth
//
// Most callers reach these through the root package scorewright
// (Rule.Table, Rule.Export, Table.Lottery), which picks the table kind the
// design's mode calls for.
package contract
