package backtest

import (
	"bufio"
	"container/heap"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
)

// spillFile holds what a backtest moved out of memory, as runs of fixed-
// size records sorted by their first eight bytes (a little-endian key
// whose high bits are the forecaster): the (forecaster, forecast) entries
// (the key, then n outcome counts) and the forecasters' money
// (moneyRecordSize). The file is removed as soon as it is made, so that
// nothing is left behind however the process ends; it lives until closed.
type spillFile struct {
	dir  string
	f    *os.File
	w    *bufio.Writer
	size int64
	err  error // the first failure, or closing; nothing more is written after it
}

// spillRun is one run: where it is, how many records, and the generation
// of forecast ids it was written in (see outcomeStore.remaps).
type spillRun struct {
	off   int64
	count int
	gen   int
}

// records is an iterator over fixed-size records: each call writes the
// next into rec and reports whether there was one.
type records func(rec []byte) bool

// writeRun appends the count sorted records of size size that next
// gives, as one run.
func (sp *spillFile) writeRun(count, gen, size int, next records) (spillRun, error) {
	if sp.err != nil {
		return spillRun{}, sp.err
	}
	if sp.f == nil {
		f, err := os.CreateTemp(sp.dir, "scorewright-backtest-*.tmp")
		if err != nil {
			sp.err = fmt.Errorf("backtest: too many forecasts to keep in memory, and no temporary file: %w", err)
			return spillRun{}, sp.err
		}
		os.Remove(f.Name()) // it lives until closed (on systems that allow it)
		sp.f, sp.w = f, bufio.NewWriterSize(f, 1<<16)
	}
	rec := make([]byte, size)
	for next(rec) {
		if _, err := sp.w.Write(rec); err != nil {
			sp.err = sp.fail(err)
			return spillRun{}, sp.err
		}
	}
	run := spillRun{off: sp.size, count: count, gen: gen}
	sp.size += int64(count) * int64(size)
	return run, nil
}

func (sp *spillFile) fail(err error) error {
	return fmt.Errorf("backtest: writing the temporary file of forecasts: %w", err)
}

// flush makes every run readable.
func (sp *spillFile) flush() error {
	if sp.err != nil || sp.w == nil {
		return sp.err
	}
	if err := sp.w.Flush(); err != nil {
		sp.err = sp.fail(err)
	}
	return sp.err
}

func (sp *spillFile) close() error {
	if sp.f == nil {
		return nil
	}
	name := sp.f.Name()
	err := sp.f.Close()
	os.Remove(name) // in case the system kept it when it was made
	sp.f, sp.w = nil, nil
	// Runs already written point into the file: a new one must not start.
	sp.err = errors.New("backtest: the tally was closed, and its temporary file with it")
	return err
}

// cursor reads the records of one run in order, or of a table in memory.
type cursor struct {
	r     *bufio.Reader
	mem   records // the table in memory; r is then nil
	left  int
	rec   []byte
	shift uint // the forecaster is the key >> shift
	// remap takes a run's forecast ids (the key's low 32 bits) to the
	// current ones (nil: they are current).
	remap []int32
}

func (c *cursor) forecaster() uint64 { return binary.LittleEndian.Uint64(c.rec) >> c.shift }

// next moves to the next record; it reports false at the end.
func (c *cursor) next() (bool, error) {
	if c.r == nil {
		return c.mem(c.rec), nil
	}
	if c.left == 0 {
		return false, nil
	}
	c.left--
	if _, err := io.ReadFull(c.r, c.rec); err != nil {
		return false, fmt.Errorf("backtest: reading the temporary file of forecasts: %w", err)
	}
	if c.remap != nil {
		key := binary.LittleEndian.Uint64(c.rec)
		binary.LittleEndian.PutUint64(c.rec, key&^0xffffffff|uint64(c.remap[uint32(key)]))
	}
	return true, nil
}

// cursors is a heap of cursors by their forecaster.
type cursors []*cursor

func (h cursors) Len() int           { return len(h) }
func (h cursors) Less(i, j int) bool { return h[i].forecaster() < h[j].forecaster() }
func (h cursors) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *cursors) Push(x any)        { *h = append(*h, x.(*cursor)) }
func (h *cursors) Pop() any {
	old := *h
	c := old[len(old)-1]
	*h = old[:len(old)-1]
	return c
}

