package emphasis

import (
	"math"
	"testing"
)

// A weight written with terms that cancel is known only to their
// rounding: (1e12 + c) - 1e12 is c to within an ulp of 1e12 (2^-13, about
// 1.2e-4), so its efforts are within 1.2e-4·(1 - p)^2/2 (yes) and
// 1.2e-4·p^2/2 (no) of those of w = c, ∫_p^1 (1 - c)c dc = 1/6 - p^2/2 +
// p^3/3 and ∫_0^p c^2 dc = p^3/3 (derived by hand). The bounds must cover
// that difference; for the plain weight c they stay at rounding level.
func TestRoundingCoversTheWeightsOwnRounding(t *testing.T) {
	noisy, err := New("(1e12 + c) - 1e12", Options{})
	if err != nil {
		t.Fatal(err)
	}
	plain, err := New("c", Options{})
	if err != nil {
		t.Fatal(err)
	}
	en, ep := noisy.NewBinary(), plain.NewBinary()
	hess, grad := make([]float64, 4), make([]float64, 2)
	for _, p := range []float64{0.1, 0.3337, 0.5, 0.8123} {
		yes, no := en.Losses(p)
		wantYes, wantNo := 1.0/6-p*p/2+p*p*p/3, p*p*p/3
		en.HessianRounding(hess, grad, []float64{p, 1 - p})
		if math.Abs(yes-wantYes) > grad[0] || math.Abs(no-wantNo) > grad[1] {
			t.Errorf("p = %g: efforts off by %g, %g; bounds %g, %g", p, yes-wantYes, no-wantNo, grad[0], grad[1])
		}
		h := p*wantYes + (1-p)*wantNo
		if b, ok := en.ValueRounding([]float64{p, 1 - p}); !ok || math.Abs(en.Value([]float64{p, 1 - p})-h) > b {
			t.Errorf("p = %g: H off by %g, bound %g", p, en.Value([]float64{p, 1 - p})-h, b)
		}
		if b, ok := ep.ValueRounding([]float64{p, 1 - p}); !ok || b > 1e-13 {
			t.Errorf("p = %g: plain weight c has bound %g, want rounding level", p, b)
		}
	}
}
