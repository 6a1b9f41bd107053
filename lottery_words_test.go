package scorewright

import (
	"math"
	"strings"
	"testing"
)

// The remedy sentence claims that paid as a chance (pay - floor)/(cap -
// floor) of one fixed prize, any expected-utility maximiser reports the
// truth. Checked by brute force over reports for a CRRA 2 forecaster
// (u = -1/w) under the quadratic pay 100·(1 - (1 - r)²) on the event
// (derived by hand): with money the best report is pulled toward 1/2,
// with the lottery it is the belief. The sentence names how to ask for it.
func TestLotteryRemedyHolds(t *testing.T) {
	u := func(w float64) float64 { return -1 / w }
	pay := func(r float64, event bool) float64 {
		if event {
			return 100 * (1 - (1-r)*(1-r))
		}
		return 100 * (1 - r*r)
	}
	const wealth, q = 20.0, 0.2
	best := func(value func(r float64) float64) float64 {
		br, bv := 0.0, math.Inf(-1)
		for i := 0; i <= 1000; i++ {
			r := float64(i) / 1000
			if v := value(r); v > bv {
				br, bv = r, v
			}
		}
		return br
	}
	money := best(func(r float64) float64 { return q*u(wealth+pay(r, true)) + (1-q)*u(wealth+pay(r, false)) })
	prize := 100.0
	ticket := best(func(r float64) float64 {
		c1, c0 := pay(r, true)/100, pay(r, false)/100
		win := q*c1 + (1-q)*c0
		return win*u(wealth+prize) + (1-win)*u(wealth)
	})
	if math.Abs(money-q) < 0.02 {
		t.Fatalf("money best report %v: no distortion to remove", money)
	}
	if ticket != q {
		t.Errorf("lottery best report %v, want the belief %v", ticket, q)
	}
	s := LotteryRemedy("table --lottery")
	for _, want := range []string{"(pay - floor)/(cap - floor)", "one fixed prize", "table --lottery", "expected-utility maximiser reports the truth"} {
		if !strings.Contains(s, want) {
			t.Errorf("remedy %q lacks %q", s, want)
		}
	}
}
