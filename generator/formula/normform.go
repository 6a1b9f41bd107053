package formula

// NormForm is one term of the shape Program.NormTerms recognises, a sum
// of such terms plus an affine function of the variables:
//
//	Coef · (sum_k Weights[k] · p_k^Inner)^Outer
//
// It says only what the program computes, by its structure; whether that
// is concave is the caller's question (a certificate asks that Coef < 0,
// Inner > 1, every weight > 0 and Inner·Outer >= 1, which make it a
// negated power of a weighted Inner-norm).
type NormForm struct {
	// Coef is the factor in front of the power of the sum.
	Coef float64
	// Weights has one entry a variable: its weight in the sum, 0 for a
	// variable the sum does not read. Each weight was formed from
	// positive factors only, so its sign is exact even where its value
	// was rounded.
	Weights []float64
	// Inner is the exponent of every variable in the sum.
	Inner float64
	// Outer is the exponent the sum is raised to (1 when it is not).
	Outer float64
}

// normShape is what normCells knows of one cell.
type normShape uint8

const (
	shUnknown normShape = iota
	shConst             // a number, its value known
	shAffine            // an affine function of the variables (constants too)
	shPowSum            // sum of w_k p_k^a, every w_k >= 0, some > 0
	shNorm              // a sum of terms c · (power sum)^k, plus affine
)

// normCell is one cell's shape with what it carries.
type normCell struct {
	shape normShape
	val   float64    // shConst
	w     []float64  // shPowSum: the weights of the sum
	a     float64    // shPowSum: the inner exponent
	terms []NormForm // shNorm
}

// NormTerms reports whether the whole program is, by its structure, a sum
// of terms c·(sum_k w_k p_k^a)^e plus an affine function, and if so the
// terms.
// It follows the cells exactly: variables and numbers; a variable to a
// constant power (or squared) as a term of a sum, terms of one exponent
// added (or summed over lanes) and multiplied or divided by positive
// numbers; the sum to a constant power (powk, sq, sqrt); such terms
// times or divided by a nonzero number, negated, added to one another and
// plus or minus affine functions (variables, numbers, their sums,
// differences and multiples). Anything else — another function, a
// product of two variable cells, a min, an if, a power of a term — leaves
// it unrecognised, so a formula that differs from the shape by any term
// is not matched.
func (p *Program) NormTerms() ([]NormForm, bool) {
	nv := len(p.varNames)
	cells := make([]normCell, p.cells)
	for k := 0; k < nv; k++ {
		cells[k] = normCell{shape: shAffine}
	}
	for c := nv; c < p.base(); c++ {
		cells[c] = numberCell(p.consts[c-nv])
	}
	for _, in := range p.code {
		for l := int32(0); l < in.w; l++ {
			cells[in.dst+l] = normStep(cells, in, l, nv)
		}
	}
	out := cells[p.out]
	if out.shape != shNorm {
		return nil, false
	}
	return out.terms, true
}

// normStep is the shape of lane l of instruction in.
func normStep(cells []normCell, in cell, l int32, nv int) normCell {
	x := cells[in.a+l*in.sa]
	y := cells[in.b+l*in.sb]
	varTerm := func(k float64) normCell {
		v := in.a + l*in.sa
		if int(v) >= nv {
			return normCell{}
		}
		w := make([]float64, nv)
		w[v] = 1
		return normCell{shape: shPowSum, w: w, a: k}
	}
	switch in.op {
	case opPowK:
		if int(in.a+l*in.sa) < nv {
			return varTerm(in.k)
		}
		return raise(x, in.k)
	case opSq:
		if int(in.a+l*in.sa) < nv {
			return varTerm(2)
		}
		return raise(x, 2)
	case opSqrt:
		return raise(x, 0.5)
	case opNeg:
		return scale(x, -1)
	case opMul:
		switch {
		case x.shape == shConst:
			return scale(y, x.val)
		case y.shape == shConst:
			return scale(x, y.val)
		}
	case opDiv:
		if y.shape == shConst && y.val != 0 {
			return scale(x, 1/y.val)
		}
	case opAdd:
		return add(x, y)
	case opSub:
		return add(x, scale(y, -1))
	case opVSum, opVSumSq:
		var sum normCell
		for k := in.a; k < in.a+in.n; k++ {
			term := cells[k]
			if in.op == opVSumSq {
				if int(k) >= nv {
					return normCell{}
				}
				w := make([]float64, nv)
				w[k] = 1
				term = normCell{shape: shPowSum, w: w, a: 2}
			}
			if k == in.a {
				sum = term
			} else {
				sum = add(sum, term)
			}
		}
		return sum
	}
	return normCell{}
}

