package backtest

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strings"
	"testing"
)

// spillHistory adds a random history to tl: 60 forecasters taking random
// turns, forecasts on a tenth menu or, one in four, continuous. It
// returns what Add said each forecaster earned, summed by the test's own
// bookkeeping: count, total pay, total effort and off-menu count per
// scheme.
func spillHistory(tl *Tally, rows int) map[string][][4]float64 {
	sums := map[string][][4]float64{}
	rng := rand.New(rand.NewPCG(7, 11))
	for i := range rows {
		var p [3]float64
		if i%4 == 0 {
			a, b := rng.Float64(), rng.Float64()
			p = [3]float64{math.Min(a, b), math.Abs(a - b), 0}
		} else {
			a, b := rng.IntN(11), rng.IntN(11)
			p = [3]float64{float64(min(a, b)) / 10, float64(max(a, b)-min(a, b)) / 10, 0}
		}
		p[2] = 1 - p[0] - p[1]
		name := fmt.Sprintf("forecaster %02d", rng.IntN(60))
		paid := tl.Add(name, i+2, rng.IntN(3), p[:])
		if sums[name] == nil {
			sums[name] = make([][4]float64, len(paid))
		}
		for s, pd := range paid {
			off := 0.0
			if !pd.OnMenu {
				off = 1
			}
			sums[name][s] = [4]float64{sums[name][s][0] + 1, sums[name][s][1] + pd.Pay, sums[name][s][2] + pd.Effort, sums[name][s][3] + off}
		}
	}
	return sums
}

// checkMoney compares every forecaster's money with the sums Add
// returned.
func checkMoney(t *testing.T, tl *Tally, want map[string][][4]float64) {
	t.Helper()
	res := result(t, tl)
	seen := 0
	err := res.EachForecaster(func(f *Forecaster) error {
		seen++
		for s, m := range f.Money {
			w := want[f.Name][s]
			if float64(m.Count) != w[0] || math.Abs(m.Total-w[1]) > 1e-9*math.Abs(w[1]) ||
				math.Abs(m.MeanEffort*w[0]-w[2]) > 1e-9*math.Abs(w[2]) || float64(m.OffMenu) != w[3] {
				t.Errorf("%s, scheme %d: money %+v, want count, pay, effort, off menu %v", f.Name, s, m, w)
			}
		}
		return nil
	})
	if err != nil || seen != len(want) {
		t.Errorf("%d forecasters visited of %d: %v", seen, len(want), err)
	}
}

