package backtest

import (
	"fmt"
	"math"
	"sort"

	"scorewright/generator/bregman"
	"scorewright/generator/formula"
)

// Bin is a group of forecasts scored together in the decomposition.
type Bin struct {
	// Count is the number of forecasts in the bin.
	Count int
	// Forecast is the mean forecast of the bin.
	Forecast []float64
	// Observed is the frequency of each outcome among the bin's forecasts.
	Observed []float64
}

// Decomposition splits a mean effort into its three parts.
type Decomposition struct {
	// MeanEffort is the mean of L(p, y) over the forecasts.
	MeanEffort float64
	// Uncertainty is H(obar), the effort of always forecasting the
	// observed frequencies: how hard the questions were.
	Uncertainty float64
	// Resolution is sum_k (n_k/N) D(obar_k, obar): how far the outcome
	// frequencies given each forecast move away from the overall ones
	// (larger is better).
	Resolution float64
	// Reliability is sum_k (n_k/N) D(obar_k, p_k): how far the forecasts
	// are from the frequencies that followed them (smaller is better).
	Reliability float64
	// WithinBin is MeanEffort - (Uncertainty - Resolution + Reliability),
	// the part the bins cannot see. It is zero up to rounding when the bins
	// are the distinct forecasts.
	WithinBin float64
}

// Decompose computes uncertainty, resolution and reliability of the rule
// behind s over bins. MeanEffort and WithinBin are left zero: they need
// the efforts of the single forecasts, which bins do not keep. Empty bins
// are ignored; with no forecasts at all every term is NaN.
func Decompose(s *bregman.Scorer, bins []Bin) Decomposition {
	var total int
	n := 0
	for _, b := range bins {
		total += b.Count
		if b.Count > 0 {
			n = len(b.Observed)
		}
	}
	if total == 0 {
		nan := math.NaN()
		return Decomposition{MeanEffort: nan, Uncertainty: nan, Resolution: nan, Reliability: nan, WithinBin: nan}
	}
	obar := make([]float64, n)
	for _, b := range bins {
		for k, o := range b.Observed {
			obar[k] += float64(b.Count) * o
		}
	}
	for k := range obar {
		obar[k] /= float64(total)
	}
	d := Decomposition{Uncertainty: s.Entropy(obar)}
	for _, b := range bins {
		if b.Count == 0 {
			continue
		}
		w := float64(b.Count) / float64(total)
		d.Resolution += w * s.Divergence(b.Observed, obar)
		d.Reliability += w * s.Divergence(b.Observed, b.Forecast)
	}
	return d
}

// Identity returns Uncertainty - Resolution + Reliability.
func (d Decomposition) Identity() float64 { return d.Uncertainty - d.Resolution + d.Reliability }

// binKey identifies a bin: the forecast itself, or its grid cell.
type binKey [formula.MaxOutcomes]float64

// binSet groups one forecaster's forecasts into bins in bounded memory:
// by distinct forecast while there are at most max of them, then on a
// grid of cells 1/grid wide, halving grid whenever the cells outgrow max.
type binSet struct {
	n, max int
	// grid is 0 while bins are distinct forecasts.
	grid, startGrid int
	index           map[binKey]int
	count           []int
	sumP, hits      []float64 // n per bin
}

func newBinSet(n, max, grid int) *binSet {
	return &binSet{n: n, max: max, startGrid: grid, index: map[binKey]int{}}
}

func (b *binSet) key(p []float64) binKey {
	var k binKey
	if b.grid == 0 {
		copy(k[:], p)
		return k
	}
	// The last probability follows from the others, so cells are cut in
	// the first n-1 only (for two outcomes: in the event's probability).
	g := float64(b.grid)
	for i, x := range p[:len(p)-1] {
		k[i] = math.Round(x * g)
	}
	return k
}

func (b *binSet) add(p []float64, y int) {
	key := b.key(p)
	i, ok := b.index[key]
	if !ok {
		i = b.newBin(key)
	}
	b.count[i]++
	row := b.sumP[i*b.n : (i+1)*b.n]
	for k, x := range p {
		row[k] += x
	}
	b.hits[i*b.n+y]++
	if !ok && len(b.count) > b.max {
		b.coarsen()
	}
}

func (b *binSet) newBin(key binKey) int {
	i := len(b.count)
	b.index[key] = i
	b.count = append(b.count, 0)
	for range b.n {
		b.sumP = append(b.sumP, 0)
		b.hits = append(b.hits, 0)
	}
	return i
}

// coarsen moves to a coarser grid and regroups the bins by their mean
// forecasts until they fit. Every forecast stays in exactly one bin, so
// the decomposition (with its within-bin remainder) stays exact.
func (b *binSet) coarsen() {
	for len(b.count) > b.max && b.grid != 1 {
		if b.grid == 0 {
			b.grid = b.startGrid
		} else {
			b.grid = max(1, b.grid/2)
		}
		count, sumP, hits := b.count, b.sumP, b.hits
		b.index = map[binKey]int{}
		b.count, b.sumP, b.hits = nil, nil, nil
		mean := make([]float64, b.n)
		for i, c := range count {
			for k := range mean {
				mean[k] = sumP[i*b.n+k] / float64(c)
			}
			key := b.key(mean)
			j, ok := b.index[key]
			if !ok {
				j = b.newBin(key)
			}
			b.count[j] += c
			for k := range mean {
				b.sumP[j*b.n+k] += sumP[i*b.n+k]
				b.hits[j*b.n+k] += hits[i*b.n+k]
			}
		}
	}
}

// bins returns the bins sorted by mean forecast, for stable output.
func (b *binSet) bins() []Bin {
	out := make([]Bin, len(b.count))
	for i, c := range b.count {
		f := make([]float64, b.n)
		o := make([]float64, b.n)
		for k := range f {
			f[k] = b.sumP[i*b.n+k] / float64(c)
			o[k] = b.hits[i*b.n+k] / float64(c)
		}
		out[i] = Bin{Count: c, Forecast: f, Observed: o}
	}
	sort.Slice(out, func(i, j int) bool {
		a, c := out[i].Forecast, out[j].Forecast
		for k := range a {
			if a[k] != c[k] {
				return a[k] < c[k]
			}
		}
		return false
	})
	return out
}

// Binning says how bins were formed.
type Binning struct {
	// Grid is 0 when the bins are the distinct forecasts (the
	// decomposition is then exact), else the number of cells per unit of
	// probability each forecast was rounded to.
	Grid int
}

func (b Binning) String() string {
	if b.Grid == 0 {
		return "bins are the distinct forecasts (the decomposition is exact)"
	}
	return fmt.Sprintf("bins are cells of width 1/%d in each probability (a within-bin remainder is shown)", b.Grid)
}
