package formula

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Scope says what the names of a formula mean where it is used.
type Scope struct {
	// Outcomes is n, the number of outcomes, for formulas over a
	// probability vector (generators and payouts); 0 for scalar formulas
	// (point forecasts in x, emphasis weights in c).
	Outcomes int
	// Weights are the outcome weights w inside sum(); nil means all 1.
	Weights []float64
	// Ordered allows csum(), the sum over cumulative probabilities.
	Ordered bool
	// Payout allows y, hit and hitc: the formula is a payment for the
	// outcome Outcome (1..n), which it sees as y.
	Payout  bool
	Outcome int
	// Vars are scalar variables read after p1..pn, such as "x" or "c".
	Vars []string
	// Params overrides parameter values set in the formula. Naming a
	// parameter the formula does not set is an error.
	Params map[string]float64
}

// arity returns the least and most arguments of a built-in function (most
// -1: any number), and whether name is one. A switch, not a map, so the
// table cannot be changed at run time.
func arity(name string) (lo, hi int, ok bool) {
	switch name {
	case "ln", "log", "log2", "log10", "exp", "expm1", "log1p", "sqrt", "abs", "sum", "csum":
		return 1, 1, true
	case "min", "max":
		return 1, -1, true
	case "if":
		return 3, 3, true
	}
	return 0, 0, false
}

// Functions returns the names of the built-in functions, sorted.
func Functions() []string {
	return []string{"abs", "csum", "exp", "expm1", "if", "ln", "log", "log10", "log1p", "log2", "max", "min", "sqrt", "sum"}
}

// MaxOutcomes is the largest outcome count the engine supports.
const MaxOutcomes = 12

// Compile resolves the names of f in scope, unrolls sums, folds constants
// and returns the program. Errors are *Error values with a position, except
// for a bad scope or an override of an unknown parameter, which are plain.
func Compile(f *File, scope Scope) (*Program, error) {
	if scope.Outcomes != 0 && (scope.Outcomes < 2 || scope.Outcomes > MaxOutcomes) {
		return nil, fmt.Errorf("formula: outcome count %d is outside 2..%d", scope.Outcomes, MaxOutcomes)
	}
	if scope.Weights != nil && len(scope.Weights) != scope.Outcomes {
		return nil, fmt.Errorf("formula: %d weights given for %d outcomes", len(scope.Weights), scope.Outcomes)
	}
	if scope.Payout && scope.Outcomes > 0 && (scope.Outcome < 1 || scope.Outcome > scope.Outcomes) {
		return nil, fmt.Errorf("formula: payout outcome %d is outside 1..%d", scope.Outcome, scope.Outcomes)
	}
	c := &compiler{src: f.Source, scope: scope, cse: map[instr]int32{}, konsts: map[uint64]int32{}, vkeys: map[string]int32{}, params: map[string]float64{}}
	for k := 1; k <= scope.Outcomes; k++ {
		c.varNames = append(c.varNames, "p"+strconv.Itoa(k))
	}
	c.varNames = append(c.varNames, scope.Vars...)
	var out int32
	err := c.run(func() {
		for _, p := range f.Params {
			if c.reserved(p.Name) {
				c.fail(p.At, "parameter %q clashes with a built-in name; choose another", p.Name)
			}
			v := c.constant(p.Value, "the value of parameter "+strconv.Quote(p.Name))
			if o, ok := scope.Params[p.Name]; ok {
				v = o
			}
			c.params[p.Name] = v
			c.paramList = append(c.paramList, ParamValue{p.Name, v})
		}
		out = c.emit(f.Expr, ctx{})
	})
	if err != nil {
		return nil, err
	}
	for name := range scope.Params {
		if _, ok := c.params[name]; !ok {
			known := make([]string, 0, len(c.paramList))
			for _, p := range c.paramList {
				known = append(known, p.Name)
			}
			if len(known) == 0 {
				return nil, fmt.Errorf("unknown parameter %q: the formula sets no parameters", name)
			}
			return nil, fmt.Errorf("unknown parameter %q; the formula sets: %s", name, strings.Join(known, ", "))
		}
	}
	p := link(c.code, out, c.varNames, c.vconsts)
	p.params = c.paramList
	return p, nil
}

