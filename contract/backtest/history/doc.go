// Package history reads a forecast history: a CSV file with one forecast
// per row, naming the forecaster, the question, the outcome that happened
// and the probability the forecaster gave each outcome.
//
// The reader streams. It keeps one record in memory, reuses it for the
// next row and allocates nothing per row beyond what encoding/csv itself
// does (one string per record), so a file of any length is read in
// constant memory. Rows that are not a valid forecast are reported with
// their line number and a reason, and the caller decides whether to skip
// them or stop.
package history
