// Package design is the description of a scoring-rule design as a user
// states it — outcomes, the formula or preset, parameters, budget — and
// turns it into the objects the engine computes with. The same Design
// comes from command-line flags, from the workbench and from a saved file.
package design

import (
	"errors"
	"fmt"
	"maps"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"scorewright/generator/formula"
)

// Mode says what the formula of a design describes.
type Mode string

// The modes a design can be in.
const (
	// ModeGenerator: the formula is a concave generator H over p1..pn.
	ModeGenerator Mode = "generator"
	// ModePayout: the formula is somebody's payout pay(p, y) under audit.
	ModePayout Mode = "payout"
	// ModePoint: the formula is a concave phi(x) for point forecasts of a mean.
	ModePoint Mode = "point"
	// ModeEmphasis: the formula is a weight w(c) >= 0 on (0, 1) for n = 2.
	ModeEmphasis Mode = "emphasis"
	// ModePointPayout: the formula is somebody's payout pay(x, y) for a
	// point forecast x of an outcome y on Interval, under audit.
	ModePointPayout Mode = "point-payout"
)

// Modes lists every mode, in the order the workbench cycles through them.
var Modes = []Mode{ModeGenerator, ModePayout, ModeEmphasis, ModePoint, ModePointPayout}

// modeTraits is what a mode asks of a design, so that the document can be
// validated without switching on its mode: the one place that turns a
// mode into engine objects is the root package's Open.
type modeTraits struct {
	mode Mode
	// onInterval: the formula is about a number on Interval (a point
	// forecast) rather than a distribution over Labels.
	onInterval bool
	// payout: the formula is a payout under audit (more is better)
	// rather than a rule's generator.
	payout bool
	// outcomes is the number of outcomes the mode is for; 0 means any
	// from 2 to formula.MaxOutcomes.
	outcomes int
	// withInterval is the mode a design of this mode is when it states an
	// interval (a payout with an interval was a point-forecast payout in
	// files written before that mode had its own name).
	withInterval Mode
	// title and hint are what a mode is called where a user picks it, and
	// what its formula is in ("" for no hint).
	title, hint string
	// sample is the formula a design is first given when it is switched
	// to the mode; "" keeps the formula it has.
	sample string
}

// traits describes every mode. It is a function, not a table in a
// variable, so that nothing can change it.
func traits(m Mode) (modeTraits, bool) {
	for _, t := range []modeTraits{
		{mode: ModeGenerator, title: "generator", hint: "concave H"},
		{mode: ModePayout, payout: true, withInterval: ModePointPayout, title: "payout audit", hint: "pay(p, y)",
			// A scaled quadratic payment, to be replaced by the payout under audit.
			sample: "# pay(p, y): the payment when outcome y happens\n10 - 5*sum((p - hit)^2)"},
		{mode: ModeEmphasis, outcomes: 2, title: "emphasis weight w(c)",
			// The beta family; a = b = 1 is the quadratic rule.
			sample: "# w(c): where the rule puts its incentive\na = 1\nb = 1\nc^(a-1) * (1-c)^(b-1)"},
		{mode: ModePoint, onInterval: true, title: "point forecast phi(x)",
			sample: "-x^2"}, // squared error
		{mode: ModePointPayout, onInterval: true, payout: true, title: "point payout audit", hint: "pay(x, y)",
			// A scaled squared error on [0, 100], paying 0 to 50.
			sample: "# pay(x, y): the payment for report x when the outcome is y\n50 - (x - y)^2 / 200"},
	} {
		if t.mode == m {
			return t, true
		}
	}
	return modeTraits{}, false
}

// OnInterval reports whether the mode is about a number on an interval
// (a point forecast) rather than a distribution over outcomes.
func (m Mode) OnInterval() bool { t, _ := traits(m); return t.onInterval }

// Title is what the mode is called where a user picks it ("" for a mode
// this build does not know), and Hint what its formula is in ("" when
// the title says it).
func (m Mode) Title() (title, hint string) { t, _ := traits(m); return t.title, t.hint }

// Sample is the formula a design is first given when it is switched to
// the mode, "" when it keeps the formula it has.
func (m Mode) Sample() string { t, _ := traits(m); return t.sample }

// Payout reports whether the formula of the mode is a payout under audit
// (more is better) rather than a rule's generator.
func (m Mode) Payout() bool { t, _ := traits(m); return t.payout }

// Outcomes is the number of outcomes the mode is for (2 for an emphasis
// weight), or 0 when it takes any number a design may have.
func (m Mode) Outcomes() int { t, _ := traits(m); return t.outcomes }

// Budget is how a rule is turned into money. Zero values mean "not set".
type Budget struct {
	// Floor and Cap bound every payment over the report menu.
	Floor float64 `toml:"floor"`
	Cap   float64 `toml:"cap"`
	// MeanPay, when set, replaces Cap: the expected payment of a truthful
	// forecaster at the reference belief.
	MeanPay *float64 `toml:"mean_pay,omitempty"`
	// Reference is the reference belief for MeanPay; nil means uniform.
	Reference []float64 `toml:"reference,omitempty"`
	// Step is the report menu step (n = 2) or 1/K for a simplex grid.
	Step float64 `toml:"step"`
	// Unit is the currency rounding unit; 0 means no rounding.
	Unit float64 `toml:"unit"`
	// Rounding is the rounding mode: "nearest" (half away from zero),
	// "down" or "up"; empty means nearest.
	Rounding string `toml:"rounding,omitempty"`
	// ReportFloor is the smallest probability the menu allows (e.g. 0.01),
	// the way out for rules that are infinite at p_k = 0.
	ReportFloor float64 `toml:"report_floor,omitempty"`
	// Clamp, when positive, pays every report as if it gave each outcome
	// at least Clamp (rescaled to sum to 1): the other way out for rules
	// that are infinite at p_k = 0. It bends honesty near the boundary,
	// and the menu re-check says by how much.
	Clamp float64 `toml:"clamp,omitempty"`
	// Menu, when set, is a CSV file of the reports the contract allows,
	// one per line, instead of Step's grid (the two are not set
	// together). A relative path is relative to the design file's
	// folder (Design.MenuPath), and saving elsewhere rewrites it.
	Menu string `toml:"menu,omitempty"`
}

