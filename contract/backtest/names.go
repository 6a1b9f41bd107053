package backtest

import (
	"bytes"
	"hash/maphash"
	"sort"
)

// nameIndex interns forecaster names: every name's bytes in one arena and
// an open-addressing table of indices, about a name's length plus 16 bytes
// a forecaster. A Go map of strings costs a string header, a separate
// allocation and a map slot each (some 60 bytes beside the name), which
// was a fifth of a backtest's memory at two million forecasters.
type nameIndex struct {
	seed  maphash.Seed
	arena []byte
	ends  []int   // end of name i in arena; name i starts at ends[i-1]
	slots []int32 // name index + 1; 0 is empty; length a power of two
}

func newNameIndex() nameIndex {
	return nameIndex{seed: maphash.MakeSeed(), slots: make([]int32, 16)}
}

func (x *nameIndex) len() int { return len(x.ends) }

// bytes returns name i; it aliases the arena and must not be kept.
func (x *nameIndex) bytes(i int) []byte {
	start := 0
	if i > 0 {
		start = x.ends[i-1]
	}
	return x.arena[start:x.ends[i]]
}

// name returns name i as a new string.
func (x *nameIndex) name(i int) string { return string(x.bytes(i)) }

// find returns the index of name, adding it when absent (made is then
// true). Looking up a known name allocates nothing.
func (x *nameIndex) find(name string) (i int, made bool) {
	mask := uint64(len(x.slots) - 1)
	for s := maphash.String(x.seed, name) & mask; ; s = (s + 1) & mask {
		j := int(x.slots[s]) - 1
		if j < 0 {
			i = x.len()
			x.slots[s] = int32(i + 1)
			x.arena = append(x.arena, name...)
			x.ends = append(x.ends, len(x.arena))
			if 2*x.len() > len(x.slots) {
				x.rehash(2 * len(x.slots))
			}
			return i, true
		}
		if string(x.bytes(j)) == name {
			return j, false
		}
	}
}

func (x *nameIndex) rehash(size int) {
	x.slots = make([]int32, size)
	mask := uint64(size - 1)
	for j := range x.len() {
		s := maphash.Bytes(x.seed, x.bytes(j)) & mask
		for x.slots[s] != 0 {
			s = (s + 1) & mask
		}
		x.slots[s] = int32(j + 1)
	}
}

// sorted returns the name indices in name (byte) order.
func (x *nameIndex) sorted() []int32 {
	order := make([]int32, x.len())
	for i := range order {
		order[i] = int32(i)
	}
	sort.Slice(order, func(a, b int) bool {
		return bytes.Compare(x.bytes(int(order[a])), x.bytes(int(order[b]))) < 0
	})
	return order
}
