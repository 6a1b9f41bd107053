package formula

import (
	"math"
	"math/rand/v2"
	"testing"
)

// normCases are formulas of the shape c·(sum w_k p_k^a)^e + affine, with
// their parts read off the formula by hand.
var normCases = []struct {
	src     string
	n       int
	coef    float64
	weights []float64
	inner   float64
	outer   float64
}{
	{"a = 3\n-sum(p^a)^(1/a)", 3, -1, []float64{1, 1, 1}, 3, 1.0 / 3},
	{"a = 2\n-sum(p^a)^(1/a)", 4, -1, []float64{1, 1, 1, 1}, 2, 0.5},
	{"a = 1.5\n-sum(p^a)^(1/a)", 2, -1, []float64{1, 1}, 1.5, 1 / 1.5},
	{"-sqrt(sum(p^2))", 3, -1, []float64{1, 1, 1}, 2, 0.5},
	{"-sqrt(p1^2 + p2^2 + p3^2)", 3, -1, []float64{1, 1, 1}, 2, 0.5},
	{"1 - 2*(p1^3 + 2*p2^3 + p3^3)^(1/3) + p1", 3, -2, []float64{1, 2, 1}, 3, 1.0 / 3},
	{"-sum(w*p^3)^(1/3)", 3, -1, []float64{1, 2, 3}, 3, 1.0 / 3},
	{"3*p2 - sum(2*p^4)^0.25/5 + 7", 3, -0.2, []float64{2, 2, 2}, 4, 0.25},
	{"-sum(p^3)", 3, -1, []float64{1, 1, 1}, 3, 1},
	{"sum(p^3)^(1/3)", 2, 1, []float64{1, 1}, 3, 1.0 / 3},
	{"-sum(p^0.5)^2", 3, -1, []float64{1, 1, 1}, 0.5, 2},
	{"-(p1^3 + p2^3)^(1/3)", 3, -1, []float64{1, 1, 0}, 3, 1.0 / 3},
}

// TestNormTermsSum: a sum of norm terms gives each term, in the order
// the formula writes them (read off by hand).
func TestNormTermsSum(t *testing.T) {
	p, err := CompileString("2 - sum(p^3)^(1/3) + p1 - 3*sqrt(sum(p^2)) - sum(p^4)", Scope{Outcomes: 3})
	if err != nil {
		t.Fatal(err)
	}
	terms, ok := p.NormTerms()
	want := []NormForm{{-1, nil, 3, 1.0 / 3}, {-3, nil, 2, 0.5}, {-1, nil, 4, 1}}
	if !ok || len(terms) != len(want) {
		t.Fatalf("got %+v %v", terms, ok)
	}
	for j, w := range want {
		if g := terms[j]; g.Coef != w.Coef || g.Inner != w.Inner || g.Outer != w.Outer || len(g.Weights) != 3 || g.Weights[0] != 1 {
			t.Errorf("term %d: %+v, want %+v", j, g, w)
		}
	}
}

// TestNormFormParts: the recogniser returns the parts the formula writes.
func TestNormFormParts(t *testing.T) {
	for _, c := range normCases {
		p, err := CompileString(c.src, Scope{Outcomes: c.n, Weights: []float64{1, 2, 3, 4}[:c.n]})
		if err != nil {
			t.Fatal(err)
		}
		terms, ok := p.NormTerms()
		if !ok || len(terms) != 1 {
			t.Errorf("%q: not recognised as one term: %+v", c.src, terms)
			continue
		}
		nf := terms[0]
		close := func(x, y float64) bool { return math.Abs(x-y) <= 1e-15*math.Abs(y) }
		if !close(nf.Coef, c.coef) || !close(nf.Inner, c.inner) || !close(nf.Outer, c.outer) || len(nf.Weights) != c.n {
			t.Errorf("%q: got %+v", c.src, nf)
			continue
		}
		for k := range nf.Weights {
			if !close(nf.Weights[k], c.weights[k]) {
				t.Errorf("%q: weights %v, want %v", c.src, nf.Weights, c.weights)
			}
		}
	}
}

