package backtest

import (
	"math/rand/v2"
	"testing"
)

// TestRadixOrderSorts checks radixOrder against the definition of a
// stable sort, not against another sort: the order is a permutation, the
// keys along it never decrease, and equal keys keep their index order.
// Keys are drawn so that some bytes are shared by all (skipped passes),
// some vary, and many repeat, at sizes either side of radixFrom.
func TestRadixOrderSorts(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 13))
	for _, size := range []int{0, 1, 2, 7, radixFrom - 1, radixFrom, radixFrom + 1, 5000, 70000} {
		for _, shape := range []string{"pairs", "small", "full", "equal"} {
			keys := make([]uint64, size)
			for i := range keys {
				switch shape {
				case "pairs": // forecaster<<32 | forecast id, as the table's keys
					keys[i] = uint64(rng.IntN(40))<<32 | uint64(rng.IntN(700_000))
				case "small":
					keys[i] = uint64(rng.IntN(20))
				case "full":
					keys[i] = rng.Uint64()
				case "equal":
					keys[i] = 0xabcdef
				}
			}
			order := radixOrder(keys)
			if len(order) != size {
				t.Fatalf("%s, %d keys: order of %d", shape, size, len(order))
			}
			seen := make([]bool, size)
			for i, e := range order {
				if e < 0 || int(e) >= size || seen[e] {
					t.Fatalf("%s, %d keys: order is not a permutation at %d (%d)", shape, size, i, e)
				}
				seen[e] = true
				if i == 0 {
					continue
				}
				a, b := order[i-1], e
				if keys[a] > keys[b] || keys[a] == keys[b] && a > b {
					t.Fatalf("%s, %d keys: position %d: key %x (index %d) before key %x (index %d)", shape, size, i, keys[a], a, keys[b], b)
				}
			}
		}
	}
}
