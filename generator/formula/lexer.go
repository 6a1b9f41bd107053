package formula

import (
	"strconv"
	"unicode"
	"unicode/utf8"
)

// tokenKind classifies a token.
type tokenKind int

const (
	tokEOF tokenKind = iota
	tokNewline
	tokNumber
	tokIdent
	tokOp // one of + - * / ^ ( ) [ ] , = < <= > >=
	tokBad
)

type token struct {
	kind tokenKind
	text string
	num  float64
	pos  Pos
}

// describe names a token the way an error message should show it.
func (t token) describe() string {
	switch t.kind {
	case tokEOF:
		return "end of formula"
	case tokNewline:
		return "end of line"
	case tokNumber:
		return "number " + t.text
	case tokIdent:
		return "name " + strconv.Quote(t.text)
	case tokBad:
		return "character " + strconv.Quote(t.text)
	}
	return strconv.Quote(t.text)
}

// lex splits src into tokens. It never fails: an unknown character becomes
// a tokBad token, which the parser reports with its position.
func lex(src string) ([]token, *Error) {
	l := &lexer{src: src, line: 1, col: 1}
	for l.i < len(src) {
		r, size := utf8.DecodeRuneInString(src[l.i:])
		start := Pos{l.line, l.col}
		var err *Error
		switch {
		case r == '\n':
			l.toks = append(l.toks, token{kind: tokNewline, text: "\n", pos: start})
			l.i += size
			l.line++
			l.col = 1
		case r == '#':
			err = l.comment()
		case unicode.IsSpace(r):
			l.i += size
			l.col++
		case r >= '0' && r <= '9' || r == '.':
			err = l.number(start)
		case r == '_' || r < utf8.RuneSelf && unicode.IsLetter(r):
			l.name(start)
		default:
			err = l.op(r, size, start)
		}
		if err != nil {
			return nil, err
		}
	}
	l.toks = append(l.toks, token{kind: tokEOF, pos: Pos{l.line, l.col}})
	return l.toks, nil
}

// lexer is the state of lex: the source, the byte offset i and the
// position of the rune there, and the tokens so far.
type lexer struct {
	src       string
	i         int
	line, col int
	toks      []token
}

// comment skips a comment to the end of its line. A comment is echoed in
// annexes and on terminals, so a control character in it is refused.
func (l *lexer) comment() *Error {
	for l.i < len(l.src) && l.src[l.i] != '\n' {
		c, s := utf8.DecodeRuneInString(l.src[l.i:])
		if c != '\t' && c != '\r' && unicode.IsControl(c) {
			return newError(l.src, Pos{l.line, l.col}, "control character %U in a comment", c)
		}
		l.i += s
		l.col++
	}
	return nil
}

// number reads the number starting at start.
func (l *lexer) number(start Pos) *Error {
	j := scanNumber(l.src, l.i)
	text := l.src[l.i:j]
	v, err := strconv.ParseFloat(text, 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return newError(l.src, start, "number %s is out of range", text)
		}
		return newError(l.src, start, "malformed number %q", text)
	}
	l.toks = append(l.toks, token{kind: tokNumber, text: text, num: v, pos: start})
	l.col += j - l.i
	l.i = j
	return nil
}

// name reads the name starting at start: ASCII letters, digits and _.
func (l *lexer) name(start Pos) {
	j := l.i
	for j < len(l.src) {
		c := l.src[j]
		if c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' {
			j++
			continue
		}
		break
	}
	l.toks = append(l.toks, token{kind: tokIdent, text: l.src[l.i:j], pos: start})
	l.col += j - l.i
	l.i = j
}

// op reads the operator or punctuation r (size bytes) at start; any other
// rune becomes a bad token for the parser to name.
func (l *lexer) op(r rune, size int, start Pos) *Error {
	src, i := l.src, l.i
	switch r {
	case '<', '>':
		if i+1 < len(src) && src[i+1] == '=' {
			l.toks = append(l.toks, token{kind: tokOp, text: src[i : i+2], pos: start})
			l.i += 2
			l.col += 2
			return nil
		}
		l.toks = append(l.toks, token{kind: tokOp, text: string(r), pos: start})
	case '+', '-', '*', '/', '^', '(', ')', '[', ']', ',':
		l.toks = append(l.toks, token{kind: tokOp, text: string(r), pos: start})
	case '=':
		if i+1 < len(src) && src[i+1] == '=' {
			return newError(src, start, "\"==\" is not part of the language; compare with <, <=, > or >= inside if(...)")
		}
		l.toks = append(l.toks, token{kind: tokOp, text: "=", pos: start})
	default:
		l.toks = append(l.toks, token{kind: tokBad, text: string(r), pos: start})
	}
	l.i += size
	l.col++
	return nil
}

// scanNumber returns the end of the number starting at i: digits, an
// optional fraction and an optional exponent (1e-3, 2.5E+4).
func scanNumber(src string, i int) int {
	j := i
	digits := func() {
		for j < len(src) && src[j] >= '0' && src[j] <= '9' {
			j++
		}
	}
	digits()
	if j < len(src) && src[j] == '.' {
		j++
		digits()
	}
	if j < len(src) && (src[j] == 'e' || src[j] == 'E') {
		k := j + 1
		if k < len(src) && (src[k] == '+' || src[k] == '-') {
			k++
		}
		if k < len(src) && src[k] >= '0' && src[k] <= '9' {
			j = k
			digits()
		}
	}
	return j
}
