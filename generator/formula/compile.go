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
	if r, ok := c.countName(n, x); ok {
		return r
	}
	if c.constOnly != "" {
		c.fail(n.At, "%s must be a constant, but uses %q; known here: %s", c.constOnly, name, c.known(x))
	}
	if r, ok := c.outcomeName(n, x); ok {
		return r
	}
	nOut := c.scope.Outcomes
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

// countName resolves the names that are constants of the scope, allowed
// where only constants are: n (the outcome count), i (the index inside a
// sum) and y (the outcome of a payout).
func (c *compiler) countName(n *Ident, x ctx) (int32, bool) {
	nOut := c.scope.Outcomes
	switch n.Name {
	case "n":
		if nOut > 0 {
			return c.konst(float64(nOut)), true
		}
	case "i":
		if x.inSum || x.inCsum {
			return c.indexLanes(x.lanes, func(k int) float64 { return float64(k) }), true
		}
		if c.constOnly == "" {
			c.fail(n.At, "i is the outcome index and exists only inside sum(...) or csum(...)")
		}
	case "y":
		if c.scope.Payout && nOut > 0 {
			return c.konst(float64(c.scope.Outcome)), true
		}
	}
	return 0, false
}

// outcomeName resolves the names that stand for one value per outcome:
// p, w, c, hit and hitc, each where it exists.
func (c *compiler) outcomeName(n *Ident, x ctx) (int32, bool) {
	nOut := c.scope.Outcomes
	switch n.Name {
	case "p":
		if x.inSum {
			return c.outcomeVector(), true
		}
		if nOut == 2 {
			return c.outcomeVar(1), true
		}
		if nOut > 0 && !x.inSum {
			c.fail(n.At, "p alone is the event's probability only when there are 2 outcomes; use p1..p%d, or p inside sum(...)", nOut)
		}
	case "w":
		if x.inSum {
			if c.scope.Weights == nil {
				return c.konst(1), true
			}
			return c.vkonst(c.scope.Weights), true
		}
		if nOut > 0 {
			c.fail(n.At, "w is the outcome weight and exists only inside sum(...)")
		}
	case "c":
		if x.inCsum {
			return x.cum, true
		}
	case "hit":
		if c.scope.Payout && x.inSum {
			return c.indexLanes(x.lanes, func(k int) float64 { return b2f(k == c.scope.Outcome) }), true
		}
		if c.scope.Payout {
			c.fail(n.At, "hit exists only inside sum(...); outside it, compare y with an outcome number")
		}
	case "hitc":
		if c.scope.Payout && x.inCsum {
			return c.indexLanes(x.lanes, func(k int) float64 { return b2f(c.scope.Outcome <= k) }), true
		}
		if c.scope.Payout {
			c.fail(n.At, "hitc exists only inside csum(...)")
		}
	}
	return 0, false
}
