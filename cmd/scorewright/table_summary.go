package main

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"scorewright/contract/budget"
	"scorewright/contract/table"
	"scorewright/internal/num"
	"scorewright/internal/numfmt"
	"scorewright/internal/textcol"
)

// tableSummary is what --json prints.
type tableSummary struct {
	Outcomes []string `json:"outcomes"`
	Menu     menuJSON `json:"menu"`
	fitJSON
	MeanPay      *num.Float    `json:"mean_pay,omitempty"`
	Reference    []num.Float   `json:"reference,omitempty"`
	ReferencePay num.Float     `json:"reference_pay"`
	Truthful     truthfulJSON  `json:"truthful_pay"`
	MenuPay      truthfulJSON  `json:"menu_pay"`
	Recheck      recheckJSON   `json:"recheck"`
	ClampGap     *clampGapJSON `json:"clamp_gap,omitempty"`
	Cells        []cellJSON    `json:"cells"`
	Cost         *costJSON     `json:"cost,omitempty"`
	exportJSON
}

// fitJSON is what every table summary (point tables too) says about the
// fit; its fields sit at the top level of the JSON.
type fitJSON struct {
	A        num.Float `json:"A"`
	B        num.Float `json:"B"`
	Floor    num.Float `json:"floor"`
	Cap      num.Float `json:"cap"`
	Unit     num.Float `json:"unit"`
	Rounding string    `json:"rounding"`
	MinPay   num.Float `json:"min_pay"`
	MaxPay   num.Float `json:"max_pay"`
}

// newFitJSON takes the fit from the table's record, and the range of the
// rounded money payments (which the record states only in words).
func newFitJSON(m *table.Meta, minPay, maxPay float64) fitJSON {
	return fitJSON{A: m.A, B: m.B, Floor: m.Floor, Cap: m.Cap, Unit: m.Unit, Rounding: m.Rounding, MinPay: num.Float(minPay), MaxPay: num.Float(maxPay)}
}

// exportJSON closes every table summary: margins per menu item, the
// lottery, what was written, the notes and the caution of the export.
type exportJSON struct {
	Margins []marginJSON `json:"margins"`
	Lottery *lotteryJSON `json:"lottery,omitempty"`
	Output  tableOutput  `json:"output"`
	Notes   []string     `json:"notes"`
	Caution []string     `json:"caution"`
}

// recheckCore is the part of the re-check every table summary has.
type recheckCore struct {
	Passed    bool          `json:"passed"`
	Verdict   string        `json:"verdict"`
	MinMargin num.Float     `json:"min_margin"`
	At        []num.Float   `json:"at"`
	Rival     []num.Float   `json:"rival,omitempty"`
	Ties      [][]num.Float `json:"ties"`
	Beaten    [][]num.Float `json:"beaten"`
}

// marginMark is TIE or BEATEN for a margin within the tolerance of 0 or
// below it, else empty.
func marginMark(m, tol float64) string {
	switch {
	case math.Abs(m) <= tol:
		return "TIE"
	case m < 0:
		return "BEATEN"
	}
	return ""
}

type menuJSON struct {
	Desc  string      `json:"desc"`
	Items int         `json:"items"`
	Clamp num.Float   `json:"clamp"`
	First []num.Float `json:"first"`
	Last  []num.Float `json:"last"`
}

type truthfulJSON struct {
	Min       num.Float   `json:"min"`
	Max       num.Float   `json:"max"`
	MinBelief []num.Float `json:"min_belief"`
	MaxBelief []num.Float `json:"max_belief"`
	Grid      string      `json:"grid"`
}

type recheckJSON struct {
	recheckCore
	NeverChosen [][]num.Float   `json:"never_chosen"`
	TiedBeliefs int             `json:"tied_beliefs"`
	Grid        recheckGridJSON `json:"grid"`
}

type recheckGridJSON struct {
	Desc      string    `json:"desc"`
	Points    int       `json:"points"`
	Tolerance num.Float `json:"tolerance"`
}

type clampGapJSON struct {
	Max     num.Float   `json:"max"`
	Belief  []num.Float `json:"belief,omitempty"`
	Best    []num.Float `json:"best_report,omitempty"`
	Beliefs int         `json:"beliefs"`
	Grid    string      `json:"grid"`
}

