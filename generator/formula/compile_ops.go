package formula

import (
	"fmt"
	"math"
)

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
