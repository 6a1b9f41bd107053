package main

import (
	"flag"
	"fmt"
	"io"

	"scorewright/contract/annex"
	"scorewright/contract/cost"
	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/internal/textcol"
)

const contractUsage = "[--title T] [--buyer NAME] [--forecaster NAME] [--currency C] [--start DATE] [--end DATE] [--signed DATE] [--forecasts N] [--base-rate q1,...]"

// contractFlags are the annex's terms; each overrides the design's.
type contractFlags struct {
	title, buyer, forecaster, currency, start, end, signed, baseRate string
	forecasts                                                        int
}

func addContractFlags(fs *flag.FlagSet) *contractFlags {
	c := &contractFlags{}
	fs.StringVar(&c.title, "title", "", "the annex's title")
	fs.StringVar(&c.buyer, "buyer", "", "the party that pays")
	fs.StringVar(&c.forecaster, "forecaster", "", "the party that forecasts and is paid")
	fs.StringVar(&c.currency, "currency", "", "currency label for every amount (e.g. EUR)")
	fs.StringVar(&c.start, "start", "", "first forecast date, YYYY-MM-DD")
	fs.StringVar(&c.end, "end", "", "last forecast date, YYYY-MM-DD")
	fs.StringVar(&c.signed, "signed", "", "date of signature, YYYY-MM-DD")
	intVar(fs, &c.forecasts, "forecasts", 0, "forecasts per season, for what the contract costs")
	fs.StringVar(&c.baseRate, "base-rate", "", "the buyer's base rate q1,...: how often each outcome happens (default: --reference, else uniform)")
	return c
}

// apply writes the given contract flags over the design's contract.
func (c *contractFlags) apply(fs *flag.FlagSet, d *design.Design) error {
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	ct := &d.Contract
	for _, f := range []struct {
		name     string
		src, dst *string
	}{{"buyer", &c.buyer, &ct.Buyer}, {"forecaster", &c.forecaster, &ct.Forecaster}, {"currency", &c.currency, &ct.Currency},
		{"start", &c.start, &ct.Start}, {"end", &c.end, &ct.End}, {"signed", &c.signed, &ct.Signed}, {"title", &c.title, &d.Title}} {
		if set[f.name] {
			*f.dst = *f.src
		}
	}
	if set["forecasts"] {
		ct.Forecasts = c.forecasts
	}
	if set["base-rate"] {
		if d.Mode.OnInterval() {
			return usagef("--base-rate is for rules over outcomes")
		}
		q, err := num.ParseDistribution(c.baseRate, d.N())
		if err != nil {
			return usagef("--base-rate: %v", err)
		}
		ct.BaseRate = q
	}
	if err := ct.Validate(d.N()); err != nil {
		return usagef("%v", err)
	}
	return nil
}

// annexInput gathers what an annex needs; see annex.InputFor.
func annexInput(d *design.Design, tb *table.Table, rule *bregman.Rule, a, b, clamp float64) (*annex.Input, error) {
	return annex.InputFor(d, tb, rule, a, b, clamp, version)
}

// costJSON is what the season costs, in the summary.
type costJSON struct {
	Forecasts    int         `json:"forecasts"`
	BaseRate     []num.Float `json:"base_rate"`
	BaseRateFrom string      `json:"base_rate_from"`
	Currency     string      `json:"currency,omitempty"`
	// Per forecast, and over the season (Forecasts times).
	BaseRateOnly num.Float `json:"base_rate_only"`
	Perfect      num.Float `json:"perfect"`
	WorstCase    num.Float `json:"worst_case"`
	Lines        []string  `json:"lines"`
}

func newCostJSON(c *cost.Cost) *costJSON {
	if c == nil {
		return nil
	}
	j := &costJSON{Forecasts: c.Season.Forecasts, BaseRate: num.Floats(c.Season.BaseRate), BaseRateFrom: c.Season.BaseRateFrom,
		Currency: c.Season.Currency, BaseRateOnly: num.Float(numfmt.Clean(c.BaseRateOnly)), Perfect: num.Float(numfmt.Clean(c.Perfect)), WorstCase: num.Float(numfmt.Clean(c.WorstCase))}
	for _, l := range c.Lines() {
		j.Lines = append(j.Lines, l.Who+": "+l.PerForecast+" per forecast, "+l.Season+" per season")
	}
	return j
}

// printCost writes what the season costs, one line for each forecaster.
func printCost(w io.Writer, c *costJSON) error {
	if c == nil {
		return nil
	}
	tw := textcol.NewWriter(w, 0)
	fmt.Fprintf(tw, "cost	at the base rate %s (%s), per forecast and per season:\n", num.Format(floats(c.BaseRate)), c.BaseRateFrom)
	for _, l := range c.Lines {
		fmt.Fprintf(tw, "\t  %s\n", l)
	}
	return tw.Flush()
}

func floats(v []num.Float) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = float64(x)
	}
	return out
}
