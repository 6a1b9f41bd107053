package corp

import (
	"cmp"
	"math"
	"slices"
)

// radixFrom is the number of groups from which sortByX sorts by radix: a
// backtest's decomposition sorts every forecaster's distinct forecasts,
// hundreds of thousands at a time, where a comparison sort was a tenth of
// the whole run.
const radixFrom = 256

// sortByX sorts groups with X in [0, 1] by X, ascending, and returns the
// sorted slice (groups itself or a buffer of the same length). Equal X
// may come in any order: Sorted merges them.
func sortByX(groups []Group) []Group {
	if len(groups) < radixFrom {
		slices.SortFunc(groups, func(a, b Group) int { return cmp.Compare(a.X, b.X) })
		return groups
	}
	// The bits of a float64 that is not negative (-0 made +0) order as
	// the number does: a least-significant-digit radix sort of the bits,
	// a byte at a time, sorts by X. Bytes that every key shares (the high
	// bytes of numbers in [0, 1], most low bytes of a report menu) are
	// skipped.
	keys := make([]uint64, len(groups))
	var count [8][256]int
	for i, g := range groups {
		k := math.Float64bits(g.X + 0)
		keys[i] = k
		for d := range 8 {
			count[d][byte(k>>(8*d))]++
		}
	}
	src, dst := groups, make([]Group, len(groups))
	srcK, dstK := keys, make([]uint64, len(keys))
	for d := range 8 {
		c := &count[d]
		if c[byte(srcK[0]>>(8*d))] == len(src) {
			continue
		}
		pos := 0
		for b := range c {
			c[b], pos = pos, pos+c[b]
		}
		for i, k := range srcK {
			b := byte(k >> (8 * d))
			dst[c[b]], dstK[c[b]] = src[i], k
			c[b]++
		}
		src, dst, srcK, dstK = dst, src, dstK, srcK
	}
	return src
}
