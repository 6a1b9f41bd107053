package backtest

import (
	"bufio"
	"container/heap"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
)

// spillFile holds the runs of (forecaster, forecast) entries a backtest
// moved out of memory: each run is a table's entries sorted by key, one
// record each (the key, then n outcome counts, little-endian). The file
// is removed as soon as it is made, so that nothing is left behind however
// the process ends; it lives until closed.
type spillFile struct {
	dir  string
	n    int
	f    *os.File
	w    *bufio.Writer
	runs []spillRun
	size int64
}

// spillRun is one run: where it is, how many records, and the generation
// of forecast ids it was written in (see outcomeStore.remaps).
type spillRun struct {
	off   int64
	count int
	gen   int
}

func (sp *spillFile) recordSize() int { return 8 + 4*sp.n }

// write appends the entries (keys, and n counts per key) as one run.
func (sp *spillFile) write(keys []uint64, hits []uint32, gen int) error {
	if sp.f == nil {
		f, err := os.CreateTemp(sp.dir, "scorewright-backtest-*.tmp")
		if err != nil {
			return fmt.Errorf("backtest: too many forecasts to keep in memory, and no temporary file: %w", err)
		}
		os.Remove(f.Name()) // it lives until closed (on systems that allow it)
		sp.f, sp.w = f, bufio.NewWriterSize(f, 1<<16)
	}
	order := make([]int32, len(keys))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(a, b int32) int {
		switch x, y := keys[a], keys[b]; {
		case x < y:
			return -1
		case x > y:
			return 1
		}
		return 0
	})
	rec := make([]byte, sp.recordSize())
	for _, e := range order {
		binary.LittleEndian.PutUint64(rec, keys[e])
		for k, h := range hits[int(e)*sp.n : (int(e)+1)*sp.n] {
			binary.LittleEndian.PutUint32(rec[8+4*k:], h)
		}
		if _, err := sp.w.Write(rec); err != nil {
			return sp.fail(err)
		}
	}
	sp.runs = append(sp.runs, spillRun{off: sp.size, count: len(keys), gen: gen})
	sp.size += int64(len(keys)) * int64(len(rec))
	return nil
}

func (sp *spillFile) fail(err error) error {
	return fmt.Errorf("backtest: writing the temporary file of forecasts: %w", err)
}

func (sp *spillFile) close() error {
	if sp.f == nil {
		return nil
	}
	name := sp.f.Name()
	err := sp.f.Close()
	os.Remove(name) // in case the system kept it when it was made
	sp.f, sp.w, sp.runs, sp.size = nil, nil, nil, 0
	return err
}

// cursor reads the entries of one run, or of the table in memory, in key
// order.
type cursor struct {
	r    *bufio.Reader // nil: the table in memory
	left int
	rec  []byte
	// remap takes the run's forecast ids to the current ones (nil: they
	// are current).
	remap []int32
	// in memory: entries in key order and the table they index.
	order []int32
	keys  []uint64
	hits  []uint32
	// the current entry
	key uint64
	cur []uint32
}

// next moves to the next entry; it reports false at the end.
func (c *cursor) next() (bool, error) {
	if c.left == 0 {
		return false, nil
	}
	c.left--
	if c.r == nil {
		e := int(c.order[len(c.order)-c.left-1])
		c.key, c.cur = c.keys[e], c.hits[e*len(c.cur):(e+1)*len(c.cur)]
		return true, nil
	}
	if _, err := io.ReadFull(c.r, c.rec); err != nil {
		return false, err
	}
	c.key = binary.LittleEndian.Uint64(c.rec)
	for k := range c.cur {
		c.cur[k] = binary.LittleEndian.Uint32(c.rec[8+4*k:])
	}
	if c.remap != nil {
		c.key = c.key&^0xffffffff | uint64(c.remap[uint32(c.key)])
	}
	return true, nil
}

// cursors is a heap of cursors by their forecaster.
type cursors []*cursor

func (h cursors) Len() int           { return len(h) }
func (h cursors) Less(i, j int) bool { return h[i].key>>32 < h[j].key>>32 }
func (h cursors) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *cursors) Push(x any)        { *h = append(*h, x.(*cursor)) }
func (h *cursors) Pop() any {
	old := *h
	c := old[len(old)-1]
	*h = old[:len(old)-1]
	return c
}

