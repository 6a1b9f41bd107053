package formula

import (
	"math"

	iv "scorewright/internal/interval"
)

// lane encloses lane l of one instruction: its value and, by the chain
// rule in interval arithmetic, its gradient and Hessian; an operand that
// is a min or max of smooth pieces (enclose_pieces.go) is carried piece
// by piece where the operation allows.
func (e *Encloser) lane(in *cell, l int32) {
	if e.hasPieces(in, l) {
		e.piecewiseLane(in, l)
		return
	}
	e.smoothLane(in, l)
}

// smoothLane is lane for smooth operands. A numeric kernel: one case an
// operation, kept together so the rules can be read side by side with
// Machine.hessLane.
func (e *Encloser) smoothLane(in *cell, l int32) {
	i := in.dst + l
	ia, ib := in.a+l*in.sa, in.b+l*in.sb
	a, b := e.val[ia], e.val[ib]
	one, zero := iv.Point(1), iv.Point(0)
	switch in.op {
	case opAdd:
		e.unboundedSum(a, b, false)
		e.val[i] = iv.Add(a, b)
		e.chain(i, ia, ib, one, one, zero, zero, zero)
	case opSub:
		e.unboundedSum(a, b, true)
		e.val[i] = iv.Sub(a, b)
		e.chain(i, ia, ib, one, iv.Point(-1), zero, zero, zero)
	case opMul:
		if x, k, m1, neg, ok := e.timesPower(ia, ib); ok {
			e.xPower(i, x, k, m1)
			e.negateIf(i, neg)
			return
		}
		if x, neg, ok := e.timesLog(ia, ib); ok {
			e.xlnx(i, x, e.val[x], false)
			e.negateIf(i, neg)
			return
		}
		if a.Contains(0) && !b.Bounded() || b.Contains(0) && !a.Bounded() {
			e.kinked = true
		}
		e.val[i] = iv.Mul(a, b)
		e.chain(i, ia, ib, b, a, zero, zero, one)
	case opDiv:
		e.singularAt(ib, b.Contains(0))
		z, ok := iv.Div(a, b)
		e.undef = e.undef || !ok
		if !a.Bounded() && !b.Bounded() {
			e.kinked = true
		}
		e.val[i] = z
		inv, _ := iv.Inv(b)
		e.chain(i, ia, ib, inv, iv.Neg(iv.Mul(z, inv)), zero, iv.Mul(iv.Point(2), iv.Mul(z, iv.Sq(inv))), iv.Neg(iv.Sq(inv)))
	case opNeg:
		e.val[i] = iv.Neg(a)
		e.chain1(i, ia, iv.Point(-1), zero)
	case opSq:
		e.val[i] = iv.Sq(a)
		e.chain1(i, ia, iv.Scale(2, a), iv.Point(2))
	case opPowK:
		e.powK(i, ia, in.k, a)
	case opPowB:
		z, ok := iv.PowB(in.k, a)
		e.undef = e.undef || !ok
		e.val[i] = z
		lk, _ := iv.Log(iv.Point(in.k))
		e.chain1(i, ia, iv.Mul(z, lk), iv.Mul(z, iv.Sq(lk)))
	case opPow:
		e.pow(i, ia, ib, a, b)
	case opExp, opExpm1:
		if x, k, ok := e.powerForm(ia); ok {
			e.expOfLog(i, in.op, x, k)
			return
		}
		if in.op == opExp {
			z := iv.Exp(a)
			e.val[i] = z
			e.chain1(i, ia, z, z)
			return
		}
		z := iv.Expm1(a)
		e.val[i] = z
		d := iv.Exp(a)
		e.chain1(i, ia, d, d)
	case opLn:
		e.singularAt(ia, a.Lo <= 0)
		z, ok := iv.Log(a)
		e.undef = e.undef || !ok
		e.val[i] = z
		inv, _ := iv.Inv(a)
		e.chain1(i, ia, inv, iv.Neg(iv.Sq(inv)))
	case opLog1p:
		e.singularAt(ia, a.Lo <= -1)
		z, ok := iv.Log1p(a)
		e.undef = e.undef || !ok
		e.val[i] = z
		inv, _ := iv.Inv(iv.Add(one, a))
		e.chain1(i, ia, inv, iv.Neg(iv.Sq(inv)))
	case opSqrt:
		e.singularAt(ia, a.Lo <= 0)
		z, ok := iv.Sqrt(a)
		e.undef = e.undef || !ok
		e.val[i] = z
		d, _ := iv.Div(iv.Point(0.5), z)
		e.chain1(i, ia, d, iv.Scale(-2, iv.Mul(d, iv.Sq(d))))
	case opXLnX:
		e.xlnx(i, ia, a, false)
	case opAbs:
		// A branch is taken only when the kink lies outside the closed
		// box (or only on the simplex's faces): a kink on the box's edge
		// would join two smooth boxes at a corner no Hessian sees.
		switch {
		case a.Lo > 0 || a.Lo == 0 && e.faceOnly[ia]:
			e.val[i] = a
			e.chain1(i, ia, one, zero)
		case a.Hi < 0 || a.Hi == 0 && e.faceOnly[ia]:
			e.val[i] = iv.Neg(a)
			e.chain1(i, ia, iv.Point(-1), zero)
		default:
			e.val[i] = iv.Abs(a)
			e.chain1(i, ia, iv.New(-1, 1), zero)
			e.absPieces(i, ia)
		}
	case opMin, opMax:
		e.minMax(in.op, i, ia, ib, a, b)
	case opLt, opLe, opGt, opGe:
		if v, ok := e.forcedComparison(i); ok {
			e.val[i] = v
		} else {
			e.val[i] = e.compare(in.op, a, b)
		}
		e.clearCell(i)
	case opSelect:
		c := e.val[in.c+l*in.sc]
		switch {
		case !c.Contains(0):
			e.copyCell(i, ia)
		case c.IsZero():
			e.copyCell(i, ib)
		default:
			e.kinked = true
			e.hullCells(i, ia, ib)
		}
	case opVSum, opVSumSq, opVSumXLnX:
		e.reduce(in, i)
	case opCumsum:
		if l == 0 {
			e.copyCell(i, ia)
			return
		}
		e.val[i] = iv.Add(e.val[i-1], a)
		e.chain(i, i-1, ia, one, one, zero, zero, zero)
	default:
		// An operation without an interval rule proves nothing: the
		// box is reported undefined rather than enclosed wrongly.
		e.undef = true
		e.val[i] = iv.Entire()
		e.clearCell(i)
	}
}

