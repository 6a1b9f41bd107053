package simplex

import (
	"math"
	"testing"
)

func TestCountAndFull(t *testing.T) {
	// C(K+n-1, n-1), derived by hand: n = 3, K = 200 -> 202·201/2 = 20301;
	// n = 4, K = 40 -> 43·42·41/6 = 12341; n = 2, K = 1000 -> 1001.
	for _, c := range []struct {
		n, k int
		want int64
	}{{3, 200, 20301}, {4, 40, 12341}, {2, 1000, 1001}, {12, 4, 1365}} {
		if got := Count(c.n, c.k); got != c.want {
			t.Errorf("Count(%d, %d) = %d, want %d", c.n, c.k, got, c.want)
		}
		g, err := Full(c.n, c.k)
		if err != nil {
			t.Fatal(err)
		}
		if int64(g.Len()) != c.want {
			t.Errorf("Full(%d, %d) has %d points", c.n, c.k, g.Len())
		}
		seen := map[[12]float64]bool{}
		for i := 0; i < g.Len(); i++ {
			var s float64
			var key [12]float64
			zero := false
			for k, v := range g.Point(i) {
				s += v
				key[k] = v
				zero = zero || v == 0
				if u := v * float64(c.k); math.Abs(u-math.Round(u)) > 1e-9 {
					t.Fatalf("coordinate %g is not a multiple of 1/%d", v, c.k)
				}
			}
			if math.Abs(s-1) > 1e-12 || zero != g.Boundary[i] || seen[key] {
				t.Fatalf("point %v: sum %g, boundary %v, repeated %v", g.Point(i), s, g.Boundary[i], seen[key])
			}
			seen[key] = true
		}
	}
	if _, err := Full(3, 0); err == nil {
		t.Error("resolution 0 accepted")
	}
	if _, err := Full(12, 1000); err == nil {
		t.Error("an impossible grid accepted")
	}
}

func TestSample(t *testing.T) {
	a, err := Sample(8, 80, 500, 7)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Sample(8, 80, 500, 7)
	if a.Len() != 508 || !a.Sampled {
		t.Fatalf("%d points", a.Len())
	}
	bd := 0
	for i := range a.Coords {
		if a.Coords[i] != b.Coords[i] {
			t.Fatal("same seed, different sample")
		}
	}
	for i := 0; i < a.Len(); i++ {
		var s float64
		for _, v := range a.Point(i) {
			s += v
		}
		if math.Abs(s-1) > 1e-12 {
			t.Fatalf("sum %g", s)
		}
		if a.Boundary[i] {
			bd++
		}
	}
	if bd == 0 || bd == a.Len() {
		t.Errorf("%d of %d sampled points on the boundary; want both kinds", bd, a.Len())
	}
}

func TestRoundAndSquares(t *testing.T) {
	comp := make([]int, 3)
	// Largest remainders (derived by hand): (1/3, 1/3, 1/3) at K = 10 is
	// 3.33 each, floors 3, 3, 3 and one unit left to the first largest.
	Round(comp, []float64{1, 1, 1}, 3, 10)
	if comp[0]+comp[1]+comp[2] != 10 || comp[0] != 4 {
		t.Errorf("Round = %v", comp)
	}
	p, th := make([]float64, 3), make([]float64, 3)
	ToSquares(th, []float64{0.5, 0, 0.5})
	FromSquares(p, th)
	if math.Abs(p[0]-0.5) > 1e-15 || p[1] != 0 {
		t.Errorf("round trip %v", p)
	}
	FromSquares(p, []float64{0, 0, 0})
	if p[0] != 1.0/3 {
		t.Errorf("zero maps to %v, want the centre", p)
	}
}

// Vectors lists the lattice ascending (the menu order), Full descending;
// both hold the same C(K+n-1, n-1) points, entries i/K exactly.
func TestVectorsOrder(t *testing.T) {
	v := Vectors(2, 4)
	want := [][]float64{{0, 1}, {0.25, 0.75}, {0.5, 0.5}, {0.75, 0.25}, {1, 0}}
	if len(v) != len(want) {
		t.Fatalf("got %v", v)
	}
	for i := range want {
		if v[i][0] != want[i][0] || v[i][1] != want[i][1] {
			t.Fatalf("point %d: %v, want %v", i, v[i], want[i])
		}
	}
	for _, c := range []struct{ n, k int }{{3, 5}, {4, 3}, {5, 2}} {
		vs := Vectors(c.n, c.k)
		g, err := Full(c.n, c.k)
		if err != nil {
			t.Fatal(err)
		}
		if int64(len(vs)) != Count(c.n, c.k) || g.Len() != len(vs) {
			t.Fatalf("n %d k %d: %d vectors, %d grid points, count %d", c.n, c.k, len(vs), g.Len(), Count(c.n, c.k))
		}
		// Full is Vectors read backwards.
		for i, p := range vs {
			q := g.Point(len(vs) - 1 - i)
			for j := range p {
				if p[j] != q[j] {
					t.Fatalf("n %d k %d: vector %d is %v, grid point from the end %v", c.n, c.k, i, p, q)
				}
			}
		}
	}
}

// Resolution is the largest k whose lattice fits the limit: C(k+2, 2)
// points for 3 outcomes, 21 at k = 5 and 28 at k = 6 (derived by hand).
func TestResolution(t *testing.T) {
	if k := Resolution(3, 100, 27); k != 5 {
		t.Fatalf("Resolution(3, 100, 27) = %d, want 5", k)
	}
	if k := Resolution(3, 100, 28); k != 6 {
		t.Fatalf("Resolution(3, 100, 28) = %d, want 6", k)
	}
	if k := Resolution(2, 10, 1e9); k != 10 {
		t.Fatalf("kmax not kept: %d", k)
	}
	if k := Resolution(12, 1000, 1); k != 1 {
		t.Fatalf("at least 1: %d", k)
	}
}
