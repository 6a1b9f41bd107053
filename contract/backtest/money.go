package backtest

import (
	"encoding/binary"
	"math"
	"slices"

	"scorewright/internal/num"
)

// DefaultMaxMoney is how many forecasters' money a backtest keeps in
// memory: the first DefaultMaxMoney forecasters in a plain array (about
// 15 MB for two rules, and no lookup), the later ones in a table of as
// many entries that moves to the temporary file whenever it is full. Past
// it the memory of a backtest no longer grows with the forecasters but
// for their names.
const DefaultMaxMoney = 1 << 17

// schemeMoney is one forecaster's money under one scheme.
type schemeMoney struct {
	pay, effort num.Sum
	// off counts forecasts off the menu; low and high payments out of
	// the budget's bounds; nonFinite payments that are ±Inf or NaN, the
	// first of them on line first.
	off, low, high, nonFinite, first int32
}

func (m *schemeMoney) add(p Paid, line int, s *Scheme) {
	m.pay.Add(p.Pay)
	m.effort.Add(p.Effort)
	if !p.OnMenu {
		m.off++
	}
	if p.Pay-p.Pay != 0 { // ±Inf or NaN (finite x - x is exactly 0)
		m.nonFinite++
		if m.first == 0 {
			m.first = int32(min(line, math.MaxInt32))
		}
	}
	if p.Pay < s.Low {
		m.low++
	} else if p.Pay > s.High {
		m.high++
	}
}

// merge adds b, counted later than m, to m.
func (m *schemeMoney) merge(b *schemeMoney) {
	m.pay.Merge(b.pay)
	m.effort.Merge(b.effort)
	m.off += b.off
	m.low += b.low
	m.high += b.high
	m.nonFinite += b.nonFinite
	if m.first == 0 {
		m.first = b.first
	}
}

// money is the Money of count forecasts.
func (m *schemeMoney) money(count int) Money {
	out := Money{Count: count, Total: m.pay.Value(), OffMenu: int(m.off), BelowLow: int(m.low), AboveHigh: int(m.high),
		NonFinite: int(m.nonFinite), FirstNonFinite: int(m.first), Min: math.NaN(), Max: math.NaN()}
	if count > 0 {
		out.Mean = out.Total / float64(count)
		out.MeanEffort = m.effort.Value() / float64(count)
	} else {
		out.Mean, out.MeanEffort = math.NaN(), math.NaN()
	}
	return out
}

// moneyRec is one forecaster's money under every scheme.
type moneyRec struct {
	count int
	s     []schemeMoney
}

func (r *moneyRec) reset(schemes int) {
	r.count = 0
	r.s = append(r.s[:0], make([]schemeMoney, schemes)...)
}

// moneyRecordSize is the bytes of one forecaster's money in the temporary
// file: the forecaster (8), the count (4), per scheme four float64 and five
// int32.
func moneyRecordSize(schemes int) int { return 12 + 52*schemes }

// encodeMoney writes forecaster f's money into rec.
func encodeMoney(rec []byte, f int, count int32, ms []schemeMoney) {
	le := binary.LittleEndian
	le.PutUint64(rec, uint64(f))
	le.PutUint32(rec[8:], uint32(count))
	b := rec[12:]
	for i := range ms {
		m := &ms[i]
		ps, pc := m.pay.Parts()
		es, ec := m.effort.Parts()
		for k, x := range [4]float64{ps, pc, es, ec} {
			le.PutUint64(b[8*k:], math.Float64bits(x))
		}
		for k, x := range [5]int32{m.off, m.low, m.high, m.nonFinite, m.first} {
			le.PutUint32(b[32+4*k:], uint32(x))
		}
		b = b[52:]
	}
}

// mergeMoney adds the money in rec to r.
func mergeMoney(r *moneyRec, rec []byte) {
	le := binary.LittleEndian
	f64 := func(b []byte) float64 { return math.Float64frombits(le.Uint64(b)) }
	i32 := func(b []byte) int32 { return int32(le.Uint32(b)) }
	r.count += int(le.Uint32(rec[8:]))
	b := rec[12:]
	for i := range r.s {
		m := schemeMoney{pay: num.SumOf(f64(b), f64(b[8:])), effort: num.SumOf(f64(b[16:]), f64(b[24:])),
			off: i32(b[32:]), low: i32(b[36:]), high: i32(b[40:]), nonFinite: i32(b[44:]), first: i32(b[48:])}
		r.s[i].merge(&m)
		b = b[52:]
	}
}

