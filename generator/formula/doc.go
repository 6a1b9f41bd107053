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
package formula
