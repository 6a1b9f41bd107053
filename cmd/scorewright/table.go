package main

import (
	"bytes"
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"scorewright"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"scorewright/contract/annex"
	"scorewright/contract/budget"
	"scorewright/contract/lottery"
	"scorewright/contract/table"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/safefile"
)

const tableUsage = "RULE BUDGET [--menu FILE] [--clamp P] [--format csv|md|json|tex|svg|png|pdf|xlsx|html] [--out FILE] [--force] [--lottery] [--json] [--certify [--deadline D]] [TERMS]\n\nRULE: " + ruleUsage + "\nBUDGET: " + budgetUsage + "\nTERMS (for the pdf, xlsx and html annexes): " + contractUsage

// tableFlags are the options of the table command beyond RULE and BUDGET.
type tableFlags struct {
	format, out, menu string
	clamp             float64
	force, json       bool
	lottery           bool
	draws             int
	// cert runs the interval certificate so that the table records
	// "certified" rather than "grid evidence" as its verdict kind.
	cert *certifyFlags
}

func addTableFlags(fs *flag.FlagSet) *tableFlags {
	t := &tableFlags{}
	fs.StringVar(&t.format, "format", "", "csv, md, json, tex, svg or png (the table), pdf, xlsx or html (the annex to sign) (default: from --out's extension, else md)")
	fs.StringVar(&t.out, "out", "", "write the table to FILE, atomically (figures need it)")
	fs.BoolVar(&t.force, "force", false, "replace an existing --out file, and export a table that failed the re-check (it then carries a warning)")
	fs.BoolVar(&t.json, "json", false, "print the fit and re-check summary as JSON (the table itself goes to --out)")
	fs.BoolVar(&t.lottery, "lottery", false, "pay a chance of winning a fixed prize, (pay - floor)/(cap - floor), instead of money")
	fs.IntVar(&t.draws, "draws", lottery.DefaultDraws, "--lottery: chances in whole 1/N, settled by drawing a whole number from 1 to N (N a power of ten)")
	fs.StringVar(&t.menu, "menu", "", "read the report menu from a CSV file: one report per line, n probabilities (n = 2: one number), '#' comments")
	floatVar(fs, &t.clamp, "clamp", 0, "pay every report as if each probability were at least P (rescaled to sum 1); for rules infinite at 0")
	t.cert = addCertifyFlags(fs)
	return t
}

// format picks the export format: --format, else --out's extension,
// else Markdown.
func (t *tableFlags) resolveFormat() (string, error) {
	f := strings.ToLower(t.format)
	if f == "" && t.out != "" {
		f = strings.TrimPrefix(strings.ToLower(filepath.Ext(t.out)), ".")
		switch f {
		case "markdown":
			f = "md"
		case "txt", "":
			return "", usagef("cannot tell the format from %q; give --format %s", t.out, strings.Join(exportFormats(), "|"))
		}
	}
	if f == "" {
		f = "md"
	}
	for _, known := range exportFormats() {
		if f == known {
			if (table.IsFigure(f) || annex.IsFormat(f)) && t.out == "" {
				return "", usagef("a %s file needs --out FILE", f)
			}
			return f, nil
		}
	}
	return "", usagef("--format %q is not one of %s", f, strings.Join(exportFormats(), ", "))
}

// exportFormats are what table writes; see annex.ExportFormats.
func exportFormats() []string { return annex.ExportFormats() }

func runTable(e *env, args []string) error {
	fs := newFlags("table")
	rf := addRuleFlags(fs)
	bf := addBudgetFlags(fs)
	tf := addTableFlags(fs)
	cf := addContractFlags(fs)
	if err := parseFlags(e, fs, tableUsage, args, false); err != nil {
		return err
	}
	format, err := tf.resolveFormat()
	if err != nil {
		return err
	}
	d, err := rf.design()
	if err != nil {
		return err
	}
	if err := bf.apply(fs, d); err != nil {
		return err
	}
	if err := cf.apply(fs, d); err != nil {
		return err
	}
	return tableOf(e, fs, d, format, tf)
}

// tableOf fits, re-checks and exports the table of a design; fs holds the
// flags the report menu is read from.
func tableOf(e *env, fs *flag.FlagSet, d *design.Design, format string, tf *tableFlags) error {
	r, err := openRule(d)
	if err != nil {
		return err
	}
	if r.OnInterval() && (tf.menu != "" || tf.clamp != 0) {
		return usagef("--menu and --clamp are for rules over outcomes; a point-forecast menu is --step S in the units of the interval")
	}
	t, err := r.Table(context.Background(), func(int) (*budget.Menu, error) { return tableMenu(fs, tf, d) })
	switch {
	case errors.Is(err, scorewright.ErrMeanPayOnInterval):
		return usagef("point-forecast tables are fitted to --floor and --cap; --mean-pay is for rules over outcomes")
	case errors.Is(err, scorewright.ErrNoCap):
		return usagef("give --floor F --cap C with C > F")
	case err != nil:
		return fitError(err)
	}
	tb := r.Export(t, version, exportDate())
	if err := certifyRecord(e, r, &tb.Meta, tf.cert); err != nil {
		return err
	}
	if t.Point != nil {
		return writePointTable(e, d, t, tb, format, tf)
	}
	fit, rc := t.Fit, t.Recheck
	a, b, clamp := t.PayLine()
	ax, err := annexInput(d, tb, r.Outcomes(), a, b, clamp)
	if err != nil {
		return err
	}
	var lot *lotteryJSON
	if tf.lottery {
		if lot, err = lotteryTable(tb, t, tf.draws); err != nil {
			return err
		}
	}
	sum := newTableSummary(fit, rc, tb, format, tf.out)
	sum.Lottery, sum.Caution = lot, tb.Meta.Cautions
	sum.Cost = newCostJSON(ax.Cost)
	return exportTable(e, ax, format, tf, rc.Passed && tb.Meta.Passed, &sum.Output, sum, func() error {
		return printTableSummary(e.stdout, fit, rc, sum)
	})
}

