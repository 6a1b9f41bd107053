package formula

import (
	"math"
	"math/rand/v2"
	"testing"

	iv "scorewright/internal/interval"
)

// near reports whether the machine's float x lies in a, allowing for the
// machine's own rounding (a relative 1e-9: the enclosure holds the exact
// value, the machine a rounded one).
func near(a iv.Interval, x float64) bool {
	if math.IsNaN(x) {
		return true
	}
	if math.IsInf(x, 0) {
		return (math.IsInf(x, 1) && math.IsInf(a.Hi, 1)) || (math.IsInf(x, -1) && math.IsInf(a.Lo, -1)) || !a.Bounded()
	}
	s := 1e-9 * (1 + math.Abs(x))
	return a.Lo-s <= x && x <= a.Hi+s
}

// randomSimplexBox is a small box around a random point of the simplex,
// sometimes touching a face; p is a point of the simplex inside it.
func randomSimplexBox(r *rand.Rand, n int) (box []iv.Interval, sample func() []float64) {
	c := make([]float64, n)
	var s float64
	for k := range c {
		c[k] = -math.Log(1 - r.Float64())
		if r.IntN(6) == 0 {
			c[k] = 0
		}
		s += c[k]
	}
	if s == 0 {
		c[0], s = 1, 1
	}
	h := math.Pow(10, -1-2*r.Float64())
	box = make([]iv.Interval, n)
	for k := range c {
		c[k] /= s
		box[k] = iv.Interval{Lo: math.Max(0, c[k]-h), Hi: math.Min(1, c[k]+h)}
	}
	return box, func() []float64 {
		// A point of the box near c on the simplex: move mass between
		// two coordinates within the box.
		p := append([]float64(nil), c...)
		i, j := r.IntN(n), r.IntN(n)
		t := r.Float64() * math.Min(box[i].Hi-p[i], p[j]-box[j].Lo)
		if i != j && t > 0 {
			p[i] += t
			p[j] -= t
		}
		return p
	}
}

var encloseFormulas = []string{
	"1 - sum(p^2)",
	"-sum(p*ln(p))",
	"-sqrt(sum(p^2))",
	"-sum(p^3)^(1/3)",
	"g = 3\nif(abs(g - 1) > 0, -sum(p*expm1((g - 1)*ln(p))) / (g - 1), -sum(p*ln(p)))",
	"g = 0.5\n-sum(p*expm1((g - 1)*ln(p))) / (g - 1)",
	"csum(c*(1-c))",
	"-p1*ln(p1) - log1p(-p1)*(1-p1) + exp(p2) / (1 + p3)",
	"min(p1*p2, 0.16) + max(p1, p2)^2 - abs(p1 - p2)",
	"if(p1 < 0.3, p1^2, sqrt(p1)) + p2^2.5 + 2^p3",
	"(p1 + 0.5)^(p2 + 1) - expm1(p3) * log1p(p1)",
	"sum(w*p*(1-p)) / (p1 + p2 + 0.1)",
}

// TestEnclosureContainsPoints evaluates the machine's value, gradient and
// Hessian at random points of random boxes: every number must lie in the
// box's enclosure (where the enclosure says it is smooth, for the
// derivatives), the defining property of an interval extension (Moore
// 1966, Ch. 3).
func TestEnclosureContainsPoints(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for _, src := range encloseFormulas {
		for _, n := range []int{2, 3, 4} {
			prog, err := CompileString(src, Scope{Outcomes: n, Ordered: true})
			if err != nil && n < 3 {
				continue // the formula names p3
			}
			if err != nil {
				t.Fatalf("%q n=%d: %v", src, n, err)
			}
			m, e := prog.NewMachine(), prog.NewEncloser()
			var enc Enclosure
			g, h := make([]float64, n), make([]float64, n*n)
			for range 300 {
				box, sample := randomSimplexBox(r, n)
				e.Enclose(&enc, box, 2)
				if enc.Undefined {
					continue
				}
				for range 5 {
					p := sample()
					v := m.Hessian(h, g, p)
					if !near(enc.Value, v) {
						t.Fatalf("%q n=%d box %v: value %g at %v outside %v", src, n, box, v, p, enc.Value)
					}
					if enc.Kinked || onFace(p) {
						continue
					}
					for k := range g {
						if !near(enc.Grad[k], g[k]) {
							t.Fatalf("%q n=%d box %v: gradient %d = %g at %v outside %v", src, n, box, k, g[k], p, enc.Grad[k])
						}
					}
					for k := range h {
						if !near(enc.Hess[k], h[k]) {
							t.Fatalf("%q n=%d box %v: Hessian %d = %g at %v outside %v", src, n, box, k, h[k], p, enc.Hess[k])
						}
					}
				}
			}
		}
	}
}

