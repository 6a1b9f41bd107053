package payout

import (
	"errors"
	"math"
	"strings"
	"testing"

	"scorewright/generator/formula"
)

func TestPays(t *testing.T) {
	cases := []struct {
		src    string
		n      int
		report []float64
		want   []float64
		tol    float64
		source string
	}{
		// Brier (1950): multi-category effort sum (p_i - o_i)^2; at 0.70 for
		// the event that happens it is 2 × 0.09 = 0.18 (the common binary
		// form doubled), so 10 - 5 × 0.18 = 9.1; if it does not, 2 × 0.49.
		{"10 - 5*sum((p - hit)^2)", 2, []float64{0.7, 0.3}, []float64{9.1, 10 - 5*0.98}, 1e-12, "Brier 1950"},
		// The linear rule pays the reported probability of what happened
		// (common practice).
		{"p[y]", 3, []float64{0.5, 0.2, 0.3}, []float64{0.5, 0.2, 0.3}, 0, "common practice"},
		// Spherical score p_y / ||p||_2 (Gneiting & Raftery 2007, Sec. 3):
		// p = (0.5, 0.2, 0.3), outcome 3 -> 0.4866642634.
		{"p[y] / sqrt(sum(p^2))", 3, []float64{0.5, 0.2, 0.3}, []float64{0.5 / math.Sqrt(0.38), 0.2 / math.Sqrt(0.38), 0.4866642634}, 1e-9, "Gneiting & Raftery 2007"},
		// Ranked probability with hitc over cumulative c (Epstein 1969):
		// forecast (0.6, 0.3, 0.1), outcome 2: sum_k (C_k - [2 <= k])^2 =
		// 0.6^2 + (0.9 - 1)^2 = 0.37; the normalised RPS is 0.185.
		{"csum((c - hitc)^2) / 2", 3, []float64{0.6, 0.3, 0.1}, []float64{(0.16 + 0.01) / 2, 0.185, (0.36 + 0.81) / 2}, 1e-12, "Epstein 1969"},
		// The clamped log rule (derived by hand): ln max(p_y, 0.01).
		{"ln(max(p[y], 0.01))", 2, []float64{1, 0}, []float64{0, math.Log(0.01)}, 1e-15, "by hand"},
	}
	for _, c := range cases {
		p, err := New(c.src, Options{Outcomes: c.n, Ordered: strings.Contains(c.src, "csum")})
		if err != nil {
			t.Fatalf("%s: %v", c.src, err)
		}
		ev := p.NewEvaluator()
		got := make([]float64, c.n)
		ev.Pays(got, c.report)
		for k := range got {
			if math.Abs(got[k]-c.want[k]) > c.tol {
				t.Errorf("%s (%s): pay(%v, %d) = %.12g, want %.12g", c.src, c.source, c.report, k+1, got[k], c.want[k])
			}
			if v := ev.Pay(c.report, k+1); v != got[k] {
				t.Errorf("%s: Pay and Pays differ at outcome %d", c.src, k+1)
			}
		}
	}
}

func TestExpectedSkipsImpossibleOutcomes(t *testing.T) {
	// ln(p_y) is -Inf at an outcome the report rules out; a belief that
	// rules it out too must not pay 0 × -Inf = NaN (common convention
	// 0 · ln 0 = 0).
	p, err := New("ln(p[y])", Options{Outcomes: 3})
	if err != nil {
		t.Fatal(err)
	}
	ev := p.NewEvaluator()
	if v := ev.Expected([]float64{0.5, 0.5, 0}, []float64{0.5, 0.5, 0}); math.Abs(v-math.Log(0.5)) > 1e-15 {
		t.Errorf("expected %g, want ln 0.5", v)
	}
	if v := ev.Expected([]float64{0.5, 0.25, 0.25}, []float64{0.5, 0.5, 0}); !math.IsInf(v, -1) {
		t.Errorf("expected %g, want -Inf", v)
	}
	// NaN stays data.
	p, _ = New("ln(p[y] - 0.5)", Options{Outcomes: 2})
	if v := p.NewEvaluator().Pay([]float64{0.2, 0.8}, 1); !math.IsNaN(v) {
		t.Errorf("ln(-0.3) = %g, want NaN", v)
	}
}

func TestErrors(t *testing.T) {
	_, err := New("p[y] + q", Options{Outcomes: 2})
	var fe *formula.Error
	if !errors.As(err, &fe) || fe.Pos.Col != 8 || !strings.Contains(fe.Msg, `"q"`) {
		t.Fatalf("error %v; want a formula error at column 8 naming q", err)
	}
	if !strings.Contains(fe.Caret(), "^") {
		t.Errorf("caret %q", fe.Caret())
	}
	if _, err := New("p[y]", Options{Outcomes: 1}); err == nil {
		t.Error("one outcome accepted")
	}
	if _, err := New("csum(c)", Options{Outcomes: 3}); err == nil {
		t.Error("csum without ordered outcomes accepted")
	}
}

func TestNoAllocation(t *testing.T) {
	p, err := New("10 - 5*sum((p - hit)^2)", Options{Outcomes: 4})
	if err != nil {
		t.Fatal(err)
	}
	ev := p.NewEvaluator()
	r, q, dst := []float64{0.1, 0.2, 0.3, 0.4}, []float64{0.25, 0.25, 0.25, 0.25}, make([]float64, 4)
	if a := testing.AllocsPerRun(50, func() { ev.Pays(dst, r); ev.Expected(q, r) }); a != 0 {
		t.Errorf("%v allocations per evaluation", a)
	}
}