// moneyTable is the money of the first max forecasters, in dense
// arrays, and of later ones counted since the last spill, found by
// forecaster in an open-addressing table.
type moneyTable struct {
	schemes int
	max     int
	dcount  []int32       // forecasters below max
	dms     []schemeMoney // schemes per forecaster below max
	slots   []int32       // entry + 1; 0 is empty
	fs      []int32       // forecaster of each entry
	count   []int32
	ms      []schemeMoney // schemes per entry
	runs    []spillRun
	lastF   int // forecaster of entry lastE; -1: none
	lastE   int
}

func newMoneyTable(schemes, max int) *moneyTable {
	if max <= 0 {
		max = DefaultMaxMoney
	}
	return &moneyTable{schemes: schemes, max: max, slots: make([]int32, 16), lastF: -1}
}

// entry returns forecaster f's money under every scheme, spilling the
// table to sp first when it is full and f is not in it; it counts one
// more forecast.
func (t *moneyTable) entry(f int, sp *spillFile) ([]schemeMoney, error) {
	if f < t.max {
		for len(t.dcount) <= f {
			t.dcount = append(t.dcount, 0)
			t.dms = append(t.dms, make([]schemeMoney, t.schemes)...)
		}
		t.dcount[f]++
		return t.dms[f*t.schemes : (f+1)*t.schemes], nil
	}
	if f != t.lastF {
		e, err := t.find(f, sp)
		if err != nil {
			return nil, err
		}
		t.lastF, t.lastE = f, e
	}
	e := t.lastE
	t.count[e]++
	return t.ms[e*t.schemes : (e+1)*t.schemes], nil
}

func (t *moneyTable) find(f int, sp *spillFile) (int, error) {
	for {
		mask := uint64(len(t.slots) - 1)
		for s := fmix(uint64(f)) & mask; ; s = (s + 1) & mask {
			j := int(t.slots[s]) - 1
			if j >= 0 && int(t.fs[j]) == f {
				return j, nil
			}
			if j >= 0 {
				continue
			}
			if len(t.fs) >= t.max {
				break
			}
			t.slots[s] = int32(len(t.fs) + 1)
			t.fs = append(t.fs, int32(f))
			t.count = append(t.count, 0)
			t.ms = append(t.ms, make([]schemeMoney, t.schemes)...)
			if 2*len(t.fs) > len(t.slots) {
				t.rehash(2 * len(t.slots))
			}
			return len(t.fs) - 1, nil
		}
		if err := t.spill(sp); err != nil {
			return 0, err
		}
	}
}

func (t *moneyTable) rehash(size int) {
	t.slots = make([]int32, size)
	mask := uint64(size - 1)
	for j, f := range t.fs {
		s := fmix(uint64(f)) & mask
		for t.slots[s] != 0 {
			s = (s + 1) & mask
		}
		t.slots[s] = int32(j + 1)
	}
}

// records iterates over the dense entries (unless tableOnly) and then the
// table's, as records sorted by forecaster.
func (t *moneyTable) records(tableOnly bool) records {
	f := 0
	if tableOnly {
		f = len(t.dcount)
	}
	order := make([]int32, len(t.fs))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(a, b int32) int { return int(t.fs[a]) - int(t.fs[b]) })
	return func(rec []byte) bool {
		switch {
		case f < len(t.dcount):
			encodeMoney(rec, f, t.dcount[f], t.dms[f*t.schemes:(f+1)*t.schemes])
			f++
		case len(order) > 0:
			e := int(order[0])
			order = order[1:]
			encodeMoney(rec, int(t.fs[e]), t.count[e], t.ms[e*t.schemes:(e+1)*t.schemes])
		default:
			return false
		}
		return true
	}
}

// spill moves the table's entries to sp as one run and empties it.
func (t *moneyTable) spill(sp *spillFile) error {
	run, err := sp.writeRun(len(t.fs), 0, moneyRecordSize(t.schemes), t.records(true))
	if err != nil {
		return err
	}
	t.runs = append(t.runs, run)
	clear(t.slots)
	t.fs, t.count, t.ms = t.fs[:0], t.count[:0], t.ms[:0]
	t.lastF = -1
	return nil
}
