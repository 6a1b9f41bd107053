package formula

import (
	"fmt"
	"strings"
)

// Parse reads a formula: zero or more parameter lines (name = value) and then
// one expression, which may span several lines. Blank lines and # comments
// are allowed anywhere. The first problem found is returned as an *Error.
func Parse(src string) (file *File, err error) {
	if len(src) > MaxSource {
		// Checked before lexing: a formula of megabytes would otherwise
		// cost hundreds of bytes of tokens and tree per byte of text.
		return nil, &Error{Pos: Pos{1, 1}, Msg: fmt.Sprintf("formula is %d bytes long; a formula may be at most %d bytes (64 KiB)", len(src), MaxSource)}
	}
	toks, lerr := lex(src)
	if lerr != nil {
		return nil, lerr
	}
	p := &parser{src: src, toks: toks}
	// A parser bug must not crash the caller; report it as an error at the
	// current token instead.
	defer func() {
		if r := recover(); r != nil {
			if e, ok := r.(*Error); ok {
				file, err = nil, e
				return
			}
			file, err = nil, newError(src, p.peek().pos, "internal parser error: %v", r)
		}
	}()
	return p.parseFile(), nil
}

type parser struct {
	src  string
	toks []token
	i    int
	// depth guards against stack exhaustion on pathological nesting.
	depth int
}

// maxDepth bounds every recursion of the parser: parentheses, subscripts,
// call arguments, signs and each "^" of a chain all count a level.
const maxDepth = 200

// MaxSource is the longest formula text the language accepts, in bytes.
// It is far beyond any scoring rule a person writes, and it bounds the
// memory and time of parsing and compiling.
const MaxSource = 64 << 10

// deeper counts one level of recursion at t and fails past maxDepth.
func (p *parser) deeper(t token) {
	p.depth++
	if p.depth > maxDepth {
		p.fail(t, "formula is nested too deeply (more than %d levels)", maxDepth)
	}
}

func (p *parser) peek() token { return p.toks[p.i] }

func (p *parser) next() token {
	t := p.toks[p.i]
	if t.kind != tokEOF {
		p.i++
	}
	return t
}

func (p *parser) fail(t token, format string, args ...any) {
	panic(newError(p.src, t.pos, format, args...))
}

func (p *parser) skipNewlines() {
	for p.peek().kind == tokNewline {
		p.next()
	}
}

// peekExpr returns the next token of an expression, where line breaks are
// insignificant.
func (p *parser) peekExpr() token {
	p.skipNewlines()
	return p.peek()
}

func (p *parser) isOp(t token, ops ...string) bool {
	if t.kind != tokOp {
		return false
	}
	for _, o := range ops {
		if t.text == o {
			return true
		}
	}
	return false
}

func (p *parser) expectOp(op string, what string) token {
	t := p.peekExpr()
	if !p.isOp(t, op) {
		p.fail(t, "expected %s, found %s", what, t.describe())
	}
	return p.next()
}

// file = { newline } { param newline { newline } } expr { newline } EOF
// param = IDENT "=" expr
func (p *parser) parseFile() *File {
	f := &File{Source: src(p)}
	for {
		p.skipNewlines()
		t := p.peek()
		if t.kind == tokEOF {
			if len(f.Params) > 0 {
				p.fail(t, "expected an expression after the parameter lines, found end of formula")
			}
			p.fail(t, "expected an expression, found end of formula")
		}
		if t.kind == tokIdent && p.toks[p.i+1].kind == tokOp && p.toks[p.i+1].text == "=" {
			p.next()
			p.next()
			for _, q := range f.Params {
				if q.Name == t.text {
					p.fail(t, "parameter %q is set twice (first at %s)", t.text, q.At)
				}
			}
			val := p.parseLineExpr()
			f.Params = append(f.Params, Param{At: t.pos, Name: t.text, Value: val})
			end := p.peek()
			if end.kind != tokNewline && end.kind != tokEOF {
				p.fail(end, "expected end of line after the value of %q, found %s", t.text, end.describe())
			}
			continue
		}
		f.Expr = p.parseExpr()
		t = p.peekExpr()
		if t.kind != tokEOF {
			if t.kind == tokIdent && p.isOp(p.toks[p.i+1], "=") {
				p.fail(p.toks[p.i+1], "expected an operator or end of formula, found \"=\" (parameter lines must come before the expression)")
			}
			if p.isOp(t, "=") {
				p.fail(t, "expected an operator or end of formula, found \"=\" (parameter lines must come before the expression)")
			}
			p.fail(t, "expected an operator or end of formula, found %s", t.describe())
		}
		return f
	}
}

func src(p *parser) string { return p.src }

// parseLineExpr parses a parameter value, which must stay on its line.
func (p *parser) parseLineExpr() Node {
	// Parameter values are short; parse them with newlines significant by
	// cutting the token stream at the end of the line.
	end := p.i
	for end < len(p.toks) && p.toks[end].kind != tokNewline && p.toks[end].kind != tokEOF {
		end++
	}
	if end == p.i {
		p.fail(p.peek(), "expected a value after \"=\", found %s", p.peek().describe())
	}
	saved := p.toks
	line := make([]token, 0, end-p.i+1)
	line = append(line, saved[p.i:end]...)
	line = append(line, token{kind: tokEOF, pos: saved[end].pos})
	sub := &parser{src: p.src, toks: line}
	n := sub.parseExpr()
	if t := sub.peek(); t.kind != tokEOF {
		sub.fail(t, "expected end of line after the parameter value, found %s", t.describe())
	}
	p.i = end
	return n
}

