package formula

import (
	"fmt"

	"scorewright/internal/interval"
)

// Enclosure is what an Encloser proved about a program on a box of its
// variables: for every point of the box where the program is defined and
// twice differentiable, the value, gradient and Hessian lie in these
// intervals (Moore 1966; Hansen & Walster 2004).
type Enclosure struct {
	// Value encloses the program's value on the whole box.
	Value interval.Interval
	// Grad (order >= 1) encloses the gradient, one interval a variable
	// (a direction, for a simplex encloser).
	Grad []interval.Interval
	// Hess (order 2) encloses the Hessian, row-major, square.
	Hess []interval.Interval
	// Undefined: some operation may leave its domain on the box (ln or
	// sqrt of a negative, 0/0, a negative base to a fractional power);
	// the program may be NaN there.
	Undefined bool
	// Kinked: the derivatives do not hold on the whole box — an if, a
	// comparison, min, max or abs is undecided on it (a jump or a kink may
	// lie inside), a singular point of ln, sqrt, a division or a power
	// lies inside away from the faces of the simplex, or the value relied
	// on the limit convention 0·∞ = 0 (so may jump at the faces). Value
	// stays a valid enclosure; Grad and Hess hold only where smooth.
	Kinked bool
	// Piecewise: Kinked only because a min, max or abs is undecided, and
	// the program is exactly the min (Max false) or max (Max true) of the
	// smooth Pieces on the box, each with its own derivatives
	// (enclose_pieces.go).
	Piecewise, Max bool
	Pieces         []Piece
}

// Encloser evaluates a Program in interval arithmetic. It owns scratch
// space sized once; it is not safe for concurrent use — give each
// goroutine its own from the same Program.
type Encloser struct {
	prog *Program
	nv   int
	// nd is the number of directions derivatives are taken in: nv, or
	// n-1 on the simplex (NewSimplexEncloser).
	nd      int
	simplex bool
	val     []interval.Interval
	grad    []interval.Interval
	hess    []interval.Interval
	// owner is the instruction that writes each cell (-1 for variables
	// and constants).
	owner []int32
	// faceOnly marks cells whose zero set on the simplex lies in its
	// faces: a nonnegative (or nonpositive) affine combination of p1..pn
	// there, such as p2 or 1 - p1 for two outcomes. A singular point of ln,
	// x ln x, sqrt or a power at such an argument is a limit at the
	// boundary, not a kink inside.
	faceOnly []bool
	// pw holds the branches of piecewise cells (pwSet lists them, next is
	// the first free scratch cell, past the program's own).
	pw     []pieceSet
	pwSet  []int32
	next   int32
	kinked bool
	undef  bool
	order  int
	// forced holds the comparisons forced to one side (enclose_force.go).
	forced map[int32]bool
}

// NewEncloser returns an Encloser for p.
func (p *Program) NewEncloser() *Encloser {
	nv := len(p.varNames)
	ns := p.cells + scratchCells
	e := &Encloser{prog: p, nv: nv, nd: nv, val: make([]interval.Interval, ns), owner: make([]int32, ns), pw: make([]pieceSet, ns)}
	for i := range e.owner {
		e.owner[i] = -1
	}
	for j, in := range p.code {
		for l := int32(0); l < in.w; l++ {
			e.owner[in.dst+l] = int32(j)
		}
	}
	for k, c := range p.consts {
		e.val[nv+k] = interval.Point(c)
	}
	e.faceOnly = append(faceOnlyCells(p), make([]bool, scratchCells)...)
	return e
}

// NewSimplexEncloser returns an Encloser whose derivatives are taken
// along the simplex: in p1..p(n-1), with pn = 1 - p1 - ... - p(n-1), so
// Grad has n-1 entries and Hess is (n-1)×(n-1) — the gradient and
// Hessian of H restricted to the simplex in the basis e_a - e_n. Taking
// them by the chain rule, rather than projecting the full Hessian
// afterwards, keeps the enclosures narrower. The program must read
// exactly the outcome variables p1..pn (n >= 2).
func (p *Program) NewSimplexEncloser() *Encloser {
	e := p.NewEncloser()
	if e.nv < 2 {
		panic("formula: a simplex encloser needs at least two outcome variables")
	}
	e.nd, e.simplex = e.nv-1, true
	return e
}

// AtEdge declares that variable k (in the order of VarNames) stays >= 0
// on the domain and reaches 0 only at the domain's end, as a point
// forecast's x does on [0, hi]: a singular point of ln, sqrt or a power
// at x = 0 is then a limit at the edge, not a kink inside, as it is for
// a coordinate p_k at a face of the simplex.
func (e *Encloser) AtEdge(k int) { e.faceOnly[k] = true }

// Program returns the program the encloser runs.
func (e *Encloser) Program() *Program { return e.prog }

func (e *Encloser) alloc() {
	if e.grad != nil {
		return
	}
	nd, ns := e.nd, len(e.val)
	e.grad = make([]interval.Interval, ns*nd)
	e.hess = make([]interval.Interval, ns*nd*nd)
	for k := 0; k < nd; k++ {
		e.grad[k*nd+k] = interval.Point(1)
	}
	if e.simplex {
		last := e.nv - 1
		for k := 0; k < nd; k++ {
			e.grad[last*nd+k] = interval.Point(-1)
		}
	}
}