// scan calls fn for every forecaster with entries, in forecaster order,
// with its forecast ids and their n outcome counts each (ids distinct).
// The slices are reused after fn returns.
func (s *outcomeStore) scan(fn func(f int, ids []int32, hits []uint32) error) error {
	if s.err != nil {
		return s.err
	}
	h, err := s.cursors()
	if err != nil {
		return err
	}
	var ids []int32
	var hits []uint32
	for h.Len() > 0 {
		f := h[0].key >> 32
		ids, hits = ids[:0], hits[:0]
		for h.Len() > 0 && h[0].key>>32 == f {
			c := h[0]
			ids = append(ids, int32(uint32(c.key)))
			hits = append(hits, c.cur...)
			ok, err := c.next()
			if err != nil {
				return s.spill.fail(err)
			}
			if ok {
				heap.Fix(&h, 0)
			} else {
				heap.Pop(&h)
			}
		}
		ids, hits = mergeEntries(ids, hits, s.n)
		if err := fn(int(f), ids, hits); err != nil {
			return err
		}
	}
	return nil
}

// cursors opens one cursor per spilled run and one on the table, each on
// its first entry.
func (s *outcomeStore) cursors() (cursors, error) {
	var h cursors
	if len(s.spill.runs) > 0 {
		if err := s.spill.w.Flush(); err != nil {
			return nil, s.spill.fail(err)
		}
	}
	// Read buffers shrink with the number of runs, so that a long spill
	// costs at most a few megabytes to merge.
	buf := max(4<<10, min(64<<10, (4<<20)/max(1, len(s.spill.runs))))
	remaps := map[int][]int32{}
	for _, run := range s.spill.runs {
		if _, ok := remaps[run.gen]; !ok {
			remaps[run.gen] = s.composedRemap(run.gen)
		}
		size := int64(run.count) * int64(s.spill.recordSize())
		c := &cursor{r: bufio.NewReaderSize(io.NewSectionReader(s.spill.f, run.off, size), buf), left: run.count,
			rec: make([]byte, s.spill.recordSize()), cur: make([]uint32, s.n), remap: remaps[run.gen]}
		h = append(h, c)
	}
	order := make([]int32, len(s.pairs.keys))
	for i := range order {
		order[i] = int32(i)
	}
	keys := s.pairs.keys
	slices.SortFunc(order, func(a, b int32) int {
		if keys[a] < keys[b] {
			return -1
		}
		return 1 // keys are distinct
	})
	h = append(h, &cursor{left: len(order), order: order, keys: keys, hits: s.hits, cur: make([]uint32, s.n)})
	live := h[:0]
	for _, c := range h {
		ok, err := c.next()
		if err != nil {
			return nil, s.spill.fail(err)
		}
		if ok {
			live = append(live, c)
		}
	}
	heap.Init(&live)
	return live, nil
}

// composedRemap takes forecast ids of generation gen to the current one
// (nil when they are current).
func (s *outcomeStore) composedRemap(gen int) []int32 {
	if gen == len(s.remaps) {
		return nil
	}
	out := slices.Clone(s.remaps[gen])
	for _, r := range s.remaps[gen+1:] {
		for i, id := range out {
			out[i] = r[id]
		}
	}
	return out
}

// mergeEntries sums the counts of equal forecast ids (a forecaster's
// forecast may sit in several runs, or meet another after coarsening).
func mergeEntries(ids []int32, hits []uint32, n int) ([]int32, []uint32) {
	if len(ids) < 2 {
		return ids, hits
	}
	order := make([]int32, len(ids))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(a, b int32) int { return int(ids[a]) - int(ids[b]) })
	outIDs := make([]int32, 0, len(ids))
	outHits := make([]uint32, 0, len(hits))
	for _, e := range order {
		h := hits[int(e)*n : (int(e)+1)*n]
		if k := len(outIDs) - 1; k >= 0 && outIDs[k] == ids[e] {
			for j, x := range h {
				outHits[k*n+j] += x
			}
			continue
		}
		outIDs = append(outIDs, ids[e])
		outHits = append(outHits, h...)
	}
	return outIDs, outHits
}

// errStop ends a scan early without an error.
var errStop = errors.New("stop")
