package backtest

import (
	"fmt"
	"math"
	"math/bits"
	"strconv"

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
//
// A slot holds entry index + 1 in its low bits (those of the slot mask:
// the table is at most half full, so the index fits) and, in the bits
// above, the same bits of the key's hash: a probe that meets another key
// is told so by its slot alone, nearly always, without reading that key
// from memory (for hundreds of thousands of forecasts, an access that
// misses the processor's cache).
type keyTable struct {
	n     int
	slots []uint32  // hash tag | (entry index + 1); 0 is empty; length a power of two
	keys  []float64 // n per entry
}

func newKeyTable(n int) keyTable { return keyTable{n: n, slots: make([]uint32, 16)} }

// slotTag is the tag of hash h in a table of slot mask mask: the bits of
// the hash's upper half that the entry index leaves free.
func slotTag(h uint64, mask uint64) uint32 { return uint32(h>>32) &^ uint32(mask) }

func (t *keyTable) len() int { return len(t.keys) / t.n }

// key returns entry i.
func (t *keyTable) key(i int) []float64 { return t.keys[i*t.n : (i+1)*t.n] }

// hashKey mixes the bits of k. Probabilities such as 0.25 have long runs
// of zero bits, and their information sits in the high bits of each word:
// each word is multiplied into the hash (which carries low bits upwards)
// after the hash was rotated (which brings the previous words' high bits
// down), and the sum goes once through a full 64-bit finaliser
// (MurmurHash3's fmix64) before the table takes the low bits: a
// multiplication a word rather than a finaliser a word, since every row
// of a backtest hashes its forecast.
func hashKey(k []float64) uint64 {
	h := uint64(len(k))
	for _, x := range k {
		h = (bits.RotateLeft64(h, 29) ^ math.Float64bits(x)) * 0x9e3779b97f4a7c15
	}
	return fmix(h)
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
	return t.findHashed(key, hashKey(key), add)
}

// findHashed is find of a key whose hashKey is h.
func (t *keyTable) findHashed(key []float64, h uint64, add bool) (i int, made bool) {
	mask := uint64(len(t.slots) - 1)
	tag := slotTag(h, mask)
	for s := h & mask; ; s = (s + 1) & mask {
		v := t.slots[s]
		if v == 0 {
			if !add {
				return -1, false
			}
			i = t.len()
			t.slots[s] = tag | uint32(i+1)
			t.keys = append(t.keys, key...)
			if 2*t.len() > len(t.slots) {
				t.rehash(2 * len(t.slots))
			}
			return i, true
		}
		if v&^uint32(mask) != tag {
			continue
		}
		if j := int(v&uint32(mask)) - 1; equal(t.keys[j*t.n:(j+1)*t.n], key) {
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
	t.slots = make([]uint32, size)
	mask := uint64(size - 1)
	for j := range t.len() {
		h := hashKey(t.keys[j*t.n : (j+1)*t.n])
		s := h & mask
		for t.slots[s] != 0 {
			s = (s + 1) & mask
		}
		t.slots[s] = slotTag(h, mask) | uint32(j+1)
	}
}

// Binning says how bins were formed.
type Binning struct {
	// Grid is 0 when the bins are the distinct forecasts, else the number
	// of cells of equal width per probability.
	Grid int
}

// String describes the binning in words, for reports.
func (b Binning) String() string {
	if b.Grid == 0 {
		return "bins are the distinct forecasts (no within-bin remainder)"
	}
	return fmt.Sprintf("bins are cells of width %s in each probability (%d cells per probability; a within-bin remainder is shown)", strconv.FormatFloat(1/float64(b.Grid), 'g', 4, 64), b.Grid)
}
