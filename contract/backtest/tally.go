package backtest

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"scorewright/generator/bregman"
)

// Payer turns a rule's effort into the money a forecast earns. A fitted
// budget (A - B·effort, rounded to currency units) is one; Affine is the
// unrounded formula.
type Payer interface {
	Pay(effort float64) float64
}

// Affine pays A - B·effort, unrounded. B must be positive for the payment
// to keep the rule proper.
type Affine struct{ A, B float64 }

// Pay returns A - B·effort.
func (a Affine) Pay(effort float64) float64 { return a.A - a.B*effort }

// Scheme is one rule with the way it is paid.
type Scheme struct {
	// Name labels the scheme in reports.
	Name string
	// Rule gives the effort L(p, y) of each forecast.
	Rule *bregman.Rule
	// Pay turns effort into money.
	Pay Payer
	// OnMenu reports whether a forecast is one of the reports the
	// contract's menu allows; nil means every forecast is. Forecasts off
	// the menu are still paid by Pay (the formula), and counted.
	OnMenu func(p []float64) bool
	// Low and High are the payments the budget promises to stay within;
	// payments outside are counted. Use -Inf and +Inf for no bound.
	Low, High float64
	// Adjust, if set, writes into dst the report the contract pays for
	// forecast p (a clamp away from zero, say) and returns dst; the pay is
	// A - B·L at that report. nil pays the forecast as written.
	Adjust func(dst, p []float64) []float64
	// Record, if set, writes into dst the report the contract records for
	// forecast p — a report floor raises entries below it, as the menu's
	// items are raised — and returns dst. The menu test, the pay, the
	// effort and the decomposition use the recorded report.
	Record func(dst, p []float64) []float64
}

// Paid is what one forecast earns under one scheme.
type Paid struct {
	// Effort is L(p, y) at the report the contract pays for the forecast
	// (recorded and adjusted; the forecast as written when the scheme
	// changes nothing), so Pay = A - B·Effort; the decomposition splits its
	// mean.
	Effort float64
	// Pay is the payment, at the report Scheme.Adjust makes of p.
	Pay    float64
	OnMenu bool
}

// Money is what a set of forecasts earns under one scheme.
type Money struct {
	// Count is the number of forecasts.
	Count int
	// Total and Mean are the payment summed and averaged; Total is
	// summed with compensation, so rounding to currency units adds up
	// exactly for any file length that matters.
	Total, Mean float64
	// MeanEffort is the mean effort L(p, y).
	MeanEffort float64
	// Min and Max are the smallest and largest payment (NaN with no
	// forecasts).
	Min, Max float64
	// OffMenu counts forecasts that are not on the report menu (paid by the
	// formula).
	OffMenu int
	// BelowLow and AboveHigh count payments outside the budget's bounds.
	BelowLow, AboveHigh int
	// NonFinite counts payments that are ±Inf or NaN (e.g. a log rule and a
	// forecast that gave the outcome probability 0); FirstNonFinite is the
	// line of the first.
	NonFinite, FirstNonFinite int
}

// Forecaster is one forecaster's backtest.
type Forecaster struct {
	Name string
	// Count is the number of valid forecasts.
	Count int
	// Money holds one entry per scheme, in the order the schemes were given.
	Money []Money
	// Rank is the forecaster's rank under each scheme by mean pay per
	// forecast (1 = best; ties share the better rank).
	Rank []int
	// Decomposition of the mean effort, per scheme.
	Decomposition []Decomposition
	// Bins are the forecast groups the decomposition used, sorted by
	// forecast; Binning says how they were formed.
	Bins    []Bin
	Binning Binning
}

// Result is a whole backtest.
type Result struct {
	// Schemes are the scheme names, in order.
	Schemes []string
	// Forecasters, sorted by name.
	Forecasters []Forecaster
	// All is every valid forecast together, per scheme.
	All []Money
	// Rows is the number of valid forecasts; SkippedCount the number of
	// rows skipped, of which the first Skipped are kept.
	Rows, SkippedCount int
	Skipped            []Skipped
}

// Skipped is a record left out, with the reason: Line is where it starts
// and EndLine where it ends (past Line when a quoted field ran across
// lines).
type Skipped struct {
	Line, EndLine int
	Why           string
}

