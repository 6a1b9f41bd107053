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
	// aux keeps ln(a) of each opXLnX lane for the backward sweep.
	aux []float64
	// Second-order forward mode: gradient and Hessian of every cell,
	// allocated on first use of Hessian. hw is the Hessian entries each
	// cell keeps: nv×nv, or only the nv diagonal ones when diag is set
	// (a separable program, whose mixed partials are all structural
	// zeros; machine_hessian.go).
	grad []float64
	hess []float64
	hw   int
	diag bool
	// sup is, in diagonal mode, the one variable each cell reads (-1:
	// none, -2: more than one): a cell's gradient and Hessian are zero
	// outside it, so the chain rule on it costs O(1), not O(n).
	sup []int32
	// nanGrad records that a select with a NaN condition set a whole
	// gradient to NaN in this pass (see Hessian).
	nanGrad bool
	// abs makes the chain rule add the absolute value of every term it
	// forms (HessianRounding): the size of what the derivatives sum,
	// which bounds what their rounding can do.
	abs bool
	// vround is ValueRounding's interval evaluation, made on first use.
	vround *valueRounding
}

// NewMachine returns a Machine for p.
func (p *Program) NewMachine() *Machine {
	nv := len(p.varNames)
	m := &Machine{prog: p, nv: nv, val: make([]float64, p.cells), adj: make([]float64, p.cells), aux: make([]float64, p.cells)}
	// Constants never change: place them once.
	copy(m.val[nv:p.base()], p.consts)
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
	// A loop, not copy(): for a handful of variables the call costs more
	// than the copying.
	for k, x := range vars {
		v[k] = x
	}
	code := m.prog.code
	for j := range code {
		in := &code[j]
		if in.w > 1 {
			m.forwardLanes(in)
			continue
		}
		i := in.dst
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
			v[i] = m.xlnx(i, v[in.a])
		case opVSum:
			var s float64
			for _, x := range v[in.a : in.a+in.n] {
				s += x
			}
			v[i] = s
		case opVSumSq:
			var s float64
			for _, x := range v[in.a : in.a+in.n] {
				s += x * x
			}
			v[i] = s
		case opVSumXLnX:
			// ln a of each lane is kept in the instruction's own aux cells.
			xs := v[in.a : in.a+in.n]
			ls := m.aux[in.c : in.c+in.n]
			ls = ls[:len(xs)]
			var s float64
			for l, x := range xs {
				lx := math.Log(x)
				ls[l] = lx
				r := x * lx
				if r != r {
					r = mul0(x, lx)
				}
				s += r
			}
			v[i] = s
		case opSelect:
			v[i] = sel(v[in.c], v[in.a], v[in.b])
		default:
			v[i] = apply(in.op, v[in.a], v[in.b], in.k)
		}
	}
}

// xlnx computes x ln x with 0 ln 0 = 0 and keeps ln x for the backward sweep.
func (m *Machine) xlnx(i int32, x float64) float64 {
	l := math.Log(x)
	m.aux[i] = l
	r := x * l
	if r != r {
		r = mul0(x, l)
	}
	return r
}

func sel(c, a, b float64) float64 {
	switch {
	case c != c:
		return math.NaN()
	case c != 0:
		return a
	}
	return b
}

