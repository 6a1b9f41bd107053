package bregman

import (
	"math"
	"math/rand/v2"
	"testing"
)

func scorer(t *testing.T, src string, n int, params map[string]float64) *Scorer {
	t.Helper()
	f, err := NewFormula(src, Options{Outcomes: n, Params: params})
	if err != nil {
		t.Fatal(err)
	}
	return (&Rule{Gen: f}).NewScorer()
}

// The log rule written with p alone (n = 2) has gradient (ln((1-p)/p), 0):
// infinite at p = 1, where the formal effort is Inf - Inf. Its effort is
// -ln p_k (Good 1952), so at the report (1, 0) the limit from the
// interior is 0 for outcome 1 and +Inf for outcome 2, and at (0, 1) the
// other way round.
func TestBoundaryLogPAlone(t *testing.T) {
	s := scorer(t, "-p*ln(p) - (1-p)*ln(1-p)", 2, nil)
	eff := make([]float64, 2)
	for _, c := range []struct {
		p    []float64
		want []float64
	}{
		{[]float64{1, 0}, []float64{0, math.Inf(1)}},
		{[]float64{0, 1}, []float64{math.Inf(1), 0}},
	} {
		s.Efforts(eff, c.p)
		for k := range eff {
			if eff[k] != c.want[k] || math.Signbit(eff[k]) {
				t.Errorf("report %v: L(p, %d) = %v, want %v (Good 1952: -ln p_k)", c.p, k+1, eff[k], c.want[k])
			}
		}
	}
}

// sqrt(p1*p2) over three outcomes is concave (a geometric mean) and
// homogeneous of degree 1 in (p1, p2). At (0, 0, 1) its formal partials
// are all 0, no supergradient (H(1/2, 1/2, 0) = 1/2 > 0). Along the
// segment from the centre p1 = p2, where the gradient is (1/2, 1/2, 0)
// (derived by hand), so the efforts are (1/2, 1/2, 0). The check below is
// independent of that: a supergradient means no belief q expects less
// than H(q) from the report, tested by brute force over a grid of q.
func TestBoundarySupergradient(t *testing.T) {
	s := scorer(t, "sqrt(p1*p2)", 3, nil)
	eff := make([]float64, 3)
	s.Efforts(eff, []float64{0, 0, 1})
	want := []float64{0.5, 0.5, 0}
	for k := range eff {
		if math.Abs(eff[k]-want[k]) > 1e-12 {
			t.Errorf("L((0,0,1), %d) = %v, want %v", k+1, eff[k], want[k])
		}
	}
	const K = 50
	for i := 0; i <= K; i++ {
		for j := 0; i+j <= K; j++ {
			q := []float64{float64(i) / K, float64(j) / K, float64(K-i-j) / K}
			if got, h := Dot(q, eff), math.Sqrt(q[0]*q[1]); got < h-1e-12 {
				t.Fatalf("belief %v expects %v from report (0,0,1), less than H(q) = %v", q, got, h)
			}
		}
	}
}

// Boundary efforts of the power rule, H = (1 - sum p^g)/(g - 1), against
// its closed form L(p, k) = (1 + (g-1) sum p^g - g p_k^(g-1))/(g - 1)
// (Gneiting & Raftery 2007, Sec. 3, in effort orientation), where the
// gradient g p^(g-1)/(g-1) is infinite at p_k = 0 for g < 1 and the
// effort then +Inf; and of the quadratic rule at a vertex, exactly 0 and 2
// (Brier 1950).
func TestBoundaryPowerClosedForm(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for _, g := range []float64{0.5, 1.1, 1.5, 2, 3} {
		s := scorer(t, "g = 2\n(1 - sum(p^g)) / (g - 1)", 4, map[string]float64{"g": g})
		eff := make([]float64, 4)
		for trial := 0; trial < 30; trial++ {
			p := make([]float64, 4)
			var sum float64
			for i := range p {
				if rng.IntN(3) > 0 {
					p[i] = rng.Float64()
					sum += p[i]
				}
			}
			if sum == 0 {
				continue
			}
			var sg float64
			for i := range p {
				p[i] /= sum
				sg += math.Pow(p[i], g)
			}
			s.Efforts(eff, p)
			for k := range eff {
				want := (1 + (g-1)*sg - g*math.Pow(p[k], g-1)) / (g - 1)
				if math.IsInf(want, 0) && eff[k] == want {
					continue
				}
				if math.Abs(eff[k]-want) > 1e-9*(1+math.Abs(want)) {
					t.Errorf("g = %g, report %v: L(p, %d) = %v, closed form %v", g, p, k+1, eff[k], want)
				}
			}
		}
	}
	s := scorer(t, "1 - sum(p^2)", 3, nil)
	eff := make([]float64, 3)
	s.Efforts(eff, []float64{1, 0, 0})
	if eff[0] != 0 || eff[1] != 2 || eff[2] != 2 {
		t.Errorf("quadratic at (1, 0, 0): efforts %v, want exactly (0, 2, 2)", eff)
	}
}

// A report on a face whose other coordinates are small but positive: the
// log rule's effort for an outcome with p_k > 0 is -ln p_k (Good 1952),
// finite, and only the outcome the report rules out costs +Inf. A segment
// whose steps start larger than p_k once mistook -ln(p_k + h/3) for the
// divergence -ln h.
func TestBoundarySmallCoordinateBesideZero(t *testing.T) {
	s := scorer(t, "-sum(p*ln(p))", 3, nil)
	eff := make([]float64, 3)
	for _, small := range []float64{0.3, 1e-3, 4.7e-7, 1e-12, 1e-100} {
		p := []float64{small, 1 - small, 0}
		s.Efforts(eff, p)
		for k := 0; k < 2; k++ {
			want := -math.Log(p[k])
			if math.Abs(eff[k]-want) > 1e-9*(1+want) {
				t.Errorf("report %v: L(p, %d) = %v, want -ln p = %v", p, k+1, eff[k], want)
			}
		}
		if !math.IsInf(eff[2], 1) {
			t.Errorf("report %v: L(p, 3) = %v, want +Inf", p, eff[2])
		}
	}
}