// sum is a compensated (Neumaier) running sum; Inf and NaN pass through.
type sum struct{ s, c float64 }

func (a *sum) add(x float64) {
	t := a.s + x
	if math.IsInf(t, 0) || math.IsNaN(t) {
		a.s = t
		return
	}
	if math.Abs(a.s) >= math.Abs(x) {
		a.c += (a.s - t) + x
	} else {
		a.c += (x - t) + a.s
	}
	a.s = t
}

func (a sum) value() float64 {
	if math.IsInf(a.s, 0) || math.IsNaN(a.s) {
		return a.s
	}
	return a.s + a.c
}

type moneyTally struct {
	pay, effort                                   sum
	min, max                                      float64
	count, off, low, high, nonFinite, firstNonFin int
}

func (m *moneyTally) add(p Paid, line int, s *Scheme) {
	if m.count == 0 || p.Pay < m.min {
		m.min = p.Pay
	}
	if m.count == 0 || p.Pay > m.max {
		m.max = p.Pay
	}
	m.count++
	m.pay.add(p.Pay)
	m.effort.add(p.Effort)
	if !p.OnMenu {
		m.off++
	}
	switch {
	case math.IsNaN(p.Pay) || math.IsInf(p.Pay, 0):
		m.nonFinite++
		if m.firstNonFin == 0 {
			m.firstNonFin = line
		}
		if p.Pay < s.Low {
			m.low++
		}
		if p.Pay > s.High {
			m.high++
		}
	case p.Pay < s.Low:
		m.low++
	case p.Pay > s.High:
		m.high++
	}
}

func (m *moneyTally) money() Money {
	out := Money{Count: m.count, Total: m.pay.value(), OffMenu: m.off, BelowLow: m.low, AboveHigh: m.high,
		NonFinite: m.nonFinite, FirstNonFinite: m.firstNonFin, Min: m.min, Max: m.max}
	if m.count > 0 {
		out.Mean = out.Total / float64(m.count)
		out.MeanEffort = m.effort.value() / float64(m.count)
	} else {
		out.Mean, out.MeanEffort, out.Min, out.Max = math.NaN(), math.NaN(), math.NaN(), math.NaN()
	}
	return out
}

type forecasterTally struct {
	name  string
	money []moneyTally
	bins  *binSet
}

// Tally accumulates a backtest one forecast at a time, in memory that
// grows with the number of forecasters (and their distinct forecasts, up
// to a bound), never with the number of rows. It is used by one goroutine.
type Tally struct {
	schemes []Scheme
	scorers []*bregman.Scorer
	n       int
	maxBins int
	grid    int
	eff     []float64
	paid    []Paid
	index   map[string]int
	fc      []*forecasterTally
	last    int
	all     []moneyTally
	cache   forecastCache
	one     []Paid    // scratch: one scheme, every outcome
	adj     []float64 // scratch: adjusted report
	rec     []float64 // scratch: recorded report
}

// Default binning bounds for the decomposition.
const (
	// DefaultMaxBins is how many distinct forecasts (or grid cells) a
	// forecaster's bins may hold before they are coarsened; it also bounds
	// the cells of the coarsest grid for 12 outcomes (2^12).
	DefaultMaxBins = 4096
)

// TallyOptions tune the decomposition's binning. The zero value means
// the defaults.
type TallyOptions struct {
	// MaxBins bounds the bins per forecaster; 0 means DefaultMaxBins.
	MaxBins int
	// Grid is the first grid once distinct forecasts are too many; 0 means
	// 20 for two outcomes and 10 for more.
	Grid int
}

