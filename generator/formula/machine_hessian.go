package formula

import (
	"fmt"
	"math"
)

// Hessian writes the matrix of second partial derivatives (row-major,
// NumVars × NumVars) into hess and the gradient into grad, by second-order
// forward-mode differentiation, and returns the value.
func (m *Machine) Hessian(hess, grad, vars []float64) float64 {
	m.checkVars(vars)
	nv := m.nv
	if len(grad) != nv || len(hess) != nv*nv {
		panic(fmt.Sprintf("formula: Hessian needs grad of %d and hess of %d", nv, nv*nv))
	}
	ns := len(m.val)
	if m.grad == nil {
		// Variables have unit gradients and constants zero ones; both are
		// fixed, so they are set once here.
		m.grad = make([]float64, ns*nv)
		m.hess = make([]float64, ns*nv*nv)
		for k := 0; k < nv; k++ {
			m.grad[k*nv+k] = 1
		}
	}
	m.forward(vars)
	for j := range m.prog.code {
		in := &m.prog.code[j]
		for l := int32(0); l < in.w; l++ {
			m.hessLane(in, l)
		}
	}
	out := int(m.prog.out)
	copy(grad, m.grad[out*nv:(out+1)*nv])
	copy(hess, m.hess[out*nv*nv:(out+1)*nv*nv])
	return m.val[out]
}

// hessLane computes the gradient and Hessian of lane l of an instruction.
//
// Numeric kernel: one pass over the grid (or the lanes) kept whole so
// the arithmetic reads in one place; it stays longer than 80 lines on purpose.
func (m *Machine) hessLane(in *cell, l int32) {
	v, nv := m.val, m.nv
	i := int(in.dst + l)
	ia, ib := int(in.a+l*in.sa), int(in.b+l*in.sb)
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*nv*nv : (i+1)*nv*nv]
	clear(G)
	clear(H)
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
		}
	case opVSum:
		for s := int(in.a); s < int(in.a+in.n); s++ {
			axpyNZ(G, 1, m.grad[s*nv:(s+1)*nv])
			axpyNZ(H, 1, m.hess[s*nv*nv:(s+1)*nv*nv])
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
		axpyNZ(G, 1, m.grad[ia*nv:(ia+1)*nv])
		axpyNZ(H, 1, m.hess[ia*nv*nv:(ia+1)*nv*nv])
	}
}

func (m *Machine) copyCell(dst, src int) {
	nv := m.nv
	copy(m.grad[dst*nv:(dst+1)*nv], m.grad[src*nv:(src+1)*nv])
	copy(m.hess[dst*nv*nv:(dst+1)*nv*nv], m.hess[src*nv*nv:(src+1)*nv*nv])
}

// unary applies the chain rule for z = f(u): G = f' Gu, H = f' Hu + f” Gu Guᵀ.
// Terms whose coefficient is exactly zero are skipped so that a structural
// zero never meets an infinite factor.
func (m *Machine) unary(i, u int, fu, fuu float64) {
	nv := m.nv
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*nv*nv : (i+1)*nv*nv]
	Gu := m.grad[u*nv : (u+1)*nv]
	axpyNZ(G, fu, Gu)
	axpyNZ(H, fu, m.hess[u*nv*nv:(u+1)*nv*nv])
	outerNZ(H, fuu, Gu, Gu)
}

// binary applies the chain rule for z = f(a, b) with partials fa, fb and
// second partials faa, fbb, fab.
func (m *Machine) binary(i, ia, ib int, fa, fb, faa, fbb, fab float64) {
	nv := m.nv
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*nv*nv : (i+1)*nv*nv]
	Ga := m.grad[ia*nv : (ia+1)*nv]
	Gb := m.grad[ib*nv : (ib+1)*nv]
	axpyNZ(G, fa, Ga)
	axpyNZ(G, fb, Gb)
	axpyNZ(H, fa, m.hess[ia*nv*nv:(ia+1)*nv*nv])
	axpyNZ(H, fb, m.hess[ib*nv*nv:(ib+1)*nv*nv])
	outerNZ(H, faa, Ga, Ga)
	outerNZ(H, fbb, Gb, Gb)
	if fab != 0 {
		outerNZ(H, fab, Ga, Gb)
		outerNZ(H, fab, Gb, Ga)
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