// TestNormFormMatchesTheProgram checks the claim independently of the
// recogniser: what the program computes minus the sum of its terms
// c·(sum w_k p_k^a)^e, both evaluated at points of the simplex, must be
// affine there — its value at the midpoint of a segment the mean of its
// values at the ends.
func TestNormFormMatchesTheProgram(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	type formulaCase struct {
		src string
		n   int
	}
	srcs := []formulaCase{{"2 - sum(p^3)^(1/3) + p1 - 3*sqrt(sum(p^2)) - sum(p^4)", 3}, {"-sum(w*p^1.5)^(1/1.5) - (p1^3 + 2*p2^3)^0.5 + 2*p2", 2}}
	for _, c := range normCases {
		srcs = append(srcs, formulaCase{c.src, c.n})
	}
	for _, c := range srcs {
		p, err := CompileString(c.src, Scope{Outcomes: c.n, Weights: []float64{1, 2, 3, 4}[:c.n]})
		if err != nil {
			t.Fatal(err)
		}
		terms, ok := p.NormTerms()
		if !ok {
			t.Fatalf("%q: not recognised", c.src)
		}
		m := p.NewMachine()
		rest := func(x []float64) float64 {
			v := m.Value(x)
			for _, nf := range terms {
				var s float64
				for k, w := range nf.Weights {
					s += w * math.Pow(x[k], nf.Inner)
				}
				v -= nf.Coef * math.Pow(s, nf.Outer)
			}
			return v
		}
		for trial := 0; trial < 200; trial++ {
			x, y := randomPoint(rng, c.n, trial), randomPoint(rng, c.n, trial+1)
			mid := make([]float64, c.n)
			for k := range mid {
				mid[k] = (x[k] + y[k]) / 2
			}
			rx, ry, rm := rest(x), rest(y), rest(mid)
			if d := rm - (rx+ry)/2; math.Abs(d) > 1e-13*(1+math.Abs(rx)+math.Abs(ry)) {
				t.Errorf("%q: the rest is not affine: %g at the midpoint of %v and %v", c.src, d, x, y)
				break
			}
		}
	}
}

// TestNormFormRefuses: a formula that differs from the shape by any term
// or operation is not recognised.
func TestNormFormRefuses(t *testing.T) {
	for _, src := range []string{
		"-sum(p^3)^(1/3) + 1e-12*p1*p2",                         // a product of two variables
		"-sum(p^3)^(1/3) + 1e-9*exp(-(p1 - 0.3)^2/1e-10)",       // a bump
		"-sum(p^3)^(1/3) * sum(p^4)^(1/4)",                      // a product of two norms
		"-(sum(p^3) + sum(p^4))^(1/3)",                          // two inner exponents in one sum
		"-(sum(p^3)^(1/6))^2",                                   // a power of a term
		"-(p1^3 - 0.5*p2^3 + p3^3)^(1/3)",                       // a negative weight
		"-(p1^3 + 0*p2^3 + p3^3)^(1/3)",                         // a zero factor
		"-(p1^3 + p2^2 + p3^3)^(1/3)",                           // two inner exponents
		"-(sum(p^3) + 0.1)^(1/3)",                               // a constant inside
		"-sum(p^3)^(1/3)*p1",                                    // times a variable
		"-min(sum(p^3)^(1/3), 1)",                               // a min
		"-(sum(p^3)^(1/3))^2",                                   // a power of the power
		"-(-sum(p^3))^(1/3)",                                    // a negated sum inside
		"-sum((2*p)^3)^(1/3)",                                   // a scaled variable inside
		"if(p1 < 0.5, -sum(p^3)^(1/3), -sum(p^3)^(1/3) + 1e-9)", // an if
		"-sum(p^3)^(1/3) + sum(p*ln(p))*1e-12",                  // an entropy term
		"-sum(p^3)^(1/3) + 1e300*1e300 - 1e300*1e300",           // an infinite constant
		"-sum(p^3)^p1",                                          // a variable exponent
		"-sum(p^3)^(1/3) + sqrt(p1)",                            // a root of a variable
	} {
		p, err := CompileString(src, Scope{Outcomes: 3})
		if err != nil {
			t.Logf("%q does not compile (%v); skipped", src, err)
			continue
		}
		if nf, ok := p.NormTerms(); ok {
			t.Errorf("%q recognised as %+v", src, nf)
		}
	}
}
