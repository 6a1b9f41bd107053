package table

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"scorewright/internal/num"
	"scorewright/internal/numfmt"
)

// Kind says what the values of a table are.
type Kind string

// KindMoney: values are payments in currency.
const KindMoney Kind = "money"

// Caution returns the caution every export carries, a fresh slice each
// call so that a transform can append its own line.
func Caution() []string {
	return []string{
		"scorewright checks mathematics, not law.",
		"Payment schemes (lottery-style payments especially) can be regulated, for example as gambling, wages or prizes.",
		"Have any contract that uses this table reviewed by qualified counsel.",
	}
}

// Table is a payment table with its record.
type Table struct {
	// Kind says what Values are.
	Kind Kind
	// ValueName heads the value columns: "pay" gives "pay if frost".
	ValueName string
	// Decimals is how many decimals values are written with; negative
	// means the shortest form that reads back as the same float64.
	Decimals int
	// Labels name the outcomes.
	Labels []string
	// Reports are the menu items, one probability vector per row; or,
	// when ReportName is set, one number per row.
	Reports [][]float64
	// ReportName, when set, makes this a point-forecast table: each report
	// is a single number (a forecast of a mean) headed ReportName, and
	// Labels name the outcome columns (values of the quantity) instead of
	// the outcomes a probability is given to.
	ReportName string
	// Values[i][k] is the value of report i when outcome k happens.
	Values [][]float64
	// Meta is the record that travels with the table.
	Meta Meta
}

// Meta is the metadata block of an export. Every field is written by every
// format; the machine-readable numbers (Unit, RoundingMode, Floor, Cap) go
// to JSON as numbers and to the other formats inside the Budget and
// Rounding sentences.
type Meta struct {
	Title   string `json:"title,omitempty"`
	Formula string `json:"formula"`
	// FormulaRole says what the formula is (a generator, an emphasis
	// weight, a point-forecast generator), so that nobody reads a weight
	// in c as a generator.
	FormulaRole string             `json:"formula_role,omitempty"`
	Preset      string             `json:"preset,omitempty"`
	Params      map[string]float64 `json:"params,omitempty"`
	// Weights are the outcome weights (w inside sum), when the rule has
	// them; Ordered says the outcomes are ordered (csum). Both change the
	// rule, so a table without them could not be made again.
	Weights  []num.Float `json:"weights,omitempty"`
	Ordered  bool        `json:"ordered,omitempty"`
	Outcomes []string    `json:"outcomes"`
	// Currency labels the money amounts of the table ("" for none).
	Currency string `json:"currency,omitempty"`
	// Menu describes the reports the contract allows.
	Menu string `json:"menu"`
	// Payment states the payment formula in words.
	Payment string    `json:"payment"`
	A       num.Float `json:"A"`
	B       num.Float `json:"B"`
	// Budget states what the fit aimed at.
	Budget string `json:"budget"`
	// Rounding states the unit and mode.
	Rounding     string    `json:"rounding"`
	Unit         num.Float `json:"unit"`
	RoundingMode string    `json:"rounding_mode"`
	Floor        num.Float `json:"floor"`
	Cap          num.Float `json:"cap"`
	// Passed is the verdict of the re-check after scaling and rounding.
	Passed bool `json:"recheck_passed"`
	// Verdict explains the re-check in one sentence.
	Verdict string `json:"recheck_verdict"`
	// VerdictKind records what the rule's verdict rests on: GridEvidence
	// (the menu re-check and the grid checks sample beliefs), or what an
	// interval certificate proved over the whole simplex, "certified
	// strictly proper" or "certified proper" (a payout's "certified
	// epsilon-proper to E"); Certificate then says how.
	VerdictKind string `json:"verdict_kind"`
	Certificate string `json:"certificate,omitempty"`
	// MinMargin is the smallest incentive margin, in the table's values.
	MinMargin num.Float `json:"min_margin"`
	// Warnings are shown prominently; a table exported despite a failed
	// re-check carries one.
	Warnings []string `json:"warnings,omitempty"`
	// Notes are further findings (truthful pay range, clamp gap...).
	Notes   []string `json:"notes,omitempty"`
	Version string   `json:"tool_version"`
	Date    string   `json:"date"`
	// Cautions close every export; transforms may add lines.
	Cautions []string `json:"caution"`
}

// GridEvidence is the verdict kind a table records when no certificate
// proved its rule honest (Meta.VerdictKind).
const GridEvidence = "grid evidence"

// Field is one line of the metadata block.
type Field struct{ Key, Value string }

