package backtest

import (
	"encoding/binary"
	"fmt"
	"math"
	"os"

	"scorewright/contract/backtest/corp"
)

// finalsInMemory is the most a finals table keeps in memory; larger ones
// go to a temporary file.
const finalsInMemory = 8 << 20

// finals keeps every forecaster's decomposition figures, a fixed number
// of float64 each, between the pass that computes them (in the order
// forecasters first appeared) and the visit in name order.
type finals struct {
	width int
	mem   []float64
	f     *os.File
	buf   []byte
}

func newFinals(count, width, limit int, dir string) (*finals, error) {
	x := &finals{width: width}
	if limit <= 0 {
		limit = finalsInMemory
	}
	if count*width*8 <= limit {
		x.mem = make([]float64, count*width)
		return x, nil
	}
	f, err := os.CreateTemp(dir, "scorewright-forecasters-*.tmp")
	if err != nil {
		return nil, fmt.Errorf("backtest: no temporary file for %d forecasters: %w", count, err)
	}
	os.Remove(f.Name()) // it lives until closed (on systems that allow it)
	x.f, x.buf = f, make([]byte, 8*width)
	return x, nil
}

// put stores the figures of the forecaster at position pos.
func (x *finals) put(pos int, v []float64) error {
	if x.f == nil {
		copy(x.mem[pos*x.width:], v)
		return nil
	}
	for i, y := range v {
		binary.LittleEndian.PutUint64(x.buf[8*i:], math.Float64bits(y))
	}
	if _, err := x.f.WriteAt(x.buf, int64(pos)*int64(len(x.buf))); err != nil {
		return fmt.Errorf("backtest: writing the temporary file of forecasters: %w", err)
	}
	return nil
}

// get reads the figures of the forecaster at position pos into v.
func (x *finals) get(pos int, v []float64) error {
	if x.f == nil {
		copy(v, x.mem[pos*x.width:(pos+1)*x.width])
		return nil
	}
	if _, err := x.f.ReadAt(x.buf, int64(pos)*int64(len(x.buf))); err != nil {
		return fmt.Errorf("backtest: reading the temporary file of forecasters: %w", err)
	}
	for i := range v {
		v[i] = math.Float64frombits(binary.LittleEndian.Uint64(x.buf[8*i:]))
	}
	return nil
}

func (x *finals) close() {
	if x.f != nil {
		name := x.f.Name()
		x.f.Close()
		os.Remove(name)
	}
}

// finalWidth is the float64 figures encodeFinal writes for one
// forecaster: the count, then per scheme seven of money, three of the
// binned decomposition and six of CORP per event.
func finalWidth(schemes, events int) int { return 1 + schemes*(10+6*events) }

// encodeFinal writes f's count, money and decompositions into v.
func encodeFinal(v []float64, f *Forecaster) {
	v = append(v[:0], float64(f.Count))
	for s, d := range f.Decomposition {
		m := f.Money[s]
		v = append(v, m.Total, m.MeanEffort, float64(m.OffMenu), float64(m.BelowLow), float64(m.AboveHigh), float64(m.NonFinite), float64(m.FirstNonFinite))
		v = append(v, d.Uncertainty, d.Resolution, d.Reliability)
		for _, c := range f.CORP[s] {
			v = append(v, float64(c.Count), c.BaseRate, c.Score, c.Miscalibration, c.Discrimination, c.Uncertainty)
		}
	}
}

// decodeFinal fills f's count, money and decompositions from v, as
// encodeFinal wrote them.
func decodeFinal(f *Forecaster, v []float64, schemes, events int) {
	f.Count = int(v[0])
	v = v[1:]
	for range schemes {
		m := Money{Count: f.Count, Total: v[0], MeanEffort: v[1], OffMenu: int(v[2]), BelowLow: int(v[3]), AboveHigh: int(v[4]),
			NonFinite: int(v[5]), FirstNonFinite: int(v[6]), Mean: v[0] / float64(f.Count), Min: math.NaN(), Max: math.NaN()}
		f.Money = append(f.Money, m)
		d := Decomposition{MeanEffort: m.MeanEffort, Uncertainty: v[7], Resolution: v[8], Reliability: v[9]}
		d.WithinBin = d.MeanEffort - d.Identity()
		f.Decomposition = append(f.Decomposition, d)
		v = v[10:]
		cs := make([]corp.Decomposition, events)
		for k := range cs {
			cs[k] = corp.Decomposition{Count: int(v[0]), BaseRate: v[1], Score: v[2], Miscalibration: v[3], Discrimination: v[4], Uncertainty: v[5]}
			v = v[6:]
		}
		f.CORP = append(f.CORP, cs)
	}
}

// bounded keeps the k items that come first in an order, in memory that
// does not grow with the items offered: a heap whose root is the last of
// those kept.
type bounded struct {
	k      int
	before func(a, b int32) bool
	items  []int32
}

func newBounded(k int, before func(a, b int32) bool) *bounded {
	return &bounded{k: k, before: before}
}

// holds reports whether x is kept.
func (b *bounded) holds(x int32) bool {
	for _, y := range b.items {
		if y == x {
			return true
		}
	}
	return false
}

// offer keeps x if it comes before the last item kept (or fewer than k are
// kept); it reports whether x was kept and which item it put out (-1:
// none).
func (b *bounded) offer(x int32) (kept bool, out int32) {
	if len(b.items) < b.k {
		b.items = append(b.items, x)
		for i := len(b.items) - 1; i > 0; {
			p := (i - 1) / 2
			if !b.before(b.items[p], b.items[i]) {
				break
			}
			b.items[p], b.items[i] = b.items[i], b.items[p]
			i = p
		}
		return true, -1
	}
	if b.k == 0 || !b.before(x, b.items[0]) {
		return false, -1
	}
	out = b.items[0]
	b.items[0] = x
	for i := 0; ; {
		l, r, m := 2*i+1, 2*i+2, i
		if l < len(b.items) && b.before(b.items[m], b.items[l]) {
			m = l
		}
		if r < len(b.items) && b.before(b.items[m], b.items[r]) {
			m = r
		}
		if m == i {
			return true, out
		}
		b.items[i], b.items[m] = b.items[m], b.items[i]
		i = m
	}
}