// expr = additive [ ("<" | "<=" | ">" | ">=") additive ]
func (p *parser) parseExpr() Node {
	p.deeper(p.peekExpr())
	defer func() { p.depth-- }()
	x := p.parseAdditive()
	if t := p.peekExpr(); p.isOp(t, "<", "<=", ">", ">=") {
		p.next()
		y := p.parseAdditive()
		x = &Binary{At: t.pos, Op: t.text, X: x, Y: y}
		if t2 := p.peekExpr(); p.isOp(t2, "<", "<=", ">", ">=") {
			p.fail(t2, "comparisons cannot be chained; use parentheses or if(...)")
		}
	}
	return x
}

// additive = term { ("+" | "-") term }
func (p *parser) parseAdditive() Node {
	x := p.parseTerm()
	for {
		t := p.peekExpr()
		if !p.isOp(t, "+", "-") {
			return x
		}
		p.next()
		x = &Binary{At: t.pos, Op: t.text, X: x, Y: p.parseTerm()}
	}
}

// term = unary { ("*" | "/") unary }
func (p *parser) parseTerm() Node {
	x := p.parseUnary()
	for {
		t := p.peekExpr()
		if !p.isOp(t, "*", "/") {
			return x
		}
		p.next()
		x = &Binary{At: t.pos, Op: t.text, X: x, Y: p.parseUnary()}
	}
}

// unary = ("-" | "+") unary | power
func (p *parser) parseUnary() Node {
	t := p.peekExpr()
	if p.isOp(t, "-", "+") {
		p.next()
		p.deeper(t)
		defer func() { p.depth-- }()
		return &Unary{At: t.pos, Op: t.text, X: p.parseUnary()}
	}
	return p.parsePower()
}

// power = postfix [ "^" unary ]   (right-associative; binds tighter than a
// leading minus, so -p^2 is -(p^2), while 2^-1 is allowed)
func (p *parser) parsePower() Node {
	x := p.parsePostfix()
	if t := p.peekExpr(); p.isOp(t, "^") {
		p.next()
		// The exponent recurses through parseUnary with no sign, so a
		// chain p^p^...^2 must count here or it exhausts the stack.
		p.deeper(t)
		defer func() { p.depth-- }()
		return &Binary{At: t.pos, Op: "^", X: x, Y: p.parseUnary()}
	}
	return x
}

// postfix = primary [ "[" expr "]" ]   (only a bare name can be subscripted)
func (p *parser) parsePostfix() Node {
	x := p.parsePrimary()
	if t := p.peekExpr(); p.isOp(t, "[") {
		id, ok := x.(*Ident)
		if !ok {
			p.fail(t, "only a name can be subscripted, as in p[y]")
		}
		p.next()
		idx := p.parseExpr()
		p.expectOp("]", "\"]\" to close the subscript")
		return &Index{At: id.At, Name: id.Name, Index: idx}
	}
	return x
}

// primary = NUMBER | IDENT | IDENT "(" [ expr { "," expr } ] ")" | "(" expr ")"
func (p *parser) parsePrimary() Node {
	t := p.peekExpr()
	switch t.kind {
	case tokNumber:
		p.next()
		return &Num{At: t.pos, Value: t.num}
	case tokIdent:
		p.next()
		if nt := p.peek(); p.isOp(nt, "(") {
			p.next()
			c := &Call{At: t.pos, Func: t.text}
			if !p.isOp(p.peekExpr(), ")") {
				for {
					c.Args = append(c.Args, p.parseExpr())
					nt := p.peekExpr()
					if p.isOp(nt, ",") {
						p.next()
						continue
					}
					if !p.isOp(nt, ")") {
						p.fail(nt, "expected \",\" or \")\" in the arguments of %s, found %s", t.text, nt.describe())
					}
					break
				}
			}
			p.next()
			return c
		}
		return &Ident{At: t.pos, Name: t.text}
	case tokOp:
		if t.text == "(" {
			p.next()
			x := p.parseExpr()
			p.expectOp(")", "\")\"")
			return x
		}
	case tokBad:
		p.fail(t, "unexpected %s", t.describe())
	}
	p.fail(t, "expected a number, name or \"(\", found %s", t.describe())
	return nil
}

// String renders a tree back to text with full parentheses; used by tests
// and for showing how a formula was read.
func String(n Node) string {
	var b strings.Builder
	writeNode(&b, n)
	return b.String()
}

func writeNode(b *strings.Builder, n Node) {
	switch n := n.(type) {
	case *Num:
		fmt.Fprintf(b, "%g", n.Value)
	case *Ident:
		b.WriteString(n.Name)
	case *Index:
		b.WriteString(n.Name)
		b.WriteByte('[')
		writeNode(b, n.Index)
		b.WriteByte(']')
	case *Unary:
		b.WriteString("(" + n.Op)
		writeNode(b, n.X)
		b.WriteByte(')')
	case *Binary:
		b.WriteByte('(')
		writeNode(b, n.X)
		b.WriteString(" " + n.Op + " ")
		writeNode(b, n.Y)
		b.WriteByte(')')
	case *Call:
		b.WriteString(n.Func + "(")
		for i, a := range n.Args {
			if i > 0 {
				b.WriteString(", ")
			}
			writeNode(b, a)
		}
		b.WriteByte(')')
	}
}
