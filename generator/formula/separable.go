package formula

// Separable reports whether the program is, by its structure, a sum of
// terms each of which reads at most one variable (plus constants): sums,
// differences, negations and sums over lanes of such terms, and products
// or quotients of one by a constant. Then every mixed second derivative
// is 0 wherever the program is twice differentiable, and its curvature is
// that of one-variable functions — what lets a certificate prove a
// generator such as 1 - sum(p^3) strictly concave up to the vertices of
// the simplex, where each term's curvature tends to 0.
func (p *Program) Separable() bool {
	nv := len(p.varNames)
	if nv > 64 {
		return false
	}
	// deps[c]: the variables cell c reads; sep[c]: cell c is a sum of
	// one-variable terms.
	deps := make([]uint64, p.cells)
	sep := make([]bool, p.cells)
	for k := 0; k < nv; k++ {
		deps[k] = 1 << k
	}
	for c := nv; c < p.base(); c++ {
		sep[c] = true
	}
	for k := 0; k < nv; k++ {
		sep[k] = true
	}
	for _, in := range p.code {
		for l := int32(0); l < in.w; l++ {
			i := in.dst + l
			a, b, c := in.a+l*in.sa, in.b+l*in.sb, in.c+l*in.sc
			var d uint64
			s := false
			switch in.op {
			case opVSum, opVSumSq, opVSumXLnX:
				s = true
				for k := in.a; k < in.a+in.n; k++ {
					d |= deps[k]
					one := deps[k]&(deps[k]-1) == 0
					s = s && (in.op == opVSum && sep[k] || one)
				}
			case opCumsum:
				d, s = deps[a], sep[a]
				if l > 0 {
					d |= deps[i-1]
					s = s && sep[i-1]
				}
			case opAdd, opSub:
				d, s = deps[a]|deps[b], sep[a] && sep[b]
			case opMul:
				d = deps[a] | deps[b]
				s = deps[a] == 0 && sep[b] || deps[b] == 0 && sep[a]
			case opDiv:
				d = deps[a] | deps[b]
				s = deps[b] == 0 && sep[a]
			case opNeg:
				d, s = deps[a], sep[a]
			case opSelect:
				d = deps[a] | deps[b] | deps[c]
			default:
				d = deps[a]
				if isBinary(in.op) {
					d |= deps[b]
				}
			}
			deps[i] = d
			// A cell that reads at most one variable is a term by itself.
			sep[i] = s || d&(d-1) == 0
		}
	}
	return sep[p.out]
}