// unboundedSum notes a possible ∞ - ∞: the value may then jump.
func (e *Encloser) unboundedSum(a, b iv.Interval, sub bool) {
	if sub {
		b = iv.Neg(b)
	}
	if math.IsInf(a.Lo, -1) && math.IsInf(b.Hi, 1) || math.IsInf(a.Hi, 1) && math.IsInf(b.Lo, -1) {
		e.kinked = true
	}
}

// singularAt notes a singular point of an operation inside the box (the
// operand cell arg reaches it) unless that operand vanishes only on the
// faces of the simplex.
func (e *Encloser) singularAt(arg int32, reaches bool) {
	if reaches && !e.faceOnly[arg] {
		e.kinked = true
	}
}

func (e *Encloser) powK(i, ia int32, k float64, a iv.Interval) {
	z, ok := iv.PowK(a, k)
	e.undef = e.undef || !ok
	whole := k == math.Trunc(k)
	e.singularAt(ia, a.Contains(0) && (k < 0 || !whole && k < 2))
	e.val[i] = z
	if e.order == 0 {
		return
	}
	d1, _ := iv.PowK(a, k-1)
	d2, _ := iv.PowK(a, k-2)
	e.chain1(i, ia, iv.Mul(iv.Point(k), d1), iv.Mul(iv.Mul(iv.Point(k), iv.Point(k-1)), d2))
}

func (e *Encloser) pow(i, ia, ib int32, a, b iv.Interval) {
	e.singularAt(ia, a.Lo <= 0)
	z, ok := iv.Pow(a, b)
	e.undef = e.undef || !ok
	e.val[i] = z
	if e.order == 0 {
		return
	}
	bm1 := iv.Sub(b, iv.Point(1))
	la, _ := iv.Log(a)
	pa1, _ := iv.Pow(a, bm1)
	pa2, _ := iv.Pow(a, iv.Sub(b, iv.Point(2)))
	fa := iv.Mul(b, pa1)
	fb := iv.Mul(z, la)
	faa := iv.Mul(iv.Mul(b, bm1), pa2)
	fbb := iv.Mul(z, iv.Sq(la))
	fab := iv.Mul(pa1, iv.Add(iv.Point(1), iv.Mul(b, la)))
	e.chain(i, ia, ib, fa, fb, faa, fbb, fab)
}