func onFace(p []float64) bool {
	for _, x := range p {
		if x == 0 {
			return true
		}
	}
	return false
}

// TestEnclosureByHand compares enclosures with bounds derived by hand.
func TestEnclosureByHand(t *testing.T) {
	box := []iv.Interval{{Lo: 0.1, Hi: 0.2}, {Lo: 0.3, Hi: 0.4}, {Lo: 0.4, Hi: 0.6}}
	prog, _ := CompileString("1 - sum(p^2)", Scope{Outcomes: 3})
	var enc Enclosure
	prog.NewEncloser().Enclose(&enc, box, 2)
	// 1 - (0.01 + 0.09 + 0.16) = 0.74 and 1 - (0.04 + 0.16 + 0.36) = 0.44;
	// gradient -2p; Hessian -2I exactly (derived by hand).
	if !enc.Value.Contains(0.44) || !enc.Value.Contains(0.74) || enc.Value.Lo < 0.44-1e-15 || enc.Value.Hi > 0.74+1e-15 {
		t.Errorf("value %v, want [0.44, 0.74]", enc.Value)
	}
	if g := enc.Grad[2]; g.Lo < -1.2-1e-15 || g.Hi > -0.8+1e-15 {
		t.Errorf("gradient 3 = %v, want [-1.2, -0.8]", g)
	}
	for k, h := range enc.Hess {
		want := 0.0
		if k%4 == 0 {
			want = -2
		}
		if h != iv.Point(want) {
			t.Errorf("Hessian %d = %v, want exactly %g", k, h, want)
		}
	}
	if enc.Kinked || enc.Undefined {
		t.Error("a polynomial is smooth and defined")
	}
	// The entropy on a box touching the face p1 = 0: the diagonal is
	// -1/p_k, so entry 1 is at most -1/0.2 = -5 and unbounded below; the
	// off-diagonal entries are exactly 0; the face is a limit, not a kink.
	box[0].Lo = 0
	ent, _ := CompileString("-sum(p*ln(p))", Scope{Outcomes: 3})
	ent.NewEncloser().Enclose(&enc, box, 2)
	if h := enc.Hess[0]; math.Abs(h.Hi+5) > 1e-14 || !math.IsInf(h.Lo, -1) {
		t.Errorf("entropy H11 = %v, want (-Inf, -5] (0.2 in binary is a little above 0.2)", h)
	}
	if enc.Hess[1] != iv.Point(0) || enc.Kinked {
		t.Errorf("entropy H12 = %v kinked %v, want exactly 0 and smooth", enc.Hess[1], enc.Kinked)
	}
	// An undecided if is a possible jump.
	jump, _ := CompileString("if(p1 < 0.15, 1, 0)", Scope{Outcomes: 3})
	box[0] = iv.Interval{Lo: 0.1, Hi: 0.2}
	jump.NewEncloser().Enclose(&enc, box, 2)
	if !enc.Kinked || enc.Value != iv.New(0, 1) {
		t.Errorf("undecided if: %v kinked %v", enc.Value, enc.Kinked)
	}
	// ln of a coordinate difference crosses its singular point inside.
	sing, _ := CompileString("sqrt(p1 - p2 + 0.25)", Scope{Outcomes: 3})
	sing.NewEncloser().Enclose(&enc, []iv.Interval{{Lo: 0.1, Hi: 0.2}, {Lo: 0.3, Hi: 0.5}, {Lo: 0.3, Hi: 0.6}}, 2)
	if !enc.Kinked || !enc.Undefined {
		t.Errorf("sqrt reaching below 0 inside the simplex: kinked %v undefined %v", enc.Kinked, enc.Undefined)
	}
}
