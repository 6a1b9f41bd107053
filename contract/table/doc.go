// Package table holds a finished payment table — one row per report on the
// menu, one value per outcome — together with the record that must travel
// with it (formula, fit, rounding, the re-check verdict, tool version,
// date and the caution), and writes it as CSV, Markdown, JSON, a LaTeX
// tabular, or a figure (SVG, PNG, PDF).
//
// The package does no mathematics: contract/budget computes the numbers
// and fills a Table. Values carry a Kind, so a later transform (for
// example turning money into the chance of winning a fixed prize) can
// replace the values, relabel the columns and add its own caution line,
// and every format follows without change.
package table
