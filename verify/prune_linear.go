package verify

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// A tighter bound for a leaf: its efforts as a plane plus a remainder.
//
// The box bound sum_k q_k lo_k falls short of a leaf's best report by
// about the leaf's width times the efforts' slope. For a proper rule the
// slope seen from a belief q near the leaf is nearly flat (the honest
// report minimises expected effort, so sum_k q_k de_k/dr = 0 at r = q),
// and a bound that knows the plane falls short only by the width squared.
// Every leaf gets a model of its reports' efforts e_j (n per report) in
// their coordinates u_j = r_j - rbar (the first n - 1; the last is fixed
// by the others):
//
//	e_jk = c_k + sum_i M_ki u_ji + eps_jk,
//
// with M fitted by least squares (any M gives a valid bound; the fit only
// makes it tight) and eps the remainder. With g_i = sum_k q_k M_ki, for
// every report j of the leaf
//
//	sum_k q_k e_jk  >=  sum_k q_k (c_k + elo_k) + sum_i min(g_i ulo_i, g_i uhi_i)
//
// where elo_k is the least remainder and [ulo_i, uhi_i] the leaf's range
// of u_i. That is exact arithmetic; the computed stream value dotN(q, e_j)
// and the computed bound each differ from theirs by at most about 6n + 3
// rounding units of the magnitudes involved, each at most
// mag = max_k (max_j |e_jk| + |c_k| + sum_i |M_ki| max|u_i| + |elo_k|)
// (the remainders' own rounding included; q_k >= 0 and sum_k q_k = 1), so
// the bound less delta = (8n + 8) u mag (u = 2^-53; plus a floor for
// underflow) is below every computed value of the leaf. A node skipped by
// it holds no report that could enter the best two, as with the box
// bound, and the stream's result stays identical. A leaf with a
// non-finite or very large effort has no model.
type leafModels struct {
	n, first int
	ok       []bool
	// packed holds each leaf's model side by side, stride floats a leaf
	// (model gives the parts): c (n, c_k + elo_k), M (n·(n-1), M_ki at
	// k·(n-1)+i), ulo and uhi (n-1 each) and delta last. A leaf without a
	// model has zeros and delta +Inf, so its bound is -Inf.
	packed []float64
	stride int
}

// model is leaf l's slot in packed and its parts (delta is slot's last).
func (lm *leafModels) model(l int) (slot, c, M, ulo, uhi []float64) {
	n, d := lm.n, lm.n-1
	slot = lm.packed[l*lm.stride : (l+1)*lm.stride]
	return slot, slot[:n], slot[n : n+n*d], slot[n+n*d : n+n*d+d], slot[n+n*d+d : n+n*d+2*d]
}

// modelWidth is the widest typical leaf (leafWidth) that gets models: the
// bound costs about n² operations a leaf and belief, and gains only where a
// leaf is narrow enough that its width squared is well below its width
// (measured: at n = 6, K = 12 and n = 8, K = 7, leaves about 0.4 and 0.6
// wide, the stream was slower with models; at n = 4, K = 40, 0.17, no
// slower; at n = 3, K = 200 and 400, 0.06 and 0.03, 1.4 and 1.7 times
// faster; BenchmarkStream).
const modelWidth = 0.2

// leafWidth is a typical leaf's width in one coordinate for G reports
// spread over the (n-1)-dimensional simplex, leafSize to a leaf.
func leafWidth(n, G int) float64 {
	if n < 2 || G <= leafSize {
		return 1
	}
	return math.Pow(float64(leafSize)/float64(G), 1/float64(n-1))
}

// modelLimit is the largest effort a leaf model takes: far from overflow
// in the fit's squares and products.
const modelLimit = 1e100

// newLeafModels fits every leaf of t, whose reports' coordinates are
// coords (n per grid report, by grid index); nil for one outcome, which
// has no plane to fit.
func newLeafModels(t *reportTree, coords []float64) *leafModels {
	n := t.n
	if n < 2 {
		return nil
	}
	leaves := (len(t.start) + 1) / 2
	d := n - 1
	stride := n + n*d + 2*d + 1
	lm := &leafModels{n: n, first: len(t.start) - leaves, ok: make([]bool, leaves),
		packed: make([]float64, leaves*stride), stride: stride}
	f := newLeafFit(d)
	for l := range leaves {
		if lm.ok[l] = lm.fit(f, t, coords, l); !lm.ok[l] {
			slot, _, _, _, _ := lm.model(l)
			clear(slot)
			slot[len(slot)-1] = math.Inf(1)
		}
	}
	return lm
}

// leafFit is scratch space for fitting leaves.
type leafFit struct {
	rbar, ebar []float64
	a          *mat.SymDense
	b, x       *mat.VecDense
	chol       mat.Cholesky
}

func newLeafFit(d int) *leafFit {
	return &leafFit{rbar: make([]float64, d), a: mat.NewSymDense(d, nil), b: mat.NewVecDense(d, nil), x: mat.NewVecDense(d, nil)}
}

