package backtest

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"scorewright/contract/backtest/history"
	"scorewright/internal/pool"
)

// stepMenu is an explicit report menu for tests: multiples of 1/k.
func stepMenu(k float64) func(p []float64) bool {
	return func(p []float64) bool {
		for _, x := range p {
			if math.Abs(x*k-math.Round(x*k)) > 1e-9 {
				return false
			}
		}
		return true
	}
}

// Pay is A - B·L with L the multi-category Brier effort. Brier (1950),
// binary form (f - o)^2: 0.70 and the event happens -> 0.09, 0.30 -> 0.49,
// 0.50 -> 0.25; the two-component form used here doubles these.
func TestPayExplicit(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 2, false)
	tl, err := NewTally([]Scheme{{Name: "quadratic", Rule: q, Pay: Affine{A: 10, B: 5}, OnMenu: stepMenu(10), Low: 0, High: 10}}, TallyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		p      float64
		y      int
		effort float64
		on     bool
	}{
		{0.70, 0, 2 * 0.09, true},
		{0.30, 0, 2 * 0.49, true},
		{0.50, 1, 2 * 0.25, true},
		{0.25, 1, 2 * 0.0625, false}, // (0.25 - 0)^2, off a 0.1 menu
	}
	var total float64
	for i, c := range cases {
		paid := tl.Add("Alder", i+2, c.y, []float64{c.p, 1 - c.p})
		want := 10 - 5*c.effort
		total += want
		if math.Abs(paid[0].Effort-c.effort) > 1e-12 || math.Abs(paid[0].Pay-want) > 1e-12 || paid[0].OnMenu != c.on {
			t.Errorf("p=%g y=%d: paid %+v, want effort %g pay %g on menu %v", c.p, c.y, paid[0], c.effort, want, c.on)
		}
	}
	m := result(t, tl).Forecasters[0].Money[0]
	if m.Count != 4 || math.Abs(m.Total-total) > 1e-12 || m.OffMenu != 1 || m.BelowLow+m.AboveHigh != 0 {
		t.Errorf("money %+v, want 4 forecasts, total %g, 1 off the menu, none out of bounds", m, total)
	}
}

// Under the log rule a forecast that ruled the outcome out costs +Inf
// effort and pays -Inf; that is counted and located, not hidden.
func TestNonFinitePay(t *testing.T) {
	lg := rule(t, "-sum(p*ln(p))", 2, false)
	tl, _ := NewTally([]Scheme{{Name: "log", Rule: lg, Pay: Affine{A: 5, B: 1}, Low: 0, High: math.Inf(1)}}, TallyOptions{})
	tl.Add("Birch", 2, 0, []float64{0.5, 0.5})
	tl.Add("Birch", 3, 1, []float64{1, 0})
	m := result(t, tl).All[0]
	if m.NonFinite != 1 || m.FirstNonFinite != 3 || !math.IsInf(m.Total, -1) || m.BelowLow != 1 {
		t.Errorf("money %+v, want one non-finite payment on line 3, total -Inf, one below the floor", m)
	}
}

// Ranks by mean pay: the hedger wins under one rule and loses under the
// other. Efforts by hand (n = 2, outcome 1 happens twice, forecasts fixed):
// Alder says 0.9 both times, Birch 0.6. Quadratic: Alder 2·0.01 = 0.02,
// Birch 2·0.16 = 0.32. Linear-in-effort pays keep that order; a scheme
// that pays the effort itself (B = -1, improper, only to test ranking)
// reverses it. A third forecaster tied with Alder shares rank 1.
func TestRanks(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 2, false)
	tl, _ := NewTally([]Scheme{
		{Name: "proper", Rule: q, Pay: Affine{A: 1, B: 1}, Low: math.Inf(-1), High: math.Inf(1)},
		{Name: "reversed", Rule: q, Pay: Affine{A: 0, B: -1}, Low: math.Inf(-1), High: math.Inf(1)},
	}, TallyOptions{})
	for _, who := range []struct {
		name string
		f    float64
	}{{"Alder", 0.9}, {"Birch", 0.6}, {"Cedar", 0.9}} {
		for i := range 2 {
			tl.Add(who.name, i+2, 0, []float64{who.f, 1 - who.f})
		}
	}
	res := result(t, tl)
	want := map[string][2]int{"Alder": {1, 2}, "Birch": {3, 1}, "Cedar": {1, 2}}
	for _, f := range res.Forecasters {
		if w := want[f.Name]; f.Rank[0] != w[0] || f.Rank[1] != w[1] {
			t.Errorf("%s ranks %v, want %v", f.Name, f.Rank, w)
		}
	}
	if res.Forecasters[1].Name != "Birch" || math.Abs(res.Forecasters[1].Money[0].MeanEffort-0.32) > 1e-12 {
		t.Errorf("Birch %+v, want mean effort 0.32", res.Forecasters[1])
	}
}

