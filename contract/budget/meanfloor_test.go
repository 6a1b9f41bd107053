package budget

import (
	"math"
	"testing"

	"scorewright/generator/design"
)

// A mean-pay budget with a report floor aims at what a truthful forecaster
// at the reference is paid: the reference raised to the floor. Checked
// against a brute force over every report the floor allows (n = 2, log rule
// written out as A + B ln p_k: for a belief below the floor the best such
// report is the floor itself, as the expected log score falls on each side
// of the belief), and by hand for n = 3 (quadratic effort
// (1 - p_k)^2 + sum_{j != k} p_j^2 at the floored reference).
func TestMeanPayAimsAtTheFlooredReference(t *testing.T) {
	mp := 30.0
	ref := []float64{0.002, 0.998}
	f, err := FitRule(rule(t, "-sum(p*ln(p))", 2), stepMenu(t, 2, 0.05, 0.01), design.Budget{Floor: 0, MeanPay: &mp, Reference: ref, ReportFloor: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	best := math.Inf(-1)
	for i := 0; i <= 980000; i++ {
		r := 0.01 + float64(i)*1e-6
		best = math.Max(best, ref[0]*(f.A+f.B*math.Log(r))+ref[1]*(f.A+f.B*math.Log(1-r)))
	}
	if math.Abs(best-mp) > 1e-9 || math.Abs(f.ReferencePay-mp) > 1e-9 {
		t.Errorf("n = 2: best expected pay at the reference %.12g, reference pay %.12g; want %g", best, f.ReferencePay, mp)
	}

	mp3 := 60.0
	ref3 := []float64{0, 0.3, 0.7}
	f3, err := FitRule(rule(t, "1 - sum(p^2)", 3), stepMenu(t, 3, 0.05, 0.05), design.Budget{Floor: 0, MeanPay: &mp3, Reference: ref3, ReportFloor: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	paid := []float64{0.05, 0.3, 0.65} // raised to the floor, taken from the largest
	var pay float64
	for k, qk := range ref3 {
		var l float64
		for j, x := range paid {
			if j == k {
				x = 1 - x
			}
			l += x * x
		}
		pay += qk * (f3.A - f3.B*l)
	}
	if math.Abs(pay-mp3) > 1e-9 {
		t.Errorf("n = 3: expected pay at the floored reference %.12g, want %g", pay, mp3)
	}
}
