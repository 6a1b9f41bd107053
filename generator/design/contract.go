package design

import (
	"fmt"
	"math"
	"strings"
	"time"
	"unicode/utf8"
)

// Contract is what an annex states besides the mathematics: who pays
// whom, in which currency, over which season. Every field may be left
// empty; an annex prints an empty field as a blank line to fill in by
// hand, so that nothing unset reads as agreed.
type Contract struct {
	// Buyer pays for the forecasts.
	Buyer string `toml:"buyer,omitempty"`
	// Forecaster reports the forecasts and is paid.
	Forecaster string `toml:"forecaster,omitempty"`
	// Currency labels every amount ("EUR", "credits").
	Currency string `toml:"currency,omitempty"`
	// Start and End bound the season of forecasts, as YYYY-MM-DD.
	Start string `toml:"start,omitempty"`
	End   string `toml:"end,omitempty"`
	// Signed is the date of signature, as YYYY-MM-DD.
	Signed string `toml:"signed,omitempty"`
	// Forecasts is the number of forecasts per season, for what the
	// contract costs; 0 means not stated.
	Forecasts int `toml:"forecasts,omitempty"`
	// BaseRate is the buyer's base rate (how often each outcome happens
	// in the buyer's records), for what the contract costs; nil means the
	// budget's reference belief, else uniform.
	BaseRate []float64 `toml:"base_rate,omitempty"`
	// OffMenu replaces the annex's default clause for a report that is
	// not a row of the table.
	OffMenu string `toml:"off_menu,omitempty"`
}

// Limits of contract text, so that an annex stays a page and a file
// stays small.
const (
	maxPartyLen    = 200
	maxCurrencyLen = 16
	maxClauseLen   = 2000
	// MaxForecasts bounds forecasts per season (one a minute for ten
	// years is about 5 million).
	MaxForecasts = 10_000_000
)

// DateLayout is how contract dates are written.
const DateLayout = "2006-01-02"

// Validate checks the contract fields, naming the one at fault.
func (c *Contract) Validate(n int) error {
	texts := []struct {
		name, v string
		max     int
	}{{"buyer", c.Buyer, maxPartyLen}, {"forecaster", c.Forecaster, maxPartyLen},
		{"currency", c.Currency, maxCurrencyLen}, {"off_menu", c.OffMenu, maxClauseLen}}
	for _, t := range texts {
		if !utf8.ValidString(t.v) {
			return fmt.Errorf("contract.%s: not valid UTF-8 text", t.name)
		}
		if utf8.RuneCountInString(t.v) > t.max {
			return fmt.Errorf("contract.%s: %d characters; at most %d", t.name, utf8.RuneCountInString(t.v), t.max)
		}
		if t.name != "off_menu" && strings.ContainsAny(t.v, "\n\r") {
			return fmt.Errorf("contract.%s: must be one line", t.name)
		}
	}
	for _, d := range []struct{ name, v string }{{"start", c.Start}, {"end", c.End}, {"signed", c.Signed}} {
		if d.v == "" {
			continue
		}
		if _, err := time.Parse(DateLayout, d.v); err != nil {
			// Written in the layout but not a day (2027-02-30): saying
			// "not written YYYY-MM-DD" would contradict what the user sees.
			if len(d.v) == len(DateLayout) && strings.Count(d.v, "-") == 2 && d.v[4] == '-' && d.v[7] == '-' && strings.Trim(d.v, "0123456789-") == "" {
				return fmt.Errorf("contract.%s: %q is not a day of the calendar", d.name, d.v)
			}
			return fmt.Errorf("contract.%s: %q is not a date written YYYY-MM-DD", d.name, d.v)
		}
	}
	if c.Start != "" && c.End != "" && c.End < c.Start {
		return fmt.Errorf("contract.end: %s is before the start %s", c.End, c.Start)
	}
	if c.Forecasts < 0 || c.Forecasts > MaxForecasts {
		return fmt.Errorf("contract.forecasts: %d; must be 0 (not stated) to %d", c.Forecasts, MaxForecasts)
	}
	if c.BaseRate != nil {
		if len(c.BaseRate) != n {
			return fmt.Errorf("contract.base_rate: %d entries for %d outcomes", len(c.BaseRate), n)
		}
		sum := 0.0
		for i, q := range c.BaseRate {
			if !(q >= 0 && q <= 1) {
				return fmt.Errorf("contract.base_rate: entry %d is %g; must be a probability", i+1, q)
			}
			sum += q
		}
		if math.Abs(sum-1) > 1e-6 {
			return fmt.Errorf("contract.base_rate: entries sum to %g, not 1", sum)
		}
	}
	return nil
}
