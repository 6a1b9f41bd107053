package verify

import (
	"context"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/stat"

	"scorewright/generator/bregman"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// Candidate is a known rule a payout may be an affine image of. A rule
// with one numeric parameter (the power rule's g) can be a whole family:
// when At is set, identification fits the parameter over [Lo, Hi] along
// with the scale and shift. The fields match presets.NamedRule, so a
// caller converts with verify.Candidate(r).
type Candidate struct {
	Name string
	// Rule is the rule itself, or for a family its member at Value.
	Rule *bregman.Rule
	// Param names the fitted parameter, "" for a rule without one.
	Param string
	// Value is Param's value in Rule; the search tries it among others.
	Value float64
	// Lo and Hi bound the values searched, Lo < Hi.
	Lo, Hi float64
	// At builds the member with Param = v. An error or a nil rule rules
	// v out (the power rule's formula is undefined at g = 1, for one).
	At func(v float64) (*bregman.Rule, error)
}

// Identification says a payout is shift + scale × a known rule's score
// (score = -effort), i.e. pay = Shift - Scale × L.
type Identification struct {
	Preset string
	// Param and Value are the fitted parameter and its value, for a
	// candidate family; Param is "" otherwise.
	Param string
	Value float64
	// Status is the parameter search's outcome: the optimiser's status,
	// and whether its result was kept.
	Status       string
	Scale, Shift float64
	// Residual is the root-mean-square misfit relative to the spread of
	// the payments, over Points finite (report, outcome) pairs: those of
	// every grid report, or of the search's subset when the fit there
	// already shows the rule cannot fit (Note then says so).
	Residual float64
	Points   int
	// Note explains a fit that was not accepted.
	Note string
}

// WithParam is the fitted parameter as a phrase to follow the preset's
// name (` with g = 1.5`), "" when nothing was fitted.
func (id Identification) WithParam() string {
	if id.Param == "" {
		return ""
	}
	return fmt.Sprintf(" with %s = %.6g", id.Param, id.Value)
}

// DefaultIdentifyTolerance is the relative residual below which a payout
// counts as an affine image of a candidate rule.
const DefaultIdentifyTolerance = 1e-6

// Parameter search. A single number is pinned by far fewer reports than
// the grid has, so the search fits on at most identSearchPoints of them
// (every k-th) and the chosen member is then fitted on all of them. It
// runs in two stages: the family's parameter is located on a coarse
// sub-lattice of that subset (every identLocateStride-th of its reports,
// kept to at least identLocateMin reports) — identScan values spread
// over the range find the right basin, then Nelder–Mead refines within
// identEvals evaluations — and then polished on the whole subset by
// Nelder–Mead from there within identPolish evaluations. An exact member
// has residual 0 on any subset, so the coarse stage already finds its
// parameter; the polish settles a near member on the subset the search
// has always used, at a few evaluations' cost.
const (
	identSearchPoints = 400
	identLocateStride = 8
	identLocateMin    = 40
	identScan         = 33
	identEvals        = 100
	identPolish       = 12
	// identPolishSize is the polish's first step in u: the located
	// value is already near the subset's best.
	identPolishSize = 1e-3
)

// identifyCost is the progress budget of identifying against cands on a
// grid of G points, in stream pairs.
func identifyCost(G int, cands []Candidate) int64 {
	cost := int64(G) * gradCost * int64(len(cands))
	step, coarse := searchSteps(G)
	for _, c := range cands {
		if c.At != nil {
			cost += int64(identScan+identEvals+2) * int64((G+coarse-1)/coarse) * gradCost
			cost += int64(identPolish+1) * int64((G+step-1)/step) * gradCost
		}
	}
	return cost
}

// searchSteps are the strides of the search's subset and of its coarse
// sub-lattice over G grid reports; coarse is a multiple of step.
func searchSteps(G int) (step, coarse int) {
	step = (G + identSearchPoints - 1) / identSearchPoints
	sub := (G + step - 1) / step
	m := max(1, min(identLocateStride, sub/identLocateMin))
	return step, step * m
}

// lsq is a least-squares fit pay ≈ shift + scale × (-L).
type lsq struct {
	shift, scale, residual float64
	// points are the (report, outcome) pairs where both are finite;
	// mismatch counts those where they are not finite alike (one finite,
	// a NaN, or infinities of opposite sign).
	points, mismatch int
	constant         bool
	// sse is the sum of squared misfits in units of unit, the largest
	// |payment| among the points.
	sse, unit float64
}

// badness orders the members of a family: fewest mismatched infinities
// first (only a member with none can be accepted), then the smallest
// residual, which is at most 1 for a least-squares fit with a shift.
func (l lsq) badness() float64 {
	if l.residual != l.residual {
		return math.Inf(1)
	}
	return float64(l.mismatch) + l.residual
}

// fitter fits candidate rules to a payout's grid payments, reusing its
// buffers from fit to fit.
type fitter struct {
	g         *simplex.Grid
	pays      *menu
	x, y, eff []float64
	spread    spread
}

func newFitter(g *simplex.Grid, pays *menu, sp spread) *fitter {
	m := g.Len() * g.N
	return &fitter{g: g, pays: pays, x: make([]float64, 0, m), y: make([]float64, 0, m), eff: make([]float64, g.N), spread: sp}
}

// spread is the sum of squares about their mean (sst, in units of unit,
// the largest |payment|) of every finite payment on the grid. A fit on
// the whole grid uses some of them, and the sum of squares about the mean
// of a subset is at most that of the whole set about the same centre, so
// sst bounds the spread any fit on the grid is judged against.
type spread struct{ sst, unit float64 }

func paySpread(pays *menu) spread {
	var unit, sum float64
	count := 0
	for _, v := range pays.rows {
		if !math.IsInf(v, 0) && v == v {
			unit = math.Max(unit, math.Abs(v))
		}
	}
	if unit == 0 {
		return spread{}
	}
	for _, v := range pays.rows {
		if !math.IsInf(v, 0) && v == v {
			sum += v / unit
			count++
		}
	}
	mean, sst := sum/float64(max(count, 1)), 0.0
	for _, v := range pays.rows {
		if !math.IsInf(v, 0) && v == v {
			sst += (v/unit - mean) * (v/unit - mean)
		}
	}
	return spread{sst, unit}
}

// identSkipMargin is how far (as a factor on the relative residual) a
// subset's fit must be beyond the tolerance before the whole grid's fit
// is skipped: the least-squares sums carry rounding, and a near miss is
// worth the full fit.
const identSkipMargin = 10

// cannotFit reports whether sub, a fit on a subset of the grid reports,
// proves that no shift and scale fit the rule on the whole grid: its
// infinities already differ (they would on the whole grid too), or its
// least sum of squared misfits, which no fit on more points can go below,
// is above identSkipMargin × the tolerance of the grid's whole spread
// (an upper bound on the spread the full fit is judged against).
func (f *fitter) cannotFit(sub lsq) bool {
	if sub.points < 3 || sub.constant || sub.scale != sub.scale || sub.sse != sub.sse {
		return false
	}
	if sub.mismatch > 0 {
		return true
	}
	r := f.spread.unit / sub.unit
	bound := identSkipMargin * identSkipMargin * DefaultIdentifyTolerance * DefaultIdentifyTolerance * f.spread.sst * r * r
	return !math.IsInf(bound, 0) && bound == bound && sub.sse > bound
}

// fit fits pay ≈ shift + scale × (-L) by least squares over every step-th
// grid report and every outcome where both are finite.
func (f *fitter) fit(r *bregman.Rule, step int) lsq {
	n, G := f.g.N, f.g.Len()
	sc := r.NewScorer()
	x, y := f.x[:0], f.y[:0]
	var l lsq
	for j := 0; j < G; j += step {
		sc.Efforts(f.eff, f.g.Point(j))
		for k := 0; k < n; k++ {
			sx, py := -f.eff[k], f.pays.rows[j*n+k]
			fx, fy := !math.IsInf(sx, 0) && sx == sx, !math.IsInf(py, 0) && py == py
			switch {
			case fx && fy:
				x, y = append(x, sx), append(y, py)
			case fx != fy, sx != sx, py != py, math.Signbit(sx) != math.Signbit(py):
				l.mismatch++
			}
		}
	}
	f.x, f.y = x, y
	l.points = len(x)
	if len(x) < 3 {
		l.residual = math.Inf(1)
		return l
	}
	// Fit in units of the largest |payment|: the sums of squares of a
	// payout counted in 1e300 would overflow to Inf and fail the fit.
	unit := 0.0
	for _, v := range y {
		unit = math.Max(unit, math.Abs(v))
	}
	if unit == 0 {
		unit = 1
	}
	for i := range y {
		y[i] /= unit
	}
	shift, scale := stat.LinearRegression(x, y, nil, false)
	var sse, sst float64
	my := stat.Mean(y, nil)
	for i := range x {
		r := y[i] - shift - scale*x[i]
		sse += r * r
		sst += (y[i] - my) * (y[i] - my)
	}
	l.shift, l.scale, l.sse, l.unit = shift*unit, scale*unit, sse, unit
	if sst == 0 {
		l.residual, l.constant = math.Inf(1), true
	} else {
		l.residual = math.Sqrt(sse / sst)
	}
	return l
}

// fitParam finds the value of c's parameter whose member fits the payout
// best (by badness) on the search's subset of grid reports. The values are
// placed by u in [0, 1] (paramScale). On the coarse sub-lattice it scans
// identScan values of u and c.Value, then runs Nelder–Mead (gonum
// optimize, through minimise) in u from the best; on the whole subset it
// polishes that value with a few more Nelder–Mead evaluations (minimise
// keeps the best point it evaluated, so the polish never loses ground on
// the subset). A derivative method is not open: the residual's derivative
// in the parameter needs the rule's, which the engine does not compute,
// and the engine takes no finite differences. A stage's result is kept
// only when the optimiser's status is a convergence or budget status;
// otherwise the value it started from stands and the status says so.
func (f *fitter) fitParam(ctx context.Context, c Candidate, pr *pool.Meter) (v float64, status string, err error) {
	G := f.g.Len()
	step, coarse := searchSteps(G)
	value, start := paramScale(c)
	locate, polish := f.memoCost(ctx, c, value, coarse, pr), f.memoCost(ctx, c, value, step, pr)
	bestU, best := 0.0, math.Inf(1)
	try := func(u float64) {
		if b := locate(u); b < best {
			bestU, best = u, b
		}
	}
	for i := 0; i < identScan; i++ {
		try(float64(i) / (identScan - 1))
	}
	if c.Value > c.Lo && c.Value < c.Hi {
		try(start)
	}
	if err := ctx.Err(); err != nil {
		return 0, "", err
	}
	cr, pts := (G+coarse-1)/coarse, (G+step-1)/step
	x, _, st, ok := minimise(func(x []float64) float64 { return locate(x[0]) }, []float64{bestU}, identEvals, simplexSize)
	if err := ctx.Err(); err != nil {
		return 0, "", err
	}
	from := x[0]
	words := fmt.Sprintf("the best of %d values tried on %d reports, refined by a local search that %s", identScan, cr, st)
	if !ok {
		from = bestU
		words = fmt.Sprintf("the best of %d values tried on %d reports; a local search to refine it %s, so it was not used", identScan, cr, st)
	}
	y, _, st, ok := minimise(func(x []float64) float64 { return polish(x[0]) }, []float64{from}, identPolish, identPolishSize)
	if err := ctx.Err(); err != nil {
		return 0, "", err
	}
	if !ok {
		return value(from), fmt.Sprintf("%s; a polish on %d reports %s, so it was not used", words, pts, st), nil
	}
	return value(y[0]), fmt.Sprintf("%s, then polished on %d reports by one that %s", words, pts, st), nil
}

// paramScale maps u in [0, 1] to c's parameter, geometrically over
// [Lo, Hi] when Lo > 0 (a power's effect is multiplicative) and evenly
// otherwise, and gives the u of c.Value.
func paramScale(c Candidate) (value func(u float64) float64, start float64) {
	if c.Lo > 0 {
		return func(u float64) float64 { return c.Lo * math.Pow(c.Hi/c.Lo, u) }, math.Log(c.Value/c.Lo) / math.Log(c.Hi/c.Lo)
	}
	return func(u float64) float64 { return c.Lo + (c.Hi-c.Lo)*u }, (c.Value - c.Lo) / (c.Hi - c.Lo)
}

// memoCost is the badness of c's member at u fitted on every step-th grid
// report, +Inf outside [0, 1], once ctx is done, or where no member can
// be built. The scan's best is the local search's start, which evaluates
// it again, and Nelder–Mead revisits points as its simplex shrinks (a
// sixth of its evaluations on the presets): a member's fit depends on u
// alone, so each u is compiled and fitted once per stride.
func (f *fitter) memoCost(ctx context.Context, c Candidate, value func(float64) float64, step int, pr *pool.Meter) func(u float64) float64 {
	pts := int64((f.g.Len() + step - 1) / step)
	memo := make(map[float64]float64, identScan+identEvals)
	return func(u float64) float64 {
		if !(u >= 0 && u <= 1) || ctx.Err() != nil {
			return math.Inf(1)
		}
		if b, ok := memo[u]; ok {
			return b
		}
		pr.Add(pts * gradCost)
		b := math.Inf(1)
		if r, err := c.At(value(u)); err == nil && r != nil && r.Outcomes() == f.g.N {
			b = f.fit(r, step).badness()
		}
		memo[u] = b
		return b
	}
}

// identify fits pay = shift + scale × (-L) for every candidate (and its
// parameter, for a family) by least squares over the grid reports and
// outcomes where both are finite.
//
// The candidates are fitted on w goroutines, each with its own fitter;
// the fits come back in the candidates' order whatever the schedule.
func identify(ctx context.Context, g *simplex.Grid, pays *menu, cands []Candidate, w int, pr *pool.Meter) ([]Identification, error) {
	n := g.N
	w = pool.Workers(w)
	sp := paySpread(pays)
	fitters := make([]*fitter, w)
	for i := range fitters {
		fitters[i] = newFitter(g, pays, sp)
	}
	slots := make([]*Identification, len(cands))
	errs := make([]error, len(cands))
	err := pool.Run(ctx, w, len(cands), 1, func(wk, lo, hi int) {
		for i := lo; i < hi; i++ {
			if c := cands[i]; c.Rule != nil && c.Rule.Outcomes() == n {
				slots[i], errs[i] = fitters[wk].candidate(ctx, c, pr)
			}
		}
	})
	if err != nil {
		return nil, err
	}
	var fits []Identification
	for i, id := range slots {
		if errs[i] != nil {
			return nil, errs[i]
		}
		if id != nil {
			fits = append(fits, *id)
		}
	}
	// Accepted fits keep the candidates' order (several rules coincide up
	// to scale for n = 2, and the caller lists the plainest first); the
	// rejected follow, closest first.
	sort.SliceStable(fits, func(a, b int) bool {
		ea, eb := fits[a].Note == "", fits[b].Note == ""
		if ea || eb {
			return ea && !eb
		}
		return fits[a].Residual < fits[b].Residual
	})
	return fits, nil
}

// candidate fits one candidate: its parameter first, for a family, then
// the rule (or the member found) on every grid report.
func (f *fitter) candidate(ctx context.Context, c Candidate, pr *pool.Meter) (*Identification, error) {
	n, G := f.g.N, f.g.Len()
	id := Identification{Preset: c.Name}
	r := c.Rule
	if c.At != nil && c.Lo < c.Hi {
		v, status, err := f.fitParam(ctx, c, pr)
		if err != nil {
			return nil, err
		}
		id.Param, id.Value, id.Status = c.Param, v, status
		if m, err := c.At(v); err == nil && m != nil && m.Outcomes() == n {
			r = m
		} else {
			// Only when no member could be built: report the rule
			// at its own value.
			id.Value, id.Status = c.Value, status+"; no member could be built, so the rule at its default value was fitted"
		}
	}
	// The subset's fit costs a fiftieth of the whole grid's, and where it
	// proves the rule cannot fit, the whole grid's would only restate it.
	step, _ := searchSteps(G)
	if step > 1 {
		if sub := f.fit(r, step); f.cannotFit(sub) {
			pr.Add(int64(G) * gradCost)
			id = judge(id, sub)
			id.Note += fmt.Sprintf(" (fitted on every %s grid report, %d of %d: enough to show that no scale and shift fit it on the whole grid to within %g)", ordinal(step), (G+step-1)/step, G, identSkipMargin*DefaultIdentifyTolerance)
			return &id, nil
		}
	}
	l := f.fit(r, 1)
	pr.Add(int64(G) * gradCost)
	id = judge(id, l)
	return &id, nil
}

// ordinal is k as an English ordinal: 2nd, 51st, 112th.
func ordinal(k int) string {
	suffix := "th"
	if k%100 < 11 || k%100 > 13 {
		switch k % 10 {
		case 1:
			suffix = "st"
		case 2:
			suffix = "nd"
		case 3:
			suffix = "rd"
		}
	}
	return fmt.Sprintf("%d%s", k, suffix)
}

// judge fills id from the fit l and notes why it is not accepted, if it
// is not: the tolerance rule is the same for a fitted family member as
// for a fixed rule.
func judge(id Identification, l lsq) Identification {
	id.Points, id.Scale, id.Shift, id.Residual = l.points, l.scale, l.shift, l.residual
	switch {
	case l.points < 3:
		id.Note = "too few finite points to fit"
	case l.constant:
		id.Note = "the payout is constant"
	case l.mismatch > 0:
		id.Note = fmt.Sprintf("the two are infinite in different places (%d report–outcome pairs)", l.mismatch)
	case !(l.residual < DefaultIdentifyTolerance):
		id.Note = fmt.Sprintf("relative residual %.3g is above %g", l.residual, DefaultIdentifyTolerance)
	case !(l.scale > 0):
		id.Note = fmt.Sprintf("the fitted scale %.6g is not positive, so the payout rewards the opposite", l.scale)
	}
	return id
}
