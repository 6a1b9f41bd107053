package backtest

import (
	"math"
	"sort"

	"scorewright/contract/backtest/corp"
	"scorewright/contract/backtest/history"
	"scorewright/generator/bregman"
)

// Forecaster is one forecaster's backtest.
type Forecaster struct {
	Name string
	// Count is the number of valid forecasts.
	Count int
	// Money holds one entry per scheme, in the order the schemes were given
	// (Min and Max are NaN: they are kept for all forecasts together).
	Money []Money
	// Rank is the forecaster's rank under each scheme by mean pay per
	// forecast (1 = best; ties share the better rank).
	Rank []int
	// Decomposition of the mean effort into uncertainty, resolution and
	// reliability over Bins, per scheme.
	Decomposition []Decomposition
	// Bins are the forecast groups the binned decomposition used, sorted
	// by forecast; Binning says how they were formed.
	Bins    []Bin
	Binning Binning
	// CORP is the decomposition by isotonic recalibration, per scheme and
	// event: for two outcomes one event (the first outcome) under each
	// scheme's own rule; for more, each outcome against the rest under
	// the squared error of the event (the same for every scheme).
	CORP [][]corp.Decomposition
	// Events are the forecasts of each event grouped by probability, as
	// CORP and the reliability picture use them (one event for two
	// outcomes, n for more).
	Events [][]corp.Group
}

// Result is a whole backtest.
type Result struct {
	// Schemes are the scheme names, in order.
	Schemes []string
	// Outcomes is the number of outcomes.
	Outcomes int
	// Forecasters are detailed, sorted by name: every one when there are
	// at most 4·Show, else the Show best and Show worst under the first
	// scheme. ForecasterCount counts all; EachForecaster visits all.
	Forecasters     []Forecaster
	ForecasterCount int
	// All is every valid forecast together, per scheme.
	All []Money
	// Months is the pay by month of the forecasts' dates, in order, when
	// the history has a date column.
	Months []MonthMoney
	// Rows is the number of valid forecasts; SkippedCount the number of
	// rows skipped, of which the first Skipped are kept.
	Rows, SkippedCount int
	Skipped            []Skipped
	// Grouping says whether the decomposition saw every forecast exactly
	// or grouped on a grid (too many distinct forecasts).
	Grouping string
	// Spans counts valid records whose question ran across lines.
	Spans history.Spans
	t     *Tally
	ranks [][]int32 // per scheme, per forecaster
}

// MonthMoney is the pay of one month's forecasts.
type MonthMoney struct {
	Month history.Month
	Money []Money // per scheme
}

// Skipped is a record left out, with the reason: Line is where it starts
// and EndLine where it ends (past Line when a quoted field ran across
// lines).
type Skipped struct {
	Line, EndLine int
	Why           string
}

// Shown reports whether the Result details every forecaster.
func (r *Result) Shown() bool { return len(r.Forecasters) == r.ForecasterCount }

// Close removes the temporary file the backtest may have kept its
// forecasts in; EachForecaster needs it until then.
func (r *Result) Close() error { return r.t.Close() }

// EachForecaster calls fn with every forecaster in name order, detailed
// as in Forecasters but without Bins and Events, which it does not keep;
// fn must not retain f. It stops at the first error fn returns.
//
// The decompositions are computed in one pass over the forecasts, in the
// order forecasters first appeared, and kept (in memory, or in a
// temporary file when there are many) until they are visited by name.
func (r *Result) EachForecaster(fn func(f *Forecaster) error) error {
	t := r.t
	order := t.names.sorted()
	pos := make([]int32, len(order))
	for p, f := range order {
		pos[f] = int32(p)
	}
	width := finalWidth(len(t.schemes), t.events())
	fin, err := newFinals(len(order), width, t.opt.finalsLimit, t.opt.SpillDir)
	if err != nil {
		return err
	}
	defer fin.close()
	vals := make([]float64, width)
	err = t.scan(true, true, func(f int, m *moneyRec, own ownEntries) error {
		fr := t.forecasterResult(f, m, own, r.ranks, false)
		encodeFinal(vals, &fr)
		return fin.put(int(pos[f]), vals)
	})
	if err != nil {
		return err
	}
	pos = nil
	for p, f := range order {
		if err := fin.get(p, vals); err != nil {
			return err
		}
		fr := Forecaster{Name: t.names.name(int(f)), Binning: t.binning()}
		decodeFinal(&fr, vals, len(t.schemes), t.events())
		for s := range t.schemes {
			fr.Rank = append(fr.Rank, int(r.ranks[s][f]))
		}
		if err := fn(&fr); err != nil {
			return err
		}
	}
	return nil
}

