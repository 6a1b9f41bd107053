package certify

import (
	"math"

	"gonum.org/v1/gonum/mat"

	iv "scorewright/internal/interval"
)

// project returns the interval Hessian of H restricted to the simplex in
// the basis e_a - e_j (a != j) of the directions that keep the sum: M_ab
// = H_ab - H_aj - H_jb + H_jj, row-major (n-1)×(n-1). Any basis gives the
// same sign of the eigenvalues (Sylvester's law of inertia); eliminating
// the coordinate farthest from 0 keeps the entries bounded near a face.
func project(hess []iv.Interval, n, j int) []iv.Interval {
	d := n - 1
	m := make([]iv.Interval, d*d)
	idx := make([]int, 0, d)
	for k := 0; k < n; k++ {
		if k != j {
			idx = append(idx, k)
		}
	}
	for r, a := range idx {
		for c, b := range idx {
			if c < r {
				m[r*d+c] = m[c*d+r]
				continue
			}
			v := iv.Sub(iv.Add(hess[a*n+b], hess[j*n+j]), iv.Add(hess[a*n+j], hess[j*n+b]))
			m[r*d+c] = v
		}
	}
	return m
}

// gershgorin is an upper bound on the largest eigenvalue of every
// symmetric matrix in the interval matrix m (d×d): the largest over rows
// of the diagonal's upper end plus the off-diagonal magnitudes, rounded
// up (Gershgorin's circle theorem, the bound the alpha-BB method uses).
func gershgorin(m []iv.Interval, d int) float64 {
	worst := math.Inf(-1)
	for r := 0; r < d; r++ {
		s := iv.Point(m[r*d+r].Hi)
		for c := 0; c < d; c++ {
			if c != r {
				s = iv.Add(s, iv.Point(m[r*d+c].Mag()))
			}
		}
		worst = math.Max(worst, s.Hi)
	}
	return worst
}

// diagonalTangent bounds the curvature along the simplex of a full
// Hessian h (n×n) that is diagonal on the box (every off-diagonal entry
// exactly 0, as for a sum of one-variable terms): vᵀhv = sum h_ii v_i²,
// and a direction along the simplex (sum v = 0) moves at least two
// coordinates, so the curvature is strictly negative when every diagonal
// entry is at most 0 and all but one are strictly negative — even where
// that one vanishes, on a face. It returns -1 then (a strictly negative
// stand-in: the sign is what decides), 0 when every entry is at most 0,
// else +Inf.
func diagonalTangent(h []iv.Interval, n int) float64 {
	flat := 0
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			if r != c && !h[r*n+c].IsZero() {
				return math.Inf(1)
			}
		}
		switch d := h[r*n+r].Hi; {
		case d < 0:
		case d <= 0:
			flat++
		default:
			return math.Inf(1)
		}
	}
	if flat <= 1 {
		return -1
	}
	return 0
}

// bounded reports whether every entry of m is finite.
func bounded(m []iv.Interval) bool {
	for _, v := range m {
		if !v.Bounded() {
			return false
		}
	}
	return true
}

// centre is the float matrix of midpoints of m.
func centre(m []iv.Interval, d int) *mat.SymDense {
	c := mat.NewSymDense(d, nil)
	for r := 0; r < d; r++ {
		for k := r; k < d; k++ {
			c.SetSym(r, k, m[r*d+k].Mid())
		}
	}
	return c
}

// congruence returns the interval matrix Qᵀ m Q for a float matrix Q.
func congruence(m []iv.Interval, q *mat.Dense, d int) []iv.Interval {
	// t = m Q, then Qᵀ t.
	t := make([]iv.Interval, d*d)
	for r := 0; r < d; r++ {
		for c := 0; c < d; c++ {
			s := iv.Point(0)
			for k := 0; k < d; k++ {
				s = iv.Add(s, iv.Mul(m[r*d+k], iv.Point(q.At(k, c))))
			}
			t[r*d+c] = s
		}
	}
	out := make([]iv.Interval, d*d)
	for r := 0; r < d; r++ {
		for c := 0; c < d; c++ {
			s := iv.Point(0)
			for k := 0; k < d; k++ {
				s = iv.Add(s, iv.Mul(iv.Point(q.At(k, r)), t[k*d+c]))
			}
			out[r*d+c] = s
		}
	}
	return out
}

// curvatureSign decides the sign of the largest eigenvalue over the
// interval matrix m: it returns hi, an upper bound that is <= 0 when every
// matrix in m is negative semidefinite (< 0: definite), by the best of
// plain Gershgorin and Gershgorin after congruence with the eigenvectors
// of m's centre, which leaves a nearly diagonal matrix with the same
// inertia; and, when the centre has a positive eigenvalue, its
// eigenvector v (else nil), a direction to test for positive curvature.
func curvatureSign(m []iv.Interval, d int) (hi float64, v []float64) {
	hi = gershgorin(m, d)
	if hi < 0 || !bounded(m) {
		return hi, nil
	}
	var eig mat.EigenSym
	if !eig.Factorize(centre(m, d), true) {
		return hi, nil
	}
	var q mat.Dense
	eig.VectorsTo(&q)
	if g := gershgorin(congruence(m, &q, d), d); g < hi && g <= 0 {
		hi = g
	}
	vals := eig.Values(nil)
	top := d - 1 // EigenSym sorts ascending
	if vals[top] > 0 {
		v = make([]float64, d)
		for k := range v {
			v[k] = q.At(k, top)
		}
	}
	return hi, v
}

// quadForm encloses vᵀ m v for a float vector v.
func quadForm(m []iv.Interval, v []float64) iv.Interval {
	d := len(v)
	s := iv.Point(0)
	for r := 0; r < d; r++ {
		for c := 0; c < d; c++ {
			s = iv.Add(s, iv.Mul(m[r*d+c], iv.Mul(iv.Point(v[r]), iv.Point(v[c]))))
		}
	}
	return s
}
