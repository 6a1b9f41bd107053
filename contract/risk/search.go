package risk

import "math"

// The search over reports. A report is a point of the simplex with every
// entry at least the report floor f. The best report of a risk-seeking
// forecaster is often a corner, of a risk-averse one an interior point
// where the gradient is nearly flat; both are found by moving probability
// between two outcomes at a time (a line along e_i - e_j, which stays in
// the simplex and reaches its faces exactly) with the bracketing line
// search maximise1, sweep after sweep, plus a line along each sweep's total
// step (so that a narrow valley does not take thousands of sweeps). Every
// line search keeps the best point it saw, so the value never decreases
// and no flat gradient can stall it. For n > 2 the search starts from the
// better of the truthful report and the best point of a lattice over the
// report range.

// Search limits.
const (
	// lineCells is the grid of each line search: fine for n = 2, where
	// the one line is the whole problem; coarse for the pair lines of
	// n > 2, whose starting point already comes from the lattice.
	lineCells2, lineCellsN = 256, 8
	// maxSweeps bounds the sweeps over all pairs.
	maxSweeps = 400
	// resolution is where a line search stops, relative to its range:
	// about the rounding unit of probabilities.
	resolution = 1e-16
	// latticePoints bounds the lattice of starting points.
	latticePoints = 2000
)

// search returns the best report found from the truthful report truth,
// and its certainty equivalent.
func (s *Solver) search(truth []float64) ([]float64, float64) {
	p, v := s.climb(truth)
	if s.n > 2 {
		if start := s.latticeBest(); start != nil {
			if p2, v2 := s.climb(start); v2 > v+s.tie {
				p, v = p2, v2
			}
		}
	}
	return p, v
}

// climb runs the sweeps from start.
func (s *Solver) climb(start []float64) ([]float64, float64) {
	n, f := s.n, s.c.ReportFloor
	p := append([]float64(nil), start...)
	prev := make([]float64, n)
	v := s.value(p)
	cells := lineCellsN
	if n == 2 {
		cells = lineCells2
	}
	for sweep := 0; sweep < maxSweeps; sweep++ {
		copy(prev, p)
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				for k := range s.dir {
					s.dir[k] = 0
				}
				s.dir[i], s.dir[j] = 1, -1
				var t float64
				t, v = s.line(p, s.dir, f-p[i], p[j]-f, cells, v)
				switch {
				case t == f-p[i]:
					p[j] += p[i] - f
					p[i] = f
				case t == p[j]-f:
					p[i] += p[j] - f
					p[j] = f
				default:
					p[i] += t
					p[j] -= t
				}
			}
		}
		if n > 2 {
			v = s.extrapolate(p, prev, v)
		}
		step := 0.0
		for k := range p {
			step = math.Max(step, math.Abs(p[k]-prev[k]))
		}
		if step <= 1e-14 {
			break
		}
	}
	normalise(p)
	return p, v
}

// line maximises the value on base + t·dir for t in [lo, hi] (t = 0 is
// base, of value v0) and returns the best t and its value.
func (s *Solver) line(base, dir []float64, lo, hi float64, cells int, v0 float64) (float64, float64) {
	if !(hi > lo) {
		return 0, v0
	}
	at := func(t float64) []float64 {
		for k := range base {
			s.trial[k] = base[k] + t*dir[k]
		}
		return s.trial
	}
	f := func(t float64) float64 { return s.value(at(t)) }
	df := func(t float64) float64 {
		if _, ok := s.slope(at(t)); !ok {
			return math.NaN()
		}
		var d float64
		for k, g := range s.g {
			d += g * dir[k]
		}
		return d
	}
	return maximise1(f, df, lo, hi, 0, v0, cells, s.tie, resolution*(hi-lo))
}

// extrapolate searches along the step p - prev of the last sweep, in
// place, and returns the new value.
func (s *Solver) extrapolate(p, prev []float64, v float64) float64 {
	d := make([]float64, s.n)
	lo, hi := math.Inf(-1), math.Inf(1)
	moved := false
	for k := range p {
		d[k] = p[k] - prev[k]
		room := p[k] - s.c.ReportFloor
		switch {
		case d[k] > 0:
			lo = math.Max(lo, -room/d[k])
			moved = true
		case d[k] < 0:
			hi = math.Min(hi, room/-d[k])
			moved = true
		}
	}
	if !moved {
		return v
	}
	t, nv := s.line(p, d, lo, hi, 4, v)
	if t == 0 {
		return v
	}
	for k := range p {
		p[k] = math.Max(p[k]+t*d[k], s.c.ReportFloor)
	}
	return nv
}

// latticeBest is the best report on the lattice f + (1 - n f)·k/K over
// whole vectors k summing to K, the largest K with at most latticePoints
// points (nil when no lattice point has a defined value).
func (s *Solver) latticeBest() []float64 {
	n, f := s.n, s.c.ReportFloor
	K := 1
	for count(K+1, n) <= latticePoints {
		K++
	}
	k := make([]int, n)
	p := make([]float64, n)
	var best []float64
	bv := math.Inf(-1)
	var walk func(i, left int)
	walk = func(i, left int) {
		if i == n-1 {
			k[i] = left
			for j := range p {
				p[j] = f + (1-float64(n)*f)*float64(k[j])/float64(K)
			}
			if v := s.value(p); v > bv {
				bv, best = v, append(best[:0], p...)
			}
			return
		}
		for c := 0; c <= left; c++ {
			k[i] = c
			walk(i+1, left-c)
		}
	}
	walk(0, K)
	return best
}

// count is the number of lattice points C(K+n-1, n-1).
func count(K, n int) float64 {
	c := 1.0
	for i := 1; i < n; i++ {
		c = c * float64(K+i) / float64(i)
	}
	return c
}