// dump writes everything a Result says, every forecaster included, so two
// Results can be compared (NaN prints as itself).
func dump(t *testing.T, tl *Tally) string {
	t.Helper()
	res := result(t, tl)
	var b strings.Builder
	fmt.Fprintf(&b, "%v %v %d %s\n", res.All, res.Rows, res.ForecasterCount, res.Grouping)
	for _, f := range res.Forecasters {
		fmt.Fprintf(&b, "%+v\n", f)
	}
	err := res.EachForecaster(func(f *Forecaster) error {
		fmt.Fprintf(&b, "%+v\n", *f)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// Moving the (forecaster, forecast) entries to a temporary file, in runs
// of a few entries, and the forecasters' figures too, changes nothing in
// the Result: the same money, ranks, bins, decompositions and CORP terms,
// to the last bit, also when the forecasts are coarsened to a grid while
// runs written before hold the ids of the finer one. Nothing is left in
// the temporary directory.
func TestSpillChangesNothing(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 3, false)
	lg := rule(t, "-sum(p*ln(p))", 3, false)
	clamp := clampAt(0.01)
	schemes := []Scheme{
		{Name: "q", Rule: q, Pay: Affine{A: 10, B: 5}, OnMenu: stepMenu(10), Low: 0, High: 10},
		{Name: "l", Rule: lg, Pay: Affine{A: 10, B: 1}, Adjust: clamp, Low: 0, High: 10},
	}
	for _, maxDistinct := range []int{0, 300} {
		dir := t.TempDir()
		run := func(opt TallyOptions) string {
			opt.MaxDistinct, opt.SpillDir = maxDistinct, dir
			tl, err := NewTally(schemes, opt)
			if err != nil {
				t.Fatal(err)
			}
			defer tl.Close()
			checkMoney(t, tl, spillHistory(tl, 5000))
			if maxDistinct > 0 && tl.store.quantum == 0 {
				t.Fatalf("the history was not coarsened at %d distinct forecasts", maxDistinct)
			}
			return dump(t, tl)
		}
		want := run(TallyOptions{})
		for _, opt := range []TallyOptions{{MaxPairs: 7}, {MaxMoney: 5}, {MaxPairs: 64, MaxMoney: 1, finalsLimit: 1}} {
			if got := run(opt); got != want {
				t.Errorf("max distinct %d, %+v: the Result differs from the one kept in memory:\n%s\nin memory:\n%s", maxDistinct, opt, firstDiff(got, want), firstDiff(want, got))
			}
		}
		if left, _ := os.ReadDir(dir); len(left) != 0 {
			t.Errorf("left in the temporary directory: %v", left)
		}
	}
}

// firstDiff returns the first line of a that b does not have.
func firstDiff(a, b string) string {
	bl := strings.Split(b, "\n")
	for i, l := range strings.Split(a, "\n") {
		if i >= len(bl) || l != bl[i] {
			return l
		}
	}
	return ""
}

// A spill that cannot be written is an error of the run, not a silent
// loss of forecasts.
func TestSpillFailure(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 3, false)
	tl, err := NewTally([]Scheme{{Name: "q", Rule: q, Pay: Affine{A: 1, B: 1}}}, TallyOptions{MaxPairs: 4, SpillDir: "/nonexistent/dir"})
	if err != nil {
		t.Fatal(err)
	}
	spillHistory(tl, 100)
	if tl.Err() == nil {
		t.Fatal("no error from a spill into a directory that does not exist")
	}
	if _, err := tl.Result(); err == nil || !strings.Contains(err.Error(), "temporary file") {
		t.Errorf("Result: error %v, want the spill's", err)
	}
}

// The detailed forecasters are the ten best and ten worst by mean pay
// under the first scheme, ties broken by first appearance: checked
// against a sort of every forecaster's mean from the test's own sums, with
// and without spilling.
func TestShownAreTheBestAndWorst(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 3, false)
	for _, opt := range []TallyOptions{{}, {MaxMoney: 3, MaxPairs: 5}} {
		opt.SpillDir = t.TempDir()
		// Pay rounded to 0 or 10, ten forecasts each: the means tie in
		// crowds, at the ends of the lists too.
		tl, err := NewTally([]Scheme{{Name: "q", Rule: q, Pay: roundedAffine{10, 5, 10}, Low: 0, High: 10}}, opt)
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(1, 2))
		sums := map[string][][4]float64{}
		for i := range 600 {
			name := fmt.Sprintf("f%02d", (i*7)%60)
			a := float64(rng.IntN(11)) / 10
			paid := tl.Add(name, i+2, rng.IntN(3), []float64{a, (1 - a) / 2, (1 - a) / 2})
			if sums[name] == nil {
				sums[name] = make([][4]float64, 1)
			}
			sums[name][0][0]++
			sums[name][0][1] += paid[0].Pay
		}
		type fc struct {
			name  string
			mean  float64
			first int
		}
		var all []fc
		res := result(t, tl)
		err = res.EachForecaster(func(f *Forecaster) error {
			w := sums[f.Name][0]
			all = append(all, fc{f.Name, w[1] / w[0], 0})
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		order := map[string]int{}
		for i := range tl.names.len() {
			order[tl.names.name(i)] = i
		}
		for i := range all {
			all[i].first = order[all[i].name]
		}
		sort.Slice(all, func(i, j int) bool {
			if all[i].mean != all[j].mean {
				return all[i].mean > all[j].mean
			}
			return all[i].first < all[j].first
		})
		want := map[string]bool{}
		for _, f := range append(all[:DefaultShow], all[len(all)-DefaultShow:]...) {
			want[f.name] = true
		}
		if len(res.Forecasters) != 2*DefaultShow {
			t.Fatalf("%d detailed, want %d", len(res.Forecasters), 2*DefaultShow)
		}
		for _, f := range res.Forecasters {
			if !want[f.Name] {
				t.Errorf("%+v: %s is detailed but is neither among the best nor the worst %d", opt, f.Name, DefaultShow)
			}
		}
		tl.Close()
	}
}

// Every forecaster's reliability curve, not only the detailed ones: one
// per forecaster in name order, a point per distinct forecast with the
// count the test counted itself, the detailed ones as ReliabilityCurves
// draws them; the same with the forecasts spilled.
func TestAllReliabilityCurves(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 2, false)
	for _, opt := range []TallyOptions{{}, {MaxMoney: 4, MaxPairs: 9}} {
		opt.SpillDir = t.TempDir()
		tl, err := NewTally([]Scheme{{Name: "q", Rule: q, Pay: Affine{A: 1, B: 1}}}, opt)
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(5, 6))
		counts := map[string]map[float64]int{}
		for i := range 2000 {
			name := fmt.Sprintf("g%02d", rng.IntN(50))
			x := float64(rng.IntN(21)) / 20
			tl.Add(name, i+2, rng.IntN(2), []float64{x, 1 - x})
			if counts[name] == nil {
				counts[name] = map[float64]int{}
			}
			counts[name][x]++
		}
		res := result(t, tl)
		all, err := AllReliabilityCurves(res, 0)
		if err != nil {
			t.Fatal(err)
		}
		if len(all) != len(counts) || len(res.Forecasters) == len(all) {
			t.Fatalf("%d curves for %d forecasters (%d detailed)", len(all), len(counts), len(res.Forecasters))
		}
		byName := map[string]Curve{}
		for i, c := range all {
			if i > 0 && all[i-1].Name >= c.Name {
				t.Fatalf("curves not in name order: %s before %s", all[i-1].Name, c.Name)
			}
			byName[c.Name] = c
			got := map[float64]int{}
			for _, p := range c.Points {
				got[p.Forecast] = p.Count
			}
			if fmt.Sprint(got) != fmt.Sprint(counts[c.Name]) {
				t.Errorf("%s: points %v, want the forecasts %v", c.Name, got, counts[c.Name])
			}
		}
		for _, c := range ReliabilityCurves(res, 0) {
			if fmt.Sprintf("%+v", c) != fmt.Sprintf("%+v", byName[c.Name]) {
				t.Errorf("%s: the curve differs from the detailed one", c.Name)
			}
		}
		tl.Close()
	}
}

// A Result whose temporary file was closed says so instead of failing
// somewhere deeper.
func TestClosedResult(t *testing.T) {
	q := rule(t, "1 - sum(p^2)", 3, false)
	tl, err := NewTally([]Scheme{{Name: "q", Rule: q, Pay: Affine{A: 1, B: 1}}}, TallyOptions{MaxPairs: 4, MaxMoney: 2, SpillDir: t.TempDir()})
	if err != nil {
		t.Fatal(err)
	}
	spillHistory(tl, 200)
	res := result(t, tl)
	res.Close()
	if err := res.EachForecaster(func(*Forecaster) error { return nil }); err == nil || !strings.Contains(err.Error(), "closed") {
		t.Errorf("EachForecaster after Close: %v, want an error saying the result was closed", err)
	}
}
