package formula

// opcode is one instruction of a compiled program.
type opcode uint8

const (
	opConst    opcode = iota // k
	opVar                    // vars[a]
	opAdd                    // a + b
	opSub                    // a - b
	opMul                    // a * b, with 0 * ±Inf = 0
	opDiv                    // a / b
	opNeg                    // -a
	opSq                     // a * a
	opPowK                   // a ^ k, k constant
	opPowB                   // k ^ a, k constant base
	opPow                    // a ^ b
	opExp                    // exp(a)
	opLn                     // ln(a)
	opSqrt                   // sqrt(a)
	opAbs                    // |a|
	opMin                    // min(a, b)
	opMax                    // max(a, b)
	opLt                     // a < b  (1 or 0)
	opLe                     // a <= b
	opGt                     // a > b
	opGe                     // a >= b
	opSelect                 // c != 0 ? a : b
	opXLnX                   // a * ln(a), with 0 ln 0 = 0: the entropy term, fused
	opVConst                 // a vector constant (compiler only)
	opVSum                   // the sum of the lanes of vector a
	opCumsum                 // lanes k = a_1 + ... + a_k of vector a
	opVSumSq                 // the sum of the squares of the lanes of a
	opVSumXLnX               // the sum of a ln a over the lanes of a
	opExpm1                  // exp(a) - 1, accurate for small a
	opLog1p                  // ln(1 + a), accurate for small a
)

var opNames = [...]string{"const", "var", "add", "sub", "mul", "div", "neg", "sq", "powk", "powb", "pow", "exp", "ln", "sqrt", "abs", "min", "max", "lt", "le", "gt", "ge", "select", "xlnx", "vconst", "vsum", "cumsum", "vsumsq", "vsumxlnx", "expm1", "log1p"}

func (o opcode) String() string { return opNames[o] }

// unary reports operations that read only operand a.
func (o opcode) unary() bool {
	switch o {
	case opNeg, opSq, opPowK, opPowB, opExp, opLn, opSqrt, opAbs, opXLnX, opVSum, opCumsum, opVSumSq, opVSumXLnX, opExpm1, opLog1p:
		return true
	}
	return false
}

// instr is one operation of the compiler's SSA list: it computes slot i
// (its index) from earlier slots a, b, c. w is its lane count, 0 or 1 for a
// scalar.
type instr struct {
	op      opcode
	a, b, c int32
	k       float64
	w       int32
}

// cell is one linked instruction: it writes lanes dst..dst+w-1 of the
// machine's value array from operand cells a, b, c. An operand's stride is
// 1 when it is a vector and 0 when a scalar is broadcast across the lanes.
type cell struct {
	op         opcode
	w          int32 // lanes written
	dst        int32
	a, b, c    int32
	sa, sb, sc int32
	n          int32 // lanes read by opVSum
	k          float64
}

// Program is a compiled formula: a straight-line list of instructions.
// Cells (the machine's value array) are laid out as variables first, then
// constants, then the lanes each instruction writes, so variables and
// constants cost nothing to evaluate. A Program is immutable and safe to
// share between goroutines; each goroutine evaluates it with its own Machine.
type Program struct {
	consts   []float64
	code     []cell
	out      int32
	cells    int
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

// base is the first instruction cell.
func (p *Program) base() int { return len(p.varNames) + len(p.consts) }

// IsConstant reports whether the program's value does not depend on any
// variable; its value is then Constant().
func (p *Program) IsConstant() bool {
	nv := int32(len(p.varNames))
	return p.out >= nv && p.out < int32(p.base())
}

// Constant returns the program's value when IsConstant is true.
func (p *Program) Constant() float64 { return p.consts[int(p.out)-len(p.varNames)] }

// link lays out the compiler's SSA list as a Program: cells for the
// variables, then for the constants the result depends on, then for the
// lanes of each live instruction, renumbering operands. Instructions the
// result does not depend on (constants left over from folding, subscripts,
// parameter values) are dropped.
func link(code []instr, out int32, varNames []string, vconsts [][]float64) *Program {
	live := liveSlots(code, out)
	nv := int32(len(varNames))
	p := &Program{varNames: varNames}
	at := make([]int32, len(code)) // first cell of each slot
	for i, in := range code {
		if !live[i] {
			continue
		}
		switch in.op {
		case opConst:
			at[i] = nv + int32(len(p.consts))
			p.consts = append(p.consts, in.k)
		case opVConst:
			at[i] = nv + int32(len(p.consts))
			p.consts = append(p.consts, vconsts[in.a]...)
		}
	}
	next := nv + int32(len(p.consts))
	for i, in := range code {
		if !live[i] {
			continue
		}
		switch in.op {
		case opConst, opVConst:
			continue
		case opVar:
			at[i] = in.a
			continue
		}
		cl := linkCell(code, in, at, next)
		at[i] = next
		next += cl.w
		if in.op == opVSumXLnX {
			// Cells of its own for ln a of every lane, kept for the
			// backward sweep (the operand's lanes may belong to another
			// instruction that keeps its own there).
			cl.c = next
			next += cl.n
		}
		p.code = append(p.code, cl)
	}
	p.out = at[out]
	p.cells = int(next)
	return p
}

// liveSlots marks the instructions the result at out depends on.
func liveSlots(code []instr, out int32) []bool {
	live := make([]bool, len(code))
	live[out] = true
	for i := int(out); i >= 0; i-- {
		if !live[i] {
			continue
		}
		switch in := code[i]; {
		case in.op == opConst || in.op == opVar || in.op == opVConst:
		case in.op.unary():
			live[in.a] = true
		case in.op == opSelect:
			live[in.a], live[in.b], live[in.c] = true, true, true
		default:
			live[in.a], live[in.b] = true, true
		}
	}
	return live
}

// linkCell is the cell of instruction in, writing at dst, its operands
// read at the cells at gives them; a lane operand is read with stride 1,
// a scalar one with stride 0.
func linkCell(code []instr, in instr, at []int32, dst int32) cell {
	stride := func(s int32) int32 {
		if code[s].w > 1 {
			return 1
		}
		return 0
	}
	cl := cell{op: in.op, w: max(1, in.w), dst: dst, k: in.k}
	switch {
	case in.op == opVSum || in.op == opVSumSq || in.op == opVSumXLnX:
		cl.a, cl.n = at[in.a], code[in.a].w
	case in.op.unary():
		cl.a, cl.sa = at[in.a], stride(in.a)
		cl.b, cl.sb = cl.a, cl.sa
	case in.op == opSelect:
		cl.a, cl.b, cl.c = at[in.a], at[in.b], at[in.c]
		cl.sa, cl.sb, cl.sc = stride(in.a), stride(in.b), stride(in.c)
	default:
		cl.a, cl.b = at[in.a], at[in.b]
		cl.sa, cl.sb = stride(in.a), stride(in.b)
	}
	return cl
}