// numberCell is the number v; an infinite or NaN one is not matched (a
// generator with an infinite term is no norm shape).
func numberCell(v float64) normCell {
	if v != v || v-v != 0 {
		return normCell{}
	}
	return normCell{shape: shConst, val: v}
}

// affineLike reports a cell that is an affine function (a number too).
func affineLike(x normCell) bool { return x.shape == shConst || x.shape == shAffine }

// raise is x^k for a constant k: a power sum to a power is the norm
// shape; nothing else is matched.
func raise(x normCell, k float64) normCell {
	if x.shape != shPowSum {
		return normCell{}
	}
	return normTerm(NormForm{Coef: 1, Weights: x.w, Inner: x.a, Outer: k})
}

// scale is s·x. A power sum keeps its shape only under a positive factor
// (its weights stay positive); under a negative one it becomes the norm
// shape with outer exponent 1.
func scale(x normCell, s float64) normCell {
	if s != s || s-s != 0 {
		return normCell{}
	}
	switch x.shape {
	case shConst:
		return numberCell(s * x.val)
	case shAffine:
		return x
	case shPowSum:
		if s > 0 {
			w := make([]float64, len(x.w))
			for i, v := range x.w {
				w[i] = s * v
			}
			return normCell{shape: shPowSum, w: w, a: x.a}
		}
		if s < 0 {
			return normTerm(NormForm{Coef: s, Weights: x.w, Inner: x.a, Outer: 1})
		}
	case shNorm:
		if s != 0 {
			terms := make([]NormForm, len(x.terms))
			for i, t := range x.terms {
				t.Coef *= s
				terms[i] = t
			}
			return normCell{shape: shNorm, terms: terms}
		}
	}
	return normCell{}
}

// add is x + y: affine plus affine, power sums of one exponent, and sums
// of norm terms (a power sum counts as one with factor 1) plus one
// another or affine.
func add(x, y normCell) normCell {
	switch {
	case x.shape == shConst && y.shape == shConst:
		return numberCell(x.val + y.val)
	case affineLike(x) && affineLike(y):
		return normCell{shape: shAffine}
	case x.shape == shPowSum && y.shape == shPowSum && x.a == y.a:
		w := make([]float64, len(x.w))
		for i := range w {
			w[i] = x.w[i] + y.w[i]
		}
		return normCell{shape: shPowSum, w: w, a: x.a}
	case affineLike(y):
		return asNorm(x)
	case affineLike(x):
		return asNorm(y)
	}
	nx, ny := asNorm(x), asNorm(y)
	if nx.shape != shNorm || ny.shape != shNorm {
		return normCell{}
	}
	return normCell{shape: shNorm, terms: append(append([]NormForm(nil), nx.terms...), ny.terms...)}
}

// normTerm is a sum of one norm term.
func normTerm(t NormForm) normCell { return normCell{shape: shNorm, terms: []NormForm{t}} }

// asNorm reads a power sum as the norm term 1·S^1, and passes a sum of
// norm terms through (the affine addend it gains is not tracked).
func asNorm(x normCell) normCell {
	switch x.shape {
	case shPowSum:
		return normTerm(NormForm{Coef: 1, Weights: x.w, Inner: x.a, Outer: 1})
	case shNorm:
		return x
	}
	return normCell{}
}
