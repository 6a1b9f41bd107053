package backtest

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"strconv"
	"strings"
	"testing"

	"scorewright/contract/backtest/corp"
	"scorewright/contract/backtest/history"
)

// fastRow is one forecast of a generated history as the generator meant
// it: the reference side of TestFastPathsAgainstDirectSums.
type fastRow struct {
	line int
	name string
	p    [3]float64
	y    int
}

// fastHistory writes a random history of three outcomes: forecasters in
// runs of one to four rows, interleaved (so the reader's and the tally's
// shortcuts for a repeated forecaster are taken and left in turn); names
// with a comma, hence quoted, now and then; forecasts on a 10 % menu
// (repeated) or with three decimals (mostly new); CR LF line ends, blank
// lines and spaces around fields here and there.
func fastHistory(rng *rand.Rand, rows int) (string, []fastRow) {
	names := []string{"Alder", "Birch", "Cedar", "Smith, J", "Elm", "Fir", "Rowan"}
	var b strings.Builder
	b.WriteString("forecaster,question,outcome,below,near,above\n")
	line := 1
	var want []fastRow
	name := names[0]
	for len(want) < rows {
		if rng.IntN(3) == 0 {
			name = names[rng.IntN(len(names))]
		}
		var s [3]string
		if rng.IntN(2) == 0 {
			a, c := rng.IntN(1001), rng.IntN(1001)
			a, c = min(a, c), max(a, c)
			for k, v := range []int{a, c - a, 1000 - c} {
				s[k] = strconv.FormatFloat(float64(v)/1000, 'f', -1, 64)
			}
		} else {
			a, c := rng.IntN(11), rng.IntN(11)
			a, c = min(a, c), max(a, c)
			for k, v := range []int{a, c - a, 10 - c} {
				s[k] = strconv.FormatFloat(float64(v)/10, 'f', -1, 64)
			}
		}
		var r fastRow
		r.name, r.y = name, rng.IntN(3)
		var sum float64
		for k := range s {
			r.p[k], _ = strconv.ParseFloat(s[k], 64)
			sum += r.p[k]
		}
		if sum != 1 { // the reader's renormalisation (history.Reader)
			for k := range r.p {
				r.p[k] /= sum
			}
		}
		field := name
		if strings.Contains(name, ",") {
			field = `"` + name + `"`
		}
		if rng.IntN(8) == 0 {
			s[1] = " " + s[1] + " "
		}
		end := "\n"
		if rng.IntN(6) == 0 {
			end = "\r\n"
		}
		line++
		r.line = line
		fmt.Fprintf(&b, "%s,q%d,%s,%s,%s,%s%s", field, line, benchLabels[r.y], s[0], s[1], s[2], end)
		want = append(want, r)
		if rng.IntN(20) == 0 {
			b.WriteString("\n")
			line++
		}
	}
	return b.String(), want
}

// brier is the multi-category Brier effort sum_k (p_k - [k = y])^2 (Brier
// 1950), and logEffort -ln p_y: the two rules' efforts written out.
func brier(p [3]float64, y int) float64 {
	var s float64
	for k, x := range p {
		if k == y {
			x--
		}
		s += x * x
	}
	return s
}

func logEffort(p [3]float64, y int) float64 { return -math.Log(p[y]) }

// Every shortcut of the backtest's hot path (the CSV reader's own split of
// quote-free lines, its decimal parser, the per-forecaster groupings made
// once, the radix sort of the event groups, the tables spilling to disk)
// against sums written out row by row on random histories: each row seen
// on its line with its forecaster, each forecaster's count, pay, efforts,
// event groups and binned Brier decomposition.
func TestFastPathsAgainstDirectSums(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 4))
	for c := range 12 {
		src, want := fastHistory(rng, 200+rng.IntN(8000))
		schemes := []Scheme{
			{Name: "quadratic", Rule: rule(t, "1 - sum(p^2)", 3, true), Pay: Affine{A: 10, B: 5}, Low: math.Inf(-1), High: math.Inf(1)},
			{Name: "log", Rule: rule(t, "-sum(p*ln(p))", 3, true), Pay: Affine{A: 10, B: 1}, Low: math.Inf(-1), High: math.Inf(1)},
		}
		opt := Options{Strict: true}
		if c%2 == 1 {
			opt.Tally = TallyOptions{MaxPairs: 64, MaxMoney: 3} // spill both tables
		}
		seen := 0
		opt.OnRow = func(r *history.Row, _ []Paid) error {
			w := want[seen]
			seen++
			if r.Line != w.line || r.Forecaster != w.name || r.Outcome != w.y || [3]float64(r.P) != w.p {
				return fmt.Errorf("row %d read as line %d, %q, outcome %d, %v; written as line %d, %q, %d, %v", seen, r.Line, r.Forecaster, r.Outcome, r.P, w.line, w.name, w.y, w.p)
			}
			return nil
		}
		h, err := history.NewReader(strings.NewReader(src), benchLabels, history.Options{})
		if err != nil {
			t.Fatal(err)
		}
		res, err := Run(context.Background(), h, schemes, opt)
		if err != nil {
			t.Fatalf("case %d: %v", c, err)
		}
		if seen != len(want) || res.Rows != len(want) {
			t.Fatalf("case %d: %d rows seen, %d counted, %d written", c, seen, res.Rows, len(want))
		}
		byName := map[string][]fastRow{}
		for _, r := range want {
			byName[r.name] = append(byName[r.name], r)
		}
		if len(res.Forecasters) != len(byName) {
			t.Fatalf("case %d: %d forecasters detailed, %d wrote", c, len(res.Forecasters), len(byName))
		}
		for _, f := range res.Forecasters {
			checkForecaster(t, c, f, byName[f.Name])
		}
		res.Close()
	}
}

