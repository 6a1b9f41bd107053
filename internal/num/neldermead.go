package num

import (
	"math"
	"sort"
)

// NelderMead settings and outcome.
//
// The engine's local searches (sharpening a witness, fitting a family's
// parameter, looking between grid points) each run a few hundred
// evaluations of a function that costs tens of nanoseconds. gonum's
// optimize.Minimize runs its method, its bookkeeping and the function on
// three goroutines that hand every evaluation over channels, which costs
// about 1.3 µs an evaluation on this project's machines: most of an
// audit's local-search time. NelderMeadMin is the same search on the
// caller's goroutine: the method of gonum's optimize.NelderMead with its
// default coefficients, gonum's evaluation limit and its FunctionConverge
// test, step for step, so it evaluates the same points in the same order
// and stops at the same one (TestNelderMeadMatchesGonum holds it to that
// on functions with ties, infinities and NaNs).

// NMStatus is how a Nelder–Mead search ended.
type NMStatus int

const (
	// NMConverged: the best value did not improve by more than the
	// tolerance over the given number of major iterations.
	NMConverged NMStatus = iota
	// NMBudget: the evaluation limit was reached.
	NMBudget
	// NMNonFiniteStart: the starting value was +Inf or NaN, so no search ran.
	NMNonFiniteStart
	// NMNegativeInfinity: a vertex of the simplex reached -Inf.
	NMNegativeInfinity
)

// NMSettings are a search's limits: Evals function evaluations in all
// (the start included; 0 for no limit); convergence when Iterations major
// iterations in a row improve the best value by no more than
// Relative·max(|f|, |best|) + Absolute; Size, the initial simplex's edge
// along each axis (0.05 when 0).
type NMSettings struct {
	Evals              int
	Absolute, Relative float64
	Iterations         int
	Size               float64
}

// nmState is one search's simplex: vertices sorted by value, ascending.
type nmState struct {
	f        func([]float64) float64
	s        NMSettings
	evals    int
	vertices [][]float64
	values   []float64
	centroid []float64
	// best and stall are the convergence test's best value and the
	// major iterations since it last improved; first marks the first.
	best  float64
	stall int
	first bool
}

// vertexOrder sorts the simplex by value, with the same Less and Swap as
// gonum's sorter, so sort.Sort permutes ties alike.
type vertexOrder struct {
	vertices [][]float64
	values   []float64
}

func (o vertexOrder) Len() int           { return len(o.values) }
func (o vertexOrder) Less(i, j int) bool { return o.values[i] < o.values[j] }
func (o vertexOrder) Swap(i, j int) {
	o.values[i], o.values[j] = o.values[j], o.values[i]
	o.vertices[i], o.vertices[j] = o.vertices[j], o.vertices[i]
}

// errStop ends a search; its status says why.
type errStop struct{ status NMStatus }

// eval evaluates f at x, counting it against the budget: the search stops
// (with NMBudget) as soon as the count reaches it, before the value is
// used, as gonum's bookkeeping does.
func (st *nmState) eval(x []float64) (float64, *errStop) {
	v := st.f(x)
	st.evals++
	if st.s.Evals > 0 && st.evals >= st.s.Evals {
		return v, &errStop{NMBudget}
	}
	return v, nil
}

// place evaluates x and makes it vertex i (unsorted).
func (st *nmState) place(i int, x []float64) *errStop {
	v, stop := st.eval(x)
	if stop != nil {
		return stop
	}
	copy(st.vertices[i], x)
	st.values[i] = v
	return nil
}

// major is a major iteration at the best vertex: the convergence test.
func (st *nmState) major() *errStop {
	f := st.values[0]
	if math.IsInf(f, -1) {
		return &errStop{NMNegativeInfinity}
	}
	if st.first {
		st.best, st.first = f, false
		return nil
	}
	if st.s.Iterations == 0 {
		return nil
	}
	if f < st.best && st.best-f > st.s.Relative*math.Max(math.Abs(f), math.Abs(st.best))+st.s.Absolute {
		st.best, st.stall = f, 0
		return nil
	}
	st.stall++
	if st.stall < st.s.Iterations {
		return nil
	}
	return &errStop{NMConverged}
}

// NelderMeadMin minimises f from x0 (which it does not change) and
// returns how the search ended and the evaluations it made. The caller
// keeps the best point it saw (f is called for every point evaluated);
// f should give +Inf, not NaN, where it is undefined.
func NelderMeadMin(f func([]float64) float64, x0 []float64, s NMSettings) (NMStatus, int) {
	st := &nmState{f: f, s: s, first: true}
	if st.s.Size == 0 {
		st.s.Size = 0.05
	}
	stop := st.run(x0)
	return stop.status, st.evals
}

