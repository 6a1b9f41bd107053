package formula

import (
	"fmt"
	"math"
)

// Hessian writes the matrix of second partial derivatives (row-major,
// NumVars × NumVars) into hess and the gradient into grad, by second-order
// forward-mode differentiation, and returns the value.
//
// A separable program (Program.Separable: a sum of one-variable terms)
// keeps only the diagonal of every cell's Hessian, so the pass costs
// O(cells × n), not O(cells × n²). The result is the dense pass's, bit for
// bit: in a separable program every product of gradients the chain rule
// forms is of gradients that read one and the same variable (or none), so
// the dense pass never writes an off-diagonal entry, and it forms each
// diagonal entry from the same terms in the same order. The one exception
// is a select whose condition is NaN, which makes a whole gradient NaN;
// the dense pass then spreads NaN off the diagonal, so the machine redoes
// that evaluation densely and stays dense from then on.
func (m *Machine) Hessian(hess, grad, vars []float64) float64 {
	m.checkVars(vars)
	nv := m.nv
	if len(grad) != nv || len(hess) != nv*nv {
		panic(fmt.Sprintf("formula: Hessian needs grad of %d and hess of %d", nv, nv*nv))
	}
	if m.grad == nil {
		m.secondOrder(m.prog.Separable())
	}
	m.forward(vars)
	m.hessPass()
	if m.diag && m.nanGrad {
		m.secondOrder(false)
		m.hessPass()
	}
	out := int(m.prog.out)
	copy(grad, m.grad[out*nv:(out+1)*nv])
	if !m.diag {
		copy(hess, m.hess[out*nv*nv:(out+1)*nv*nv])
		return m.val[out]
	}
	clear(hess)
	for k, h := range m.hess[out*nv : (out+1)*nv] {
		hess[k*nv+k] = h
	}
	return m.val[out]
}

// HessianRounding writes into hess and grad a bound on the rounding error
// of each entry Hessian (and Gradient) computes at vars, and returns the
// value. Every derivative is a sum of chain-rule terms; the pass forms the
// same terms with absolute values (|f'|·|Gu|, |f”|·|Gu||Gu|ᵀ, ...), so it
// gives Σ|terms|, and the bound is (cells + 1)·ε times it — the running
// error bound of a sum (Higham 2002, Sec. 3.1, γ_k·Σ|x_i| to first order),
// with one rounding per cell. Terms that cancel exactly, as in
// p·(1/p - 1) whose gradient is 1/p - 1 - 1/p, leave their size here
// though the derivative is 0: that size, not the result, is what a
// tolerance must allow for.
func (m *Machine) HessianRounding(hess, grad, vars []float64) float64 {
	m.abs = true
	v := m.Hessian(hess, grad, vars)
	m.abs = false
	u := float64(m.prog.cells+1) * 0x1p-53
	for k := range grad {
		grad[k] *= u
	}
	for k := range hess {
		hess[k] *= u
	}
	return v
}

// secondOrder allocates the second-order store, dense or diagonal.
// Variables have unit gradients and constants zero ones; both are fixed,
// so they are set once here.
func (m *Machine) secondOrder(diag bool) {
	nv, ns := m.nv, len(m.val)
	m.diag, m.hw, m.sup = diag, nv*nv, nil
	if diag {
		m.hw, m.sup = nv, supports(m.prog)
	}
	m.grad = make([]float64, ns*nv)
	m.hess = make([]float64, ns*m.hw)
	for k := 0; k < nv; k++ {
		m.grad[k*nv+k] = 1
	}
}

func (m *Machine) hessPass() {
	m.nanGrad = false
	for j := range m.prog.code {
		in := &m.prog.code[j]
		for l := int32(0); l < in.w; l++ {
			m.hessLane(in, l)
		}
	}
}

