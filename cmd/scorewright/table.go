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
	"strconv"
	"strings"
	"time"

	"scorewright"
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
	d, err := rf.design(e.stderr)
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
		return writePointTable(e, d, t, tb, format, tf, r.Point())
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
		m, err = scorewright.FileMenu(tf.menu, d.N())
	case d.Budget.Menu != "" && !stepSet:
		// The design's own menu file, as the workbench fits it.
		m, err = scorewright.DesignMenu(d)
	case d.Budget.Step > 0:
		m, err = scorewright.StepMenu(d.N(), d.Budget)
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
	if m.Clamp == 0 {
		m.Clamp = d.Budget.Clamp // the design's clamp, unless the flag gives one
	}
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
