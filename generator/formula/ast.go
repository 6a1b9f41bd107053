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
