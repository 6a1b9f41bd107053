package backtest

import (
	"fmt"
	"math"
	"sort"

	"scorewright/generator/bregman"
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

// keyTable finds short float vectors (forecasts, grid cells) by their
// bits in an open-addressing table: a Go map with an array key would spend
// most of its time hashing and comparing all twelve slots.
type keyTable struct {
	n     int
	slots []int32   // entry index + 1; 0 is empty; length a power of two
	keys  []float64 // n per entry
}

func newKeyTable(n int) keyTable { return keyTable{n: n, slots: make([]int32, 16)} }

func (t *keyTable) len() int { return len(t.keys) / t.n }

// hashKey mixes the bits of k. Probabilities such as 0.25 have long runs
// of zero bits, so every word goes through a full 64-bit finaliser
// (MurmurHash3's fmix64) before the table takes the low bits.
func hashKey(k []float64) uint64 {
	var h uint64
	for _, x := range k {
		h = fmix(h ^ math.Float64bits(x))
	}
	return h
}

func fmix(h uint64) uint64 {
	h ^= h >> 33
	h *= 0xff51afd7ed558ccd
	h ^= h >> 33
	h *= 0xc4ceb9fe1a85ec53
	h ^= h >> 33
	return h
}

// find returns the entry of key, adding it when add is set; made reports
// a new entry, and i is -1 when key is absent and not added.
func (t *keyTable) find(key []float64, add bool) (i int, made bool) {
	mask := uint64(len(t.slots) - 1)
	for s := hashKey(key) & mask; ; s = (s + 1) & mask {
		j := int(t.slots[s]) - 1
		if j < 0 {
			if !add {
				return -1, false
			}
			i = t.len()
			t.slots[s] = int32(i + 1)
			t.keys = append(t.keys, key...)
			if 2*t.len() > len(t.slots) {
				t.rehash(2 * len(t.slots))
			}
			return i, true
		}
		if equal(t.keys[j*t.n:(j+1)*t.n], key) {
			return j, false
		}
	}
}

func equal(a, c []float64) bool {
	for i, x := range a {
		if x != c[i] {
			return false
		}
	}
	return true
}

func (t *keyTable) rehash(size int) {
	t.slots = make([]int32, size)
	mask := uint64(size - 1)
	for j := range t.len() {
		s := hashKey(t.keys[j*t.n:(j+1)*t.n]) & mask
		for t.slots[s] != 0 {
			s = (s + 1) & mask
		}
		t.slots[s] = int32(j + 1)
	}
}

// binSet groups one forecaster's forecasts into bins in bounded memory:
// by distinct forecast while there are at most max of them, then on a
// grid of cells 1/grid wide in the first n-1 probabilities, halving grid
// whenever the cells outgrow max (at grid 1 there are at most 2^(n-1)).
type binSet struct {
	n, max int
	// grid is 0 while bins are distinct forecasts.
	grid, startGrid int
	table           keyTable
	count           []int
	sumP, hits      []float64 // n per bin
	key             []float64 // scratch
}

func newBinSet(n, max, grid int) *binSet {
	return &binSet{n: n, max: max, startGrid: grid, table: newKeyTable(n), key: make([]float64, n)}
}

// cell writes the key of forecast p into b.key: p itself, or its grid
// cell. The last probability follows from the others, so cells are cut in
// the first n-1 only (for two outcomes: in the event's probability).
func (b *binSet) cell(p []float64) []float64 {
	k := b.key
	if b.grid == 0 {
		for i, x := range p {
			k[i] = x + 0 // -0 and +0 are one forecast
		}
		return k
	}
	g := float64(b.grid)
	for i, x := range p[:b.n-1] {
		k[i] = math.Round(x * g)
	}
	k[b.n-1] = 0
	return k
}

// find returns the bin of key, making it if needed; made reports a new bin.
func (b *binSet) find(key []float64) (i int, made bool) {
	i, made = b.table.find(key, true)
	if made {
		b.count = append(b.count, 0)
		for range b.n {
			b.sumP = append(b.sumP, 0)
			b.hits = append(b.hits, 0)
		}
	}
	return i, made
}

func (b *binSet) add(p []float64, y int) {
	i, made := b.find(b.cell(p))
	b.count[i]++
	row := b.sumP[i*b.n : (i+1)*b.n]
	for k, x := range p {
		row[k] += x
	}
	b.hits[i*b.n+y]++
	if made && len(b.count) > b.max {
		b.coarsen()
	}
}

// merge adds a whole group of c forecasts, with summed forecast sumP and
// outcome counts hits, to the bin of its mean forecast.
func (b *binSet) merge(c int, sumP, hits []float64) {
	mean := make([]float64, b.n)
	for k := range mean {
		mean[k] = sumP[k] / float64(c)
	}
	j, _ := b.find(b.cell(mean))
	b.count[j] += c
	for k := range mean {
		b.sumP[j*b.n+k] += sumP[k]
		b.hits[j*b.n+k] += hits[k]
	}
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
		b.table = newKeyTable(b.n)
		b.count, b.sumP, b.hits = nil, nil, nil
		for i, c := range count {
			b.merge(c, sumP[i*b.n:(i+1)*b.n], hits[i*b.n:(i+1)*b.n])
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

// String describes the binning in words, for reports.
func (b Binning) String() string {
	if b.Grid == 0 {
		return "bins are the distinct forecasts (the decomposition is exact)"
	}
	return fmt.Sprintf("bins are cells of width 1/%d in each probability (a within-bin remainder is shown)", b.Grid)
}