// take calls fn with every record of forecaster f at the heap's top,
// advancing past them.
func (h *cursors) take(f uint64, fn func(rec []byte)) error {
	for h.Len() > 0 && (*h)[0].forecaster() == f {
		c := (*h)[0]
		fn(c.rec)
		ok, err := c.next()
		if err != nil {
			return err
		}
		if ok {
			heap.Fix(h, 0)
		} else {
			heap.Pop(h)
		}
	}
	return nil
}

// openCursors opens one cursor per run of records of size size in sp,
// and one on the table in memory, which mem gives, each on its first
// record.
func openCursors(sp *spillFile, runs []spillRun, mem records, size int, shift uint, remap func(gen int) []int32) (cursors, error) {
	if err := sp.flush(); err != nil {
		return nil, err
	}
	if len(runs) > 0 && sp.f == nil {
		return nil, errors.New("backtest: the result was closed, and its temporary file with it")
	}
	// Read buffers shrink with the number of runs, so that a long spill
	// costs at most a few megabytes to merge.
	buf := max(4<<10, min(64<<10, (4<<20)/max(1, len(runs))))
	var h cursors
	for _, run := range runs {
		sec := io.NewSectionReader(sp.f, run.off, int64(run.count)*int64(size))
		h = append(h, &cursor{r: bufio.NewReaderSize(sec, buf), left: run.count, rec: make([]byte, size), shift: shift, remap: remap(run.gen)})
	}
	h = append(h, &cursor{mem: mem, rec: make([]byte, size), shift: shift})
	live := h[:0]
	for _, c := range h {
		ok, err := c.next()
		if err != nil {
			return nil, err
		}
		if ok {
			live = append(live, c)
		}
	}
	heap.Init(&live)
	return live, nil
}

// scan calls fn for every forecaster in forecaster order with, when money
// is set, its money and, when pairs is set, its distinct forecast ids and
// their outcome counts (each left empty otherwise). The arguments are
// reused after fn returns.
func (t *Tally) scan(money, pairs bool, fn func(f int, m *moneyRec, own ownEntries) error) error {
	if err := t.Err(); err != nil {
		return err
	}
	var mh, ph cursors
	var err error
	if money {
		if mh, err = openCursors(t.spill, t.money.runs, t.money.records(false), moneyRecordSize(len(t.schemes)), 0, func(int) []int32 { return nil }); err != nil {
			return err
		}
	}
	s := t.store
	if pairs {
		remaps := map[int][]int32{}
		remap := func(gen int) []int32 {
			if _, ok := remaps[gen]; !ok {
				remaps[gen] = s.composedRemap(gen)
			}
			return remaps[gen]
		}
		if ph, err = openCursors(t.spill, s.runs, s.records(), s.recordSize(), 32, remap); err != nil {
			return err
		}
	}
	var m moneyRec
	var own ownEntries
	for mh.Len() > 0 || ph.Len() > 0 {
		f := uint64(math.MaxUint64)
		if mh.Len() > 0 {
			f = mh[0].forecaster()
		}
		if ph.Len() > 0 {
			f = min(f, ph[0].forecaster())
		}
		m.reset(len(t.schemes))
		if err := mh.take(f, func(rec []byte) { mergeMoney(&m, rec) }); err != nil {
			return err
		}
		own.ids, own.hits = own.ids[:0], own.hits[:0]
		err := ph.take(f, func(rec []byte) {
			own.ids = append(own.ids, int32(binary.LittleEndian.Uint32(rec)))
			for k := range s.n {
				own.hits = append(own.hits, binary.LittleEndian.Uint32(rec[8+4*k:]))
			}
		})
		if err != nil {
			return err
		}
		own.ids, own.hits = mergeEntries(own.ids, own.hits, s.n)
		if err := fn(int(f), &m, own); err != nil {
			return err
		}
	}
	return nil
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
	var order []int32
	if len(ids) < radixFrom { // most forecasters: no keys to allocate
		order = make([]int32, len(ids))
		for i := range order {
			order[i] = int32(i)
		}
		slices.SortFunc(order, func(a, b int32) int { return int(ids[a]) - int(ids[b]) })
	} else {
		keys := make([]uint64, len(ids))
		for i, id := range ids {
			keys[i] = uint64(uint32(id)) // ids are not negative
		}
		order = radixOrder(keys)
	}
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
