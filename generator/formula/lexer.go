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
	var toks []token
	line, col := 1, 1
	i := 0
	for i < len(src) {
		r, size := utf8.DecodeRuneInString(src[i:])
		start := Pos{line, col}
		switch {
		case r == '\n':
			toks = append(toks, token{kind: tokNewline, text: "\n", pos: start})
			i += size
			line++
			col = 1
			continue
		case r == '#':
			for i < len(src) && src[i] != '\n' {
				c, s := utf8.DecodeRuneInString(src[i:])
				if c != '\t' && c != '\r' && unicode.IsControl(c) {
					// A comment is echoed in annexes and on terminals.
					return nil, newError(src, Pos{line, col}, "control character %U in a comment", c)
				}
				i += s
				col++
			}
			continue
		case unicode.IsSpace(r):
			i += size
			col++
			continue
		case r >= '0' && r <= '9' || r == '.':
			j := scanNumber(src, i)
			text := src[i:j]
			v, err := strconv.ParseFloat(text, 64)
			if err != nil {
				if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
					return nil, newError(src, start, "number %s is out of range", text)
				}
				return nil, newError(src, start, "malformed number %q", text)
			}
			toks = append(toks, token{kind: tokNumber, text: text, num: v, pos: start})
			col += j - i
			i = j
			continue
		case r == '_' || r < utf8.RuneSelf && unicode.IsLetter(r):
			j := i
			for j < len(src) {
				c := src[j]
				if c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' {
					j++
					continue
				}
				break
			}
			toks = append(toks, token{kind: tokIdent, text: src[i:j], pos: start})
			col += j - i
			i = j
			continue
		}
		switch r {
		case '<', '>':
			if i+1 < len(src) && src[i+1] == '=' {
				toks = append(toks, token{kind: tokOp, text: src[i : i+2], pos: start})
				i += 2
				col += 2
				continue
			}
			fallthrough
		case '+', '-', '*', '/', '^', '(', ')', '[', ']', ',':
			toks = append(toks, token{kind: tokOp, text: string(r), pos: start})
		case '=':
			if i+1 < len(src) && src[i+1] == '=' {
				return nil, newError(src, start, "\"==\" is not part of the language; compare with <, <=, > or >= inside if(...)")
			}
			toks = append(toks, token{kind: tokOp, text: "=", pos: start})
		default:
			toks = append(toks, token{kind: tokBad, text: string(r), pos: start})
		}
		i += size
		col++
	}
	toks = append(toks, token{kind: tokEOF, pos: Pos{line, col}})
	return toks, nil
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
