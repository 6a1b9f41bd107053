package backtest

import (
	"fmt"
	"runtime"
	"testing"
)

// Many forecasters with a few forecasts each keep a small, fixed summary
// apiece: 100,000 forecasters with two forecasts each, two rules, must
// stay under 400 bytes a forecaster of live heap (the name, its map entry,
// 2 × 56 bytes of money and the outcome counts of its two forecasts),
// where one bin table per forecaster took several kilobytes.
func TestManyForecastersStaySmall(t *testing.T) {
	if testing.Short() {
		t.Skip("allocates 100,000 forecasters")
	}
	schemes := []Scheme{
		{Name: "q", Rule: rule(t, "1 - sum(p^2)", 3, false), Pay: Affine{A: 1, B: 1}},
		{Name: "l", Rule: rule(t, "-sum(p*ln(p))", 3, false), Pay: Affine{A: 1, B: 1}},
	}
	tl, err := NewTally(schemes, TallyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	menu := [][]float64{{0.2, 0.3, 0.5}, {0.6, 0.2, 0.2}, {0.1, 0.1, 0.8}}
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	const F = 100_000
	for i := range 2 * F {
		tl.Add(fmt.Sprintf("forecaster %06d", i%F), i+2, i%3, menu[(i/F+i)%3])
	}
	runtime.GC()
	runtime.ReadMemStats(&after)
	per := float64(after.HeapAlloc-before.HeapAlloc) / F
	t.Logf("%.0f bytes of live heap per forecaster", per)
	if per > 400 {
		t.Errorf("%.0f bytes of live heap per forecaster, want at most 400", per)
	}
	res := result(t, tl)
	if res.ForecasterCount != F || len(res.Forecasters) != 2*DefaultShow {
		t.Errorf("%d forecasters, %d detailed; want %d and %d", res.ForecasterCount, len(res.Forecasters), F, 2*DefaultShow)
	}
	runtime.KeepAlive(tl)
}
