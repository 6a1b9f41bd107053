package backtest

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"
)

// spillHistory adds a random history to tl: 60 forecasters taking random
// turns, forecasts on a tenth menu or, one in four, continuous.
func spillHistory(tl *Tally, rows int) {
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
		tl.Add(fmt.Sprintf("forecaster %02d", rng.IntN(60)), i+2, rng.IntN(3), p[:])
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
	clamp := func(dst, p []float64) []float64 {
		var s float64
		for i, x := range p {
			dst[i] = math.Max(x, 0.01)
			s += dst[i]
		}
		for i := range dst {
			dst[i] /= s
		}
		return dst
	}
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
			spillHistory(tl, 5000)
			if maxDistinct > 0 && tl.store.quantum == 0 {
				t.Fatalf("the history was not coarsened at %d distinct forecasts", maxDistinct)
			}
			return dump(t, tl)
		}
		want := run(TallyOptions{})
		for _, opt := range []TallyOptions{{MaxPairs: 7}, {MaxPairs: 64, finalsLimit: 1}} {
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
