package verify

import (
	"math"
	"math/rand/v2"
	"testing"

	"scorewright/internal/simplex"
)

// modelMenus are efforts for the plane bound's worst cases: exactly affine
// in the report (the bound is then tight up to rounding, where a missing
// rounding margin shows), affine at a scale near the model's limit, a
// smooth proper rule's efforts, noise, and many equal values.
func modelMenus(g *simplex.Grid, rng *rand.Rand) map[string][]float64 {
	n, G := g.N, g.Len()
	out := map[string][]float64{}
	a, B := make([]float64, n), make([]float64, n*n)
	for k := range a {
		a[k] = rng.NormFloat64()
		for i := range n {
			B[k*n+i] = rng.NormFloat64()
		}
	}
	for _, name := range []string{"affine", "affine-huge", "quadratic", "noise", "steps"} {
		rows := make([]float64, G*n)
		for j := range G {
			r := g.Point(j)
			for k := range n {
				v := a[k]
				for i, x := range r {
					v += B[k*n+i] * x
				}
				switch name {
				case "affine-huge":
					v *= 1e90
				case "quadratic":
					var s float64
					for _, x := range r {
						s += x * x
					}
					v = s - 2*r[k] + 1 // the quadratic rule's effort, derived by hand
				case "noise":
					v = rng.NormFloat64()
				case "steps":
					v = math.Floor(4 * v)
				}
				rows[j*n+k] = v
			}
		}
		out[name] = rows
	}
	return out
}

// TestLeafBoundBelowEveryValue: for every leaf and belief (grid points
// and random points of the simplex), the plane bound is at or below the
// computed value dotN of every report in the leaf, at n = 2..6.
func TestLeafBoundBelowEveryValue(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	res := map[int]int{2: 2000, 3: 60, 4: 16, 5: 8, 6: 6}
	for n := 2; n <= 6; n++ {
		g, err := simplex.Full(n, res[n])
		if err != nil {
			t.Fatal(err)
		}
		beliefs := randomInterior(n, 300, 9, uint64(n))
		for j := 0; j < g.Len(); j += 7 {
			beliefs = append(beliefs, g.Point(j)...)
		}
		for name, rows := range modelMenus(g, rng) {
			m := newMenu(n, g.Len())
			copy(m.rows, rows)
			m.seal()
			tr := newReportTree(g, m)
			tr.models = newLeafModels(tr, g.Coords) // at every size, for the test
			models := 0
			for node := tr.models.first; node < len(tr.start); node++ {
				if !tr.models.ok[node-tr.models.first] {
					continue
				}
				models++
				for b := 0; b*n < len(beliefs); b++ {
					q := beliefs[b*n : (b+1)*n]
					bd := tr.models.bound(node, q)
					for p := tr.start[node]; p < tr.end[node]; p++ {
						if v := dotN(q, tr.rows[int(p)*n:int(p+1)*n]); bd > v {
							t.Fatalf("n %d %s: leaf %d bound %v above %v (report %d, belief %v)", n, name, node, bd, v, tr.idx[p], q)
						}
					}
				}
			}
			if n > 2 && models == 0 {
				t.Errorf("n %d %s: no leaf has a model", n, name)
			}
		}
	}
}

// TestLeafBoundIsTighter: on the quadratic rule's efforts the plane bound
// is tighter than the box bound for beliefs near a leaf, where the box
// bound falls short by the leaf's width and the plane bound only by its
// square (see leafModels) — so the pruning gains from it.
func TestLeafBoundIsTighter(t *testing.T) {
	g, err := simplex.Full(3, 200)
	if err != nil {
		t.Fatal(err)
	}
	n := 3
	m := newMenu(n, g.Len())
	copy(m.rows, modelMenus(g, rand.New(rand.NewPCG(1, 2)))["quadratic"])
	m.seal()
	tr := newReportTree(g, m)
	var boxGap, planeGap float64
	for node := tr.models.first; node < len(tr.start); node++ {
		q := g.Point(int(tr.idx[tr.start[node]])) // a belief in the leaf
		least := math.Inf(1)
		for p := tr.start[node]; p < tr.end[node]; p++ {
			least = min(least, dotN(q, tr.rows[int(p)*n:int(p+1)*n]))
		}
		boxGap += least - dotN(q, tr.lo[node*n:(node+1)*n])
		planeGap += least - tr.models.bound(node, q)
	}
	if !(planeGap < boxGap/5) {
		t.Fatalf("plane bound short by %g in all, box bound by %g", planeGap, boxGap)
	}
}