// CompileString parses and compiles src in one step.
func CompileString(src string, scope Scope) (*Program, error) {
	f, err := Parse(src)
	if err != nil {
		return nil, err
	}
	return Compile(f, scope)
}

// ctx is where in the formula the compiler is: inside a sum over outcome i,
// or a cumulative sum at k.
//
// A sum body is compiled once, in lanes: names that depend on the outcome
// (p, i, w, hit; c, hitc in csum) are vectors with one lane per outcome, and
// every operation on them is one vector instruction. The sum is then a
// reduction. This keeps the instruction count independent of n.
type ctx struct {
	inSum  bool
	inCsum bool
	lanes  int   // lanes of the body: n in sum, n-1 in csum
	cum    int32 // slot of the cumulative probabilities c inside csum
}

type compiler struct {
	src    string
	scope  Scope
	code   []instr
	cse    map[instr]int32
	konsts map[uint64]int32
	// vconsts holds the values of vector constants (opVConst's a indexes
	// it); vkeys shares equal vectors.
	vconsts   [][]float64
	vkeys     map[string]int32
	varNames  []string
	params    map[string]float64
	paramList []ParamValue
	// constOnly is set while folding a parameter value or a subscript.
	constOnly string
}

func (c *compiler) run(f func()) (err error) {
	defer func() {
		if r := recover(); r != nil {
			if e, ok := r.(*Error); ok {
				err = e
				return
			}
			panic(r)
		}
	}()
	f()
	return nil
}

func (c *compiler) fail(at Pos, format string, args ...any) {
	panic(newError(c.src, at, format, args...))
}

// builtinConstant returns the value of a named constant of the language.
func builtinConstant(name string) (float64, bool) {
	switch name {
	case "pi":
		return math.Pi, true
	case "e":
		return math.E, true
	}
	return 0, false
}

func (c *compiler) reserved(name string) bool {
	if _, ok := builtinConstant(name); ok {
		return true
	}
	if _, _, ok := arity(name); ok {
		return true
	}
	switch name {
	case "p", "n", "i", "w", "c", "x", "y", "hit", "hitc":
		return true
	}
	if isOutcomeVar(name) > 0 {
		return true
	}
	for _, v := range c.scope.Vars {
		if v == name {
			return true
		}
	}
	return false
}

// isOutcomeVar returns k for a name p<k> with k >= 1, else 0.
func isOutcomeVar(name string) int {
	if len(name) < 2 || name[0] != 'p' || name[1] == '0' {
		return 0
	}
	k, err := strconv.Atoi(name[1:])
	if err != nil || k < 1 {
		return 0
	}
	return k
}

// constant folds n, which may use only numbers, pi, e, n and earlier
// parameters.
func (c *compiler) constant(n Node, what string) float64 {
	saved := c.constOnly
	c.constOnly = what
	s := c.emit(n, ctx{})
	c.constOnly = saved
	in := c.code[s]
	if in.op != opConst {
		c.fail(n.Pos(), "%s must be a constant", what)
	}
	return in.k
}

// known lists the names valid at a place, for "unknown name" messages.
func (c *compiler) known(x ctx) string {
	var names []string
	if c.constOnly != "" {
		names = append(names, "pi", "e")
		if c.scope.Outcomes > 0 {
			names = append(names, "n")
		}
		for _, p := range c.paramList {
			names = append(names, p.Name)
		}
		if x.inSum || x.inCsum {
			names = append(names, "i")
		}
		if c.scope.Payout && c.scope.Outcomes > 0 {
			names = append(names, "y")
		}
		return strings.Join(names, ", ")
	}
	if x.inSum {
		names = append(names, "p", "i", "w")
		if c.scope.Payout {
			names = append(names, "hit")
		}
	}
	if x.inCsum {
		names = append(names, "c", "i")
		if c.scope.Payout {
			names = append(names, "hitc")
		}
	}
	if n := c.scope.Outcomes; n > 0 {
		if n == 2 && !x.inSum {
			names = append(names, "p")
		}
		names = append(names, fmt.Sprintf("p1..p%d", n), "n")
		if c.scope.Payout {
			names = append(names, "y", "p[y]")
		}
	}
	names = append(names, c.scope.Vars...)
	names = append(names, "pi", "e")
	for _, p := range c.paramList {
		names = append(names, p.Name)
	}
	return strings.Join(names, ", ")
}

