package backtest

import (
	"fmt"
	"math"
	"scorewright/internal/num"

	"scorewright/contract/backtest/corp"
	"scorewright/contract/backtest/history"
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

type moneyTally struct {
	pay, effort                                   num.Sum
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
	m.pay.Add(p.Pay)
	m.effort.Add(p.Effort)
	if !p.OnMenu {
		m.off++
	}
	switch {
	case p.Pay-p.Pay != 0: // ±Inf or NaN (finite x - x is exactly 0)
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
	out := Money{Count: m.count, Total: m.pay.Value(), OffMenu: m.off, BelowLow: m.low, AboveHigh: m.high,
		NonFinite: m.nonFinite, FirstNonFinite: m.firstNonFin, Min: m.min, Max: m.max}
	if m.count > 0 {
		out.Mean = out.Total / float64(m.count)
		out.MeanEffort = m.effort.Value() / float64(m.count)
	} else {
		out.Mean, out.MeanEffort, out.Min, out.Max = math.NaN(), math.NaN(), math.NaN(), math.NaN()
	}
	return out
}

// Tally accumulates a backtest one forecast at a time, in memory that
// grows with the number of forecasters (a fixed summary each) and with
// their distinct forecasts (up to a bound), never with the number of
// rows. It is used by one goroutine.
type Tally struct {
	schemes  []Scheme
	scorers  []*bregman.Scorer
	n        int
	opt      TallyOptions
	eff      []float64
	paid     []Paid
	names    nameIndex
	money    *moneyTable
	spill    *spillFile
	err      error // the first failure to spill; nothing is counted after it
	last     int
	all      []moneyTally
	months   map[history.Month][]moneyTally
	store    *outcomeStore
	cache    []Paid         // schemes × n per cached forecast, by forecast id
	one      []Paid         // scratch: one scheme, every outcome
	adj      []float64      // scratch: adjusted report
	rec      []float64      // scratch: recorded report
	groupBuf [][]corp.Group // scratch: a forecaster's event groups before sorting
}

// TallyOptions tune the decomposition. The zero value means the defaults.
type TallyOptions struct {
	// Grid sets the bins of the rule's own decomposition: cells of width
	// 1/Grid in each probability; 0 means DefaultGrid. Distinct bins by
	// distinct forecast instead (exact, but on continuous forecasts every
	// bin holds one case, which says nothing).
	Grid     int
	Distinct bool
	// MaxDistinct bounds the distinct forecasts kept exactly; 0 means
	// DefaultMaxDistinct.
	MaxDistinct int
	// Show is how many forecasters at each end of the ranking the Result
	// details when there are more than 4·Show; 0 means DefaultShow.
	Show int
	// MaxPairs bounds the (forecaster, forecast) entries kept in memory,
	// and MaxMoney the forecasters whose money is; past them they go to a
	// temporary file in SpillDir (empty: the system's). 0 means
	// DefaultMaxPairs and DefaultMaxMoney.
	MaxPairs, MaxMoney int
	SpillDir           string
	// finalsLimit is the most bytes of decomposition figures EachForecaster
	// keeps in memory (0: finalsInMemory); tests lower it.
	finalsLimit int
}

// DefaultGrid gives bins a tenth wide in each probability.
const DefaultGrid = 10

// DefaultShow is how many top and bottom forecasters a Result details.
const DefaultShow = 10

// NewTally starts a backtest of schemes, which must share the number of
// outcomes.
func NewTally(schemes []Scheme, opt TallyOptions) (*Tally, error) {
	if len(schemes) == 0 {
		return nil, fmt.Errorf("backtest: no schemes")
	}
	n := schemes[0].Rule.Outcomes()
	if opt.Grid <= 0 {
		opt.Grid = DefaultGrid
	}
	if opt.Show <= 0 {
		opt.Show = DefaultShow
	}
	t := &Tally{schemes: schemes, n: n, opt: opt, names: newNameIndex(), last: -1, months: map[history.Month][]moneyTally{},
		money: newMoneyTable(len(schemes), opt.MaxMoney), spill: &spillFile{dir: opt.SpillDir}}
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
	t.store = newOutcomeStore(n, opt.MaxDistinct, opt.MaxPairs, t.spill)
	t.eff = make([]float64, n)
	t.adj = make([]float64, n)
	t.rec = make([]float64, n)
	t.one = make([]Paid, n)
	t.paid = make([]Paid, len(schemes))
	t.all = make([]moneyTally, len(schemes))
	return t, nil
}

// cacheEntries bounds the forecasts whose payments are remembered: more
// than any report menu a contract would print, small enough to stay in
// memory (about 2.5 MB for three outcomes and two rules). A history
// written on a report menu repeats a few hundred forecasts millions of
// times; with the cache each generator is evaluated once per distinct
// forecast instead of once per row. Payers and menus must therefore be
// pure functions, as a payment table is.
const cacheEntries = 1 << 14

// Add scores one forecast p (summing to 1) by forecaster with outcome y
// (0-based) on the given line, and returns what it earns under each
// scheme. The returned slice is reused by the next call.
func (t *Tally) Add(forecaster string, line, y int, p []float64) []Paid {
	return t.AddDated(forecaster, line, y, p, 0)
}

// AddDated is Add for a forecast of a known month (0: none), so that the
// Result totals pay by month.
func (t *Tally) AddDated(forecaster string, line, y int, p []float64, month history.Month) []Paid {
	if len(p) != t.n || y < 0 || y >= t.n {
		panic(fmt.Sprintf("backtest: forecast of %d entries, outcome %d, for %d outcomes", len(p), y, t.n))
	}
	f := t.forecaster(forecaster)
	if t.err != nil {
		return t.zeroPaid()
	}
	fm, err := t.money.entry(f, t.spill)
	if err != nil {
		t.err = err
		return t.zeroPaid()
	}
	id, made := t.store.lookup(f, p)
	cached := t.store.quantum == 0 && id < cacheEntries
	width := len(t.schemes) * t.n
	if cached && made {
		for s := range t.schemes {
			t.cache = append(t.cache, make([]Paid, t.n)...)
			t.scoreAll(s, p, t.cache[len(t.cache)-t.n:])
		}
	}
	var mt []moneyTally
	if month != 0 {
		if mt = t.months[month]; mt == nil {
			mt = make([]moneyTally, len(t.schemes))
			t.months[month] = mt
		}
	}
	for i := range t.schemes {
		s := &t.schemes[i]
		var pd Paid
		if cached {
			pd = t.cache[id*width+i*t.n+y]
		} else {
			t.scoreAll(i, p, t.one)
			pd = t.one[y]
		}
		t.paid[i] = pd
		fm[i].add(pd, line, s)
		t.all[i].add(pd, line, s)
		if mt != nil {
			mt[i].add(pd, line, s)
		}
	}
	if err := t.store.add(f, id, y); err != nil {
		t.err = err
	}
	return t.paid
}

// zeroPaid is what a tally that failed returns for every forecast.
func (t *Tally) zeroPaid() []Paid {
	clear(t.paid)
	return t.paid
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

// forecaster finds (or makes) a forecaster's index; consecutive rows by
// the same forecaster, the usual layout, skip the lookup.
func (t *Tally) forecaster(name string) int {
	if t.last >= 0 && string(t.names.bytes(t.last)) == name {
		return t.last
	}
	i, _ := t.names.find(name)
	t.last = i
	return i
}

// Err reports a failure to keep the forecasts (the temporary file they
// overflow into could not be written); the tally then counts money but
// no longer the decompositions.
func (t *Tally) Err() error { return t.err }

// Close removes the temporary file the tally may have made. The Result
// needs it until then.
func (t *Tally) Close() error { return t.spill.close() }