// Scoring a forecast by a known forecaster in a known bin allocates nothing.
func TestAddAllocations(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 3, false)
	lg := rule(t, "-sum(p*ln(p))", 3, false)
	tl, _ := NewTally([]Scheme{{Name: "q", Rule: q, Pay: Affine{A: 1, B: 1}}, {Name: "l", Rule: lg, Pay: Affine{A: 1, B: 1}}}, TallyOptions{})
	p := []float64{0.2, 0.3, 0.5}
	tl.Add("Alder", 1, 0, p)
	tl.Add("Birch", 2, 0, p)
	allocs := testing.AllocsPerRun(200, func() {
		tl.Add("Alder", 3, 1, p)
		tl.Add("Birch", 4, 2, p)
	})
	if allocs != 0 {
		t.Errorf("Add allocates %.1f times, want 0", allocs)
	}
}

const runHistory = "forecaster,question,outcome,frost,clear\n" +
	"Alder,n1,frost,0.7,0.3\n" +
	"Alder,n2,frost,0.7,0.7\n" + // line 3: sum 1.4
	"Birch,n1,clear,0.7,0.3\n" +
	"Birch,n2,hail,0.5,0.5\n" // line 5: unknown outcome

func TestRunSkipsAndStrict(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 2, false)
	schemes := []Scheme{{Name: "q", Rule: q, Pay: Affine{A: 10, B: 5}}}
	open := func() *history.Reader {
		h, err := history.NewReader(strings.NewReader(runHistory), []string{"frost", "clear"}, history.Options{})
		if err != nil {
			t.Fatal(err)
		}
		return h
	}
	var seen []string
	var last pool.Step
	res, err := Run(context.Background(), open(), schemes, Options{
		OnRow:    func(r *history.Row, paid []Paid) error { seen = append(seen, r.Forecaster+"/"+r.Question); return nil },
		Progress: func(p pool.Step) { last = p },
	})
	if err != nil {
		t.Fatal(err)
	}
	if res.Rows != 2 || res.SkippedCount != 2 || res.Skipped[0].Line != 3 || res.Skipped[1].Line != 5 {
		t.Errorf("rows %d, skipped %+v, want 2 rows and lines 3 and 5 skipped", res.Rows, res.Skipped)
	}
	if strings.Join(seen, " ") != "Alder/n1 Birch/n1" || last.Items != 4 || last.Skipped != 2 || last.Done != float64(len(runHistory)) ||
		last.Total != last.Done || !last.Last || last.Unit != pool.UnitBytes {
		t.Errorf("rows seen %v, last progress %+v", seen, last)
	}
	// Alder: 0.7 and frost, effort 2·0.09 = 0.18, pay 10 - 0.9 = 9.1;
	// Birch: 0.7 and clear, effort 2·0.49 = 0.98, pay 10 - 4.9 = 5.1 (Brier 1950).
	if a, b := res.Forecasters[0].Money[0].Total, res.Forecasters[1].Money[0].Total; math.Abs(a-9.1) > 1e-12 || math.Abs(b-5.1) > 1e-12 {
		t.Errorf("totals %g, %g, want 9.1, 5.1", a, b)
	}
	_, err = Run(context.Background(), open(), schemes, Options{Strict: true})
	var re *history.RowError
	if !errors.As(err, &re) || re.Line != 3 {
		t.Errorf("strict run: error %v, want the row error of line 3", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	big := "forecaster,question,outcome,frost,clear\n" + strings.Repeat("A,n,frost,0.5,0.5\n", progressEvery+1)
	h, _ := history.NewReader(strings.NewReader(big), []string{"frost", "clear"}, history.Options{})
	if _, err := Run(ctx, h, schemes, Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled run: error %v, want context.Canceled", err)
	}
}

// A clamp pays the report as if each probability were at least c, and the
// effort is that of the paid report. Log rule, forecast (1, 0), outcome 2,
// clamp 0.01: the paid report is (1/1.01, 0.01/1.01), effort
// -ln(0.01/1.01) = ln 101 (derived by hand; the written forecast's would
// be +Inf).
func TestAdjust(t *testing.T) {
	lg := rule(t, "-sum(p*ln(p))", 2, false)
	clamp := clampAt(0.01)
	tl, _ := NewTally([]Scheme{{Name: "log", Rule: lg, Pay: Affine{A: 10, B: 1}, Adjust: clamp, Low: 0, High: 10}}, TallyOptions{})
	paid := tl.Add("Birch", 2, 1, []float64{1, 0})
	if math.Abs(paid[0].Effort-math.Log(101)) > 1e-12 || math.Abs(paid[0].Pay-(10-math.Log(101))) > 1e-12 {
		t.Errorf("paid %+v, want effort ln 101 and pay 10 - ln 101 = %g", paid[0], 10-math.Log(101))
	}
}

// A report floor records the forecast as the menu would: log rule,
// forecast (1, 0), outcome 2, floor 0.01: the recorded report is
// (0.99, 0.01), on the menu, paid at effort -ln 0.01 = ln 100 (derived by
// hand), and that is its effort.
func TestRecord(t *testing.T) {
	lg := rule(t, "-sum(p*ln(p))", 2, false)
	floor := floorAt(0.01)
	onMenu := func(p []float64) bool { return math.Abs(p[0]-0.99) < 1e-12 }
	tl, _ := NewTally([]Scheme{{Name: "log", Rule: lg, Pay: Affine{A: 10, B: 1}, Record: floor, OnMenu: onMenu, Low: 0, High: 10}}, TallyOptions{})
	paid := tl.Add("Birch", 2, 1, []float64{1, 0})
	if math.Abs(paid[0].Effort-math.Log(100)) > 1e-12 || math.Abs(paid[0].Pay-(10-math.Log(100))) > 1e-12 || !paid[0].OnMenu {
		t.Errorf("paid %+v, want effort ln 100, pay 10 - ln 100 = %g, on the menu", paid[0], 10-math.Log(100))
	}
}

// The decomposition splits the efforts that were paid. Log rule, floor
// 0.01: forecasts (1, 0) twice, outcomes 1 and 2, and (0.5, 0.5) twice,
// outcomes 1 and 2. The paid forecasts are (0.99, 0.01) and (0.5, 0.5),
// each bin with observed frequency 1/2, so (derived by hand, natural logs)
// uncertainty H(1/2, 1/2) = ln 2, resolution 0, reliability
// 1/2 D((.5,.5), (.99,.01)) = 1/2 (-ln 2 - (ln 0.99 + ln 0.01)/2), all
// finite; the mean effort (-ln 0.99 - ln 0.01 + 2 ln 2)/4 is what the
// identity adds up to.
func TestDecompositionOfPaidForecasts(t *testing.T) {
	lg := rule(t, "-sum(p*ln(p))", 2, false)
	floor := floorAt(0.01)
	tl, _ := NewTally([]Scheme{{Name: "log", Rule: lg, Pay: Affine{A: 10, B: 1}, Record: floor, Low: 0, High: 10}}, TallyOptions{})
	tl.Add("Birch", 2, 0, []float64{1, 0})
	tl.Add("Birch", 3, 1, []float64{1, 0})
	tl.Add("Birch", 4, 0, []float64{0.5, 0.5})
	tl.Add("Birch", 5, 1, []float64{0.5, 0.5})
	d := result(t, tl).Forecasters[0].Decomposition[0]
	rel := 0.5 * (-math.Log(2) - (math.Log(0.99)+math.Log(0.01))/2)
	mean := (-math.Log(0.99) - math.Log(0.01) + 2*math.Log(2)) / 4
	if math.Abs(d.Uncertainty-math.Log(2)) > 1e-12 || math.Abs(d.Resolution) > 1e-12 || math.Abs(d.Reliability-rel) > 1e-12 ||
		math.Abs(d.MeanEffort-mean) > 1e-12 || math.Abs(d.WithinBin) > 1e-12 {
		t.Errorf("decomposition %+v; want uncertainty ln 2, resolution 0, reliability %g, mean effort %g, within-bin 0", d, rel, mean)
	}
}

// Past the cache's bound forecasts are scored directly, with the same
// result: Brier (1950) effort 2 (f - o)^2 for every one.
func TestCacheOverflow(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 2, false)
	tl, _ := NewTally([]Scheme{{Name: "q", Rule: q, Pay: Affine{A: 1, B: 1}}}, TallyOptions{})
	for i := range cacheEntries + 500 {
		f := float64(i) / (cacheEntries + 500)
		paid := tl.Add("A", i+2, 0, []float64{f, 1 - f})
		if want := 2 * (f - 1) * (f - 1); math.Abs(paid[0].Effort-want) > 1e-12 {
			t.Fatalf("forecast %d: effort %g, want %g", i, paid[0].Effort, want)
		}
	}
	if n := len(tl.cache) / tl.n; n != cacheEntries {
		t.Errorf("cache holds %d forecasts, want the bound %d", n, cacheEntries)
	}
}

// clampAt is a report clamp for the tests: every probability raised to at
// least c, then the report renormalised (the clamp the budget applies).
func clampAt(c float64) func(dst, p []float64) []float64 {
	return func(dst, p []float64) []float64 {
		var s float64
		for i, x := range p {
			dst[i] = math.Max(x, c)
			s += dst[i]
		}
		for i := range dst {
			dst[i] /= s
		}
		return dst
	}
}

// floorAt records a two-outcome forecast as a menu with report floor f
// records it: an entry below f is raised to f, the other lowered to match.
func floorAt(f float64) func(dst, p []float64) []float64 {
	return func(dst, p []float64) []float64 {
		copy(dst, p)
		for i := range dst {
			if dst[i] < f {
				dst[1-i] -= f - dst[i]
				dst[i] = f
			}
		}
		return dst
	}
}