// Design is everything that defines a scoring rule and its contract.
type Design struct {
	// Version is the file schema version.
	Version int `toml:"version"`
	// Title is a free-text name for the design.
	Title string `toml:"title,omitempty"`
	// Labels name the outcomes; their count is n.
	Labels []string `toml:"outcomes"`
	// Ordered marks ordinal outcomes.
	Ordered bool `toml:"ordered,omitempty"`
	// Mode says what Formula describes.
	Mode Mode `toml:"mode"`
	// Preset is the preset the formula came from, if any.
	Preset string `toml:"preset,omitempty"`
	// Formula is the formula text in scorewright's formula language.
	Formula string `toml:"formula"`
	// Params override parameter values of the formula.
	Params map[string]float64 `toml:"params,omitempty"`
	// Weights are outcome weights (w inside sum).
	Weights []float64 `toml:"weights,omitempty"`
	// Interval is [lo, hi] for point forecasts.
	Interval []float64 `toml:"interval,omitempty"`
	// Budget is the contract's money side.
	Budget Budget `toml:"budget"`
	// Contract is who pays whom, in which currency, over which season.
	Contract Contract `toml:"contract,omitempty"`
	// Dir is the folder of the file the design was opened from or saved
	// to, where a relative Budget.Menu is read from (MenuPath); "" for a
	// design never saved. It is not part of the file.
	Dir string `toml:"-" json:"-"`
}

// SchemaVersion is the design file version this build writes.
const SchemaVersion = 1

// Clone is a deep copy of d: no slice, map or pointer is shared, so a
// copy handed to a background job never changes under it.
func (d *Design) Clone() *Design {
	c := *d
	c.Labels = slices.Clone(d.Labels)
	c.Weights = slices.Clone(d.Weights)
	c.Interval = slices.Clone(d.Interval)
	c.Params = maps.Clone(d.Params)
	c.Budget.Reference = slices.Clone(d.Budget.Reference)
	c.Contract.BaseRate = slices.Clone(d.Contract.BaseRate)
	if d.Budget.MeanPay != nil {
		v := *d.Budget.MeanPay
		c.Budget.MeanPay = &v
	}
	return &c
}

// N is the number of outcomes.
func (d *Design) N() int { return len(d.Labels) }

// DefaultLabels returns "1".."n".
func DefaultLabels(n int) []string {
	l := make([]string, n)
	for i := range l {
		l[i] = strconv.Itoa(i + 1)
	}
	return l
}

// ParseOutcomes reads the --outcomes form: a count "3" or labels
// "frost,no frost".
func ParseOutcomes(s string) ([]string, error) {
	s = strings.TrimSpace(s)
	if n, err := strconv.Atoi(s); err == nil {
		if n < 2 || n > formula.MaxOutcomes {
			return nil, fmt.Errorf("outcome count %d is outside 2..%d", n, formula.MaxOutcomes)
		}
		return DefaultLabels(n), nil
	}
	parts := strings.Split(s, ",")
	seen := map[string]bool{}
	for i, p := range parts {
		p = strings.TrimSpace(p)
		if err := CheckLabel(p); err != nil {
			return nil, fmt.Errorf("outcome label %d %w", i+1, err)
		}
		if seen[p] {
			return nil, fmt.Errorf("outcome label %q appears twice", p)
		}
		seen[p] = true
		parts[i] = p
	}
	if len(parts) < 2 || len(parts) > formula.MaxOutcomes {
		return nil, fmt.Errorf("%d outcome labels given; need 2..%d", len(parts), formula.MaxOutcomes)
	}
	return parts, nil
}

// MaxLabel is the longest outcome label, in bytes; a label heads a table
// column.
const MaxLabel = 200

// ReservedLabels are the names of the fixed columns of history and pay-out
// files; an outcome named like one would collide with it.
var reservedLabels = []string{"forecaster", "question", "outcome", "line"}

// CheckLabel says what is wrong with an outcome label, or returns nil. A
// label goes into CSV headers, comma-separated flags such as --reference
// and --outcomes of a second rule, annex tables and terminal lines, so it
// must be one line of printable text without commas, and must not be
// named like a fixed column. The error reads after "label N".
func CheckLabel(l string) error {
	switch {
	case strings.TrimSpace(l) == "":
		return errors.New("is empty")
	case len(l) > MaxLabel:
		return fmt.Errorf("is %d bytes long; a label may have at most %d", len(l), MaxLabel)
	case strings.Contains(l, ","):
		return fmt.Errorf("%q has a comma, which separates labels in flags and files", l)
	case !utf8.ValidString(l):
		return fmt.Errorf("%q is not valid UTF-8 text", l)
	}
	for _, r := range l {
		if unicode.IsControl(r) {
			return fmt.Errorf("%q has a control character (%U); labels are one line of printable text", l, r)
		}
		if unicode.Is(unicode.Bidi_Control, r) {
			return fmt.Errorf("%q has a bidirectional control character (%U), which can reorder how the label and the text after it display; write the label without it", l, r)
		}
	}
	for _, c := range reservedLabels {
		if strings.EqualFold(strings.TrimSpace(l), c) {
			return fmt.Errorf("%q is the name of a fixed column of history and pay-out files; choose another", l)
		}
	}
	return nil
}
