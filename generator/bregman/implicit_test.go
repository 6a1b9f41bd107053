package bregman

import (
	"math"
	"testing"
)

// The log generator written with an implicit last coordinate,
// -p1 ln p1 - p2 ln p2 - (1-p1-p2) ln(1-p1-p2), is Shannon's entropy on
// the simplex. On the face p3 = 0 the grid's points (i/K, (K-i)/K, 0)
// round 1-p1-p2 to a tiny negative number for some i (i = 7 at K = 100:
// 1 - 0.07 - 0.93 = -5.6e-17), where ln is undefined and the formula
// gives NaN. H there must be the limit from the interior, the entropy
// -sum q ln q of the face point (Shannon 1948), and the efforts -ln q_k
// for the outcomes the report allows (Good 1952).
func TestImplicitLastCoordinateOnFace(t *testing.T) {
	s := scorer(t, "-p1*ln(p1)-p2*ln(p2)-(1-p1-p2)*ln(1-p1-p2)", 3, nil)
	eff := make([]float64, 3)
	const K = 100
	nan := 0
	for i := 1; i < K; i++ {
		q := []float64{float64(i) / K, float64(K-i) / K, 0}
		if 1-q[0]-q[1] < 0 {
			nan++
		}
		want := -q[0]*math.Log(q[0]) - q[1]*math.Log(q[1])
		if h := s.Entropy(q); !(math.Abs(h-want) <= 1e-12) {
			t.Errorf("H(%v) = %v, want %v (Shannon entropy)", q, h, want)
		}
		if h := s.Efforts(eff, q); !(math.Abs(h-want) <= 1e-12) {
			t.Errorf("Efforts at %v returns H = %v, want %v", q, h, want)
		}
		for k := 0; k < 2; k++ {
			if !(math.Abs(eff[k]+math.Log(q[k])) <= 1e-9) {
				t.Errorf("L(%v, %d) = %v, want %v (-ln p_k)", q, k+1, eff[k], -math.Log(q[k]))
			}
		}
		if d := s.Divergence(q, q); !(math.Abs(d) <= 1e-12) {
			t.Errorf("D(q, q) at %v = %v, want 0", q, d)
		}
	}
	if nan == 0 {
		t.Fatal("no face point rounds outside the simplex: the test no longer tests the NaN case")
	}
}

// The power generator with g = 1/2, H = (1 - p^0.5 - (1-p)^0.5)/(0.5-1),
// is 0 at a vertex (derived by hand); the formula's arithmetic gives -0
// there, which prints as "-0", a negative entropy. Every path that returns
// H must give +0.
func TestEntropyAtVertexIsPositiveZero(t *testing.T) {
	s := scorer(t, "(1 - p^0.5 - (1-p)^0.5)/(0.5-1)", 2, nil)
	eff := make([]float64, 2)
	v := []float64{1, 0}
	h1 := s.Entropy(v)
	h2 := s.Efforts(eff, v)
	h3, _, _ := s.Binary(1)
	for i, h := range []float64{h1, h2, h3} {
		if h != 0 || math.Signbit(h) {
			t.Errorf("path %d: H(1, 0) = %v (sign bit %v), want +0", i+1, h, math.Signbit(h))
		}
	}
}
