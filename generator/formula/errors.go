package formula

import (
	"fmt"
	"strings"
	"unicode"
)

// Pos is a position in a formula's source: 1-based line and column
// (columns count runes, so a caret lines up under multi-byte text).
type Pos struct {
	Line, Col int
}

// String writes the position as line:col.
func (p Pos) String() string { return fmt.Sprintf("%d:%d", p.Line, p.Col) }

// Error is a problem found in a formula, with the place it was found.
type Error struct {
	Pos Pos
	// Msg says what is wrong, in the form "expected X, found Y" where that fits.
	Msg string
	// Line is the text of the source line the error is on, for the caret display.
	Line string
}

// Error returns "line:col: message".
func (e *Error) Error() string { return e.Pos.String() + ": " + e.Msg }

// Caret returns the offending source line with a caret under the column
// of the error, ready to print beneath the formula.
func (e *Error) Caret() string {
	col := e.Pos.Col - 1
	if col < 0 {
		col = 0
	}
	var b strings.Builder
	b.WriteString(e.Line)
	b.WriteByte('\n')
	// Reproduce tabs so the caret lines up on a terminal.
	n := 0
	for _, r := range e.Line {
		if n >= col {
			break
		}
		if r == '\t' {
			b.WriteByte('\t')
		} else {
			b.WriteByte(' ')
		}
		n++
	}
	for ; n < col; n++ {
		b.WriteByte(' ')
	}
	b.WriteByte('^')
	return b.String()
}

func sourceLine(src string, line int) string {
	lines := strings.Split(src, "\n")
	if line >= 1 && line <= len(lines) {
		// The line is printed under an error message: a control character
		// in it (an escape sequence, say) is shown as "?", one column
		// wide, so the caret still lines up and the terminal is not driven.
		return strings.Map(func(r rune) rune {
			if r != '\t' && unicode.IsControl(r) {
				return '?'
			}
			return r
		}, strings.TrimRight(lines[line-1], "\r"))
	}
	return ""
}

func newError(src string, pos Pos, format string, args ...any) *Error {
	return &Error{Pos: pos, Msg: fmt.Sprintf(format, args...), Line: sourceLine(src, pos.Line)}
}