// Fields returns the metadata block in the order every text format writes
// it. Warnings come first so nobody reads past them.
func (m *Meta) Fields() []Field {
	var f []Field
	add := func(k, v string) {
		if v != "" {
			f = append(f, Field{k, v})
		}
	}
	for _, w := range m.Warnings {
		add("WARNING", w)
	}
	add("title", m.Title)
	add("formula", formulaLine(m.Formula))
	add("formula is", m.FormulaRole)
	add("preset", m.Preset)
	add("parameters", formatParams(m.Params))
	if len(m.Weights) > 0 {
		w := make([]string, len(m.Weights))
		for i, v := range m.Weights {
			w[i] = FormatNumber(float64(v))
		}
		add("outcome weights", strings.Join(w, ", "))
	}
	outcomes := strings.Join(m.Outcomes, ", ")
	if m.Ordered {
		outcomes += " (ordered)"
	}
	add("outcomes", outcomes)
	add("currency", m.Currency)
	add("menu", m.Menu)
	add("payment", m.Payment)
	add("A", FormatNumber(float64(m.A)))
	add("B", FormatNumber(float64(m.B)))
	add("budget", m.Budget)
	add("rounding", m.Rounding)
	verdict := "FAILED"
	if m.Passed {
		verdict = "passed"
	}
	add("re-check", verdict+": "+m.Verdict)
	add("smallest margin", numfmt.Margin(float64(m.MinMargin)))
	add("verdict kind", m.VerdictKind)
	add("certificate", m.Certificate)
	for _, n := range m.Notes {
		add("note", n)
	}
	add("tool", "scorewright "+m.Version)
	add("date", m.Date)
	for _, c := range m.Cautions {
		add("caution", c)
	}
	return f
}

// formulaLine writes a formula of several lines (parameter lines, then
// the expression) on one line, lines separated by "; ". Comments are
// dropped: a formula opening with "# power family" would otherwise make
// the whole one-line form a comment. The formula language has no strings,
// so '#' always starts a comment; the full text travels in the design.
func formulaLine(src string) string {
	var lines []string
	for _, l := range strings.Split(src, "\n") {
		if i := strings.IndexByte(l, '#'); i >= 0 {
			l = l[:i]
		}
		if l = strings.TrimSpace(l); l != "" {
			lines = append(lines, l)
		}
	}
	return strings.Join(lines, "; ")
}

func formatParams(p map[string]float64) string {
	if len(p) == 0 {
		return ""
	}
	keys := make([]string, 0, len(p))
	for k := range p {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	parts := make([]string, len(keys))
	for i, k := range keys {
		parts[i] = k + " = " + FormatNumber(p[k])
	}
	return strings.Join(parts, ", ")
}

// FormatNumber writes a metadata number with ten significant digits.
func FormatNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprint(v)
	}
	if v == 0 {
		v = 0
	}
	return strconv.FormatFloat(v, 'g', 10, 64)
}

// Value formats a table value with the table's decimals.
func (t *Table) Value(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprint(v)
	}
	if t.Decimals < 0 {
		return strconv.FormatFloat(v+0, 'g', -1, 64)
	}
	s := strconv.FormatFloat(v, 'f', t.Decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// Probability formats a report entry: the shortest form that reads back
// as the same float64, positional from 1e-4 up to 1e15 (so a point
// forecast 1000000.1 is not written 1.0000001e+06).
func Probability(v float64) string {
	if a := math.Abs(v); a >= 1e-4 && a < 1e15 {
		return strconv.FormatFloat(v+0, 'f', -1, 64)
	}
	return strconv.FormatFloat(v+0, 'g', -1, 64)
}

// ReportHeader is the heading of report column k: the probability of
// outcome k, or the point forecast.
func (t *Table) ReportHeader(k int) string {
	if t.ReportName != "" {
		return t.ReportName
	}
	return "report " + t.Labels[k]
}

// ReportColumns is the number of report columns: one per outcome, or one
// for a point-forecast table.
func (t *Table) ReportColumns() int {
	if t.ReportName != "" {
		return 1
	}
	return len(t.Labels)
}

// ValueHeader is the column heading for the value when outcome k happens.
// A money table with a currency says it: "pay if frost (EUR)".
func (t *Table) ValueHeader(k int) string {
	h := t.ValueName + " if " + t.Labels[k]
	if t.Kind == KindMoney && t.Meta.Currency != "" {
		h += " (" + t.Meta.Currency + ")"
	}
	return h
}

// Check reports a table whose shape does not add up; writers call it so
// that a malformed table is an error, not a garbled file.
func (t *Table) Check() error {
	n := len(t.Labels)
	if n < 2 {
		return fmt.Errorf("table: %d outcome labels", n)
	}
	if len(t.Reports) != len(t.Values) || len(t.Reports) == 0 {
		return fmt.Errorf("table: %d reports and %d value rows", len(t.Reports), len(t.Values))
	}
	for i := range t.Reports {
		if len(t.Reports[i]) != t.ReportColumns() || len(t.Values[i]) != n {
			return fmt.Errorf("table: row %d does not have %d report and %d value entries", i+1, t.ReportColumns(), n)
		}
	}
	if t.ValueName == "" {
		return fmt.Errorf("table: no value name")
	}
	return nil
}
