package budget

import (
	"fmt"
	"math"
	"strconv"
	"testing"

	"scorewright/generator/design"
)

// A constant added to the generator cannot change a cent. For
// H = c + 1 - sum(p^2) the effort is, derived by hand,
// L(p, k) = c + 1 - 2 p_k + sum_j p_j^2, from c (a sure right forecast) to
// c + 2 (a sure wrong one). With floor 0 and cap C the exact pay is
// C - (C/2)(L - c); on a menu of steps 1/K, with S = K^2 (1 - 2 p_k +
// sum p_j^2) a whole number, that is C·(2K^2 - S)/(2K^2), rounded here to
// cents in whole-number arithmetic, halves away from zero. Before the
// constant was taken out, c = 1e12 moved cents at most of these budgets.
func TestConstantCannotChangeACent(t *testing.T) {
	for _, nk := range [][2]int{{2, 10}, {2, 20}, {2, 50}, {3, 10}, {3, 20}} {
		for _, capital := range []int{10, 50, 100} {
			for _, c := range []float64{0, 1e12, -1e9} {
				checkConstant(t, nk[0], nk[1], capital, c)
			}
		}
	}
}

func checkConstant(t *testing.T, n, K, capital int, c float64) {
	t.Helper()
	src := "1 - sum(p^2)"
	switch {
	case c > 0:
		src = strconv.FormatFloat(c, 'g', -1, 64) + " + " + src
	case c < 0:
		src = "-" + strconv.FormatFloat(-c, 'g', -1, 64) + " + " + src
	}
	r := rule(t, src, n)
	m := stepMenu(t, n, 1/float64(K), 0)
	f, _ := fit(t, r, m, design.Budget{Floor: 0, Cap: float64(capital), Step: 1 / float64(K), Unit: 0.01})
	for i, p := range m.Reports {
		for k := range p {
			a := make([]int64, n)
			var sq int64
			for j, pj := range p {
				a[j] = int64(math.Round(float64(K) * pj))
				sq += a[j] * a[j]
			}
			kk := int64(K)
			S := kk*kk - 2*kk*a[k] + sq
			num, den := int64(capital)*100*(2*kk*kk-S), 2*kk*kk
			cents := (2*num + den) / (2 * den)
			if got := f.Pays[i][k]; math.Abs(got*100-float64(cents)) > 1e-6 {
				t.Fatalf("%s, n %d, step 1/%d, cap %d: report %v outcome %d pays %.2f, want %s", src, n, K, capital, p, k, got, fmt.Sprintf("%d.%02d", cents/100, cents%100))
			}
		}
	}
	// A is stated for the formula as written: pay = A - B·L.
	B := float64(capital) / 2
	if want := float64(capital) + B*c; math.Abs(f.A-want) > 1e-12*math.Max(1, math.Abs(want)) || math.Abs(f.B-B) > 1e-12*B {
		t.Errorf("%s: A = %v, B = %v; want A = %v, B = %v", src, f.A, f.B, want, B)
	}
	// Pay takes the rule's effort as given, constant included.
	if got := f.Pay(c + 2); got != 0 {
		t.Errorf("%s: Pay(effort of a sure wrong forecast) = %v, want 0", src, got)
	}
	// A truthful forecaster at the uniform belief expects, by hand,
	// C - (C/2)(1 - 1/n) before rounding.
	if want := float64(capital) - B*(1-1/float64(n)); math.Abs(f.Truthful.Min-want) > 1e-9*float64(capital) {
		t.Errorf("%s: smallest truthful expected pay %v, want %v", src, f.Truthful.Min, want)
	}
}
