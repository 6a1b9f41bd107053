// Package formula is scorewright's formula language: a small lexer, a
// recursive-descent parser that produces a tree, and a compiler that turns
// the tree into an instruction list evaluated by a Machine with exact first
// and second derivatives.
//
// The three stages are kept apart so each can be tested alone:
//
//	Parse(src)            -> *File   (parameters and one expression, positions kept)
//	Compile(file, scope)  -> *Program (names resolved, sums unrolled, constants folded)
//	program.NewMachine()  -> *Machine (value, reverse-mode gradient, forward-mode Hessian)
//
// Arithmetic follows IEEE 754 with one documented exception: a product in
// which one factor is 0 and the other is ±Inf is 0, the limit convention that
// makes 0·ln 0 = 0 in entropies. NaN stays NaN.
//
// Besides the school functions (ln, log, log2, log10, exp, sqrt, abs, min,
// max, if) the language has expm1(x) = e^x - 1 and log1p(x) = ln(1 + x),
// which keep full precision for small x where the plain forms cancel; a
// formula near a limit (the power family near g = 1) is written with them.
package formula
