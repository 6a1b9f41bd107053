package backtest

import (
	"cmp"
	"slices"
)

// radixFrom is the number of keys from which radixOrder sorts by radix;
// below it a comparison sort is cheaper than clearing the counts.
const radixFrom = 256

// radixOrder returns the indices of keys in ascending order of key, equal
// keys in index order. The entries of a full (forecaster, forecast) table
// and of a forecaster's merged runs are sorted this way, tens of thousands
// at a time, where a comparison sort through a closure was a twentieth of
// a backtest on one core. From radixFrom keys it is a
// least-significant-digit radix sort a byte at a time, skipping the bytes
// every key shares (the high bytes of a forecaster index, the high bytes
// of a forecast id).
func radixOrder(keys []uint64) []int32 {
	order := make([]int32, len(keys))
	for i := range order {
		order[i] = int32(i)
	}
	if len(keys) < radixFrom {
		slices.SortStableFunc(order, func(a, b int32) int { return cmp.Compare(keys[a], keys[b]) })
		return order
	}
	var count [8][256]int
	for _, k := range keys {
		for d := range 8 {
			count[d][byte(k>>(8*d))]++
		}
	}
	src, dst := order, make([]int32, len(keys))
	for d := range 8 {
		c := &count[d]
		if c[byte(keys[0]>>(8*d))] == len(keys) {
			continue
		}
		pos := 0
		for b := range c {
			c[b], pos = pos, pos+c[b]
		}
		for _, e := range src {
			b := byte(keys[e] >> (8 * d))
			dst[c[b]] = e
			c[b]++
		}
		src, dst = dst, src
	}
	return src
}
