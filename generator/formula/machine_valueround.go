package formula

import (
	"math"

	"scorewright/internal/interval"
)

// valueRounding is the scratch of ValueRounding, made on first use.
type valueRounding struct {
	enc *Encloser
	box []interval.Interval
	en  Enclosure
}

// ValueRounding bounds the rounding error of Value at vars: the program is
// evaluated once more in interval arithmetic with outward rounding on the
// point box (Moore 1966), which encloses the exact value, and the bound is
// the farthest end of that enclosure from the floating-point value. The
// bound follows the size of the terms that cancel, not of the result:
// (1e8 - p^2) - 1e8 is about 0.25 but is known only to about 1e-8. ok is
// false where the enclosure is not finite or the value not a number
// (a point on the edge of the formula's domain), and where a comparison
// is undecided on the point (an if at its break, where the enclosure
// spans both branches and bounds their jump, not the rounding): the
// caller then has no bound.
func (m *Machine) ValueRounding(vars []float64) (bound float64, ok bool) {
	vr := m.vround
	if vr == nil {
		vr = &valueRounding{enc: m.prog.NewEncloser(), box: make([]interval.Interval, m.nv)}
		m.vround = vr
	}
	for k, x := range vars {
		vr.box[k] = interval.Point(x)
	}
	vr.enc.Enclose(&vr.en, vr.box, 0)
	v := m.Value(vars)
	lo, hi := vr.en.Value.Lo, vr.en.Value.Hi
	if vr.en.Undefined || vr.en.Kinked || !(lo <= hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) || v != v || math.IsInf(v, 0) {
		return 0, false
	}
	return math.Max(math.Max(hi-v, v-lo), 0), true
}