// powerForm recognises exp(k·ln x) (and expm1 of it), the way formulas
// write x^k to keep precision, and returns x's cell and k: enclosing it
// as a power keeps its derivatives bounded where x reaches 0, which the
// composition through ln cannot.
func (e *Encloser) powerForm(arg int32) (x int32, k float64, ok bool) {
	code := e.prog.code
	j := e.owner[arg]
	if j >= 0 && code[j].op == opLn {
		// exp(ln x): the power 1, once the constant has folded away.
		return code[j].a + (arg-code[j].dst)*code[j].sa, 1, true
	}
	if j < 0 || code[j].op != opMul {
		return 0, 0, false
	}
	m := code[j]
	l := arg - m.dst
	ca, cb := m.a+l*m.sa, m.b+l*m.sb
	kc, other := ca, cb
	if _, isK := constCell(e.prog, kc); !isK {
		kc, other = cb, ca
	}
	kv, isK := constCell(e.prog, kc)
	jl := e.owner[other]
	if !isK || jl < 0 || code[jl].op != opLn {
		return 0, 0, false
	}
	ln := code[jl]
	return ln.a + (other-ln.dst)*ln.sa, kv, true
}

// timesLog recognises x·ln(x) (either order, x perhaps negated, as -x
// parses), enclosed as the fused x ln x, whose second derivative 1/x
// keeps its sign where the product rule's 2/x - x/x² cannot show one.
func (e *Encloser) timesLog(ia, ib int32) (x int32, neg, ok bool) {
	for _, c := range [2][2]int32{{ia, ib}, {ib, ia}} {
		if j := e.owner[c[1]]; j >= 0 {
			in := e.prog.code[j]
			x, neg := e.unNeg(c[0])
			if in.op == opLn && in.a+(c[1]-in.dst)*in.sa == x {
				return x, neg, true
			}
		}
	}
	return 0, false, false
}

// unNeg returns the cell c negates, or c itself.
func (e *Encloser) unNeg(c int32) (int32, bool) {
	if j := e.owner[c]; j >= 0 && e.prog.code[j].op == opNeg {
		in := e.prog.code[j]
		return in.a + (c-in.dst)*in.sa, true
	}
	return c, false
}

// negateIf makes cell i its own negative when neg.
func (e *Encloser) negateIf(i int32, neg bool) {
	if !neg {
		return
	}
	e.val[i] = iv.Neg(e.val[i])
	if e.order == 0 {
		return
	}
	g := e.cellGrad(i)
	for k := range g {
		g[k] = iv.Neg(g[k])
	}
	if e.order >= 2 {
		h := e.cellHess(i)
		for k := range h {
			h[k] = iv.Neg(h[k])
		}
	}
}

// timesPower recognises x·exp(k·ln x) and x·expm1(k·ln x) (either
// order, x perhaps negated), the way the power rule writes p·(p^(g-1) -
// 1) to keep precision: enclosed as x^(k+1) (minus x), its derivatives
// stay bounded where x reaches 0 and they are finite, which the product
// of x and an unbounded power cannot show (0·∞).
func (e *Encloser) timesPower(ia, ib int32) (x int32, k float64, m1, neg, ok bool) {
	for _, c := range [2][2]int32{{ia, ib}, {ib, ia}} {
		j := e.owner[c[1]]
		if j < 0 {
			continue
		}
		in := e.prog.code[j]
		if in.op != opExp && in.op != opExpm1 {
			continue
		}
		arg := in.a + (c[1]-in.dst)*in.sa
		base, neg := e.unNeg(c[0])
		if x, k, ok := e.powerForm(arg); ok && x == base {
			return x, k, in.op == opExpm1, neg, true
		}
	}
	return 0, 0, false, false, false
}

