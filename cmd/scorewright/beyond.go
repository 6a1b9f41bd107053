package main

import (
	"fmt"
	"io"
	"scorewright"

	"scorewright/contract/lottery"
	"scorewright/contract/table"
	"scorewright/internal/num"
)

// lotteryJSON is the lottery part of a table summary.
type lotteryJSON struct {
	Prize num.Float `json:"prize"`
	Floor num.Float `json:"floor"`
	Cap   num.Float `json:"cap"`
}

// lotteryTable turns the money table tb of t into chances of winning a
// prize of hi - lo, lo and hi the bounds of every payment in t.
func lotteryTable(tb *table.Table, t *scorewright.Table) (*lotteryJSON, error) {
	lo, hi := t.Bounds()
	if err := lottery.Convert(tb, lo, hi); err != nil {
		return nil, usagef("--lottery: %v", err)
	}
	return &lotteryJSON{Prize: num.Float(hi - lo), Floor: num.Float(lo), Cap: num.Float(hi)}, nil
}

// printLottery adds the lottery line to a table summary.
func printLottery(w io.Writer, l *lotteryJSON) {
	if l != nil {
		fmt.Fprintf(w, "lottery\teach cell is the chance (pay - %s)/%s of winning a prize of %s, besides %s paid for certain; margins below are in money\n",
			table.FormatNumber(float64(l.Floor)), table.FormatNumber(float64(l.Prize)), table.FormatNumber(float64(l.Prize)), table.FormatNumber(float64(l.Floor)))
	}
}