// forwardLanes runs a vector instruction. The common operations have loops
// of their own; the rest go through apply lane by lane.
func (m *Machine) forwardLanes(in *cell) {
	v := m.val
	d, a, b, w := in.dst, in.a, in.b, in.w
	sa, sb := in.sa, in.sb
	switch in.op {
	case opCumsum:
		var s float64
		for l := int32(0); l < w; l++ {
			s += v[a+l]
			v[d+l] = s
		}
	case opSq:
		if sa == 1 {
			// Sub-slices of equal length let the compiler drop bounds checks.
			dst := v[d : d+w]
			src := v[a : a+w]
			src = src[:len(dst)]
			for l, x := range src {
				dst[l] = x * x
			}
			return
		}
		for l := int32(0); l < w; l++ {
			x := v[a+l*sa]
			v[d+l] = x * x
		}
	case opXLnX:
		if sa == 1 {
			dst := v[d : d+w]
			aux := m.aux[d : d+w]
			src := v[a : a+w]
			src, aux = src[:len(dst)], aux[:len(dst)]
			for l, x := range src {
				lx := math.Log(x)
				aux[l] = lx
				r := x * lx
				if r != r {
					r = mul0(x, lx)
				}
				dst[l] = r
			}
			return
		}
		for l := int32(0); l < w; l++ {
			v[d+l] = m.xlnx(d+l, v[a+l*sa])
		}
	case opAdd:
		for l := int32(0); l < w; l++ {
			v[d+l] = v[a+l*sa] + v[b+l*sb]
		}
	case opSub:
		for l := int32(0); l < w; l++ {
			v[d+l] = v[a+l*sa] - v[b+l*sb]
		}
	case opMul:
		for l := int32(0); l < w; l++ {
			v[d+l] = mul0(v[a+l*sa], v[b+l*sb])
		}
	case opSelect:
		c, sc := in.c, in.sc
		for l := int32(0); l < w; l++ {
			v[d+l] = sel(v[c+l*sc], v[a+l*sa], v[b+l*sb])
		}
	default:
		for l := int32(0); l < w; l++ {
			v[d+l] = apply(in.op, v[a+l*sa], v[b+l*sb], in.k)
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
	out := m.prog.out
	clear(adj[:out+1])
	adj[out] = 1
	code := m.prog.code
	for j := len(code) - 1; j >= 0; j-- {
		in := &code[j]
		if in.w > 1 {
			m.backwardLanes(in)
			continue
		}
		g := adj[in.dst]
		if g == 0 {
			// Nothing flows back from here; skipping also keeps 0 * Inf
			// partials of unused branches out of the result.
			continue
		}
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
		case opVSum:
			for l := range adj[in.a : in.a+in.n] {
				adj[in.a+int32(l)] += g
			}
		case opVSumSq:
			as := adj[in.a : in.a+in.n]
			xs := v[in.a : in.a+in.n]
			xs = xs[:len(as)]
			for l, x := range xs {
				as[l] += 2 * mul0(g, x)
			}
		case opVSumXLnX:
			as := adj[in.a : in.a+in.n]
			ls := m.aux[in.c : in.c+in.n]
			ls = ls[:len(as)]
			for l, lx := range ls {
				as[l] += g * (lx + 1)
			}
		default:
			m.back(in.op, in.dst, in.a, in.b, in.c, in.k, g)
		}
	}
	copy(grad, adj[:len(grad)])
	return v[out]
}

// backwardLanes propagates the adjoints of a vector instruction.
func (m *Machine) backwardLanes(in *cell) {
	v, adj := m.val, m.adj
	d, a, b, w := in.dst, in.a, in.b, in.w
	sa, sb := in.sa, in.sb
	switch in.op {
	case opCumsum:
		// Lane k is a_1 + ... + a_k, so a_j collects the adjoints of
		// lanes j..w.
		var s float64
		for l := w - 1; l >= 0; l-- {
			s += adj[d+l]
			adj[a+l] += s
		}
		return
	case opSq:
		if sa == 1 {
			gs := adj[d : d+w]
			xs := v[a : a+w]
			as := adj[a : a+w]
			xs, as = xs[:len(gs)], as[:len(gs)]
			for l, g := range gs {
				if g != 0 {
					as[l] += 2 * mul0(g, xs[l])
				}
			}
			return
		}
		for l := int32(0); l < w; l++ {
			if g := adj[d+l]; g != 0 {
				adj[a+l*sa] += 2 * mul0(g, v[a+l*sa])
			}
		}
		return
	case opXLnX:
		if sa == 1 {
			gs := adj[d : d+w]
			ls := m.aux[d : d+w]
			as := adj[a : a+w]
			ls, as = ls[:len(gs)], as[:len(gs)]
			for l, g := range gs {
				if g != 0 {
					as[l] += g * (ls[l] + 1)
				}
			}
			return
		}
		for l := int32(0); l < w; l++ {
			if g := adj[d+l]; g != 0 {
				adj[a+l*sa] += g * (m.aux[d+l] + 1)
			}
		}
		return
	}
	for l := int32(0); l < w; l++ {
		if g := adj[d+l]; g != 0 {
			m.back(in.op, d+l, a+l*sa, b+l*sb, in.c+l*in.sc, in.k, g)
		}
	}
}

// back propagates the adjoint g of cell i, computed by op from cells a, b
// (and c for select), to its operands.
func (m *Machine) back(op opcode, i, a, b, c int32, k, g float64) {
	v, adj := m.val, m.adj
	switch op {
	case opAdd:
		adj[a] += g
		adj[b] += g
	case opSub:
		adj[a] += g
		adj[b] -= g
	case opMul:
		adj[a] += mul0(g, v[b])
		adj[b] += mul0(g, v[a])
	case opDiv:
		adj[a] += g / v[b]
		adj[b] -= mul0(g, v[i]) / v[b]
	case opNeg:
		adj[a] -= g
	case opSq:
		adj[a] += 2 * mul0(g, v[a])
	case opLn:
		adj[a] += g / v[a]
	case opXLnX:
		adj[a] += g * (m.aux[i] + 1)
	case opPowK:
		adj[a] += mul0(g, mul0(k, math.Pow(v[a], k-1)))
	case opPowB:
		adj[a] += mul0(g, v[i]*math.Log(k))
	case opPow:
		x, y := v[a], v[b]
		adj[a] += mul0(g, y*math.Pow(x, y-1))
		adj[b] += mul0(g, mul0(v[i], math.Log(x)))
	case opExp:
		adj[a] += mul0(g, v[i])
	case opExpm1:
		// d/da (e^a - 1) = e^a, recomputed: value + 1 would cancel to
		// nothing where e^a is tiny (expm1 of a large negative a).
		adj[a] += mul0(g, math.Exp(v[a]))
	case opLog1p:
		adj[a] += g / (1 + v[a])
	case opSqrt:
		adj[a] += g * 0.5 / v[i]
	case opAbs:
		adj[a] += g * sign(v[a])
	case opMin, opMax:
		if v[a] == v[i] {
			adj[a] += g
		} else {
			adj[b] += g
		}
	case opLt, opLe, opGt, opGe:
	case opSelect:
		cv := v[c]
		switch {
		case cv != cv:
			adj[a] += math.NaN()
		case cv != 0:
			adj[a] += g
		default:
			adj[b] += g
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
