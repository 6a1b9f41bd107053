package formula

// opcode is one instruction of a compiled program.
type opcode uint8

const (
	opConst  opcode = iota // k
	opVar                  // vars[a]
	opAdd                  // a + b
	opSub                  // a - b
	opMul                  // a * b, with 0 * ±Inf = 0
	opDiv                  // a / b
	opNeg                  // -a
	opSq                   // a * a
	opPowK                 // a ^ k, k constant
	opPowB                 // k ^ a, k constant base
	opPow                  // a ^ b
	opExp                  // exp(a)
	opLn                   // ln(a)
	opSqrt                 // sqrt(a)
	opAbs                  // |a|
	opMin                  // min(a, b)
	opMax                  // max(a, b)
	opLt                   // a < b  (1 or 0)
	opLe                   // a <= b
	opGt                   // a > b
	opGe                   // a >= b
	opSelect               // c != 0 ? a : b
)

var opNames = [...]string{"const", "var", "add", "sub", "mul", "div", "neg", "sq", "powk", "powb", "pow", "exp", "ln", "sqrt", "abs", "min", "max", "lt", "le", "gt", "ge", "select"}

func (o opcode) String() string { return opNames[o] }

// unary reports operations that read only operand a.
func (o opcode) unary() bool {
	switch o {
	case opNeg, opSq, opPowK, opPowB, opExp, opLn, opSqrt, opAbs:
		return true
	}
	return false
}

// instr writes slot i (its index in the program) from earlier slots a, b, c.
type instr struct {
	op      opcode
	a, b, c int32
	k       float64
}

// Program is a compiled formula: a straight-line list of instructions in
// static single assignment form. A Program is immutable and safe to share
// between goroutines; each goroutine evaluates it with its own Machine.
type Program struct {
	code     []instr
	out      int32
	varNames []string
	params   []ParamValue
}

// ParamValue is a parameter's name and the value the program was compiled with.
type ParamValue struct {
	Name  string
	Value float64
}

// NumVars is the number of variables the program reads: p1..pn followed by
// the scope's extra variables.
func (p *Program) NumVars() int { return len(p.varNames) }

// VarNames lists the variables in the order Machine methods expect them.
func (p *Program) VarNames() []string { return append([]string(nil), p.varNames...) }

// Params lists the parameters in source order with the values used.
func (p *Program) Params() []ParamValue { return append([]ParamValue(nil), p.params...) }

// Len is the number of instructions, a measure of evaluation cost.
func (p *Program) Len() int { return len(p.code) }

// IsConstant reports whether the program's value does not depend on any
// variable; its value is then Constant().
func (p *Program) IsConstant() bool { return p.code[p.out].op == opConst }

// Constant returns the program's value when IsConstant is true.
func (p *Program) Constant() float64 { return p.code[p.out].k }
