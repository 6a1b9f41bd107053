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
	opXLnX                 // a * ln(a), with 0 ln 0 = 0: the entropy term, fused
)

var opNames = [...]string{"const", "var", "add", "sub", "mul", "div", "neg", "sq", "powk", "powb", "pow", "exp", "ln", "sqrt", "abs", "min", "max", "lt", "le", "gt", "ge", "select", "xlnx"}

func (o opcode) String() string { return opNames[o] }

// unary reports operations that read only operand a.
func (o opcode) unary() bool {
	switch o {
	case opNeg, opSq, opPowK, opPowB, opExp, opLn, opSqrt, opAbs, opXLnX:
		return true
	}
	return false
}

// instr computes one slot from earlier slots a, b, c.
type instr struct {
	op      opcode
	a, b, c int32
	k       float64
}

// Program is a compiled formula: a straight-line list of instructions in
// static single assignment form. Slots are laid out as variables first,
// then constants, then one slot per instruction, so variables and constants
// cost nothing to evaluate. A Program is immutable and safe to share
// between goroutines; each goroutine evaluates it with its own Machine.
type Program struct {
	consts   []float64
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

// base is the first instruction slot.
func (p *Program) base() int { return len(p.varNames) + len(p.consts) }

// IsConstant reports whether the program's value does not depend on any
// variable; its value is then Constant().
func (p *Program) IsConstant() bool {
	nv := int32(len(p.varNames))
	return p.out >= nv && p.out < int32(p.base())
}

// Constant returns the program's value when IsConstant is true.
func (p *Program) Constant() float64 { return p.consts[int(p.out)-len(p.varNames)] }

// link lays out the compiler's SSA list as a Program: variables, then the
// constants the result depends on, then the live instructions, renumbering
// operands. Instructions the result does not depend on (constants left
// over from folding, subscripts, parameter values) are dropped.
func link(code []instr, out int32, varNames []string) *Program {
	live := make([]bool, len(code))
	live[out] = true
	for i := int(out); i >= 0; i-- {
		if !live[i] {
			continue
		}
		switch in := code[i]; {
		case in.op == opConst || in.op == opVar:
		case in.op.unary():
			live[in.a] = true
		case in.op == opSelect:
			live[in.a], live[in.b], live[in.c] = true, true, true
		default:
			live[in.a], live[in.b] = true, true
		}
	}
	nv := int32(len(varNames))
	p := &Program{varNames: varNames}
	slot := make([]int32, len(code))
	for i, in := range code {
		if live[i] && in.op == opConst {
			slot[i] = nv + int32(len(p.consts))
			p.consts = append(p.consts, in.k)
		}
	}
	base := nv + int32(len(p.consts))
	for i, in := range code {
		if !live[i] {
			continue
		}
		switch {
		case in.op == opConst:
			continue
		case in.op == opVar:
			slot[i] = in.a
			continue
		case in.op.unary():
			in.a, in.b = slot[in.a], 0
		case in.op == opSelect:
			in.a, in.b, in.c = slot[in.a], slot[in.b], slot[in.c]
		default:
			in.a, in.b = slot[in.a], slot[in.b]
		}
		slot[i] = base + int32(len(p.code))
		p.code = append(p.code, in)
	}
	p.out = slot[out]
	return p
}
