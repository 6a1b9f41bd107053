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
	val  []float64
	adj  []float64
	// Second-order forward mode: gradient and Hessian of every slot,
	// allocated on first use of Hessian.
	grad []float64
	hess []float64
}

// NewMachine returns a Machine for p.
func (p *Program) NewMachine() *Machine {
	return &Machine{prog: p, nv: len(p.varNames), val: make([]float64, len(p.code)), adj: make([]float64, len(p.code))}
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
	for i, in := range m.prog.code {
		switch in.op {
		case opConst:
			v[i] = in.k
		case opVar:
			v[i] = vars[in.a]
		case opAdd:
			v[i] = v[in.a] + v[in.b]
		case opSub:
			v[i] = v[in.a] - v[in.b]
		case opMul:
			v[i] = mul0(v[in.a], v[in.b])
		case opDiv:
			v[i] = v[in.a] / v[in.b]
		case opNeg:
			v[i] = -v[in.a]
		case opSq:
			v[i] = v[in.a] * v[in.a]
		case opLn:
			v[i] = math.Log(v[in.a])
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
	for i := range adj {
		adj[i] = 0
	}
	for i := range grad {
		grad[i] = 0
	}
	out := m.prog.out
	adj[out] = 1
	code := m.prog.code
	for i := int(out); i >= 0; i-- {
		g := adj[i]
		if g == 0 {
			// Nothing flows back from here; skipping also keeps 0 * Inf
			// partials of unused branches out of the result.
			continue
		}
		in := code[i]
		switch in.op {
		case opConst:
		case opVar:
			grad[in.a] += g
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
		case opLn:
			adj[in.a] += g / v[in.a]
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
	return v[out]
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
	ns := len(m.prog.code)
	if m.grad == nil {
		m.grad = make([]float64, ns*nv)
		m.hess = make([]float64, ns*nv*nv)
	}
	m.forward(vars)
	v := m.val
	for i, in := range m.prog.code {
		G := m.grad[i*nv : (i+1)*nv]
		H := m.hess[i*nv*nv : (i+1)*nv*nv]
		clear(G)
		clear(H)
		var a, b float64
		if in.op != opVar && in.op != opConst {
			// For opVar, in.a is a variable index, not a slot.
			a, b = v[in.a], v[in.b]
		}
		z := v[i]
		switch in.op {
		case opConst:
		case opVar:
			G[in.a] = 1
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
		case opSqrt:
			m.unary(i, in, 0.5/z, -0.25/(z*a))
		case opAbs:
			m.unary(i, in, sign(a), 0)
		case opMin, opMax:
			src := in.a
			if a != z {
				src = in.b
			}
			copy(G, m.grad[int(src)*nv:(int(src)+1)*nv])
			copy(H, m.hess[int(src)*nv*nv:(int(src)+1)*nv*nv])
		case opLt, opLe, opGt, opGe:
		case opSelect:
			c := v[in.c]
			src := in.a
			if c == 0 {
				src = in.b
			}
			copy(G, m.grad[int(src)*nv:(int(src)+1)*nv])
			copy(H, m.hess[int(src)*nv*nv:(int(src)+1)*nv*nv])
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