func (c *compiler) push(in instr) int32 {
	if s, ok := c.cse[in]; ok {
		return s
	}
	s := int32(len(c.code))
	c.code = append(c.code, in)
	c.cse[in] = s
	return s
}

func (c *compiler) konst(v float64) int32 {
	// Constants are shared by their bits, not by ==: 0 and -0 are equal
	// but divide differently, and NaN equals nothing. All NaNs share one.
	if v != v {
		v = math.NaN()
	}
	bits := math.Float64bits(v)
	if s, ok := c.konsts[bits]; ok {
		return s
	}
	s := int32(len(c.code))
	c.code = append(c.code, instr{op: opConst, k: v})
	c.konsts[bits] = s
	return s
}

// vkonst returns a vector constant; one whose lanes are all equal (bit for
// bit) is the scalar constant, which broadcasts to the same thing.
func (c *compiler) vkonst(v []float64) int32 {
	uniform := true
	for _, x := range v[1:] {
		if math.Float64bits(x) != math.Float64bits(v[0]) {
			uniform = false
		}
	}
	if uniform {
		return c.konst(v[0])
	}
	key := fmt.Sprint(v)
	if s, ok := c.vkeys[key]; ok {
		return s
	}
	s := int32(len(c.code))
	c.code = append(c.code, instr{op: opVConst, a: int32(len(c.vconsts)), w: int32(len(v))})
	c.vconsts = append(c.vconsts, append([]float64(nil), v...))
	c.vkeys[key] = s
	return s
}

// isConst reports a scalar constant and its value.
func (c *compiler) isConst(s int32) (float64, bool) {
	in := c.code[s]
	return in.k, in.op == opConst
}

// constLanes returns the lanes of a scalar or vector constant.
func (c *compiler) constLanes(s int32) ([]float64, bool) {
	switch in := c.code[s]; in.op {
	case opConst:
		return []float64{in.k}, true
	case opVConst:
		return c.vconsts[in.a], true
	}
	return nil, false
}

// width is the number of lanes of a slot: 1 for a scalar.
func (c *compiler) width(s int32) int32 { return max(1, c.code[s].w) }

// lane returns lane l of constant lanes v, broadcasting a scalar.
func lane(v []float64, l int) float64 {
	if len(v) == 1 {
		return v[0]
	}
	return v[l]
}

// op emits a unary or binary operation, folding it when its operands are
// constants.
func (c *compiler) op(o opcode, a, b int32, k float64) int32 {
	unary := o.unary()
	if unary {
		b = a
	}
	w := max(c.width(a), c.width(b))
	la, ca := c.constLanes(a)
	lb, cb := c.constLanes(b)
	if ca && cb {
		out := make([]float64, w)
		for l := range out {
			out[l] = apply(o, lane(la, l), lane(lb, l), k)
		}
		return c.vkonst(out)
	}
	ka, ca := c.isConst(a)
	kb, cb := c.isConst(b)
	switch o {
	case opAdd:
		if ca && ka == 0 {
			return b
		}
		if cb && kb == 0 {
			return a
		}
	case opSub:
		if cb && kb == 0 {
			return a
		}
	case opMul:
		if ca && ka == 1 {
			return b
		}
		if cb && kb == 1 {
			return a
		}
		// x * ln(x), the term of every entropy, is fused: one instruction,
		// and its derivative ln(x) + 1 needs no division in the backward sweep.
		if in := c.code[b]; in.op == opLn && in.a == a {
			return c.push(instr{op: opXLnX, a: a, w: w})
		}
		if in := c.code[a]; in.op == opLn && in.a == b {
			return c.push(instr{op: opXLnX, a: b, w: w})
		}
	case opDiv:
		if cb && kb == 1 {
			return a
		}
	case opPow:
		if cb {
			switch kb {
			case 1:
				return a
			case 2:
				return c.push(instr{op: opSq, a: a, w: w})
			}
			return c.push(instr{op: opPowK, a: a, k: kb, w: w})
		}
		if ca {
			return c.push(instr{op: opPowB, a: b, k: ka, w: w})
		}
	}
	if unary {
		b = 0
	}
	// Commutative operations get a canonical operand order so CSE sees
	// p1*p2 and p2*p1 as one.
	if (o == opAdd || o == opMul || o == opMin || o == opMax) && a > b {
		a, b = b, a
	}
	return c.push(instr{op: o, a: a, b: b, k: k, w: w})
}