// hessLane computes the gradient and Hessian of lane l of an instruction.
//
// Numeric kernel: one pass over the grid (or the lanes) kept whole so
// the arithmetic reads in one place; it stays longer than 80 lines on purpose.
func (m *Machine) hessLane(in *cell, l int32) {
	v, nv := m.val, m.nv
	i := int(in.dst + l)
	ia, ib := int(in.a+l*in.sa), int(in.b+l*in.sb)
	hw := m.hw
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*hw : (i+1)*hw]
	switch k := m.support(i); {
	case k >= 0:
		G[k], H[k] = 0, 0 // the rest is zero, always
	case k == -2:
		clear(G)
		clear(H)
	}
	a, b, z := v[ia], v[ib], v[i]
	switch in.op {
	case opAdd:
		m.binary(i, ia, ib, 1, 1, 0, 0, 0)
	case opSub:
		m.binary(i, ia, ib, 1, -1, 0, 0, 0)
	case opMul:
		m.binary(i, ia, ib, b, a, 0, 0, 1)
	case opDiv:
		m.binary(i, ia, ib, 1/b, -z/b, 0, 2*z/(b*b), -1/(b*b))
	case opNeg:
		m.unary(i, ia, -1, 0)
	case opSq:
		m.unary(i, ia, 2*a, 2)
	case opPowK:
		k := in.k
		// mul0: for a huge exponent k(k-1) overflows while a^(k-2)
		// underflows; the product's limit is 0, not NaN.
		m.unary(i, ia, mul0(k, math.Pow(a, k-1)), mul0(k*(k-1), math.Pow(a, k-2)))
	case opPowB:
		lk := math.Log(in.k)
		m.unary(i, ia, z*lk, z*lk*lk)
	case opPow:
		la := math.Log(a)
		m.binary(i, ia, ib, b*math.Pow(a, b-1), mul0(z, la), b*(b-1)*math.Pow(a, b-2), mul0(z, la*la),
			math.Pow(a, b-1)*(1+mul0(b, la)))
	case opExp:
		m.unary(i, ia, z, z)
	case opExpm1:
		ea := math.Exp(a)
		m.unary(i, ia, ea, ea)
	case opLog1p:
		u := 1 + a
		m.unary(i, ia, 1/u, -1/(u*u))
	case opLn:
		m.unary(i, ia, 1/a, -1/(a*a))
	case opXLnX:
		m.unary(i, ia, math.Log(a)+1, 1/a)
	case opSqrt:
		m.unary(i, ia, 0.5/z, -0.25/(z*a))
	case opAbs:
		m.unary(i, ia, sign(a), 0)
	case opMin, opMax:
		src := ia
		if a != z {
			src = ib
		}
		m.copyCell(i, src)
	case opLt, opLe, opGt, opGe:
	case opSelect:
		c := v[in.c+l*in.sc]
		src := ia
		if c == 0 {
			src = ib
		}
		m.copyCell(i, src)
		if c != c {
			for k := range G {
				G[k] = math.NaN()
			}
			m.nanGrad = true
		}
	case opVSum:
		for s := int(in.a); s < int(in.a+in.n); s++ {
			m.addCell(G, H, s)
		}
	case opVSumSq:
		for s := int(in.a); s < int(in.a+in.n); s++ {
			m.unary(i, s, 2*v[s], 2)
		}
	case opVSumXLnX:
		for s := int(in.a); s < int(in.a+in.n); s++ {
			m.unary(i, s, math.Log(v[s])+1, 1/v[s])
		}
	case opCumsum:
		// Lane l is lane l-1 plus a_l.
		if l > 0 {
			m.copyCell(i, i-1)
		}
		m.addCell(G, H, ia)
	}
}

// support is the one variable cell i reads (-1: none, -2: several, or the
// machine is dense).
func (m *Machine) support(i int) int32 {
	if m.sup == nil {
		return -2
	}
	return m.sup[i]
}

func (m *Machine) copyCell(dst, src int) {
	nv, hw := m.nv, m.hw
	switch k := m.support(src); {
	case k == -1:
	case k >= 0:
		m.grad[dst*nv+int(k)], m.hess[dst*hw+int(k)] = m.grad[src*nv+int(k)], m.hess[src*hw+int(k)]
	default:
		copy(m.grad[dst*nv:(dst+1)*nv], m.grad[src*nv:(src+1)*nv])
		copy(m.hess[dst*hw:(dst+1)*hw], m.hess[src*hw:(src+1)*hw])
	}
}

// addCell adds cell s's gradient and Hessian to G and H (a sum's lane).
func (m *Machine) addCell(G, H []float64, s int) {
	nv, hw := m.nv, m.hw
	switch k := m.support(s); {
	case k == -1:
	case k >= 0:
		if g := m.grad[s*nv+int(k)]; g != 0 {
			G[k] += g
		}
		if h := m.hess[s*hw+int(k)]; h != 0 {
			H[k] += h
		}
	default:
		axpyNZ(G, 1, m.grad[s*nv:(s+1)*nv])
		axpyNZ(H, 1, m.hess[s*hw:(s+1)*hw])
	}
}

// unary applies the chain rule for z = f(u): G = f' Gu, H = f' Hu + f” Gu Guᵀ.
// Terms whose coefficient is exactly zero are skipped so that a structural
// zero never meets an infinite factor.
func (m *Machine) unary(i, u int, fu, fuu float64) {
	if m.abs {
		fu, fuu = math.Abs(fu), math.Abs(fuu)
	}
	nv, hw := m.nv, m.hw
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*hw : (i+1)*hw]
	if k := m.support(u); k != -2 {
		if k >= 0 {
			m.chain1(G, H, int(k), fu, 0, fuu, 0, 0, m.grad[u*nv+int(k)], 0, m.hess[u*hw+int(k)], 0)
		}
		return
	}
	Gu := m.grad[u*nv : (u+1)*nv]
	axpyNZ(G, fu, Gu)
	axpyNZ(H, fu, m.hess[u*hw:(u+1)*hw])
	m.outer(H, fuu, Gu, Gu)
}

