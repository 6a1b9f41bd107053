package formula

import iv "scorewright/internal/interval"

// The chain rule in interval arithmetic, for second-order forward mode:
// each cell holds enclosures of its gradient and Hessian with respect to
// the variables. Terms with an exactly zero factor are skipped, so a
// structural zero stays [0, 0] and never meets an unbounded factor.

func (e *Encloser) cellGrad(c int32) []iv.Interval {
	nd := int32(e.nd)
	return e.grad[c*nd : (c+1)*nd]
}

func (e *Encloser) cellHess(c int32) []iv.Interval {
	nn := int32(e.nd * e.nd)
	return e.hess[c*nn : (c+1)*nn]
}

func (e *Encloser) clearCell(i int32) {
	if e.order == 0 {
		return
	}
	clear(e.cellGrad(i))
	if e.order >= 2 {
		clear(e.cellHess(i))
	}
}

// copyCell makes cell i the same function as cell src.
func (e *Encloser) copyCell(i, src int32) {
	e.val[i] = e.val[src]
	if e.order == 0 {
		return
	}
	copy(e.cellGrad(i), e.cellGrad(src))
	if e.order >= 2 {
		copy(e.cellHess(i), e.cellHess(src))
	}
}

// hullCells encloses both cells a and b in cell i: the value and
// derivatives of whichever branch applies at a point.
func (e *Encloser) hullCells(i, a, b int32) {
	e.val[i] = iv.Hull(e.val[a], e.val[b])
	if e.order == 0 {
		return
	}
	ga, gb, g := e.cellGrad(a), e.cellGrad(b), e.cellGrad(i)
	for k := range g {
		g[k] = iv.Hull(ga[k], gb[k])
	}
	if e.order >= 2 {
		ha, hb, h := e.cellHess(a), e.cellHess(b), e.cellHess(i)
		for k := range h {
			h[k] = iv.Hull(ha[k], hb[k])
		}
	}
}

// chain1 sets cell i to f(u): G = f'·Gu, H = f'·Hu + f”·Gu Guᵀ.
func (e *Encloser) chain1(i, u int32, fu, fuu iv.Interval) {
	e.clearCell(i)
	e.accumulate(i, u, fu, fuu)
}

// accumulate adds the derivatives of f(u) to cell i.
func (e *Encloser) accumulate(i, u int32, fu, fuu iv.Interval) {
	if e.order == 0 {
		return
	}
	axpyIv(e.cellGrad(i), fu, e.cellGrad(u))
	if e.order >= 2 {
		axpyIv(e.cellHess(i), fu, e.cellHess(u))
		outerIv(e.cellHess(i), fuu, e.cellGrad(u), e.cellGrad(u))
	}
}

// chain sets cell i to f(a, b) with partials fa, fb and second partials
// faa, fbb, fab.
func (e *Encloser) chain(i, a, b int32, fa, fb, faa, fbb, fab iv.Interval) {
	e.clearCell(i)
	if e.order == 0 {
		return
	}
	g := e.cellGrad(i)
	axpyIv(g, fa, e.cellGrad(a))
	axpyIv(g, fb, e.cellGrad(b))
	if e.order < 2 {
		return
	}
	h := e.cellHess(i)
	ga, gb := e.cellGrad(a), e.cellGrad(b)
	axpyIv(h, fa, e.cellHess(a))
	axpyIv(h, fb, e.cellHess(b))
	outerIv(h, faa, ga, ga)
	outerIv(h, fbb, gb, gb)
	outerIv(h, fab, ga, gb)
	outerIv(h, fab, gb, ga)
}

// axpyIv adds s·x to dst, skipping exact zeros.
func axpyIv(dst []iv.Interval, s iv.Interval, x []iv.Interval) {
	if s.IsZero() {
		return
	}
	for k, xv := range x {
		if !xv.IsZero() {
			dst[k] = iv.Add(dst[k], iv.Mul(s, xv))
		}
	}
}

// outerIv adds s·x yᵀ to the square matrix dst, skipping exact zeros;
// for x = y the diagonal uses squares, which are never negative.
func outerIv(dst []iv.Interval, s iv.Interval, x, y []iv.Interval) {
	if s.IsZero() || len(x) == 0 {
		return
	}
	n := len(x)
	same := &x[0] == &y[0]
	for r, xv := range x {
		if xv.IsZero() {
			continue
		}
		for c, yv := range y {
			if yv.IsZero() {
				continue
			}
			t := iv.Mul(xv, yv)
			if same && r == c {
				t = iv.Sq(xv)
			}
			dst[r*n+c] = iv.Add(dst[r*n+c], iv.Mul(s, t))
		}
	}
}
