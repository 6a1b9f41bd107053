// Package history reads a forecast history: one forecast per record,
// naming the forecaster, the question, the outcome that happened and the
// probability the forecaster gave each outcome, with an optional date.
// Histories come as CSV, as JSON lines (one object per line, keyed like
// the CSV header) or as a sheet of an XLSX workbook; the three give the
// same rows and name bad records by the same line (row) numbers.
//
// The reader streams. It keeps one record in memory, reuses it for the
// next row and allocates at most one string per row (quote-free lines, the
// usual ones, share one string per block of lines), so a file of any
// length is read in constant memory. Every read is
// bounded: a field over MaxFieldBytes or a record over MaxRecordBytes is
// an error that ends the reading (it is not data), and a quoted field that
// runs across lines is named with the span of lines it covers, so that a
// missing closing quote can never swallow rows without a word. Rows that
// are not a valid forecast are reported with their line and a reason, and
// the caller decides whether to skip them or stop.
package history
