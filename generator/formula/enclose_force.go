package formula

import (
	"fmt"

	"scorewright/internal/interval"
)

// Forced comparisons. On a box whose face holds the break of an if (p1 <
// 0.3 on [0.2, 0.3]) the comparison is undecided — it fails at the face —
// and the box is kinked, however small it is cut. A caller that has
// proved, on its own terms, on which side of a comparison the box lies
// (apart from the face, where it proves the two branches meet) can force
// the comparison to that side: the enclosure is then the one of the
// branch extended to the closed box, smooth, with its derivatives. The
// caller answers for the forcing; nothing here checks it.

// ForceComparison makes switching quantity j (in the order of
// Machine.Switches) a comparison that holds (holds true) or fails on
// every box until ClearForced; false when j is not a comparison.
func (e *Encloser) ForceComparison(j int, holds bool) bool {
	cell, ok := e.comparisonCell(j)
	if !ok {
		return false
	}
	if e.forced == nil {
		e.forced = map[int32]bool{}
	}
	e.forced[cell] = holds
	return true
}

// ClearForced undoes every ForceComparison.
func (e *Encloser) ClearForced() { clear(e.forced) }

// comparisonCell is the cell of switching quantity j, when it is a
// comparison.
func (e *Encloser) comparisonCell(j int) (int32, bool) {
	k := 0
	for c := range e.prog.code {
		in := &e.prog.code[c]
		if !switching(in.op) {
			continue
		}
		if j < k+int(in.w) {
			switch in.op {
			case opLt, opLe, opGt, opGe:
				return in.dst + int32(j-k), true
			}
			return 0, false
		}
		k += int(in.w)
	}
	return 0, false
}

// forcedComparison is the value of comparison cell i when it is forced.
func (e *Encloser) forcedComparison(i int32) (interval.Interval, bool) {
	if len(e.forced) == 0 {
		return interval.Interval{}, false
	}
	holds, ok := e.forced[i]
	if !ok {
		return interval.Interval{}, false
	}
	if holds {
		return interval.Point(1), true
	}
	return interval.Point(0), true
}

// ComparisonSwitch reports whether switching quantity j is a comparison a
// op b whose sides are both affine in the program's outcome variables
// p1..pn, or in all its variables when it has no outcome variables
// (through sums, differences and constant multiples): its
// quantity a - b is then affine on the simplex, so it changes sign at
// most once along any segment, and a break found between two adjacent
// floating-point numbers is the only one on that segment. holds reports
// the comparison's truth for the quantity q = a - b.
func (p *Program) ComparisonSwitch(j int) (affine bool, holds func(q float64) bool) {
	e := &Encloser{prog: p}
	cell, ok := e.comparisonCell(j)
	if !ok {
		return false, nil
	}
	n := 0
	for n < len(p.varNames) && p.varNames[n] == fmt.Sprintf("p%d", n+1) {
		n++
	}
	if n == 0 {
		// A formula in other variables (x of a point forecast): affine
		// in all of them.
		n = len(p.varNames)
	}
	in := p.code[e.ownerOf(cell)]
	l := cell - in.dst
	aff := affineCells(p, n)
	if aff[in.a+l*in.sa] == nil || aff[in.b+l*in.sb] == nil {
		return false, nil
	}
	switch in.op {
	case opLt:
		return true, func(q float64) bool { return q < 0 }
	case opLe:
		return true, func(q float64) bool { return q <= 0 }
	case opGt:
		return true, func(q float64) bool { return q > 0 }
	}
	return true, func(q float64) bool { return q >= 0 }
}

// ownerOf is the instruction that writes cell c.
func (e *Encloser) ownerOf(c int32) int {
	for j, in := range e.prog.code {
		if c >= in.dst && c < in.dst+in.w {
			return j
		}
	}
	return -1
}

// ComparisonQuantity is the enclosure of a - b of comparison j (in the
// order of Machine.Switches) on the box of the last Enclose: [0, 0] at a
// point proves the point lies exactly on the comparison's break.
func (e *Encloser) ComparisonQuantity(j int) (interval.Interval, bool) {
	cell, ok := e.comparisonCell(j)
	if !ok {
		return interval.Interval{}, false
	}
	in := e.prog.code[e.ownerOf(cell)]
	l := cell - in.dst
	return interval.Sub(e.val[in.a+l*in.sa], e.val[in.b+l*in.sb]), true
}

// BranchesMeet reports, after an Enclose of order >= 1 on a point box,
// whether every if whose condition is comparison j takes exactly the same
// value and gradient on both branches there (both enclosures one and the
// same point): then the program is C1 across the comparison's break at
// that point, whatever surrounds the if. sameValue reports the values
// alone. found is false when no if reads the comparison directly.
func (e *Encloser) BranchesMeet(j int) (found, sameValue, sameGrad bool) {
	cell, ok := e.comparisonCell(j)
	if !ok || e.order < 1 {
		return false, false, false
	}
	sameValue, sameGrad = true, true
	point := func(v interval.Interval) bool { return v.Lo == v.Hi }
	for _, in := range e.prog.code {
		if in.op != opSelect {
			continue
		}
		for l := int32(0); l < in.w; l++ {
			if in.c+l*in.sc != cell {
				continue
			}
			found = true
			a, b := in.a+l*in.sa, in.b+l*in.sb
			va, vb := e.val[a], e.val[b]
			sameValue = sameValue && point(va) && point(vb) && va.Lo == vb.Lo
			for d := 0; d < e.nd; d++ {
				ga, gb := e.grad[int(a)*e.nd+d], e.grad[int(b)*e.nd+d]
				sameGrad = sameGrad && point(ga) && point(gb) && ga.Lo == gb.Lo
			}
		}
	}
	return found, found && sameValue, found && sameValue && sameGrad
}
