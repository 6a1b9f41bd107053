package main

import (
	"fmt"
	"io"
	"math"

	"scorewright/contract/table"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/emphasis"
	"scorewright/generator/formula"
	"scorewright/internal/num"
)

// emphasisRule integrates an emphasis-mode design's weight into a binary
// rule. A weight that is negative or not finite somewhere on the check
// grid is refused, naming where; an unbounded rule is built, and its
// warnings are available through ruleWarnings.
func emphasisRule(d *design.Design) (*bregman.Rule, error) {
	g, err := emphasis.New(d.Formula, emphasis.Options{Params: d.Params})
	if _, ok := err.(*formula.Error); ok {
		return nil, formulaError("emphasis", err)
	} else if err != nil {
		return nil, usagef("%v", err)
	}
	if err := g.Diagnostics().Problem(); err != nil {
		return nil, usagef("%v", err)
	}
	return &bregman.Rule{Gen: g, Labels: d.Labels}, nil
}

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

// lotteryTable turns a money table into drawable chances of winning a
// prize of hi - lo, whole multiples of 1/draws, and re-checks them with
// recheck; lo and hi must hold every payment in the table.
func lotteryTable(tb *table.Table, lo, hi float64, convert func() error) (*lotteryJSON, error) {
	if err := convert(); err != nil {
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
		fmt.Fprintf(w, "lottery re-check\t%s on the rounded chances, smallest margin %s (the re-check line below is of the money table)\n", verdict, table.FormatNumber(float64(l.MinMargin)))
	}
}

// ruleWarnings are remarks about a rule a user should see beside its
// numbers, such as an emphasis weight that makes the rule unbounded.
func ruleWarnings(r *bregman.Rule) []string {
	if g, ok := r.Gen.(*emphasis.Generator); ok {
		return g.Diagnostics().Warnings()
	}
	return nil
}
