package formula

// Node is an expression in the tree. Every node keeps the position of the
// token it started at, for error messages found after parsing.
type Node interface {
	Pos() Pos
}

// Num is a number literal.
type Num struct {
	At    Pos
	Value float64
}

// Ident is a bare name: a variable, constant or parameter.
type Ident struct {
	At   Pos
	Name string
}

// Index is a subscripted name, as in p[y] or p[2].
type Index struct {
	At    Pos
	Name  string
	Index Node
}

// Unary is a prefix minus or plus.
type Unary struct {
	At Pos
	Op string
	X  Node
}

// Binary is an infix operation: + - * / ^ < <= > >=.
type Binary struct {
	At   Pos
	Op   string
	X, Y Node
}

// Call is a function application such as ln(p) or sum(p^2).
type Call struct {
	At   Pos
	Func string
	Args []Node
}

// Pos returns where the literal starts.
func (n *Num) Pos() Pos { return n.At }

// Pos returns where the name starts.
func (n *Ident) Pos() Pos { return n.At }

// Pos returns where the subscripted name starts.
func (n *Index) Pos() Pos { return n.At }

// Pos returns where the operator is.
func (n *Unary) Pos() Pos { return n.At }

// Pos returns where the operator is.
func (n *Binary) Pos() Pos { return n.At }

// Pos returns where the function name starts.
func (n *Call) Pos() Pos { return n.At }

// Param is a parameter line, name = value.
type Param struct {
	At    Pos
	Name  string
	Value Node
}

// File is a parsed formula: its parameter lines, in order, and its expression.
type File struct {
	Source string
	Params []Param
	Expr   Node
}

// SplitConstant returns n without the number literals among the terms of
// its outermost sum, and their signed sum c: for "1e12 + 1 - sum(p^2)"
// the tree of "-sum(p^2)" and 1000000000001, and the tree 0 when every
// term is a literal. n = rest + c, and rest has n's derivatives. Scoring rules built
// from a generator use it so that a large constant, which the budget fit
// takes away again, cannot cost the digits that pay depends on.
func SplitConstant(n Node) (rest Node, c float64) {
	var terms []Node
	var signs []bool // true for a term subtracted
	var walk func(n Node, neg bool)
	walk = func(n Node, neg bool) {
		switch t := n.(type) {
		case *Binary:
			if t.Op == "+" || t.Op == "-" {
				walk(t.X, neg)
				walk(t.Y, neg != (t.Op == "-"))
				return
			}
		case *Unary:
			walk(t.X, neg != (t.Op == "-"))
			return
		case *Num:
			if neg {
				c -= t.Value
			} else {
				c += t.Value
			}
			return
		}
		terms, signs = append(terms, n), append(signs, neg)
	}
	walk(n, false)
	if len(terms) == 0 {
		return &Num{At: n.Pos()}, c
	}
	var out Node
	for i, t := range terms {
		switch {
		case i == 0 && signs[i]:
			out = &Unary{At: t.Pos(), Op: "-", X: t}
		case i == 0:
			out = t
		case signs[i]:
			out = &Binary{At: t.Pos(), Op: "-", X: out, Y: t}
		default:
			out = &Binary{At: t.Pos(), Op: "+", X: out, Y: t}
		}
	}
	return out, c
}

// Uses reports whether the expression of f names name anywhere, as a bare
// name or subscripted (w or w[2]); parameter values are not looked at.
func (f *File) Uses(name string) bool {
	var walk func(n Node) bool
	walk = func(n Node) bool {
		switch t := n.(type) {
		case *Ident:
			return t.Name == name
		case *Index:
			return t.Name == name || walk(t.Index)
		case *Unary:
			return walk(t.X)
		case *Binary:
			return walk(t.X) || walk(t.Y)
		case *Call:
			for _, a := range t.Args {
				if walk(a) {
					return true
				}
			}
		}
		return false
	}
	return f.Expr != nil && walk(f.Expr)
}
