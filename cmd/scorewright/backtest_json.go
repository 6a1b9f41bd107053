package main

import (
	"scorewright/contract/backtest"
	"scorewright/internal/num"
)

// backtestReport is what the command prints (and its JSON); this file
// holds every record of the JSON.
type backtestReport struct {
	// Warnings say that a rule's table fails its re-check; the command
	// then exits 1, as table does.
	Warnings    []string            `json:"warnings,omitempty"`
	History     string              `json:"history"`
	Outcomes    []string            `json:"outcomes"`
	Tolerance   float64             `json:"tolerance"`
	Rows        int                 `json:"rows"`
	Rules       []ruleReport        `json:"rules"`
	Forecasters []forecasterReport  `json:"forecasters"`
	SkipCount   int                 `json:"skipped_count"`
	Skipped     []skippedReport     `json:"skipped"`
	Reliability []reliabilityReport `json:"reliability,omitempty"`
	Months      []monthReport       `json:"months,omitempty"`
	// ForecasterCount counts every forecaster; Forecasters lists them all
	// or only the best and worst (see Notes).
	ForecasterCount int `json:"forecaster_count"`
	// Grouping says whether the decompositions saw every forecast exactly.
	Grouping  string           `json:"grouping"`
	Questions []questionReport `json:"questions,omitempty"`
	Notes     []string         `json:"notes,omitempty"`
	Caution   []string         `json:"caution"`
	decimals  []int
	unit      string           // "line" or "row", how the history numbers records
	curves    []backtest.Curve // the reliability picture's, n = 2
}

type skippedReport struct {
	Line int `json:"line"`
	// EndLine is the record's last line when it ran across lines.
	EndLine int    `json:"end_line,omitempty"`
	Why     string `json:"why"`
}

type ruleReport struct {
	ID      string `json:"id"`
	Name    string `json:"name"`
	Formula string `json:"formula"`
	Pay     string `json:"pay"`
	Menu    string `json:"menu"`
	Budget  string `json:"budget"`
	// ByFormula is set when the rule has no report menu: every forecast
	// is paid by the formula, and none can be off a menu.
	ByFormula bool      `json:"by_formula"`
	Count     int       `json:"count"`
	Total     num.Float `json:"total"`
	Mean      num.Float `json:"mean"`
	Min       num.Float `json:"min"`
	Max       num.Float `json:"max"`
	OffMenu   int       `json:"off_menu"`
	BelowLow  int       `json:"below_floor"`
	AboveHigh int       `json:"above_cap"`
	NonFinite int       `json:"non_finite"`
	// MostTotal is what the forecasts could have cost at most: count × the
	// table's largest payment.
	MostTotal num.Float `json:"most_total"`
	// TargetMean and TargetTotal are the mean-pay budget's aim per
	// forecast, and times the count, when the budget has one.
	TargetMean  *num.Float `json:"target_mean,omitempty"`
	TargetTotal *num.Float `json:"target_total,omitempty"`
}

type forecasterReport struct {
	Name  string `json:"name"`
	Count int    `json:"count"`
	// Total, Mean and Rank are under the first rule; Totals, Means and
	// Ranks list every rule.
	Total         num.Float             `json:"total"`
	Mean          num.Float             `json:"mean"`
	Rank          int                   `json:"rank"`
	Totals        []num.Float           `json:"totals"`
	Means         []num.Float           `json:"means"`
	Ranks         []int                 `json:"ranks"`
	RankChange    *int                  `json:"rank_change,omitempty"`
	OffMenu       []int                 `json:"off_menu"`
	Decomposition []decompositionReport `json:"decomposition"`
	Binning       string                `json:"binning"`
	CORP          []corpReport          `json:"corp"`
}

type decompositionReport struct {
	Rule        string    `json:"rule"`
	MeanEffort  num.Float `json:"mean_effort"`
	Uncertainty num.Float `json:"uncertainty"`
	Resolution  num.Float `json:"resolution"`
	Reliability num.Float `json:"reliability"`
	WithinBin   num.Float `json:"within_bin"`
}

type reliabilityReport struct {
	Forecaster string `json:"forecaster"`
	Outcome    string `json:"outcome"`
	// Method says how the points were made: the PAV recalibration at each
	// distinct forecast, with consistency bands.
	Method    string      `json:"method"`
	BandLevel num.Float   `json:"band_level"`
	Resamples int         `json:"band_resamples"`
	Seed      uint64      `json:"band_seed"`
	Points    []pointJSON `json:"points"`
}

type pointJSON struct {
	Forecast   num.Float `json:"forecast"`
	Calibrated num.Float `json:"calibrated"`
	Lo         num.Float `json:"band_low"`
	Hi         num.Float `json:"band_high"`
	Count      int       `json:"count"`
}

// corpReport is one CORP decomposition: a rule (or, for more than two
// outcomes, the squared error) on one event.
type corpReport struct {
	Rule     string    `json:"rule"`
	Event    string    `json:"event"`
	Score    string    `json:"score_rule"`
	Count    int       `json:"count"`
	BaseRate num.Float `json:"base_rate"`
	Mean     num.Float `json:"mean_score"`
	MCB      num.Float `json:"miscalibration"`
	DSC      num.Float `json:"discrimination"`
	UNC      num.Float `json:"uncertainty"`
}

type monthReport struct {
	Month  string      `json:"month"`
	Counts []int       `json:"counts"`
	Totals []num.Float `json:"totals"`
}