type cellJSON struct {
	Report  []num.Float `json:"report"`
	Beliefs int         `json:"beliefs"`
	// Lo and Hi are the exact cell (lo, hi) in the first outcome's
	// probability (n = 2).
	Lo *num.Float `json:"lo,omitempty"`
	Hi *num.Float `json:"hi,omitempty"`
}

type marginJSON struct {
	Report []num.Float `json:"report"`
	Margin num.Float   `json:"margin"`
	Rival  []num.Float `json:"rival,omitempty"`
}

type tableOutput struct {
	Format  string `json:"format"`
	File    string `json:"file,omitempty"`
	Written bool   `json:"written"`
}

func newTableSummary(f *budget.Fit, rc *budget.Recheck, tb *table.Table, format, out string) *tableSummary {
	reps := f.Menu.Reports
	items := func(idx []int) [][]num.Float {
		out := [][]num.Float{}
		for _, i := range idx {
			out = append(out, num.Floats(reps[i]))
		}
		return out
	}
	report := func(i int) []num.Float {
		if i < 0 {
			return nil
		}
		return num.Floats(reps[i])
	}
	s := &tableSummary{
		Outcomes:  f.Labels,
		Menu:      menuJSON{Desc: f.MenuDesc(), Items: len(reps), Clamp: num.Float(f.Clamp), First: num.Floats(reps[0]), Last: num.Floats(reps[len(reps)-1])},
		fitJSON:   newFitJSON(&tb.Meta, f.MinPay, f.MaxPay),
		Reference: num.Floats(f.Reference), ReferencePay: num.Float(f.ReferencePay),
		Truthful: truthfulJSON{Min: num.Float(f.Truthful.Min), Max: num.Float(f.Truthful.Max),
			MinBelief: num.Floats(f.Truthful.MinBelief), MaxBelief: num.Floats(f.Truthful.MaxBelief), Grid: f.Truthful.Grid},
		MenuPay: truthfulJSON{Min: num.Float(rc.MenuPay.Min), Max: num.Float(rc.MenuPay.Max),
			MinBelief: num.Floats(rc.MenuPay.MinBelief), MaxBelief: num.Floats(rc.MenuPay.MaxBelief), Grid: rc.Grid},
		Recheck: recheckJSON{recheckCore: recheckCore{Passed: rc.Passed, Verdict: rc.Verdict(f), MinMargin: num.Float(rc.MinMargin),
			At: report(rc.MinMarginItem), Rival: report(rc.MinMarginRival), Ties: items(rc.Ties), Beaten: items(rc.Beaten)},
			NeverChosen: items(rc.NeverChosen),
			TiedBeliefs: rc.TiedBeliefs, Grid: recheckGridJSON{Desc: rc.Grid, Points: rc.Beliefs, Tolerance: num.Float(rc.Tolerance)}},
		exportJSON: exportJSON{Output: tableOutput{Format: format, File: out}, Notes: f.Notes(rc), Caution: tb.Meta.Cautions},
	}
	if f.MeanPay != nil {
		m := num.Float(*f.MeanPay)
		s.MeanPay = &m
	}
	if g := rc.ClampGap; g != nil {
		s.ClampGap = &clampGapJSON{Max: num.Float(g.Max), Belief: num.Floats(g.Belief), Best: num.Floats(g.Best), Beliefs: g.Beliefs, Grid: g.Grid}
	}
	for i, c := range rc.Cells {
		cj := cellJSON{Report: num.Floats(reps[i]), Beliefs: c.Beliefs}
		if c.Exact && c.Lo < c.Hi {
			lo, hi := num.Float(c.Lo), num.Float(c.Hi)
			cj.Lo, cj.Hi = &lo, &hi
		}
		s.Cells = append(s.Cells, cj)
		s.Margins = append(s.Margins, marginJSON{Report: num.Floats(reps[i]), Margin: num.Float(rc.Margins[i]), Rival: report(rc.Rivals[i])})
	}
	return s
}

