package formula

import (
	"fmt"
	"math"
)

// Machine evaluates a Program. It owns scratch space sized once, so its
// methods do not allocate; it is not safe for concurrent use — give each
// goroutine its own Machine from the same Program.
type Machine struct {
	prog *Program
	nv   int
	base int
	val  []float64
	adj  []float64
	// aux keeps ln(a) of each opXLnX for the backward sweep.
	aux []float64
	// Second-order forward mode: gradient and Hessian of every slot,
	// allocated on first use of Hessian.
	grad []float64
	hess []float64
}

// NewMachine returns a Machine for p.
func (p *Program) NewMachine() *Machine {
	nv, base := len(p.varNames), p.base()
	total := base + len(p.code)
	m := &Machine{prog: p, nv: nv, base: base, val: make([]float64, total), adj: make([]float64, total), aux: make([]float64, total)}
	// Constants never change: place them once.
	copy(m.val[nv:base], p.consts)
	return m
}

// Program returns the program the machine runs.
func (m *Machine) Program() *Program { return m.prog }

func (m *Machine) checkVars(vars []float64) {
	if len(vars) != m.nv {
		panic(fmt.Sprintf("formula: %d variables given, program reads %d", len(vars), m.nv))
	}
}

// Value returns the formula's value at vars (p1..pn, then the scope's Vars).
func (m *Machine) Value(vars []float64) float64 {
	m.checkVars(vars)
	m.forward(vars)
	return m.val[m.prog.out]
}

func (m *Machine) forward(vars []float64) {
	v := m.val
	// Loops, not copy(): for a handful of variables the call costs more
	// than the copying.
	for k, x := range vars {
		v[k] = x
	}
	i := m.base
	for _, in := range m.prog.code {
		switch in.op {
		case opAdd:
			v[i] = v[in.a] + v[in.b]
		case opSub:
			v[i] = v[in.a] - v[in.b]
		case opMul:
			r := v[in.a] * v[in.b]
			if r != r {
				r = mul0(v[in.a], v[in.b])
			}
			v[i] = r
		case opDiv:
			v[i] = v[in.a] / v[in.b]
		case opNeg:
			v[i] = -v[in.a]
		case opSq:
			v[i] = v[in.a] * v[in.a]
		case opLn:
			v[i] = math.Log(v[in.a])
		case opXLnX:
			x := v[in.a]
			l := math.Log(x)
			m.aux[i] = l
			r := x * l
			if r != r {
				r = mul0(x, l)
			}
			v[i] = r
		case opSelect:
			c := v[in.c]
			switch {
			case c != c:
				v[i] = math.NaN()
			case c != 0:
				v[i] = v[in.a]
			default:
				v[i] = v[in.b]
			}
		default:
			v[i] = apply(in.op, v[in.a], v[in.b], in.k)
		}
		i++
	}
}

// Gradient writes the partial derivatives with respect to every variable
// into grad (len NumVars) by reverse-mode differentiation, and returns the
// value. Where a partial derivative is infinite it is ±Inf; where it is
// undefined, NaN.
func (m *Machine) Gradient(grad, vars []float64) float64 {
	m.checkVars(vars)
	if len(grad) != m.nv {
		panic(fmt.Sprintf("formula: gradient length %d, program reads %d variables", len(grad), m.nv))
	}
	m.forward(vars)
	v, adj := m.val, m.adj
	out := int(m.prog.out)
	for k := range adj[:out+1] {
		adj[k] = 0
	}
	adj[out] = 1
	code := m.prog.code
	for i := out; i >= m.base; i-- {
		g := adj[i]
		if g == 0 {
			// Nothing flows back from here; skipping also keeps 0 * Inf
			// partials of unused branches out of the result.
			continue
		}
		in := code[i-m.base]
		switch in.op {
		case opAdd:
			adj[in.a] += g
			adj[in.b] += g
		case opSub:
			adj[in.a] += g
			adj[in.b] -= g
		case opMul:
			adj[in.a] += mul0(g, v[in.b])
			adj[in.b] += mul0(g, v[in.a])
		case opDiv:
			b := v[in.b]
			adj[in.a] += g / b
			adj[in.b] -= mul0(g, v[i]) / b
		case opNeg:
			adj[in.a] -= g
		case opSq:
			adj[in.a] += 2 * mul0(g, v[in.a])
		case opLn:
			adj[in.a] += g / v[in.a]
		case opXLnX:
			adj[in.a] += g * (m.aux[i] + 1)
		default:
			m.backwardRare(in, i, g)
		}
	}
	for k := range grad {
		grad[k] = adj[k]
	}
	return v[out]
}

