package formula

import (
	"math"

	iv "scorewright/internal/interval"
)

// Piecewise enclosures. Where min, max or abs cannot be decided on a box,
// the cell is still exactly the min (or max) of smooth functions — its
// branches — and so is everything computed from it by operations that
// preserve that form pointwise: adding a smooth function or another min,
// multiplying by a function of one sign (a negative sign turns min into
// max), and nondecreasing (or nonincreasing) one-variable functions, since
// f(min(a, b)) = min(f(a), f(b)) for f nondecreasing. Each branch is kept
// as a cell of its own with its value, gradient and Hessian, so a caller
// can prove, say, that a min of concave branches is concave. Any other
// operation on such a cell drops the form and marks the box kinked.

const (
	// scratchCells bounds the cells branches may use on one box.
	scratchCells = 256
	// maxPieces bounds the branches of one cell (sums multiply them).
	maxPieces = 8
)

// Piece is one smooth branch of a piecewise enclosure.
type Piece struct {
	Value iv.Interval
	Grad  []iv.Interval
	Hess  []iv.Interval
}

// pieceSet is a cell that equals the min (or, with max, the max) of the
// smooth functions held in cells.
type pieceSet struct {
	max   bool
	cells []int32
}

// resetPieces forgets the branches of the last box.
func (e *Encloser) resetPieces() {
	for _, c := range e.pwSet {
		e.pw[c] = pieceSet{}
	}
	e.pwSet = e.pwSet[:0]
	e.next = int32(e.prog.cells)
}

func (e *Encloser) setPieces(i int32, s pieceSet) {
	e.pw[i] = s
	e.pwSet = append(e.pwSet, i)
}

// hasPieces reports whether an operand of lane l is piecewise.
func (e *Encloser) hasPieces(in *cell, l int32) bool {
	if len(e.pwSet) == 0 {
		return false
	}
	switch in.op {
	case opVSum, opVSumSq, opVSumXLnX:
		for s := in.a; s < in.a+in.n; s++ {
			if e.pw[s].cells != nil {
				return true
			}
		}
		return false
	case opSelect:
		return e.pw[in.a+l*in.sa].cells != nil || e.pw[in.b+l*in.sb].cells != nil || e.pw[in.c+l*in.sc].cells != nil
	case opCumsum:
		return e.pw[in.a+l*in.sa].cells != nil || l > 0 && e.pw[in.dst+l-1].cells != nil
	}
	return e.pw[in.a+l*in.sa].cells != nil || isBinary(in.op) && e.pw[in.b+l*in.sb].cells != nil
}

// isBinary reports operations that read operands a and b (and no more).
func isBinary(op opcode) bool {
	switch op {
	case opConst, opVar, opVConst, opSelect:
		return false
	}
	return !op.unary()
}

// startPieces makes cell i the min (or max) of the smooth cells a and b.
func (e *Encloser) startPieces(i int32, max bool, a, b int32) {
	if e.pw == nil {
		e.kinked = true
		return
	}
	e.setPieces(i, pieceSet{max: max, cells: []int32{a, b}})
}

// absPieces makes cell i = |a| the max of a and -a.
func (e *Encloser) absPieces(i, a int32) {
	if e.pw == nil {
		e.kinked = true
		return
	}
	if n, ok := e.apply(opNeg, 0, a, a); ok {
		e.setPieces(i, pieceSet{max: true, cells: []int32{a, n}})
		return
	}
	e.kinked = true
}

// apply evaluates op on cells a, b into a fresh scratch cell.
func (e *Encloser) apply(op opcode, k float64, a, b int32) (int32, bool) {
	if int(e.next) >= len(e.val) {
		return 0, false
	}
	s := e.next
	e.next++
	in := cell{op: op, w: 1, dst: s, a: a, b: b, k: k}
	e.smoothLane(&in, 0)
	return s, true
}

// piecesOf is cell c as a piece set: its own, or c alone (smooth).
func (e *Encloser) piecesOf(c int32) (pieceSet, bool) {
	if s := e.pw[c]; s.cells != nil {
		return s, true
	}
	return pieceSet{cells: []int32{c}}, false
}

// piecewiseLane encloses lane l when an operand is piecewise: the hull
// first (a valid enclosure of the value), then the branches where the
// operation keeps the min/max form; otherwise the box is kinked.
func (e *Encloser) piecewiseLane(in *cell, l int32) {
	kinked := e.kinked
	e.smoothLane(in, l)
	e.kinked = kinked
	i := in.dst + l
	s, ok := e.piecewise(in, l)
	if !ok || len(s.cells) > maxPieces {
		e.kinked = true
		return
	}
	if s.cells != nil {
		e.setPieces(i, s)
	}
}