// Result summarises the forecasts added so far. The error is a failure to
// keep or read back the forecasts (see Err).
func (t *Tally) Result() (*Result, error) {
	if err := t.Err(); err != nil {
		return nil, err
	}
	r := &Result{Outcomes: t.n, ForecasterCount: t.names.len(), Grouping: t.store.Grouping(), t: t}
	for _, s := range t.schemes {
		r.Schemes = append(r.Schemes, s.Name)
	}
	for i := range t.all {
		r.All = append(r.All, t.all[i].money())
	}
	if len(r.All) > 0 {
		r.Rows = r.All[0].Count
	}
	for m, mt := range t.months {
		mm := MonthMoney{Month: m}
		for i := range mt {
			mm.Money = append(mm.Money, mt[i].money())
		}
		r.Months = append(r.Months, mm)
	}
	sort.Slice(r.Months, func(i, j int) bool { return r.Months[i].Month < r.Months[j].Month })
	means, picked, err := t.means()
	if err != nil {
		return nil, err
	}
	r.ranks = make([][]int32, len(t.schemes))
	for s := range t.schemes {
		r.ranks[s] = rank(means[s])
		means[s] = nil
	}
	// The detailed forecasters, in name order, from their forecasts: the
	// money of each was kept by means, so this pass reads no money.
	var shown []int32
	for _, i := range t.names.sorted() {
		if _, ok := picked[i]; ok {
			shown = append(shown, i)
		}
	}
	at := make(map[int32]int, len(shown))
	for k, i := range shown {
		at[i] = k
	}
	r.Forecasters = make([]Forecaster, len(shown))
	err = t.scan(false, true, func(f int, _ *moneyRec, own ownEntries) error {
		if k, ok := at[int32(f)]; ok {
			m := picked[int32(f)]
			r.Forecasters[k] = t.forecasterResult(f, &m, own, r.ranks, true)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	return r, nil
}

// means returns every forecaster's mean pay under each scheme, and the
// money of the forecasters a Result details: all of them when there are
// at most 4·Show, else the Show best and the Show worst by mean pay under
// the first scheme (ties broken by first appearance, NaN last, as the
// ranks order them), kept by bounded heaps as the pass goes.
func (t *Tally) means() ([][]float64, map[int32]moneyRec, error) {
	out := make([][]float64, len(t.schemes))
	for s := range out {
		out[s] = make([]float64, t.names.len())
	}
	all := t.names.len() <= 4*t.opt.Show
	m0 := out[0]
	better := func(a, b int32) bool {
		x, y := m0[a], m0[b]
		switch {
		case math.IsNaN(x) || math.IsNaN(y):
			return !math.IsNaN(x) && math.IsNaN(y) || math.IsNaN(x) == math.IsNaN(y) && a < b
		case x != y:
			return x > y
		}
		return a < b
	}
	best := newBounded(t.opt.Show, better)
	worst := newBounded(t.opt.Show, func(a, b int32) bool { return better(b, a) })
	picked := map[int32]moneyRec{}
	keep := func(f int32, m *moneyRec) {
		picked[f] = moneyRec{count: m.count, s: append([]schemeMoney(nil), m.s...)}
	}
	err := t.scan(true, false, func(f int, m *moneyRec, _ ownEntries) error {
		for s := range out {
			out[s][f] = m.s[s].pay.Value() / float64(m.count)
		}
		if all {
			keep(int32(f), m)
			return nil
		}
		for _, b := range []*bounded{best, worst} {
			if kept, gone := b.offer(int32(f)); kept {
				keep(int32(f), m)
				if gone >= 0 && !best.holds(gone) && !worst.holds(gone) {
					delete(picked, gone)
				}
			}
		}
		return nil
	})
	return out, picked, err
}

// rank ranks forecasters by their mean pay, best first; ties share the
// better rank and NaN ranks last.
func rank(mean []float64) []int32 {
	order := make([]int32, len(mean))
	for i := range order {
		order[i] = int32(i)
	}
	better := func(a, b float64) bool {
		if math.IsNaN(b) {
			return !math.IsNaN(a)
		}
		return a > b
	}
	sort.SliceStable(order, func(a, b int) bool { return better(mean[order[a]], mean[order[b]]) })
	ranks := make([]int32, len(mean))
	for pos, j := range order {
		rank := int32(pos + 1)
		if pos > 0 {
			if prev := order[pos-1]; !better(mean[prev], mean[j]) {
				rank = ranks[prev]
			}
		}
		ranks[j] = rank
	}
	return ranks
}

// binning is how the binned decomposition forms its bins.
func (t *Tally) binning() Binning {
	if t.opt.Distinct {
		return Binning{}
	}
	return Binning{Grid: t.opt.Grid}
}

// forecasterResult details forecaster i from its money and its forecasts;
// keep says whether to keep the bins and event groups in the result.
func (t *Tally) forecasterResult(i int, m *moneyRec, own ownEntries, ranks [][]int32, keep bool) Forecaster {
	f := Forecaster{Name: t.names.name(i), Count: m.count, Binning: t.binning()}
	g := groupings{t: t, own: own, grid: f.Binning.Grid}
	for s := range t.schemes {
		f.Money = append(f.Money, m.s[s].money(m.count))
		f.Rank = append(f.Rank, int(ranks[s][i]))
		// The decompositions split the efforts that were paid: each
		// forecast as the scheme records and adjusts it.
		paid := t.paidReport(s)
		d := Decompose(t.scorers[s], g.bins(paid))
		d.MeanEffort = f.Money[s].MeanEffort
		d.WithinBin = d.MeanEffort - d.Identity()
		f.Decomposition = append(f.Decomposition, d)
		f.CORP = append(f.CORP, t.corpOf(s, g.events(paid)))
	}
	if keep {
		// Bins and events are kept as the first scheme pays them.
		f.Bins, f.Events = g.bins(t.paidReport(0)), g.events(t.paidReport(0))
	}
	return f
}

// groupings makes one forecaster's bins and event groups, once for all
// the schemes that pay forecasts as written (paid nil): they group the
// same forecasts the same way, and neither decomposition changes them.
type groupings struct {
	t          *Tally
	own        ownEntries
	grid       int
	bins0      []Bin
	events0    [][]corp.Group
	done0, ev0 bool
}

func (g *groupings) bins(paid func([]float64) []float64) []Bin {
	if paid != nil {
		return g.t.bins(g.own, g.grid, paid)
	}
	if !g.done0 {
		g.bins0, g.done0 = g.t.bins(g.own, g.grid, nil), true
	}
	return g.bins0
}

func (g *groupings) events(paid func([]float64) []float64) [][]corp.Group {
	if paid != nil {
		return g.t.eventGroups(g.own, paid)
	}
	if !g.ev0 {
		g.events0, g.ev0 = g.t.eventGroups(g.own, nil), true
	}
	return g.events0
}

// ownEntries are one forecaster's distinct forecast ids with n outcome
// counts each.
type ownEntries struct {
	ids  []int32
	hits []uint32
}

// paidReport returns the report scheme s pays for a forecast (Record, then
// Adjust), or nil when the scheme pays forecasts as written.
func (t *Tally) paidReport(s int) func(p []float64) []float64 {
	sc := &t.schemes[s]
	if sc.Record == nil && sc.Adjust == nil {
		return nil
	}
	return func(p []float64) []float64 {
		if sc.Record != nil {
			p = sc.Record(t.rec, p)
		}
		if sc.Adjust != nil {
			p = sc.Adjust(t.adj, p)
		}
		return p
	}
}

// entries visits a forecaster's forecasts as paid (as written when paid
// is nil).
func (t *Tally) entries(own ownEntries, paid func(p []float64) []float64, fn func(p []float64, hits []uint32)) {
	for e, id := range own.ids {
		p := t.store.vector(int(id))
		if paid != nil {
			p = paid(p)
		}
		fn(p, own.hits[e*t.n:(e+1)*t.n])
	}
}

// events is how many events the CORP decomposition splits: one for two
// outcomes, every outcome for more.
func (t *Tally) events() int {
	if t.n == 2 {
		return 1
	}
	return t.n
}

// eventGroups groups a forecaster's forecasts (as paid) of each event by probability:
// the first outcome for two outcomes, every outcome for more.
func (t *Tally) eventGroups(own ownEntries, paid func([]float64) []float64) [][]corp.Group {
	ne := t.events()
	// The groups are gathered in buffers the Tally keeps from one
	// forecaster to the next (corp.Sorted copies them out).
	if len(t.groupBuf) < ne {
		t.groupBuf = make([][]corp.Group, ne)
	}
	raw := t.groupBuf[:ne]
	for k := range raw {
		raw[k] = raw[k][:0]
	}
	t.entries(own, paid, func(p []float64, hits []uint32) {
		var c int
		for _, h := range hits {
			c += int(h)
		}
		for k := range ne {
			raw[k] = append(raw[k], corp.Group{X: math.Min(1, math.Max(0, p[k])), Count: c, Hits: int(hits[k])})
		}
	})
	out := make([][]corp.Group, ne)
	for k := range raw {
		// Sorted merges equal probabilities; every group is valid by
		// construction, so it cannot fail.
		out[k], _ = corp.Sorted(raw[k])
	}
	return out
}

// corpOf is the CORP decomposition of every event under scheme s: its own
// rule for two outcomes, the squared error of each event for more.
func (t *Tally) corpOf(s int, events [][]corp.Group) []corp.Decomposition {
	out := make([]corp.Decomposition, len(events))
	for k, g := range events {
		loss := corp.SquaredError
		if t.n == 2 {
			loss = binaryLoss(t.scorers[s])
		}
		out[k] = corp.Decompose(g, loss)
	}
	return out
}

// binaryLoss is a two-outcome rule's effort as a loss of the first
// outcome's probability x: L((x, 1−x), first) if it happens, else
// L((x, 1−x), second).
func binaryLoss(sc *bregman.Scorer) corp.Loss {
	p, e := make([]float64, 2), make([]float64, 2)
	return func(x float64) (float64, float64) {
		p[0], p[1] = x, 1-x
		sc.Efforts(e, p)
		return e[0], e[1]
	}
}

// bins groups a forecaster's forecasts (as paid) into cells of width 1/grid in the
// first n−1 probabilities (grid 0: by distinct forecast), sorted by mean
// forecast.
func (t *Tally) bins(own ownEntries, grid int, paid func([]float64) []float64) []Bin {
	n := t.n
	table := newKeyTable(n)
	key := make([]float64, n)
	var count []int
	var sumP, hitsK []float64
	t.entries(own, paid, func(p []float64, hits []uint32) {
		copy(key, p)
		if grid > 0 {
			for k, x := range p[:n-1] {
				key[k] = math.Min(float64(grid-1), math.Floor(x*float64(grid)))
			}
			key[n-1] = 0
		}
		j, made := table.find(key, true)
		if made {
			count = append(count, 0)
			sumP = append(sumP, make([]float64, n)...)
			hitsK = append(hitsK, make([]float64, n)...)
		}
		var c int
		for k, h := range hits {
			c += int(h)
			hitsK[j*n+k] += float64(h)
		}
		count[j] += c
		for k, x := range p {
			sumP[j*n+k] += float64(c) * x
		}
	})
	out := make([]Bin, len(count))
	for j, c := range count {
		f, o := make([]float64, n), make([]float64, n)
		for k := range f {
			f[k] = sumP[j*n+k] / float64(c)
			o[k] = hitsK[j*n+k] / float64(c)
		}
		out[j] = Bin{Count: c, Forecast: f, Observed: o}
	}
	sortBins(out)
	return out
}

func sortBins(out []Bin) {
	sort.Slice(out, func(i, j int) bool {
		a, c := out[i].Forecast, out[j].Forecast
		for k := range a {
			if a[k] != c[k] {
				return a[k] < c[k]
			}
		}
		return false
	})
}