func checkForecaster(t *testing.T, c int, f Forecaster, rows []fastRow) {
	t.Helper()
	if f.Count != len(rows) {
		t.Fatalf("case %d, %s: %d forecasts, %d written", c, f.Name, f.Count, len(rows))
	}
	// Pay and mean effort, summed plainly: the tally's compensated sums
	// differ from these by rounding only, a few ulps of the total.
	for s, effort := range []func([3]float64, int) float64{brier, logEffort} {
		a, b := 10.0, []float64{5, 1}[s]
		var pay, eff float64
		for _, r := range rows {
			l := effort(r.p, r.y)
			pay += a - b*l
			eff += l
		}
		m := f.Money[s]
		n := float64(len(rows))
		if tol := 1e-12 * n * (a + 50); math.Abs(m.Total-pay) > tol || math.Abs(m.MeanEffort-eff/n) > tol {
			t.Errorf("case %d, %s, scheme %d: total %v, mean effort %v; direct sums %v, %v", c, f.Name, s, m.Total, m.MeanEffort, pay, eff/n)
		}
	}
	// Event groups: each outcome's probabilities with how often each was
	// given and followed by that outcome, in increasing order.
	for k := range 3 {
		count, hits := map[float64]int{}, map[float64]int{}
		for _, r := range rows {
			count[r.p[k]]++
			if r.y == k {
				hits[r.p[k]]++
			}
		}
		var xs []float64
		for x := range count {
			xs = append(xs, x)
		}
		sort.Float64s(xs)
		got := f.Events[k]
		if len(got) != len(xs) {
			t.Fatalf("case %d, %s, event %d: %d groups, want %d", c, f.Name, k, len(got), len(xs))
		}
		for i, x := range xs {
			if w := (corp.Group{X: x, Count: count[x], Hits: hits[x]}); got[i] != w {
				t.Fatalf("case %d, %s, event %d: group %d is %+v, want %+v", c, f.Name, k, i, got[i], w)
			}
		}
	}
	checkBrierBins(t, c, f, rows)
}

// checkBrierBins recomputes the binned decomposition of the quadratic
// scheme: cells a tenth wide in the first two probabilities; Brier's
// uncertainty 1 - sum obar^2, resolution and reliability the bins'
// weighted squared distances from the base rates and from their mean
// forecasts (Murphy 1973, in its multi-category form).
func checkBrierBins(t *testing.T, c int, f Forecaster, rows []fastRow) {
	t.Helper()
	type cell struct {
		n        int
		sum, obs [3]float64
	}
	cells := map[[2]int]*cell{}
	var obar [3]float64
	for _, r := range rows {
		key := [2]int{min(9, int(math.Floor(r.p[0]*10))), min(9, int(math.Floor(r.p[1]*10)))}
		b := cells[key]
		if b == nil {
			b = &cell{}
			cells[key] = b
		}
		b.n++
		for k := range 3 {
			b.sum[k] += r.p[k]
		}
		b.obs[r.y]++
		obar[r.y]++
	}
	n := float64(len(rows))
	unc := 1.0
	for k := range obar {
		obar[k] /= n
		unc -= obar[k] * obar[k]
	}
	var res, rel float64
	for _, b := range cells {
		w := float64(b.n) / n
		for k := range 3 {
			o, fk := b.obs[k]/float64(b.n), b.sum[k]/float64(b.n)
			res += w * (o - obar[k]) * (o - obar[k])
			rel += w * (o - fk) * (o - fk)
		}
	}
	d := f.Decomposition[0]
	if len(f.Bins) != len(cells) || math.Abs(d.Uncertainty-unc) > 1e-9 || math.Abs(d.Resolution-res) > 1e-9 || math.Abs(d.Reliability-rel) > 1e-9 {
		t.Errorf("case %d, %s: %d bins, uncertainty %v, resolution %v, reliability %v; want %d, %v, %v, %v",
			c, f.Name, len(f.Bins), d.Uncertainty, d.Resolution, d.Reliability, len(cells), unc, res, rel)
	}
}
