package main

import (
	"context"
	"fmt"
	"io"
	"math"

	"scorewright"
	"scorewright/contract/table"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
)

// lotteryJSON is the lottery part of a table summary.
type lotteryJSON struct {
	Prize num.Float `json:"prize"`
	Floor num.Float `json:"floor"`
	Cap   num.Float `json:"cap"`
	// Draws is the decimals of the chances: a whole number is drawn
	// from 1 to 10^Draws.
	Draws int `json:"chance_decimals"`
	// Passed, Verdict and MinMargin are the re-check of the rounded
	// chances (the money table's, then the chances').
	Passed    bool      `json:"recheck_passed"`
	Verdict   string    `json:"recheck_verdict"`
	MinMargin num.Float `json:"min_margin"`
}

// lotteryTable turns the money table tb of t into drawable chances of
// winning a prize of hi - lo (lo and hi the bounds of every payment in
// t), whole multiples of 1/draws, and re-checks them.
func lotteryTable(tb *table.Table, t *scorewright.Table, draws int) (*lotteryJSON, error) {
	lo, hi := t.Bounds()
	if _, err := t.Lottery(context.Background(), tb, draws); err != nil {
		return nil, usagef("--lottery: %v", err)
	}
	return &lotteryJSON{Prize: num.Float(hi - lo), Floor: num.Float(lo), Cap: num.Float(hi), Draws: tb.Decimals,
		Passed: tb.Meta.Passed, Verdict: tb.Meta.Verdict, MinMargin: tb.Meta.MinMargin}, nil
}

// printLottery adds the lottery line to a table summary.
func printLottery(w io.Writer, l *lotteryJSON) {
	if l != nil {
		draws := int(math.Pow10(l.Draws))
		fmt.Fprintf(w, "lottery\teach cell is the chance (pay - %s)/%s of winning a prize of %s, besides %s paid for certain, rounded to whole 1/%d and drawn as a whole number from 1 to %d\n",
			table.FormatNumber(float64(l.Floor)), table.FormatNumber(float64(l.Prize)), table.FormatNumber(float64(l.Prize)), table.FormatNumber(float64(l.Floor)), draws, draws)
		verdict := "FAILED"
		if l.Passed {
			verdict = "passed"
		}
		fmt.Fprintf(w, "lottery re-check\t%s on the rounded chances, smallest margin %s (the re-check line below is of the money table)\n", verdict, numfmt.Margin(float64(l.MinMargin)))
	}
}