// NewTally starts a backtest of schemes, which must share the number of
// outcomes.
func NewTally(schemes []Scheme, opt TallyOptions) (*Tally, error) {
	if len(schemes) == 0 {
		return nil, fmt.Errorf("backtest: no schemes")
	}
	n := schemes[0].Rule.Outcomes()
	t := &Tally{schemes: schemes, n: n, maxBins: opt.MaxBins, grid: opt.Grid, index: map[string]int{}, last: -1}
	if t.maxBins <= 0 {
		t.maxBins = DefaultMaxBins
	}
	if t.grid <= 0 {
		t.grid = 10
		if n == 2 {
			t.grid = 20
		}
	}
	for i := range schemes {
		s := &schemes[i]
		if s.Rule.Outcomes() != n {
			return nil, fmt.Errorf("backtest: scheme %q has %d outcomes, scheme %q has %d", s.Name, s.Rule.Outcomes(), schemes[0].Name, n)
		}
		if s.Pay == nil {
			return nil, fmt.Errorf("backtest: scheme %q has no payer", s.Name)
		}
		t.scorers = append(t.scorers, s.Rule.NewScorer())
	}
	t.eff = make([]float64, n)
	t.adj = make([]float64, n)
	t.rec = make([]float64, n)
	t.one = make([]Paid, n)
	t.paid = make([]Paid, len(schemes))
	t.all = make([]moneyTally, len(schemes))
	return t, nil
}

// Add scores one forecast p (summing to 1) by forecaster with outcome y
// (0-based) on the given line, and returns what it earns under each
// scheme. The returned slice is reused by the next call.
func (t *Tally) Add(forecaster string, line, y int, p []float64) []Paid {
	if len(p) != t.n || y < 0 || y >= t.n {
		panic(fmt.Sprintf("backtest: forecast of %d entries, outcome %d, for %d outcomes", len(p), y, t.n))
	}
	f := t.forecaster(forecaster)
	c := t.cache.get(t, p)
	for i := range t.schemes {
		s := &t.schemes[i]
		var pd Paid
		if c != nil {
			pd = c[i*t.n+y]
		} else {
			t.scoreAll(i, p, t.one)
			pd = t.one[y]
		}
		t.paid[i] = pd
		f.money[i].add(pd, line, s)
		t.all[i].add(pd, line, s)
	}
	f.bins.add(p, y)
	return t.paid
}

// cacheEntries bounds the forecast cache: more than any report menu a
// contract would print, small enough to stay in memory (about 2.5 MB for
// three outcomes and two rules).
const cacheEntries = 1 << 14

// forecastCache remembers what each distinct forecast earns for every
// outcome under every scheme. A history written on a report menu repeats a
// few hundred forecasts millions of times; with the cache each generator
// is evaluated once per distinct forecast instead of once per row. Payers
// and menus must therefore be pure functions, as a payment table is.
// Once full, new forecasts are scored directly and not remembered.
type forecastCache struct {
	table keyTable
	paid  []Paid // schemes × n per entry
	key   []float64
}

// get returns the cached payments of p (scheme i, outcome y at i*n+y),
// computing them on first sight; nil when the cache is full.
func (c *forecastCache) get(t *Tally, p []float64) []Paid {
	if c.key == nil {
		c.table = newKeyTable(t.n)
		c.key = make([]float64, t.n)
	}
	for k, x := range p {
		c.key[k] = x + 0
	}
	width := len(t.schemes) * t.n
	i, made := c.table.find(c.key, c.table.len() < cacheEntries)
	if i < 0 {
		return nil
	}
	if made {
		for s := range t.schemes {
			c.paid = append(c.paid, make([]Paid, t.n)...)
			t.scoreAll(s, p, c.paid[len(c.paid)-t.n:])
		}
	}
	return c.paid[i*width : (i+1)*width]
}

// scoreAll writes what forecast p earns under scheme s for every outcome.
func (t *Tally) scoreAll(s int, p []float64, dst []Paid) {
	sc := &t.schemes[s]
	rec := p
	if sc.Record != nil {
		rec = sc.Record(t.rec, p)
	}
	on := sc.OnMenu == nil || sc.OnMenu(rec)
	t.scorers[s].Efforts(t.eff, p)
	for y, l := range t.eff {
		dst[y] = Paid{Effort: l, Pay: sc.Pay.Pay(l), OnMenu: on}
	}
	if sc.Adjust != nil || sc.Record != nil {
		paid := rec
		if sc.Adjust != nil {
			paid = sc.Adjust(t.adj, rec)
		}
		t.scorers[s].Efforts(t.eff, paid)
		for y, l := range t.eff {
			dst[y].Effort, dst[y].Pay = l, sc.Pay.Pay(l)
		}
	}
}