// run is the search proper; it returns the reason it stopped.
func (st *nmState) run(x0 []float64) *errStop {
	dim := len(x0)
	f0, stop := st.eval(x0)
	if stop != nil {
		return stop
	}
	if math.IsInf(f0, 1) || math.IsNaN(f0) {
		return &errStop{NMNonFiniteStart}
	}
	st.vertices = make([][]float64, dim+1)
	for i := range st.vertices {
		st.vertices[i] = make([]float64, dim)
	}
	st.values = make([]float64, dim+1)
	st.centroid = make([]float64, dim)
	st.values[0] = f0
	copy(st.vertices[0], x0)
	if stop := st.major(); stop != nil {
		return stop
	}
	copy(st.vertices[dim], x0)
	st.values[dim] = f0
	x := make([]float64, dim)
	for i := 0; i < dim; i++ {
		copy(x, st.vertices[dim])
		x[i] += st.s.Size
		if stop := st.place(i, x); stop != nil {
			return stop
		}
	}
	st.sortSimplex()
	return st.iterate(x)
}

// Coefficients of the method for dimension dim, gonum's defaults.
func nmCoefficients(dim int) (expansion, contraction, shrink float64) {
	if dim == 1 {
		return 2, 0.5, 0.5
	}
	d := float64(dim)
	return 1 + 2/d, 0.75 - 1/(2*d), 1 - 1/d
}

// iterate runs major iterations until a stop: a numeric kernel, kept
// whole so its branches read as the method's.
func (st *nmState) iterate(x []float64) *errStop {
	dim := len(x)
	expansion, contraction, shrink := nmCoefficients(dim)
	reflected := make([]float64, dim)
	for {
		if stop := st.major(); stop != nil {
			return stop
		}
		st.toward(x, 1)
		copy(reflected, x)
		fr, stop := st.eval(x)
		if stop != nil {
			return stop
		}
		switch {
		case fr >= st.values[0] && fr < st.values[dim-1]:
			st.replaceWorst(x, fr)
			continue
		case fr < st.values[0]:
			st.toward(x, expansion)
			fe, stop := st.eval(x)
			if stop != nil {
				return stop
			}
			if fe < fr {
				st.replaceWorst(x, fe)
			} else {
				st.replaceWorst(reflected, fr)
			}
			continue
		}
		outside := fr < st.values[dim]
		if outside {
			st.toward(x, contraction)
		} else {
			st.toward(x, -contraction)
		}
		fc, stop := st.eval(x)
		if stop != nil {
			return stop
		}
		if (outside && fc <= fr) || (!outside && fc < st.values[dim]) {
			st.replaceWorst(x, fc)
			continue
		}
		for i := 1; i <= dim; i++ {
			for k := range x {
				x[k] = float64(shrink*(st.vertices[i][k]-st.vertices[0][k])) + st.vertices[0][k]
			}
			if stop := st.place(i, x); stop != nil {
				return stop
			}
		}
		st.sortSimplex()
	}
}

// toward sets x to centroid + scale·(centroid - worst), rounded as gonum
// rounds it (difference, product, sum, each once: the explicit float64
// conversions forbid a fused multiply-add, here and below).
func (st *nmState) toward(x []float64, scale float64) {
	worst := st.vertices[len(x)]
	for k := range x {
		x[k] = float64(scale*(st.centroid[k]-worst[k])) + st.centroid[k]
	}
}

// sortSimplex orders the vertices by value and recomputes the centroid
// of all but the worst.
func (st *nmState) sortSimplex() {
	sort.Sort(vertexOrder{st.vertices, st.values})
	dim := len(st.centroid)
	for k := range st.centroid {
		st.centroid[k] = 0
	}
	for i := 0; i < dim; i++ {
		for k, v := range st.vertices[i] {
			st.centroid[k] += v
		}
	}
	for k := range st.centroid {
		st.centroid[k] /= float64(dim)
	}
}

// replaceWorst puts x (value v, below the worst) in the worst vertex's
// place, keeps the order, and updates the centroid incrementally.
func (st *nmState) replaceWorst(x []float64, v float64) {
	dim := len(x)
	copy(st.vertices[dim], x)
	st.values[dim] = v
	for i := dim - 1; i >= 0; i-- {
		if st.values[i] < v {
			break
		}
		st.vertices[i], st.vertices[i+1] = st.vertices[i+1], st.vertices[i]
		st.values[i], st.values[i+1] = st.values[i+1], st.values[i]
	}
	for k := range st.centroid {
		st.centroid[k] += float64(-1 / float64(dim) * st.vertices[dim][k])
	}
	for k := range st.centroid {
		st.centroid[k] += float64(1 / float64(dim) * x[k])
	}
}