// backwardRare propagates the adjoint g of slot i through the less common
// operations; kept apart so the hot loop stays small.
func (m *Machine) backwardRare(in instr, i int, g float64) {
	v, adj := m.val, m.adj
	switch in.op {
	case opPowK:
		adj[in.a] += mul0(g, in.k*math.Pow(v[in.a], in.k-1))
	case opPowB:
		adj[in.a] += mul0(g, v[i]*math.Log(in.k))
	case opPow:
		a, b := v[in.a], v[in.b]
		adj[in.a] += mul0(g, b*math.Pow(a, b-1))
		adj[in.b] += mul0(g, mul0(v[i], math.Log(a)))
	case opExp:
		adj[in.a] += mul0(g, v[i])
	case opSqrt:
		adj[in.a] += g * 0.5 / v[i]
	case opAbs:
		adj[in.a] += g * sign(v[in.a])
	case opMin, opMax:
		if v[in.a] == v[i] {
			adj[in.a] += g
		} else {
			adj[in.b] += g
		}
	case opLt, opLe, opGt, opGe:
	case opSelect:
		c := v[in.c]
		switch {
		case c != c:
			adj[in.a] += math.NaN()
		case c != 0:
			adj[in.a] += g
		default:
			adj[in.b] += g
		}
	}
}

func sign(x float64) float64 {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	case x == 0:
		return 0
	}
	return math.NaN()
}

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
	v := m.val
	for j, in := range m.prog.code {
		i := m.base + j
		G := m.grad[i*nv : (i+1)*nv]
		H := m.hess[i*nv*nv : (i+1)*nv*nv]
		clear(G)
		clear(H)
		a, b := v[in.a], v[in.b]
		z := v[i]
		switch in.op {
		case opAdd:
			m.binary(i, in, 1, 1, 0, 0, 0)
		case opSub:
			m.binary(i, in, 1, -1, 0, 0, 0)
		case opMul:
			m.binary(i, in, b, a, 0, 0, 1)
		case opDiv:
			m.binary(i, in, 1/b, -z/b, 0, 2*z/(b*b), -1/(b*b))
		case opNeg:
			m.unary(i, in, -1, 0)
		case opSq:
			m.unary(i, in, 2*a, 2)
		case opPowK:
			k := in.k
			m.unary(i, in, k*math.Pow(a, k-1), k*(k-1)*math.Pow(a, k-2))
		case opPowB:
			l := math.Log(in.k)
			m.unary(i, in, z*l, z*l*l)
		case opPow:
			la := math.Log(a)
			m.binary(i, in, b*math.Pow(a, b-1), mul0(z, la), b*(b-1)*math.Pow(a, b-2), mul0(z, la*la),
				math.Pow(a, b-1)*(1+mul0(b, la)))
		case opExp:
			m.unary(i, in, z, z)
		case opLn:
			m.unary(i, in, 1/a, -1/(a*a))
		case opXLnX:
			m.unary(i, in, math.Log(a)+1, 1/a)
		case opSqrt:
			m.unary(i, in, 0.5/z, -0.25/(z*a))
		case opAbs:
			m.unary(i, in, sign(a), 0)
		case opMin, opMax:
			src := in.a
			if a != z {
				src = in.b
			}
			m.copySlot(i, int(src))
		case opLt, opLe, opGt, opGe:
		case opSelect:
			c := v[in.c]
			src := in.a
			if c == 0 {
				src = in.b
			}
			m.copySlot(i, int(src))
			if c != c {
				for k := range G {
					G[k] = math.NaN()
				}
			}
		}
	}
	out := int(m.prog.out)
	copy(grad, m.grad[out*nv:(out+1)*nv])
	copy(hess, m.hess[out*nv*nv:(out+1)*nv*nv])
	return v[out]
}

func (m *Machine) copySlot(dst, src int) {
	nv := m.nv
	copy(m.grad[dst*nv:(dst+1)*nv], m.grad[src*nv:(src+1)*nv])
	copy(m.hess[dst*nv*nv:(dst+1)*nv*nv], m.hess[src*nv*nv:(src+1)*nv*nv])
}

// unary applies the chain rule for z = f(u): G = f' Gu, H = f' Hu + f” Gu Guᵀ.
// Terms whose coefficient is exactly zero are skipped so that a structural
// zero never meets an infinite factor.
func (m *Machine) unary(i int, in instr, fu, fuu float64) {
	nv := m.nv
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*nv*nv : (i+1)*nv*nv]
	u := int(in.a)
	Gu := m.grad[u*nv : (u+1)*nv]
	Hu := m.hess[u*nv*nv : (u+1)*nv*nv]
	axpyNZ(G, fu, Gu)
	axpyNZ(H, fu, Hu)
	outerNZ(H, fuu, Gu, Gu)
}

// binary applies the chain rule for z = f(a, b) with partials fa, fb and
// second partials faa, fbb, fab.
func (m *Machine) binary(i int, in instr, fa, fb, faa, fbb, fab float64) {
	nv := m.nv
	G := m.grad[i*nv : (i+1)*nv]
	H := m.hess[i*nv*nv : (i+1)*nv*nv]
	ia, ib := int(in.a), int(in.b)
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