// forecaster finds (or makes) the tally of a forecaster; consecutive rows
// by the same forecaster, the usual layout, skip the map.
func (t *Tally) forecaster(name string) *forecasterTally {
	if t.last >= 0 && t.fc[t.last].name == name {
		return t.fc[t.last]
	}
	i, ok := t.index[name]
	if !ok {
		name = strings.Clone(name) // the caller's string may point into a reused buffer
		i = len(t.fc)
		t.index[name] = i
		t.fc = append(t.fc, &forecasterTally{name: name, money: make([]moneyTally, len(t.schemes)), bins: newBinSet(t.n, t.maxBins, t.grid)})
	}
	t.last = i
	return t.fc[i]
}

// Result summarises the forecasts added so far.
func (t *Tally) Result() *Result {
	r := &Result{}
	for _, s := range t.schemes {
		r.Schemes = append(r.Schemes, s.Name)
	}
	for i := range t.all {
		r.All = append(r.All, t.all[i].money())
	}
	if len(r.All) > 0 {
		r.Rows = r.All[0].Count
	}
	for _, ft := range t.fc {
		f := Forecaster{Name: ft.name, Bins: ft.bins.bins(), Binning: Binning{Grid: ft.bins.grid}}
		for i := range t.schemes {
			m := ft.money[i].money()
			f.Count = m.Count
			f.Money = append(f.Money, m)
			d := Decompose(t.scorers[i], t.paidBins(i, f.Bins))
			d.MeanEffort = m.MeanEffort
			d.WithinBin = m.MeanEffort - d.Identity()
			f.Decomposition = append(f.Decomposition, d)
		}
		r.Forecasters = append(r.Forecasters, f)
	}
	sort.Slice(r.Forecasters, func(i, j int) bool { return r.Forecasters[i].Name < r.Forecasters[j].Name })
	for i := range t.schemes {
		rankBy(r.Forecasters, i)
	}
	return r
}

// paidBins are bins as scheme s pays them: each bin's forecast replaced
// by the report the contract pays for it (Record, then Adjust), bins that
// become equal merged, so that the decomposition splits the mean of the
// efforts that were paid — a forecast of 0 raised to a report floor is
// finite there, as its payment is. Without Record and Adjust the bins are
// returned as they are.
func (t *Tally) paidBins(s int, bins []Bin) []Bin {
	sc := &t.schemes[s]
	if sc.Record == nil && sc.Adjust == nil {
		return bins
	}
	keys := newKeyTable(t.n)
	var out []Bin
	for _, b := range bins {
		p := b.Forecast
		if sc.Record != nil {
			p = sc.Record(t.rec, p)
		}
		if sc.Adjust != nil {
			p = sc.Adjust(t.adj, p)
		}
		i, made := keys.find(p, true)
		if made {
			out = append(out, Bin{Forecast: append([]float64(nil), p...), Observed: make([]float64, t.n)})
		}
		o := &out[i]
		total := o.Count + b.Count
		for k := range o.Observed {
			o.Observed[k] = (o.Observed[k]*float64(o.Count) + b.Observed[k]*float64(b.Count)) / float64(total)
		}
		o.Count = total
	}
	return out
}

// rankBy ranks forecasters by mean pay under scheme i, best first; ties
// share the better rank and NaN ranks last.
func rankBy(fs []Forecaster, i int) {
	order := make([]int, len(fs))
	for j := range order {
		order[j] = j
	}
	better := func(a, b float64) bool {
		if math.IsNaN(b) {
			return !math.IsNaN(a)
		}
		return a > b
	}
	sort.SliceStable(order, func(a, b int) bool { return better(fs[order[a]].Money[i].Mean, fs[order[b]].Money[i].Mean) })
	for pos, j := range order {
		rank := pos + 1
		if pos > 0 {
			prev := order[pos-1]
			if !better(fs[prev].Money[i].Mean, fs[j].Money[i].Mean) {
				rank = fs[prev].Rank[i]
			}
		}
		if fs[j].Rank == nil {
			fs[j].Rank = make([]int, len(fs[j].Money))
		}
		fs[j].Rank[i] = rank
	}
}
