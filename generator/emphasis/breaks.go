package emphasis

import (
	"math"
	"sort"

	"scorewright/generator/formula"
)

// breakScan is the number of uniform steps of (0, 1) on which the weight's
// switching quantities are scanned for sign changes, besides the panel
// knots.
const breakScan = 4096

// breaks returns the points of (loCut, 1 - hiCut) where the weight formula
// switches piece — where the condition of an if, the argument of abs or
// the difference of min's or max's arguments changes sign — each found by
// bisection to adjacent floating-point numbers and given as the first
// number of the new piece. Quadrature panels end there, so that every
// panel integrates one smooth piece (Gauss–Legendre across a jump is only
// as accurate as the panel is narrow). A switch that changes sign twice
// between two scan points (1/4096 apart) is not seen.
func breaks(prog *formula.Program, knots []float64) []float64 {
	ns := prog.Switches()
	if ns == 0 {
		return nil
	}
	m := prog.NewMachine()
	pts := append([]float64(nil), knots...)
	for i := 1; i < breakScan; i++ {
		pts = append(pts, float64(i)/breakScan)
	}
	sort.Float64s(pts)
	at := func(c float64, dst []float64) {
		m.Switches(dst, []float64{c})
	}
	prev, cur, mid := make([]float64, ns), make([]float64, ns), make([]float64, ns)
	at(pts[0], prev)
	var out []float64
	for i := 1; i < len(pts); i++ {
		at(pts[i], cur)
		for s := range cur {
			if side(prev[s]) != side(cur[s]) && side(prev[s]) != 0 && side(cur[s]) != 0 {
				out = append(out, bisect(pts[i-1], pts[i], s, side(prev[s]), at, mid))
			}
		}
		prev, cur = cur, prev
	}
	sort.Float64s(out)
	return dedupe(out)
}

// side is the sign class of a switching quantity: -1 below 0, +1 at or
// above (a comparison a < b flips where a - b reaches 0), 0 for NaN.
func side(v float64) int {
	switch {
	case v != v:
		return 0
	case v < 0:
		return -1
	}
	return 1
}

// bisect narrows [lo, hi], where switching quantity s is on side sLo at lo
// and the other side at hi, to two adjacent floats and returns hi.
func bisect(lo, hi float64, s, sLo int, at func(float64, []float64), buf []float64) float64 {
	for {
		m := lo + (hi-lo)/2
		if m <= lo || m >= hi {
			return hi
		}
		at(m, buf)
		switch side(buf[s]) {
		case sLo:
			lo = m
		case 0:
			return hi
		default:
			hi = m
		}
	}
}

func dedupe(s []float64) []float64 {
	out := s[:0]
	for i, x := range s {
		if i == 0 || x != out[len(out)-1] {
			out = append(out, x)
		}
	}
	return out
}

// mergeKnots adds the break points to the sorted knots, keeping them
// sorted and distinct.
func mergeKnots(knots, br []float64) []float64 {
	if len(br) == 0 {
		return knots
	}
	all := append(append([]float64(nil), knots...), br...)
	sort.Float64s(all)
	out := dedupe(all)
	// Nothing beyond the first and last knot: those ends are the
	// power-law extrapolation's.
	lo, hi := knots[0], knots[len(knots)-1]
	i := sort.SearchFloat64s(out, lo)
	j := sort.SearchFloat64s(out, math.Nextafter(hi, 2))
	return out[i:j]
}