// apply evaluates one operation on numbers; shared by folding and the machine.
func apply(o opcode, a, b, k float64) float64 {
	switch o {
	case opAdd:
		return a + b
	case opSub:
		return a - b
	case opMul:
		return mul0(a, b)
	case opDiv:
		return a / b
	case opNeg:
		return -a
	case opSq:
		return a * a
	case opPowK:
		return math.Pow(a, k)
	case opPowB:
		return math.Pow(k, a)
	case opPow:
		return math.Pow(a, b)
	case opExp:
		return math.Exp(a)
	case opLn:
		return math.Log(a)
	case opExpm1:
		return math.Expm1(a)
	case opLog1p:
		return math.Log1p(a)
	case opSqrt:
		return math.Sqrt(a)
	case opAbs:
		return math.Abs(a)
	case opMin:
		return min2(a, b)
	case opMax:
		return max2(a, b)
	case opLt:
		return cmp(a, b, a < b)
	case opLe:
		return cmp(a, b, a <= b)
	case opGt:
		return cmp(a, b, a > b)
	case opGe:
		return cmp(a, b, a >= b)
	case opXLnX:
		return mul0(a, math.Log(a))
	}
	panic("formula: apply of " + o.String())
}

// mul0 multiplies with the entropy convention 0 * ±Inf = 0; NaN stays NaN.
func mul0(a, b float64) float64 {
	r := a * b
	if r != r && (a == 0 || b == 0) && a == a && b == b {
		return 0
	}
	return r
}

func min2(a, b float64) float64 {
	if a != a || b != b {
		return math.NaN()
	}
	if b < a {
		return b
	}
	return a
}

func max2(a, b float64) float64 {
	if a != a || b != b {
		return math.NaN()
	}
	if b > a {
		return b
	}
	return a
}

// cmp turns a comparison into 1 or 0; a NaN operand makes it NaN, so
// trouble is not silently taken as "false".
func cmp(a, b float64, r bool) float64 {
	if a != a || b != b {
		return math.NaN()
	}
	if r {
		return 1
	}
	return 0
}

func (c *compiler) emit(n Node, x ctx) int32 {
	switch n := n.(type) {
	case *Num:
		return c.konst(n.Value)
	case *Ident:
		return c.ident(n, x)
	case *Index:
		return c.index(n, x)
	case *Unary:
		v := c.emit(n.X, x)
		if n.Op == "+" {
			return v
		}
		return c.op(opNeg, v, 0, 0)
	case *Binary:
		a := c.emit(n.X, x)
		b := c.emit(n.Y, x)
		o := map[string]opcode{"+": opAdd, "-": opSub, "*": opMul, "/": opDiv, "^": opPow,
			"<": opLt, "<=": opLe, ">": opGt, ">=": opGe}[n.Op]
		return c.op(o, a, b, 0)
	case *Call:
		return c.call(n, x)
	}
	panic(fmt.Sprintf("formula: unknown node %T", n))
}