// Enclose evaluates the program on box (one interval a variable, in the
// order of VarNames) and writes what holds there into dst: the value,
// and with order 1 the gradient, with order 2 the Hessian too. dst's
// slices are reused when long enough.
func (e *Encloser) Enclose(dst *Enclosure, box []interval.Interval, order int) {
	if len(box) != e.nv {
		panic(fmt.Sprintf("formula: %d intervals given, program reads %d variables", len(box), e.nv))
	}
	e.order, e.kinked, e.undef = order, false, false
	if order > 0 {
		e.alloc()
	}
	e.resetPieces()
	copy(e.val, box)
	for j := range e.prog.code {
		in := &e.prog.code[j]
		for l := int32(0); l < in.w; l++ {
			e.lane(in, l)
		}
	}
	out := int(e.prog.out)
	e.outputPieces(dst, int32(out))
	dst.Value, dst.Kinked, dst.Undefined = e.val[out], e.kinked || e.pw[out].cells != nil, e.undef
	// Variables' and constants' cells carry their fixed derivatives
	// (unit vectors, zeros), so the output cell is read the same way
	// whatever wrote it.
	nd := e.nd
	dst.Grad, dst.Hess = dst.Grad[:0], dst.Hess[:0]
	if order >= 1 {
		dst.Grad = append(dst.Grad, e.grad[out*nd:(out+1)*nd]...)
	}
	if order >= 2 {
		dst.Hess = append(dst.Hess, e.hess[out*nd*nd:(out+1)*nd*nd]...)
	}
}

// faceOnlyCells finds, for a program over outcomes p1..pn, the cells that
// are affine in p and keep one sign on the simplex with zeros only on its
// faces. Coefficients are tracked in floating point; a cell whose
// arithmetic is not exact (beyond sums of small whole multiples) is
// simply not marked.
func faceOnlyCells(p *Program) []bool {
	n := 0
	for n < len(p.varNames) && p.varNames[n] == fmt.Sprintf("p%d", n+1) {
		n++
	}
	out := make([]bool, p.cells)
	if n == 0 {
		return out
	}
	for c, f := range affineCells(p, n) {
		if f == nil {
			continue
		}
		pos, neg := true, true
		for k := 1; k <= n; k++ {
			// On the simplex, c0 + sum c_k p_k = sum (c0 + c_k) p_k.
			v := f[0] + f[k]
			pos = pos && v >= 0
			neg = neg && v <= 0
		}
		out[c] = pos || neg
	}
	// A product (or positive power) of such cells keeps one sign too,
	// and vanishes only where a factor does: on the faces (p1*p2).
	for _, in := range p.code {
		for l := int32(0); l < in.w; l++ {
			a, b := in.a+l*in.sa, in.b+l*in.sb
			switch in.op {
			case opMul:
				out[in.dst+l] = out[in.dst+l] || out[a] && out[b]
			case opSq:
				out[in.dst+l] = out[in.dst+l] || out[a]
			case opPowK:
				out[in.dst+l] = out[in.dst+l] || out[a] && in.k > 0
			}
		}
	}
	return out
}

// affineCells are, for each cell of p, its coefficients of 1, p1..pn when
// the cell is affine in the first n variables (through sums, differences,
// negation and products with a constant), else nil.
func affineCells(p *Program, n int) [][]float64 {
	aff := make([][]float64, p.cells)
	nv := len(p.varNames)
	for k := 0; k < n; k++ {
		aff[k] = make([]float64, n+1)
		aff[k][k+1] = 1
	}
	for k, c := range p.consts {
		aff[nv+k] = make([]float64, n+1)
		aff[nv+k][0] = c
	}
	for _, in := range p.code {
		for l := int32(0); l < in.w; l++ {
			a, b := in.a+l*in.sa, in.b+l*in.sb
			var r []float64
			switch in.op {
			case opAdd:
				r = combine(aff[a], 1, aff[b], 1)
			case opSub:
				r = combine(aff[a], 1, aff[b], -1)
			case opNeg:
				r = combine(aff[a], -1, aff[a], 0)
			case opMul:
				if k, ok := constCell(p, b); ok {
					r = combine(aff[a], k, aff[a], 0)
				} else if k, ok := constCell(p, a); ok {
					r = combine(aff[b], k, aff[b], 0)
				}
			case opCumsum:
				r = aff[a]
				if l > 0 {
					r = combine(aff[in.dst+l-1], 1, aff[a], 1)
				}
			case opVSum:
				r = aff[in.a]
				for s := int32(1); s < in.n && r != nil; s++ {
					r = combine(r, 1, aff[in.a+s], 1)
				}
			}
			aff[in.dst+l] = r
		}
	}
	return aff
}

// combine is s·x + t·y of two coefficient vectors, nil when either is.
func combine(x []float64, s float64, y []float64, t float64) []float64 {
	if x == nil || y == nil {
		return nil
	}
	r := make([]float64, len(x))
	for i := range r {
		r[i] = s*x[i] + t*y[i]
	}
	return r
}

// constCell reports whether cell c is a constant, and its value.
func constCell(p *Program, c int32) (float64, bool) {
	nv := int32(len(p.varNames))
	if c >= nv && c < int32(p.base()) {
		return p.consts[c-nv], true
	}
	return 0, false
}