// fit models leaf l; false when it takes no model.
func (lm *leafModels) fit(f *leafFit, t *reportTree, coords []float64, l int) bool {
	n, d := lm.n, lm.n-1
	node := lm.first + l
	lo, hi := int(t.start[node]), int(t.end[node])
	if hi-lo < 2 {
		return false
	}
	f.ebar = append(f.ebar[:0], make([]float64, n)...)
	clear(f.rbar)
	for p := lo; p < hi; p++ {
		r := coords[int(t.idx[p])*n:]
		for k, v := range t.rows[p*n : (p+1)*n] {
			if !(math.Abs(v) <= modelLimit) {
				return false
			}
			f.ebar[k] += v
		}
		for i := range d {
			f.rbar[i] += r[i]
		}
	}
	cnt := float64(hi - lo)
	for k := range f.ebar {
		f.ebar[k] /= cnt
	}
	for i := range f.rbar {
		f.rbar[i] /= cnt
	}
	u := func(p, i int) float64 { return coords[int(t.idx[p])*n+i] - f.rbar[i] }
	// Normal equations A x = b_k, A = U'U plus a small ridge so that a
	// leaf on a line (one edge of the simplex) still factors.
	var trace float64
	for i := range d {
		for j := i; j < d; j++ {
			var s float64
			for p := lo; p < hi; p++ {
				s += u(p, i) * u(p, j)
			}
			f.a.SetSym(i, j, s)
		}
		trace += f.a.At(i, i)
	}
	for i := range d {
		f.a.SetSym(i, i, f.a.At(i, i)+1e-12*trace+1e-300)
	}
	_, _, M, _, _ := lm.model(l)
	if f.chol.Factorize(f.a) {
		for k := range n {
			for i := range d {
				var s float64
				for p := lo; p < hi; p++ {
					s += u(p, i) * (t.rows[p*n+k] - f.ebar[k])
				}
				f.b.SetVec(i, s)
			}
			if f.chol.SolveVecTo(f.x, f.b) != nil {
				clear(M[k*d : (k+1)*d])
				continue
			}
			for i := range d {
				if x := f.x.AtVec(i); math.Abs(x) <= modelLimit {
					M[k*d+i] = x
				}
			}
		}
	}
	return lm.remainders(t, coords, l, f, u)
}

// remainders sets leaf l's coordinate ranges, least remainders and delta
// for the fitted plane (see leafModels).
func (lm *leafModels) remainders(t *reportTree, coords []float64, l int, f *leafFit, u func(p, i int) float64) bool {
	n, d := lm.n, lm.n-1
	node := lm.first + l
	lo, hi := int(t.start[node]), int(t.end[node])
	slot, c, M, ulo, uhi := lm.model(l)
	for i := range d {
		ulo[i], uhi[i] = math.Inf(1), math.Inf(-1)
	}
	emax := make([]float64, n)
	for k := range n {
		c[k] = math.Inf(1)
	}
	for p := lo; p < hi; p++ {
		for i := range d {
			ulo[i], uhi[i] = min(ulo[i], u(p, i)), max(uhi[i], u(p, i))
		}
		for k := range n {
			e := t.rows[p*n+k]
			s := e - f.ebar[k]
			for i := range d {
				s -= M[k*d+i] * u(p, i)
			}
			c[k] = min(c[k], s) // the least remainder, for now
			emax[k] = max(emax[k], math.Abs(e))
		}
	}
	var mag float64
	for k := range n {
		mk := emax[k] + math.Abs(f.ebar[k]) + math.Abs(c[k])
		for i := range d {
			mk += math.Abs(M[k*d+i]) * max(-ulo[i], uhi[i])
		}
		mag = max(mag, mk)
		c[k] += f.ebar[k]
	}
	if !(mag <= modelLimit) {
		return false
	}
	slot[len(slot)-1] = float64(8*n+8)*0x1p-53*mag*1.01 + 1e-300
	return true
}

// bound is the plane bound of leaf node for the belief q (-Inf where the
// leaf has no model). The margin delta covers the rounding of any order
// of the sums, so they need not follow dotN's order. A numeric kernel,
// with a path of its own for n = 3, the commonest case.
func (lm *leafModels) bound(node int, q []float64) float64 {
	l := node - lm.first
	p := lm.packed[l*lm.stride : (l+1)*lm.stride]
	if lm.n == 3 && len(q) == 3 && len(p) == 14 {
		// c 0..2; M row k at 3+2k; ulo 9, 10; uhi 11, 12; delta 13.
		s := q[0]*p[0] + q[1]*p[1] + q[2]*p[2]
		g0 := q[0]*p[3] + q[1]*p[5] + q[2]*p[7]
		g1 := q[0]*p[4] + q[1]*p[6] + q[2]*p[8]
		return s + min(g0*p[9], g0*p[11]) + min(g1*p[10], g1*p[12]) - p[13]
	}
	n, d := lm.n, lm.n-1
	M := p[n : n+n*d]
	ulo, uhi := p[n+n*d:n+n*d+d], p[n+n*d+d:n+n*d+2*d]
	var s float64
	for k, x := range q {
		s += x * p[k]
	}
	for i := range d {
		var g float64
		for k, x := range q {
			g += x * M[k*d+i]
		}
		s += min(g*ulo[i], g*uhi[i])
	}
	return s - p[len(p)-1]
}