// xPower sets cell i to x^(k+1), less x when m1.
func (e *Encloser) xPower(i, x int32, k float64, m1 bool) {
	a := e.val[x]
	a = iv.Interval{Lo: math.Max(a.Lo, 0), Hi: math.Max(a.Hi, 0)}
	k1 := k + 1
	z, ok := iv.PowK(a, k1)
	e.undef = e.undef || !ok
	whole := k1 == math.Trunc(k1)
	e.singularAt(x, a.Lo <= 0 && (k1 < 0 || !whole && k1 < 2))
	d1, _ := iv.PowK(a, k)
	d1 = iv.Mul(iv.Point(k1), d1)
	if m1 {
		z = iv.Sub(z, a)
		d1 = iv.Sub(d1, iv.Point(1))
	}
	e.val[i] = z
	if e.order == 0 {
		return
	}
	d2, _ := iv.PowK(a, k-1)
	e.chain1(i, x, d1, iv.Mul(iv.Mul(iv.Point(k1), iv.Point(k)), d2))
}

func (e *Encloser) expOfLog(i int32, op opcode, x int32, k float64) {
	a := e.val[x]
	// ln already reported x below 0; the power is taken where ln is defined.
	a = iv.Interval{Lo: math.Max(a.Lo, 0), Hi: math.Max(a.Hi, 0)}
	z, ok := iv.PowK(a, k)
	e.undef = e.undef || !ok
	whole := k == math.Trunc(k)
	e.singularAt(x, a.Lo <= 0 && (k < 0 || !whole && k < 2))
	if op == opExpm1 {
		z = iv.Sub(z, iv.Point(1))
	}
	e.val[i] = z
	if e.order == 0 {
		return
	}
	d1, _ := iv.PowK(a, k-1)
	d2, _ := iv.PowK(a, k-2)
	e.chain1(i, x, iv.Mul(iv.Point(k), d1), iv.Mul(iv.Mul(iv.Point(k), iv.Point(k-1)), d2))
}

func (e *Encloser) xlnx(i, ia int32, a iv.Interval, add bool) {
	e.singularAt(ia, a.Lo <= 0)
	z, ok := iv.XLnX(a)
	e.undef = e.undef || !ok
	la, _ := iv.Log(a)
	inv, _ := iv.Inv(a)
	if add {
		e.val[i] = iv.Add(e.val[i], z)
		e.accumulate(i, ia, iv.Add(la, iv.Point(1)), inv)
		return
	}
	e.val[i] = z
	e.chain1(i, ia, iv.Add(la, iv.Point(1)), inv)
}

func (e *Encloser) minMax(op opcode, i, ia, ib int32, a, b iv.Interval) {
	// Strictly apart on the closed box, so the branch also holds next to
	// it: a tie on the box's edge would hide a kink there.
	takeA := a.Hi < b.Lo
	takeB := b.Hi < a.Lo
	if op == opMax {
		takeA, takeB = takeB, takeA
	}
	switch {
	case takeA:
		e.copyCell(i, ia)
	case takeB:
		e.copyCell(i, ib)
	default:
		e.hullCells(i, ia, ib)
		e.startPieces(i, op == opMax, ia, ib)
		if op == opMin {
			e.val[i] = iv.Min(a, b)
		} else {
			e.val[i] = iv.Max(a, b)
		}
	}
}

// compare decides a comparison on the box: 1 or 0 when it holds or fails
// everywhere with the two sides apart on the closed box, else [0, 1] and
// a possible jump (a tie on the box's edge is a jump just beside it).
func (e *Encloser) compare(op opcode, a, b iv.Interval) iv.Interval {
	var yes, no bool
	switch op {
	case opLt, opLe:
		yes, no = a.Hi < b.Lo, a.Lo > b.Hi
	case opGt, opGe:
		yes, no = a.Lo > b.Hi, a.Hi < b.Lo
	}
	switch {
	case yes:
		return iv.Point(1)
	case no:
		return iv.Point(0)
	}
	e.kinked = true
	return iv.New(0, 1)
}

// reduce encloses a sum over the lanes of a vector: plain, of squares,
// or of x ln x.
func (e *Encloser) reduce(in *cell, i int32) {
	e.val[i] = iv.Point(0)
	e.clearCell(i)
	for s := in.a; s < in.a+in.n; s++ {
		x := e.val[s]
		switch in.op {
		case opVSum:
			e.val[i] = iv.Add(e.val[i], x)
			e.accumulate(i, s, iv.Point(1), iv.Point(0))
		case opVSumSq:
			e.val[i] = iv.Add(e.val[i], iv.Sq(x))
			e.accumulate(i, s, iv.Scale(2, x), iv.Point(2))
		case opVSumXLnX:
			e.xlnx(i, s, x, true)
		}
	}
}
