package backtest

import (
	"encoding/binary"
	"fmt"
	"math"
	"slices"
)

// DefaultMaxDistinct bounds the distinct forecasts the decomposition keeps
// exactly (a report menu has a few hundred; model output one per row).
// Past it forecasts are grouped to a grid of probabilities, and the grid
// is stated.
const DefaultMaxDistinct = 1 << 20

// DefaultMaxPairs is how many (forecaster, forecast) entries a backtest
// keeps in memory before it moves them to a temporary file: about 2 MB
// for three outcomes, so that the table looked up on every row stays in a
// processor's cache (at 2^18 entries, 8 MB, a backtest of ten million rows
// with 625,000 distinct forecasts took 5 % longer). A history written on a
// report menu by a few dozen forecasters never reaches it; two million
// forecasters with five forecasts each reach it about 150 times.
const DefaultMaxPairs = 1 << 16

// outcomeStore keeps how often each outcome followed each forecast of each
// forecaster: all the CORP decomposition, the binned decomposition and the
// reliability picture need. Forecasts are interned once for all
// forecasters; each (forecaster, forecast) pair is one entry of n counts
// keyed by forecaster<<32 | forecast. At most maxPairs entries stay in
// memory: when the table is full its entries are written, sorted by key,
// as one run of a temporary file (spill.go) and the table starts afresh,
// so memory does not grow with the pairs. scan merges the runs and the
// table back in forecaster order.
type outcomeStore struct {
	n           int
	maxDistinct int
	maxPairs    int
	// quantum is 0 while forecasts are kept exactly, else the grid step
	// every probability was rounded to.
	quantum   float64
	forecasts keyTable // distinct forecasts (rounded when quantum > 0)
	pairs     pairTable
	hits      []uint32 // n per entry
	key       []float64
	last      int // entry found by the last call to entry
	spill     *spillFile
	runs      []spillRun
	// remaps[g] takes the forecast ids of generation g (before its
	// coarsening) to generation g+1; runs spilled earlier are read
	// through them.
	remaps [][]int32
	// found is the entry lookup found for the forecast it returned, or
	// -1: add then needs no second lookup. hashed is the forecast whose
	// bits lookup hashed to hash (-1: none), so that add making a new
	// entry does not hash them again.
	found, hashed int
	hash          uint64
}

func newOutcomeStore(n, maxDistinct, maxPairs int, sp *spillFile) *outcomeStore {
	if maxDistinct <= 0 {
		maxDistinct = DefaultMaxDistinct
	}
	if maxPairs <= 0 {
		maxPairs = DefaultMaxPairs
	}
	return &outcomeStore{n: n, maxDistinct: maxDistinct, maxPairs: maxPairs, forecasts: newKeyTable(n),
		pairs: newPairTable(), key: make([]float64, n), spill: sp, found: -1, hashed: -1}
}

// lookup returns the id of forecaster f's forecast p and whether the
// forecast is new to the store, remembering the (f, p) entry when there is
// one so that add needs no second lookup. The (forecaster, forecast) table
// is hashed by the forecast's bits, so a forecast the forecaster made
// before is found by one probe of that small table, without the table of
// all distinct forecasts (larger than a processor's cache when forecasts
// are continuous).
func (s *outcomeStore) lookup(f int, p []float64) (int, bool) {
	s.found, s.hashed = -1, -1
	if s.quantum > 0 {
		return s.forecastID(p)
	}
	k := s.key
	for i, x := range p {
		k[i] = x + 0 // -0 and +0 are one forecast
	}
	hk := hashKey(k)
	if e := s.pairs.findForecast(uint32(f), k, pairHash(f, hk), &s.forecasts); e >= 0 {
		s.found = e
		return int(uint32(s.pairs.keys[e])), false
	}
	if s.forecasts.len() >= s.maxDistinct {
		return s.forecastID(p) // may group the forecasts
	}
	id, made := s.forecasts.findHashed(k, hk, true)
	s.hashed, s.hash = id, hk
	return id, made
}

// forecastID interns p, returning its index and whether it is new. When
// the distinct forecasts outgrow the bound they are grouped first.
func (s *outcomeStore) forecastID(p []float64) (int, bool) {
	for {
		k := s.key
		for i, x := range p {
			k[i] = x + 0 // -0 and +0 are one forecast
			if s.quantum > 0 {
				k[i] = math.Round(x/s.quantum) * s.quantum
			}
		}
		if s.forecasts.len() < s.maxDistinct {
			return s.forecasts.find(k, true)
		}
		if i, _ := s.forecasts.find(k, false); i >= 0 {
			return i, false
		}
		s.coarsen()
	}
}

// add counts outcome y after forecast id by forecaster f.
func (s *outcomeStore) add(f, id, y int) error {
	key := uint64(f)<<32 | uint64(id)
	found, hashed, hk := s.found, s.hashed, s.hash
	s.found, s.hashed = -1, -1
	if found >= 0 && s.pairs.keys[found] == key {
		s.last = found
	} else {
		if hashed != id {
			hk = hashKey(s.vector(id))
		}
		if err := s.entry(f, id, hk); err != nil {
			return err
		}
	}
	s.hits[s.last*s.n+y]++
	return nil
}

// entry finds or makes the entry of forecaster f and forecast id, whose
// bits hash to hk, leaving its index in s.last; a full table is spilled
// first.
func (s *outcomeStore) entry(f, id int, hk uint64) error {
	key := uint64(f)<<32 | uint64(id)
	h := pairHash(f, hk)
	if len(s.pairs.keys) >= s.maxPairs {
		if e, _ := s.pairs.find(key, h, false, 0, &s.forecasts); e >= 0 {
			s.last = e
			return nil
		}
		run, err := s.spill.writeRun(len(s.pairs.keys), len(s.remaps), s.recordSize(), s.records())
		if err != nil {
			return err
		}
		s.runs = append(s.runs, run)
		s.pairs.reset()
		s.hits = s.hits[:0]
	}
	e, made := s.pairs.find(key, h, true, len(s.pairs.keys), &s.forecasts)
	if made {
		s.hits = append(s.hits, make([]uint32, s.n)...)
	}
	s.last = e
	return nil
}