// exportTable writes a built table: to --out atomically (an existing file
// only with --force), or to stdout. A table whose re-check failed is
// refused (nothing written, exit 1) unless --force, and then still exits
// 1. With --out, or when refused, the summary goes to stdout: summary as
// JSON with --json, else through printSummary. out records what was
// written.
func exportTable(e *env, ax *annex.Input, format string, tf *tableFlags, passed bool, out *tableOutput, summary any, printSummary func() error) error {
	refused := !passed && !tf.force
	var buf bytes.Buffer
	if !refused {
		if err := writeExport(&buf, ax, format); err != nil {
			return err
		}
		if tf.out != "" {
			if err := safefile.Write(tf.out, buf.Bytes(), tf.force); err != nil {
				if errors.Is(err, safefile.ErrExists) {
					return usagef("%v", err)
				}
				return usagef("--out: %v", err)
			}
			out.Written = true
		}
	}
	switch {
	case tf.json:
		if err := writeJSON(e.stdout, summary); err != nil {
			return err
		}
	case tf.out != "" || refused:
		if err := printSummary(); err != nil {
			return err
		}
	default:
		if _, err := e.stdout.Write(buf.Bytes()); err != nil {
			return err
		}
	}
	switch {
	case refused:
		fmt.Fprintln(e.stderr, "scorewright table: refused: the menu re-check failed, so nothing was written; --force exports the table anyway, with a warning in the file")
		return errFailed
	case !passed:
		fmt.Fprintln(e.stderr, "scorewright table: the menu re-check FAILED; the table was exported because of --force and carries a warning")
		return errFailed
	}
	return nil
}

// writeExport writes the table in one of its formats, or the annex.
func writeExport(w io.Writer, ax *annex.Input, format string) error {
	return annex.WriteAny(w, ax, format)
}

// tableMenu builds the report menu from --menu or the budget's step.
func tableMenu(fs *flag.FlagSet, tf *tableFlags, d *design.Design) (*budget.Menu, error) {
	stepSet := false
	fs.Visit(func(f *flag.Flag) { stepSet = stepSet || f.Name == "step" })
	var m *budget.Menu
	var err error
	switch {
	case tf.menu != "" && stepSet:
		return nil, usagef("give --step or --menu FILE, not both")
	case tf.menu != "":
		m, err = budget.FileMenu(tf.menu, d.N())
	case d.Budget.Step > 0:
		m, err = budget.StepMenu(d.N(), d.Budget.Step, d.Budget.ReportFloor)
	default:
		return nil, usagef("the report menu is missing: give --step S (e.g. 0.05; 1/K for a simplex grid when n > 2) or --menu FILE")
	}
	if err != nil {
		return nil, usagef("%v", err)
	}
	if math.IsNaN(tf.clamp) || tf.clamp < 0 {
		return nil, usagef("--clamp %g must be a probability in [0, 1/%d)", tf.clamp, d.N())
	}
	m.Clamp = tf.clamp
	return m, nil
}

// fitError turns a fit failure into a usage error; an unbounded rule gets
// the two ways out in flag form.
func fitError(err error) error {
	var ue *budget.UnboundedError
	if errors.As(err, &ue) && ue.AtZero {
		return usagef("the rule's effort is %v at report %s when %q happens: the rule is unbounded where a report gives an outcome probability 0, so no budget can hold it. "+
			"Two ways out: --report-floor 0.01 (the menu starts at 1 %%, every report gives each outcome at least that), "+
			"or --clamp 0.01 (every report is paid as if each probability were at least 1 %%; this bends honesty near the boundary, and the table reports by how much)",
			ue.Effort, num.Format(ue.Report), ue.Label)
	}
	return usagef("%v", err)
}

// exportDate is today's date in UTC, or the date of SOURCE_DATE_EPOCH
// when that is set (the reproducible-builds convention), so that exports
// can be made byte for byte again.
func exportDate() string {
	t := time.Now()
	if s := os.Getenv("SOURCE_DATE_EPOCH"); s != "" {
		if sec, err := strconv.ParseInt(s, 10, 64); err == nil {
			t = time.Unix(sec, 0)
		}
	}
	return t.UTC().Format("2006-01-02")
}

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
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintf(tw, "menu\t%s\n", h.menu)
	fmt.Fprintf(tw, "payment\t%s\n", h.payment)
	printLottery(tw, h.lottery)
	fmt.Fprintf(tw, "budget\t%s\n", h.budget)
	fmt.Fprintf(tw, "rounding\t%s\n", h.rounding)
	verdict := "FAILED"
	if h.passed {
		verdict = "passed"
	}
	fmt.Fprintf(tw, "re-check\t%s, smallest margin %s\n", verdict, table.FormatNumber(h.margin))
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
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	cellHead := "beliefs that pick it"
	if binary {
		cellHead = fmt.Sprintf("beliefs in %q that pick it", f.Labels[0])
	}
	fmt.Fprintf(tw, "report\tmargin\t\tclosest rival\t%s\n", cellHead)
	for _, i := range rows {
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
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", num.Format(reps[i]), table.FormatNumber(rc.Margins[i]), verdict, rival, cell)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if more > 0 {
		fmt.Fprintf(w, "... and %d more items (--json lists them all)\n", more)
	}
	return nil
}