func (c *compiler) ident(n *Ident, x ctx) int32 {
	name := n.Name
	if v, ok := c.params[name]; ok {
		return c.konst(v)
	}
	if v, ok := builtinConstant(name); ok {
		return c.konst(v)
	}
	if _, _, ok := arity(name); ok {
		c.fail(n.At, "%s is a function; write %s(...)", name, name)
	}
	nOut := c.scope.Outcomes
	switch name {
	case "n":
		if nOut > 0 {
			return c.konst(float64(nOut))
		}
	case "i":
		if x.inSum || x.inCsum {
			return c.indexLanes(x.lanes, func(k int) float64 { return float64(k) })
		}
		if c.constOnly == "" {
			c.fail(n.At, "i is the outcome index and exists only inside sum(...) or csum(...)")
		}
	case "y":
		if c.scope.Payout && nOut > 0 {
			return c.konst(float64(c.scope.Outcome))
		}
	}
	if c.constOnly != "" {
		c.fail(n.At, "%s must be a constant, but uses %q; known here: %s", c.constOnly, name, c.known(x))
	}
	switch name {
	case "p":
		if x.inSum {
			return c.outcomeVector()
		}
		if nOut == 2 {
			return c.outcomeVar(1)
		}
		if nOut > 0 && !x.inSum {
			c.fail(n.At, "p alone is the event's probability only when there are 2 outcomes; use p1..p%d, or p inside sum(...)", nOut)
		}
	case "w":
		if x.inSum {
			if c.scope.Weights == nil {
				return c.konst(1)
			}
			return c.vkonst(c.scope.Weights)
		}
		if nOut > 0 {
			c.fail(n.At, "w is the outcome weight and exists only inside sum(...)")
		}
	case "c":
		if x.inCsum {
			return x.cum
		}
	case "hit":
		if c.scope.Payout && x.inSum {
			return c.indexLanes(x.lanes, func(k int) float64 { return b2f(k == c.scope.Outcome) })
		}
		if c.scope.Payout {
			c.fail(n.At, "hit exists only inside sum(...); outside it, compare y with an outcome number")
		}
	case "hitc":
		if c.scope.Payout && x.inCsum {
			return c.indexLanes(x.lanes, func(k int) float64 { return b2f(c.scope.Outcome <= k) })
		}
		if c.scope.Payout {
			c.fail(n.At, "hitc exists only inside csum(...)")
		}
	}
	for k, v := range c.scope.Vars {
		if v == name {
			return c.push(instr{op: opVar, a: int32(nOut + k)})
		}
	}
	if k := isOutcomeVar(name); k > 0 && nOut > 0 {
		if k <= nOut {
			return c.outcomeVar(k)
		}
		c.fail(n.At, "%s names outcome %d, but there are only %d outcomes", name, k, nOut)
	}
	c.fail(n.At, "unknown name %q; known here: %s", name, c.known(x))
	return 0
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

func (c *compiler) outcomeVar(k int) int32 {
	return c.push(instr{op: opVar, a: int32(k - 1)})
}

// outcomeVector is p inside sum: the vector (p1, ..., pn).
func (c *compiler) outcomeVector() int32 {
	return c.push(instr{op: opVar, a: 0, w: int32(c.scope.Outcomes)})
}

// indexLanes is the constant vector f(1), ..., f(lanes).
func (c *compiler) indexLanes(lanes int, f func(k int) float64) int32 {
	v := make([]float64, lanes)
	for l := range v {
		v[l] = f(l + 1)
	}
	return c.vkonst(v)
}

func (c *compiler) index(n *Index, x ctx) int32 {
	if n.Name != "p" {
		c.fail(n.At, "only p can be subscripted (p[y], p[k]); %q cannot", n.Name)
	}
	if c.scope.Outcomes == 0 {
		c.fail(n.At, "p[...] needs a formula over outcomes")
	}
	saved := c.constOnly
	if saved == "" {
		c.constOnly = "the subscript of p"
	}
	s := c.emit(n.Index, x)
	c.constOnly = saved
	if lanes, ok := c.constLanes(s); ok && len(lanes) == c.scope.Outcomes && x.inSum {
		// p[i] inside sum is p itself; any other vector subscript is not
		// an outcome number.
		for l, v := range lanes {
			if v != float64(l+1) {
				c.fail(n.Index.Pos(), "the subscript of p must be y, i or an outcome number")
			}
		}
		return c.outcomeVector()
	}
	v, ok := c.isConst(s)
	if !ok {
		c.fail(n.Index.Pos(), "the subscript of p must be y, i or an outcome number")
	}
	k := int(v)
	if float64(k) != v || k < 1 || k > c.scope.Outcomes {
		c.fail(n.Index.Pos(), "subscript %g is not an outcome number 1..%d", v, c.scope.Outcomes)
	}
	return c.outcomeVar(k)
}

func (c *compiler) call(n *Call, x ctx) int32 {
	lo, hi, ok := arity(n.Func)
	if !ok {
		if _, isParam := c.params[n.Func]; isParam || c.reserved(n.Func) {
			c.fail(n.At, "%s is not a function; write * to multiply, as in %s*(...)", n.Func, n.Func)
		}
		c.fail(n.At, "unknown function %q; known: %s", n.Func, strings.Join(Functions(), ", "))
	}
	if len(n.Args) < lo || hi >= 0 && len(n.Args) > hi {
		want := fmt.Sprintf("%d argument", lo)
		if lo != 1 {
			want += "s"
		}
		if hi < 0 {
			want = "at least " + want
		}
		c.fail(n.At, "%s takes %s, found %d", n.Func, want, len(n.Args))
	}
	switch n.Func {
	case "sum":
		return c.sum(n, x)
	case "csum":
		return c.csum(n, x)
	case "if":
		cond := c.emit(n.Args[0], x)
		a := c.emit(n.Args[1], x)
		b := c.emit(n.Args[2], x)
		if kc, ok := c.isConst(cond); ok && kc == kc {
			if kc != 0 {
				return a
			}
			return b
		}
		return c.push(instr{op: opSelect, a: a, b: b, c: cond, w: max(c.width(a), c.width(b), c.width(cond))})
	case "min", "max":
		o := opMin
		if n.Func == "max" {
			o = opMax
		}
		acc := c.emit(n.Args[0], x)
		for _, a := range n.Args[1:] {
			acc = c.op(o, acc, c.emit(a, x), 0)
		}
		return acc
	}
	a := c.emit(n.Args[0], x)
	switch n.Func {
	case "ln", "log":
		return c.op(opLn, a, 0, 0)
	case "log2":
		return c.op(opMul, c.op(opLn, a, 0, 0), c.konst(1/math.Ln2), 0)
	case "log10":
		return c.op(opMul, c.op(opLn, a, 0, 0), c.konst(1/math.Ln10), 0)
	case "exp":
		return c.op(opExp, a, 0, 0)
	case "expm1":
		return c.op(opExpm1, a, 0, 0)
	case "log1p":
		return c.op(opLog1p, a, 0, 0)
	case "sqrt":
		return c.op(opSqrt, a, 0, 0)
	case "abs":
		return c.op(opAbs, a, 0, 0)
	}
	panic("formula: unhandled function " + n.Func)
}

func (c *compiler) sum(n *Call, x ctx) int32 {
	if c.scope.Outcomes == 0 {
		c.fail(n.At, "sum(...) runs over outcomes, and this formula has none")
	}
	if x.inSum || x.inCsum {
		c.fail(n.At, "sum(...) cannot be nested inside sum(...) or csum(...)")
	}
	lanes := c.scope.Outcomes
	return c.reduce(c.emit(n.Args[0], ctx{inSum: true, lanes: lanes}), lanes)
}

// reduce sums the lanes of a sum body. A body that came out scalar (it
// does not depend on the outcome) is the same in every lane.
func (c *compiler) reduce(body int32, lanes int) int32 {
	if v, ok := c.constLanes(body); ok {
		var s float64
		for l := 0; l < lanes; l++ {
			s += lane(v, l)
		}
		return c.konst(s)
	}
	if c.width(body) == 1 {
		if lanes == 1 {
			return body
		}
		return c.op(opMul, c.konst(float64(lanes)), body, 0)
	}
	// Superinstructions for the two commonest sums, sum(p^2) and
	// sum(p*ln(p)): one dispatch instead of two, and no lane cells.
	switch in := c.code[body]; in.op {
	case opSq:
		return c.push(instr{op: opVSumSq, a: in.a, w: 1})
	case opXLnX:
		return c.push(instr{op: opVSumXLnX, a: in.a, w: 1})
	}
	return c.push(instr{op: opVSum, a: body, w: 1})
}

func (c *compiler) csum(n *Call, x ctx) int32 {
	if c.scope.Outcomes == 0 {
		c.fail(n.At, "csum(...) runs over outcomes, and this formula has none")
	}
	if !c.scope.Ordered {
		c.fail(n.At, "csum(...) needs ordered outcomes (cumulative probabilities have no meaning otherwise)")
	}
	if x.inSum || x.inCsum {
		c.fail(n.At, "csum(...) cannot be nested inside sum(...) or csum(...)")
	}
	lanes := c.scope.Outcomes - 1
	cum := c.outcomeVar(1)
	if lanes > 1 {
		cum = c.push(instr{op: opCumsum, a: c.outcomeVector(), w: int32(lanes)})
	}
	return c.reduce(c.emit(n.Args[0], ctx{inCsum: true, lanes: lanes, cum: cum}), lanes)
}