// piecewise is the branch set of lane l, or false when the operation
// does not keep the form.
func (e *Encloser) piecewise(in *cell, l int32) (pieceSet, bool) {
	ia, ib := in.a+l*in.sa, in.b+l*in.sb
	switch in.op {
	case opAdd, opSub:
		return e.combine(in.op, ia, ib)
	case opNeg:
		return e.mapPieces(ia, opNeg, 0, -1, 0)
	case opMul, opDiv:
		return e.scaled(in.op, ia, ib)
	case opMin, opMax:
		a, _ := e.piecesOf(ia)
		b, _ := e.piecesOf(ib)
		max := in.op == opMax
		if len(a.cells) > 1 && a.max != max || len(b.cells) > 1 && b.max != max {
			return pieceSet{}, false
		}
		return pieceSet{max: max, cells: append(append([]int32(nil), a.cells...), b.cells...)}, true
	case opSelect:
		c := e.val[in.c+l*in.sc]
		if e.pw[in.c+l*in.sc].cells != nil {
			return pieceSet{}, false
		}
		switch {
		case !c.Contains(0):
			return e.pw[ia], true
		case c.IsZero():
			return e.pw[ib], true
		}
		return pieceSet{}, false
	case opVSum:
		acc := in.a
		set, _ := e.piecesOf(acc)
		for s := in.a + 1; s < in.a+in.n; s++ {
			var ok bool
			if set, ok = e.combineSets(opAdd, set, s); !ok {
				return set, false
			}
		}
		return set, true
	case opCumsum:
		if l == 0 {
			return e.pw[ia], true
		}
		return e.combine(opAdd, in.dst+l-1, ia)
	}
	if dir := e.monotone(in, e.val[ia]); dir != 0 {
		return e.mapPieces(ia, in.op, in.k, dir, 0)
	}
	return pieceSet{}, false
}

// monotone is +1 when the one-variable operation is nondecreasing over a
// (keeping min a min), -1 when nonincreasing, 0 when neither or unknown.
func (e *Encloser) monotone(in *cell, a iv.Interval) int {
	switch in.op {
	case opExp, opExpm1, opLn, opLog1p, opSqrt:
		return 1
	case opSq:
		return signOf(a)
	case opPowK:
		switch {
		case a.Lo >= 0 && in.k > 0:
			return 1
		case a.Lo > 0 && in.k < 0:
			return -1
		}
	case opPowB:
		switch {
		case in.k > 1:
			return 1
		case in.k > 0 && in.k < 1:
			return -1
		}
	case opXLnX:
		switch {
		case a.Lo >= 1/math.E:
			return 1
		case a.Lo >= 0 && a.Hi <= 1/math.E:
			return -1
		}
	}
	return 0
}

// signOf is +1 for an interval >= 0, -1 for one <= 0, else 0.
func signOf(a iv.Interval) int {
	switch {
	case a.Lo >= 0:
		return 1
	case a.Hi <= 0:
		return -1
	}
	return 0
}

// mapPieces applies a one-variable op (b: its second operand, a smooth
// cell, for binary ops applied to one side) to every branch of cell a;
// dir -1 turns min into max.
func (e *Encloser) mapPieces(a int32, op opcode, k float64, dir int, b int32) (pieceSet, bool) {
	set, _ := e.piecesOf(a)
	out := pieceSet{max: set.max != (dir < 0)}
	for _, c := range set.cells {
		r, ok := e.apply(op, k, c, b)
		if !ok {
			return out, false
		}
		out.cells = append(out.cells, r)
	}
	return out, true
}

// scaled is a·b or a/b with one side piecewise and the other smooth of
// one sign: the product keeps the form pointwise.
func (e *Encloser) scaled(op opcode, ia, ib int32) (pieceSet, bool) {
	pa, pb := e.pw[ia].cells != nil, e.pw[ib].cells != nil
	switch {
	case pa && !pb:
		if dir := strictSign(e.val[ib]); dir != 0 {
			return e.mapPieces(ia, op, 0, dir, ib)
		}
	case pb && !pa && op == opMul:
		return e.scaled(op, ib, ia)
	}
	return pieceSet{}, false
}

// strictSign is the sign of an interval that excludes 0, else 0.
func strictSign(a iv.Interval) int {
	switch {
	case a.Lo > 0:
		return 1
	case a.Hi < 0:
		return -1
	}
	return 0
}

// combine is a ± b, each smooth or piecewise of a kind that agrees
// (a min minus a max is a min).
func (e *Encloser) combine(op opcode, ia, ib int32) (pieceSet, bool) {
	a, _ := e.piecesOf(ia)
	return e.combineSets(op, a, ib)
}

func (e *Encloser) combineSets(op opcode, a pieceSet, ib int32) (pieceSet, bool) {
	b, _ := e.piecesOf(ib)
	bmax := b.max
	if op == opSub {
		bmax = !bmax
	}
	max := a.max
	switch {
	case len(a.cells) <= 1 && len(b.cells) <= 1:
	case len(a.cells) <= 1:
		max = bmax
	case len(b.cells) > 1 && bmax != a.max:
		return pieceSet{}, false
	}
	if len(a.cells)*len(b.cells) > maxPieces {
		return pieceSet{}, false
	}
	out := pieceSet{max: max}
	for _, x := range a.cells {
		for _, y := range b.cells {
			r, ok := e.apply(op, 0, x, y)
			if !ok {
				return out, false
			}
			out.cells = append(out.cells, r)
		}
	}
	return out, true
}

// outputPieces copies the branches of the output cell into dst.
func (e *Encloser) outputPieces(dst *Enclosure, out int32) {
	dst.Pieces = dst.Pieces[:0]
	dst.Piecewise, dst.Max = false, false
	s := e.pw[out]
	if s.cells == nil || e.kinked {
		return
	}
	nd := int32(e.nd)
	for _, c := range s.cells {
		p := Piece{Value: e.val[c]}
		if e.order >= 1 {
			p.Grad = append([]iv.Interval(nil), e.grad[c*nd:(c+1)*nd]...)
		}
		if e.order >= 2 {
			p.Hess = append([]iv.Interval(nil), e.hess[c*nd*nd:(c+1)*nd*nd]...)
		}
		dst.Pieces = append(dst.Pieces, p)
	}
	dst.Piecewise, dst.Max = true, s.max
}
