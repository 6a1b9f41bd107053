package formula

import (
	"fmt"
	"math"
	"strings"
)

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