// printTableSummary writes the fit and the re-check for a person.
func printTableSummary(w io.Writer, f *budget.Fit, rc *budget.Recheck, s *tableSummary) error {
	head := summaryHead{
		menu:     f.MenuDesc(),
		payment:  fmt.Sprintf("pay = A - B·L(p, k), A = %s, B = %s", table.FormatNumber(f.A), table.FormatNumber(f.B)),
		budget:   f.BudgetDesc(),
		rounding: f.RoundingDesc(),
		passed:   rc.Passed, margin: rc.MinMargin,
		verdict: s.Recheck.Verdict, notes: s.Notes, lottery: s.Lottery,
	}
	if err := head.print(w); err != nil {
		return err
	}
	if err := printCost(w, s.Cost); err != nil {
		return err
	}
	if err := printItems(w, f, rc); err != nil {
		return err
	}
	if s.Output.Written {
		fmt.Fprintf(w, "wrote %s (%s)\n", s.Output.File, s.Output.Format)
	}
	return nil
}

// summaryHead is the opening of a table command's summary, the same for
// tables over outcomes and point tables: menu, payment, lottery, budget,
// rounding, the re-check and the notes.
type summaryHead struct {
	menu, payment, budget, rounding string
	passed                          bool
	margin                          float64
	verdict                         string
	notes                           []string
	lottery                         *lotteryJSON
}

func (h summaryHead) print(w io.Writer) error {
	tw := textcol.NewWriter(w, 0)
	fmt.Fprintf(tw, "menu\t%s\n", h.menu)
	fmt.Fprintf(tw, "payment\t%s\n", h.payment)
	printLottery(tw, h.lottery)
	fmt.Fprintf(tw, "budget\t%s\n", h.budget)
	fmt.Fprintf(tw, "rounding\t%s\n", h.rounding)
	verdict := "FAILED"
	if h.passed {
		verdict = "passed"
	}
	fmt.Fprintf(tw, "re-check\t%s, smallest margin %s\n", verdict, numfmt.Margin(h.margin))
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "  %s\n", h.verdict)
	for _, n := range h.notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	return nil
}

// cellEnd writes a cell boundary to six decimals: the exact boundary is
// offset by the tie tolerance, which is not worth showing.
func cellEnd(x float64) string {
	return strconv.FormatFloat(math.Round(x*1e6)/1e6+0, 'g', -1, 64)
}

// maxItemRows bounds the per-item listing; --json has every item.
const maxItemRows = 41

// printItems lists each menu item's margin, closest rival and belief cell
// when the menu is short enough to read (two outcomes), and otherwise the
// items that fail.
func printItems(w io.Writer, f *budget.Fit, rc *budget.Recheck) error {
	reps := f.Menu.Reports
	binary := len(f.Labels) == 2
	var rows []int
	for i, m := range rc.Margins {
		if binary && len(reps) <= maxItemRows || !(m > rc.Tolerance) {
			rows = append(rows, i)
		}
	}
	if len(rows) == 0 {
		return nil
	}
	more := 0
	if len(rows) > maxItemRows {
		rows, more = rows[:maxItemRows], len(rows)-maxItemRows
	}
	fmt.Fprintln(w)
	tw := textcol.NewWriter(w, 0)
	cellHead := "beliefs that pick it"
	if binary {
		cellHead = fmt.Sprintf("beliefs in %q that pick it", f.Labels[0])
	}
	fmt.Fprintf(tw, "report\tmargin\t\tclosest rival\t%s\n", cellHead)
	shown := make([]float64, len(rows))
	for j, i := range rows {
		shown[j] = rc.Margins[i]
	}
	margins := numfmt.MarginColumn(shown)
	for j, i := range rows {
		verdict := marginMark(rc.Margins[i], rc.Tolerance)
		rival := "-"
		if r := rc.Rivals[i]; r >= 0 {
			rival = num.Format(reps[r])
		}
		c := rc.Cells[i]
		cell := "none on the grid"
		switch {
		case c.Exact && c.Lo < c.Hi:
			cell = fmt.Sprintf("(%s, %s)", cellEnd(c.Lo), cellEnd(c.Hi))
		case c.Exact:
			cell = "none"
		case c.Beliefs > 0:
			cell = fmt.Sprintf("%d of %d", c.Beliefs, rc.Beliefs)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", num.Format(reps[i]), margins[j], verdict, rival, cell)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if more > 0 {
		fmt.Fprintf(w, "... and %d more items (--json lists them all)\n", more)
	}
	return nil
}
