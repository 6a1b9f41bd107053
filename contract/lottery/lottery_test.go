package lottery

import (
	"math"
	"strings"
	"testing"

	"scorewright/contract/table"
	"scorewright/internal/num"
)

// logTable is a binary log-rule money table on the menu 0.1..0.9: pay =
// 20 + 5 ln p_k (Good 1952), in [20 + 5 ln 0.1, 20 + 5 ln 0.9].
func logTable() (*table.Table, float64, float64) {
	t := &table.Table{Kind: table.KindMoney, ValueName: "pay", Labels: []string{"frost", "clear"}, Decimals: -1,
		Meta: table.Meta{Payment: "pay(p, k) = 20 + 5 ln p_k", MinMargin: num.Float(0.4)}}
	for i := 1; i <= 9; i++ {
		p := float64(i) / 10
		t.Reports = append(t.Reports, []float64{p, 1 - p})
		t.Values = append(t.Values, []float64{20 + 5*math.Log(p), 20 + 5*math.Log(1-p)})
	}
	return t, 20 + 5*math.Log(0.1), 20 + 5*math.Log(0.9)
}

// A money table rounded to cents with a prize of 40 has chances in steps
// of 0.01/40 = 0.00025, so five decimals show them exactly (derived by
// hand); the division's binary noise (0.9974999999999999) does not show.
func TestChanceDecimals(t *testing.T) {
	tb := &table.Table{Kind: table.KindMoney, ValueName: "pay", Labels: []string{"a", "b"}, Decimals: 2,
		Reports: [][]float64{{0.5, 0.5}, {1, 0}}, Values: [][]float64{{30.01, 39.9}, {40, 0}}}
	if err := Convert(tb, 0, 40); err != nil {
		t.Fatal(err)
	}
	if tb.Decimals != 5 {
		t.Errorf("decimals %d, want 5 (30.01/40 = 0.75025)", tb.Decimals)
	}
	tb = &table.Table{Kind: table.KindMoney, ValueName: "pay", Labels: []string{"a", "b"}, Decimals: 0,
		Reports: [][]float64{{0.5, 0.5}}, Values: [][]float64{{99.75 * 4, 0}}}
	if err := Convert(tb, 0, 400); err != nil {
		t.Fatal(err)
	}
	if tb.Decimals != 4 {
		t.Errorf("decimals %d, want 4 (399/400 = 0.9975)", tb.Decimals)
	}
}

func TestConvert(t *testing.T) {
	tb, lo, hi := logTable()
	money := tb.Values
	if err := Convert(tb, lo, hi); err != nil {
		t.Fatal(err)
	}
	if tb.Kind != KindChance || tb.ValueName != "chance" || tb.Decimals != -1 {
		t.Errorf("kind %q name %q decimals %d", tb.Kind, tb.ValueName, tb.Decimals)
	}
	for i := range money {
		for k := range money[i] {
			// Derived by hand: chance = (pay - floor)/(cap - floor).
			if want := (money[i][k] - lo) / (hi - lo); math.Abs(tb.Values[i][k]-want) > 1e-15 {
				t.Errorf("cell %d,%d: %v, want %v", i, k, tb.Values[i][k], want)
			}
		}
	}
	if tb.Values[0][0] != 0 || tb.Values[0][1] != 1 {
		t.Errorf("extremes %v", tb.Values[0])
	}
	if got := float64(tb.Meta.MinMargin); math.Abs(got-0.4/(hi-lo)) > 1e-15 {
		t.Errorf("margin %v", got)
	}
	all := strings.Join(tb.Meta.Notes, " ") + strings.Join(tb.Meta.Cautions, " ")
	for _, want := range []string{"Hossain & Okui 2013", "gambling", "U < chance"} {
		if !strings.Contains(all, want) {
			t.Errorf("record lacks %q", want)
		}
	}
	if err := tb.Check(); err != nil {
		t.Error(err)
	}
	if err := Convert(tb, lo, hi); err == nil {
		t.Error("converted a chance table again")
	}
	tb, lo, hi = logTable()
	if err := Convert(tb, lo+1, hi); err == nil || !strings.Contains(err.Error(), "row 1") {
		t.Errorf("a payment below the floor: %v", err)
	}
}

// Under money a risk-averse forecaster shades the report; under the
// lottery the best menu item for any increasing utility is the one with
// the largest expected pay (derived by hand: EU = u(lose) + Pr(win)
// (u(win) - u(lose)) with Pr(win) the expected chance).
func TestLotteryRestoresTruthfulness(t *testing.T) {
	tb, lo, hi := logTable()
	money := make([][]float64, len(tb.Values))
	for i := range tb.Values {
		money[i] = append([]float64(nil), tb.Values[i]...)
	}
	if err := Convert(tb, lo, hi); err != nil {
		t.Fatal(err)
	}
	u := func(x float64) float64 { return -math.Exp(-2 * x) } // strongly risk-averse (CARA a = 2)
	q := []float64{0.8, 0.2}
	argmax := func(f func(i int) float64) int {
		best := 0
		for i := range money {
			if f(i) > f(best) {
				best = i
			}
		}
		return best
	}
	pay := argmax(func(i int) float64 { return q[0]*money[i][0] + q[1]*money[i][1] })
	eu := argmax(func(i int) float64 { return q[0]*u(money[i][0]) + q[1]*u(money[i][1]) })
	lot := argmax(func(i int) float64 {
		win := q[0]*tb.Values[i][0] + q[1]*tb.Values[i][1]
		return u(lo) + win*(u(hi)-u(lo))
	})
	if tb.Reports[pay][0] != 0.8 {
		t.Fatalf("risk-neutral pick %v, want the belief 0.8 (proper rule)", tb.Reports[pay])
	}
	if eu == pay {
		t.Errorf("money: the risk-averse pick %v is not shaded; the test lost its point", tb.Reports[eu])
	}
	if lot != pay {
		t.Errorf("lottery: pick %v, want the truthful %v", tb.Reports[lot], tb.Reports[pay])
	}
}

func TestChance(t *testing.T) {
	for _, tc := range []struct {
		pay, lo, hi float64
		ok          bool
	}{{5, 0, 10, true}, {0, 0, 10, true}, {10, 0, 10, true}, {11, 0, 10, false}, {5, 10, 10, false}, {math.NaN(), 0, 1, false}, {1, 0, math.Inf(1), false}} {
		c, err := Chance(tc.pay, tc.lo, tc.hi)
		if (err == nil) != tc.ok || tc.ok && math.Abs(c-(tc.pay-tc.lo)/(tc.hi-tc.lo)) > 1e-15 {
			t.Errorf("Chance(%v, %v, %v) = %v, %v", tc.pay, tc.lo, tc.hi, c, err)
		}
	}
}
