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
	// the payments, over Points finite (report, outcome) pairs.
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
// (every k-th) and the chosen member is then fitted on all of them.
// identScan values spread over the range find the right basin; then
// Nelder–Mead refines within identEvals evaluations.
const (
	identSearchPoints = 400
	identScan         = 33
	identEvals        = 100
)

// identifyCost is the progress budget of identifying against cands on a
// grid of G points, in stream pairs.
func identifyCost(G int, cands []Candidate) int64 {
	cost := int64(G) * gradCost * int64(len(cands))
	step := searchStep(G)
	for _, c := range cands {
		if c.At != nil {
			cost += int64(identScan+identEvals+2) * int64((G+step-1)/step) * gradCost
		}
	}
	return cost
}

func searchStep(G int) int { return (G + identSearchPoints - 1) / identSearchPoints }

// lsq is a least-squares fit pay ≈ shift + scale × (-L).
type lsq struct {
	shift, scale, residual float64
	// points are the (report, outcome) pairs where both are finite;
	// mismatch counts those where they are not finite alike (one finite,
	// a NaN, or infinities of opposite sign).
	points, mismatch int
	constant         bool
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
}

func newFitter(g *simplex.Grid, pays *menu) *fitter {
	m := g.Len() * g.N
	return &fitter{g: g, pays: pays, x: make([]float64, 0, m), y: make([]float64, 0, m), eff: make([]float64, g.N)}
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
	l.shift, l.scale = shift*unit, scale*unit
	if sst == 0 {
		l.residual, l.constant = math.Inf(1), true
	} else {
		l.residual = math.Sqrt(sse / sst)
	}
	return l
}

// fitParam finds the value of c's parameter whose member fits the payout
// best (by badness) on the search's subset of grid reports. The values are
// placed by u in [0, 1], geometrically over [Lo, Hi] when Lo > 0 (a
// power's effect is multiplicative) and evenly otherwise. It scans
// identScan values of u and c.Value, then runs Nelder–Mead (gonum
// optimize, through minimise) in u from the best. A derivative method is
// not open: the residual's derivative in the parameter needs the rule's,
// which the engine does not compute, and the engine takes no finite
// differences. The refined value is kept only when the optimiser's status
// is a convergence or budget status; otherwise the scan's best stands and
// the status says so.
func (f *fitter) fitParam(ctx context.Context, c Candidate, pr *pool.Meter) (v float64, status string, err error) {
	step := searchStep(f.g.Len())
	pts := int64((f.g.Len() + step - 1) / step)
	geometric := c.Lo > 0
	value := func(u float64) float64 {
		if geometric {
			return c.Lo * math.Pow(c.Hi/c.Lo, u)
		}
		return c.Lo + (c.Hi-c.Lo)*u
	}
	// The scan's best is the local search's start, which evaluates it
	// again, and Nelder–Mead revisits points as its simplex shrinks (a
	// sixth of its evaluations on the presets): a member's fit depends on
	// u alone, so each u is compiled and fitted once.
	memo := make(map[float64]float64, identScan+identEvals)
	cost := func(u float64) float64 {
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
	bestU, best := 0.0, math.Inf(1)
	try := func(u float64) {
		if b := cost(u); b < best {
			bestU, best = u, b
		}
	}
	for i := 0; i < identScan; i++ {
		try(float64(i) / (identScan - 1))
	}
	if c.Value > c.Lo && c.Value < c.Hi {
		u := (c.Value - c.Lo) / (c.Hi - c.Lo)
		if geometric {
			u = math.Log(c.Value/c.Lo) / math.Log(c.Hi/c.Lo)
		}
		try(u)
	}
	if err := ctx.Err(); err != nil {
		return 0, "", err
	}
	x, _, status, ok := minimise(func(x []float64) float64 { return cost(x[0]) }, []float64{bestU}, identEvals, simplexSize)
	if err := ctx.Err(); err != nil {
		return 0, "", err
	}
	if !ok {
		return value(bestU), fmt.Sprintf("the best of %d values tried; a local search to refine it %s, so it was not used", identScan, status), nil
	}
	return value(x[0]), fmt.Sprintf("the best of %d values tried, refined by a local search that %s", identScan, status), nil
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
	fitters := make([]*fitter, w)
	for i := range fitters {
		fitters[i] = newFitter(g, pays)
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
	l := f.fit(r, 1)
	pr.Add(int64(G) * gradCost)
	id = judge(id, l)
	return &id, nil
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
