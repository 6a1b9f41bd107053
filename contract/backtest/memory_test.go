package backtest

import (
	"fmt"
	"runtime"
	"testing"
)

// Many forecasters with a few forecasts each cost little memory, where
// one bin table per forecaster took several kilobytes: past the bounds of
// the tables in memory (here 4096 forecasters' money and 8192 entries,
// small so that the test is quick; DefaultMaxMoney and DefaultMaxPairs in
// use) the money and the outcome counts go to the temporary file, and a
// forecaster costs its name and its index ("forecaster 123456" and its
// index take about 40 bytes). 50,000 forecasters with two forecasts each
// under two rules must take at most 150 bytes of live heap a forecaster
// (the tables' fixed size spread over them), and 150,000 more at most 64
// bytes each.
func TestManyForecastersStaySmall(t *testing.T) {
	if testing.Short() {
		t.Skip("allocates 200,000 forecasters")
	}
	schemes := []Scheme{
		{Name: "q", Rule: rule(t, "1 - sum(p^2)", 3, false), Pay: Affine{A: 1, B: 1}},
		{Name: "l", Rule: rule(t, "-sum(p*ln(p))", 3, false), Pay: Affine{A: 1, B: 1}},
	}
	tl, err := NewTally(schemes, TallyOptions{SpillDir: t.TempDir(), MaxMoney: 1 << 12, MaxPairs: 1 << 13})
	if err != nil {
		t.Fatal(err)
	}
	defer tl.Close()
	menu := [][]float64{{0.2, 0.3, 0.5}, {0.6, 0.2, 0.2}, {0.1, 0.1, 0.8}}
	heap := func() uint64 {
		var m runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&m)
		return m.HeapAlloc
	}
	add := func(from, to int) {
		n := to - from
		for i := range 2 * n {
			tl.Add(fmt.Sprintf("forecaster %06d", from+i%n), i+2, i%3, menu[(i/n+i)%3])
		}
	}
	h0 := heap()
	const F, More = 50_000, 150_000
	add(0, F)
	h1 := heap()
	per := float64(h1-h0) / F
	t.Logf("%.0f bytes of live heap per forecaster for the first %d", per, F)
	if per > 150 {
		t.Errorf("%.0f bytes of live heap per forecaster, want at most 150", per)
	}
	add(F, F+More)
	more := float64(int64(heap())-int64(h1)) / More
	t.Logf("%.0f bytes of live heap per forecaster for %d more", more, More)
	if more > 64 {
		t.Errorf("%.0f bytes of live heap per further forecaster, want at most 64", more)
	}
	if err := tl.Err(); err != nil {
		t.Fatal(err)
	}
	res := result(t, tl)
	if res.ForecasterCount != F+More || len(res.Forecasters) != 2*DefaultShow {
		t.Errorf("%d forecasters, %d detailed; want %d and %d", res.ForecasterCount, len(res.Forecasters), F+More, 2*DefaultShow)
	}
	runtime.KeepAlive(tl)
}
