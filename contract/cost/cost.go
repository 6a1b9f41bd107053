// Package cost says what a payment table costs the buyer over a season of
// forecasts: the expected total pay at the buyer's base rate for a
// forecaster who only ever reports the base rate, for a perfect one, and
// the buyer's worst case. Everything is computed exactly on the table's
// (rounded) amounts; nothing is a grid search.
package cost

import (
	"errors"
	"fmt"
	"math"

	"scorewright/contract/table"
	"scorewright/generator/design"
	"scorewright/internal/numfmt"
)

// Season is what the buyer states about the forecasts to come.
type Season struct {
	// Forecasts is the number of forecasts per season (N).
	Forecasts int
	// BaseRate is how often each outcome happens in the buyer's records.
	BaseRate []float64
	// BaseRateFrom says where the base rate came from ("the design's base
	// rate", "uniform: no base rate stated"), for the record.
	BaseRateFrom string
	// Currency labels every amount; "" reads "units".
	Currency string
}

// Cost is the expected pay of a season, per forecast and in total.
type Cost struct {
	Season Season
	// BaseRateRow is the row a forecaster whose belief is the base rate
	// picks (the row with the largest expected pay at the base rate).
	BaseRateRow int
	// Per forecast: BaseRateOnly = Σ_k q_k pay(BaseRateRow, k); Perfect =
	// Σ_k q_k max_i pay(i, k) (a forecaster who knows each outcome picks
	// the row paying most for it); WorstCase = max pay; Least = min pay.
	BaseRateOnly, Perfect, WorstCase, Least float64
	// Decimals is how many decimals amounts are written with.
	Decimals int
}

// Of computes the cost of a money table over outcomes.
func Of(t *table.Table, s Season) (*Cost, error) {
	if t.Kind != table.KindMoney {
		return nil, fmt.Errorf("cost: the table holds %s, not money", t.Kind)
	}
	if t.ReportName != "" {
		return nil, errors.New("cost: a point-forecast table has no base rate over outcomes")
	}
	n := len(t.Labels)
	if len(s.BaseRate) != n {
		return nil, fmt.Errorf("cost: base rate has %d entries for %d outcomes", len(s.BaseRate), n)
	}
	if s.Forecasts < 0 {
		return nil, fmt.Errorf("cost: %d forecasts", s.Forecasts)
	}
	c := &Cost{Season: s, BaseRateRow: -1, BaseRateOnly: math.Inf(-1), WorstCase: math.Inf(-1), Least: math.Inf(1)}
	best := make([]float64, n)
	for k := range best {
		best[k] = math.Inf(-1)
	}
	for i, row := range t.Values {
		e := 0.0
		for k, v := range row {
			e += s.BaseRate[k] * v
			best[k] = math.Max(best[k], v)
			c.WorstCase = math.Max(c.WorstCase, v)
			c.Least = math.Min(c.Least, v)
		}
		// Ties go to the first row, as a forecaster reading down would.
		if e > c.BaseRateOnly {
			c.BaseRateOnly, c.BaseRateRow = e, i
		}
	}
	for k, b := range best {
		c.Perfect += s.BaseRate[k] * b
	}
	c.Decimals = t.Decimals
	if c.Decimals < 0 {
		c.Decimals = 2
	}
	return c, nil
}

// Total is N times a per-forecast amount.
func (c *Cost) Total(per float64) float64 { return float64(c.Season.Forecasts) * per }

// Money writes an amount with the currency label: "EUR 143.25".
func (c *Cost) Money(v float64) string { return Money(c.Season.Currency, v, c.Decimals) }

// Money writes an amount with its currency label, decimals fixed.
func Money(currency string, v float64, decimals int) string {
	if currency == "" {
		currency = "units"
	}
	return numfmt.Fixed(v, decimals) + " " + currency
}

// Line is one row of the cost statement.
type Line struct{ Who, PerForecast, Season string }

// Lines states the cost for a person: who, per forecast, over the season.
func (c *Cost) Lines() []Line {
	season := func(v float64) string {
		if c.Season.Forecasts == 0 {
			return "(forecasts per season not stated)"
		}
		return c.Money(c.Total(v))
	}
	return []Line{
		{"a forecaster who only reports the base rate", c.Money(c.BaseRateOnly), season(c.BaseRateOnly)},
		{"a perfect forecaster (expected at the base rate)", c.Money(c.Perfect), season(c.Perfect)},
		{"the buyer's worst case (every forecast paid the largest amount)", c.Money(c.WorstCase), season(c.WorstCase)},
	}
}

// Sentence is the cost in one sentence, for records and summaries.
// baseRate is the base rate as the caller writes vectors.
func (c *Cost) Sentence(baseRate string) string {
	n := "per forecast"
	if c.Season.Forecasts > 0 {
		n = fmt.Sprintf("over %d forecasts", c.Season.Forecasts)
	}
	pick := func(v float64) string {
		if c.Season.Forecasts > 0 {
			return c.Money(c.Total(v))
		}
		return c.Money(v)
	}
	return fmt.Sprintf("expected cost %s at the base rate %s (%s): %s for a forecaster who only reports the base rate (row %d), %s for a perfect forecaster, %s at worst",
		n, baseRate, c.Season.BaseRateFrom, pick(c.BaseRateOnly), c.BaseRateRow+1, pick(c.Perfect), pick(c.WorstCase))
}

// SeasonOf reads the season a design states: its forecasts per season,
// currency and base rate (the contract's base rate, else the budget's
// reference belief, else uniform), saying which.
func SeasonOf(d *design.Design) Season {
	s := Season{Forecasts: d.Contract.Forecasts, Currency: d.Contract.Currency}
	n := d.N()
	switch {
	case len(d.Contract.BaseRate) == n:
		s.BaseRate, s.BaseRateFrom = append([]float64(nil), d.Contract.BaseRate...), "the buyer's base rate"
	case len(d.Budget.Reference) == n:
		s.BaseRate, s.BaseRateFrom = append([]float64(nil), d.Budget.Reference...), "the budget's reference belief; no base rate stated"
	default:
		s.BaseRate = make([]float64, n)
		for i := range s.BaseRate {
			s.BaseRate[i] = 1 / float64(n)
		}
		s.BaseRateFrom = "uniform; no base rate stated"
	}
	return s
}