// binary applies the chain rule for z = f(a, b) with partials fa, fb and
// second partials faa, fbb, fab.
func (m *Machine) binary(i, ia, ib int, fa, fb, faa, fbb, fab float64) {
	if m.abs {
		fa, fb, faa, fbb, fab = math.Abs(fa), math.Abs(fb), math.Abs(faa), math.Abs(fbb), math.Abs(fab)
	}
	nv, hw := m.nv, m.hw
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*hw : (i+1)*hw]
	if k := m.support(i); k != -2 {
		if k >= 0 {
			j := int(k)
			m.chain1(G, H, j, fa, fb, faa, fbb, fab, m.grad[ia*nv+j], m.grad[ib*nv+j], m.hess[ia*hw+j], m.hess[ib*hw+j])
		}
		return
	}
	Ga := m.grad[ia*nv : (ia+1)*nv]
	Gb := m.grad[ib*nv : (ib+1)*nv]
	axpyNZ(G, fa, Ga)
	axpyNZ(G, fb, Gb)
	axpyNZ(H, fa, m.hess[ia*hw:(ia+1)*hw])
	axpyNZ(H, fb, m.hess[ib*hw:(ib+1)*hw])
	m.outer(H, faa, Ga, Ga)
	m.outer(H, fbb, Gb, Gb)
	if fab != 0 {
		m.outer(H, fab, Ga, Gb)
		m.outer(H, fab, Gb, Ga)
	}
}

// chain1 is binary (and unary, with b's terms 0) where everything reads
// the one variable k: entry k of each axpyNZ and outer of the general
// chain rule, in the same order, with the same zero skips.
func (m *Machine) chain1(G, H []float64, k int, fa, fb, faa, fbb, fab, ga, gb, ha, hb float64) {
	g, h := G[k], H[k]
	if fa != 0 && ga != 0 {
		g += fa * ga
	}
	if fb != 0 && gb != 0 {
		g += fb * gb
	}
	if fa != 0 && ha != 0 {
		h += fa * ha
	}
	if fb != 0 && hb != 0 {
		h += fb * hb
	}
	h = outer1(h, faa, ga, ga)
	h = outer1(h, fbb, gb, gb)
	if fab != 0 {
		h = outer1(h, fab, ga, gb)
		h = outer1(h, fab, gb, ga)
	}
	G[k], H[k] = g, h
}

// outer1 is outerNZ on one entry: h + (s·x)·y, zero factors skipped.
func outer1(h, s, x, y float64) float64 {
	if s != 0 && x != 0 && y != 0 {
		h += s * x * y
	}
	return h
}

// supports finds, for every cell of p, the one variable it reads: -1 for
// none, -2 for more than one.
func supports(p *Program) []int32 {
	nv := len(p.varNames)
	sup := make([]int32, p.cells)
	for c := range sup {
		sup[c] = -1
	}
	for k := 0; k < nv; k++ {
		sup[k] = int32(k)
	}
	join := func(x, y int32) int32 {
		switch {
		case x == -1:
			return y
		case y == -1 || x == y:
			return x
		}
		return -2
	}
	for _, in := range p.code {
		for l := int32(0); l < in.w; l++ {
			i := in.dst + l
			a, b, c := in.a+l*in.sa, in.b+l*in.sb, in.c+l*in.sc
			s := int32(-2)
			switch {
			case in.op == opVSum || in.op == opVSumSq || in.op == opVSumXLnX:
				s = -1
				for k := in.a; k < in.a+in.n; k++ {
					s = join(s, sup[k])
				}
			case in.op == opCumsum:
				s = sup[a]
				if l > 0 {
					s = join(s, sup[i-1])
				}
			case in.op == opSelect:
				s = join(join(sup[a], sup[b]), sup[c])
			case in.op.unary():
				s = sup[a]
			case isBinary(in.op):
				s = join(sup[a], sup[b])
			}
			sup[i] = s
		}
	}
	return sup
}

// outer adds s x yᵀ to a cell's Hessian: all of it, or its diagonal.
func (m *Machine) outer(dst []float64, s float64, x, y []float64) {
	if m.diag {
		diagNZ(dst, s, x, y)
	} else {
		outerNZ(dst, s, x, y)
	}
}

// diagNZ adds the diagonal of s x yᵀ to dst, with outerNZ's arithmetic.
func diagNZ(dst []float64, s float64, x, y []float64) {
	if s == 0 {
		return
	}
	y = y[:len(x)]
	for k, xv := range x {
		if xv == 0 {
			continue
		}
		sx := s * xv
		if yv := y[k]; yv != 0 {
			dst[k] += sx * yv
		}
	}
}

// axpyNZ adds s*x to dst, skipping zero entries of x and a zero s.
func axpyNZ(dst []float64, s float64, x []float64) {
	if s == 0 {
		return
	}
	for k, xv := range x {
		if xv != 0 {
			dst[k] += s * xv
		}
	}
}

// outerNZ adds s * x yᵀ to the square matrix dst, skipping zero factors.
func outerNZ(dst []float64, s float64, x, y []float64) {
	if s == 0 {
		return
	}
	n := len(x)
	for r, xv := range x {
		if xv == 0 {
			continue
		}
		row := dst[r*n : (r+1)*n]
		sx := s * xv
		for c, yv := range y {
			if yv != 0 {
				row[c] += sx * yv
			}
		}
	}
}