func (s *outcomeStore) recordSize() int { return 8 + 4*s.n }

// records iterates over the table's entries as records sorted by key.
func (s *outcomeStore) records() records {
	keys := s.pairs.keys
	order := radixOrder(keys)
	return func(rec []byte) bool {
		if len(order) == 0 {
			return false
		}
		e := int(order[0])
		order = order[1:]
		binary.LittleEndian.PutUint64(rec, keys[e])
		for j, h := range s.hits[e*s.n : (e+1)*s.n] {
			binary.LittleEndian.PutUint32(rec[8+4*j:], h)
		}
		return true
	}
}

// firstQuantum is the first grid once forecasts are too many: finer than
// any probability a person writes, coarse enough to merge model output.
const firstQuantum = 1.0 / (1 << 20)

// coarsen rounds every forecast to a grid 16 times coarser than before
// (the first: 2^-20) and merges the entries that meet. Spilled runs keep
// their ids; the remap is kept for reading them.
func (s *outcomeStore) coarsen() {
	if s.quantum == 0 {
		s.quantum = firstQuantum
	} else {
		s.quantum *= 16
	}
	old := s.forecasts
	s.forecasts = newKeyTable(s.n)
	remap := make([]int32, old.len())
	for i := range remap {
		for k, x := range old.keys[i*s.n : (i+1)*s.n] {
			s.key[k] = math.Round(x/s.quantum) * s.quantum
		}
		j, _ := s.forecasts.find(s.key, true)
		remap[i] = int32(j)
	}
	s.remaps = append(s.remaps, remap)
	hits, keys := s.hits, slices.Clone(s.pairs.keys)
	s.pairs.reset()
	s.hits = nil
	for e, key := range keys {
		// The merged entries are no more than the table held, so this
		// never spills and cannot fail.
		id := int(remap[uint32(key)])
		s.entry(int(key>>32), id, hashKey(s.vector(id)))
		for k := range s.n {
			s.hits[s.last*s.n+k] += hits[e*s.n+k]
		}
	}
}

// vector returns forecast id.
func (s *outcomeStore) vector(id int) []float64 { return s.forecasts.keys[id*s.n : (id+1)*s.n] }

// Grouping says how the decomposition saw forecasts: exactly, or rounded
// to a grid because there were too many distinct ones.
func (s *outcomeStore) Grouping() string {
	if s.quantum == 0 {
		return "every distinct forecast kept exactly"
	}
	return fmt.Sprintf("forecasts rounded to multiples of %g (more than %d distinct forecasts)", s.quantum, s.maxDistinct)
}

// pairTable maps a (forecaster, forecast id) key, forecaster<<32 | id, to
// an entry index by open addressing. Its slots are chosen by pairHash of
// the forecaster and the forecast's bits (not its id), so that a forecast
// can be looked up before it is interned (findForecast); the forecasts'
// table gives the bits of an id.
type pairTable struct {
	slots []int32 // entry + 1; 0 is empty
	keys  []uint64
}

func newPairTable() pairTable { return pairTable{slots: make([]int32, 16)} }

// pairHash is the slot hash of forecaster f's forecast whose bits hash to
// hk (hashKey, already mixed): the forecaster spread by a multiplication
// by an odd constant, so that one forecast by many forecasters fills
// different slots.
func pairHash(f int, hk uint64) uint64 { return hk ^ uint64(f)*0x9e3779b97f4a7c15 }

// reset empties the table, keeping its memory for the next run.
func (t *pairTable) reset() {
	clear(t.slots)
	t.keys = t.keys[:0]
}

// find returns the entry of key, whose pairHash is h, adding it as entry
// next when add is set; made reports a new entry, and the index is -1 when
// absent and not added.
func (t *pairTable) find(key, h uint64, add bool, next int, fc *keyTable) (int, bool) {
	mask := uint64(len(t.slots) - 1)
	for s := h & mask; ; s = (s + 1) & mask {
		j := int(t.slots[s]) - 1
		if j < 0 {
			if !add {
				return -1, false
			}
			t.slots[s] = int32(next + 1)
			t.keys = append(t.keys, key)
			if 2*len(t.keys) > len(t.slots) {
				t.rehash(2*len(t.slots), fc)
			}
			return next, true
		}
		if t.keys[j] == key {
			return j, false
		}
	}
}

// findForecast returns the entry of forecaster f and the forecast whose
// bits are k (pairHash h), or -1.
func (t *pairTable) findForecast(f uint32, k []float64, h uint64, fc *keyTable) int {
	mask := uint64(len(t.slots) - 1)
	for s := h & mask; ; s = (s + 1) & mask {
		j := int(t.slots[s]) - 1
		if j < 0 {
			return -1
		}
		if key := t.keys[j]; uint32(key>>32) == f && equal(fc.key(int(uint32(key))), k) {
			return j
		}
	}
}

func (t *pairTable) rehash(size int, fc *keyTable) {
	t.slots = make([]int32, size)
	mask := uint64(size - 1)
	for j, k := range t.keys {
		s := pairHash(int(k>>32), hashKey(fc.key(int(uint32(k))))) & mask
		for t.slots[s] != 0 {
			s = (s + 1) & mask
		}
		t.slots[s] = int32(j + 1)
	}
}
