package num

import (
	"math"
	"testing"
)

// The extrapolation itself on sequences whose limits are known: a power
// law approach of exponent 0.1 (slow, ratio 0.87 per step), a constant,
// and a logarithmic divergence.
func TestLimit(t *testing.T) {
	cases := []struct {
		name string
		f    func(h float64) float64
		want float64
	}{
		{"h^0.1", func(h float64) float64 { return 2 + 3*math.Pow(h, 0.1) }, 2},
		{"sqrt h + h", func(h float64) float64 { return -1 + math.Sqrt(h) + h }, -1},
		{"h ln h", func(h float64) float64 { return 0.5 + h*math.Log(h) }, 0.5},
		{"constant", func(float64) float64 { return 0.25 }, 0.25},
		{"-ln h", func(h float64) float64 { return -math.Log(h) }, math.Inf(1)},
		{"h^-0.5", func(h float64) float64 { return -1 / math.Sqrt(h) }, math.Inf(-1)},
	}
	for _, c := range cases {
		var st Limit
		for step := 0; step < LimitSteps && !st.Done(); step++ {
			v := c.f(LimitStep(1, step))
			st.Offer(v, math.Abs(v))
		}
		got := st.Result()
		if math.IsInf(c.want, 0) && got != c.want || !math.IsInf(c.want, 0) && math.Abs(got-c.want) > 1e-9 {
			t.Errorf("%s: limit %v, want %v", c.name, got, c.want)
		}
	}
}
