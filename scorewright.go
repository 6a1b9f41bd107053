package scorewright

import (
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/generator/emphasis"
	"scorewright/generator/formula"
	"scorewright/generator/payout"
	"scorewright/generator/point"
	"scorewright/verify/pointcheck"
)

// Rule is a design compiled for the engine. Exactly one of its engine
// objects is set, the one the design's mode calls for. Create it with Open.
type Rule struct {
	d *design.Design // a private copy

	outcomes *bregman.Rule      // generator and emphasis modes
	point    *point.Generator   // point mode
	payout   *payout.Payout     // payout mode
	pointPay *pointcheck.Payout // point-payout mode
	// pointProg is the point payout's program, for drawing it.
	pointProg *formula.Program

	params   []formula.ParamValue
	warnings []string
}

// FormulaError is a design whose formula does not compile, naming which
// formula it is ("generator", "emphasis", "point-forecast generator",
// "payout") the way the command line words it.
type FormulaError struct {
	// Formula says which formula of the design it is.
	Formula string
	// Err is the compiler's error, a *formula.Error when the formula's
	// text is at fault.
	Err error
}

func (e *FormulaError) Error() string {
	var fe *formula.Error
	if errors.As(e.Err, &fe) {
		return fmt.Sprintf("%s formula %s", e.Formula, fe.Error())
	}
	return fmt.Sprintf("%s formula: %v", e.Formula, e.Err)
}

// Unwrap returns the compiler's error.
func (e *FormulaError) Unwrap() error { return e.Err }

// formulaError names the formula of a compile error; errors that are not
// about the formula's text (an emphasis weight negative somewhere, say)
// pass unchanged unless always is set.
func formulaError(which string, err error, always bool) error {
	var fe *formula.Error
	if err == nil {
		return nil
	}
	if always || errors.As(err, &fe) {
		return &FormulaError{Formula: which, Err: err}
	}
	return err
}

// Open compiles a copy of d for the engine. The design's mode decides
// what its formula is: a generator H or an emphasis weight (a rule over
// outcomes), a point-forecast generator phi on an interval, or a payout
// under audit over outcomes or on an interval. Errors name the formula
// (a *FormulaError) or the field at fault; Open never panics.
func Open(d *design.Design) (*Rule, error) {
	r := &Rule{d: d.Clone()}
	d = r.d
	var err error
	switch d.Mode {
	case design.ModeGenerator, "":
		err = r.openGenerator()
	case design.ModeEmphasis:
		err = r.openEmphasis()
	case design.ModePoint:
		err = r.openPoint()
	case design.ModePayout:
		err = r.openPayout()
	case design.ModePointPayout:
		err = r.openPointPayout()
	default:
		err = fmt.Errorf("mode: %q is not a mode this build knows", d.Mode)
	}
	if err != nil {
		return nil, err
	}
	return r, nil
}

func (r *Rule) openGenerator() error {
	d := r.d
	f, err := bregman.NewFormula(d.Formula, bregman.Options{Outcomes: d.N(), Ordered: d.Ordered, Weights: d.Weights, Params: d.Params})
	if err != nil {
		return formulaError("generator", err, true)
	}
	r.outcomes = &bregman.Rule{Gen: f, Labels: d.Labels, Ordered: d.Ordered}
	r.params = f.Program().Params()
	return nil
}

// openEmphasis integrates the weight twice into a yes/no rule. A weight
// that is negative or not finite somewhere on the check grid is refused,
// naming where; an unbounded rule is built, and says so in Warnings.
func (r *Rule) openEmphasis() error {
	d := r.d
	if d.N() != 2 {
		return fmt.Errorf("an emphasis weight designs rules for 2 outcomes; the design has %d", d.N())
	}
	g, err := emphasis.New(d.Formula, emphasis.Options{Params: d.Params})
	if err != nil {
		return formulaError("emphasis", err, false)
	}
	if err := g.Diagnostics().Problem(); err != nil {
		return err
	}
	r.outcomes = &bregman.Rule{Gen: g, Labels: d.Labels}
	r.params, r.warnings = g.Program().Params(), g.Diagnostics().Warnings()
	return nil
}

// errNoInterval is a point design without a usable interval.
var errNoInterval = errors.New("a point-forecast design needs an interval lo < hi")

func (r *Rule) openPoint() error {
	d := r.d
	if len(d.Interval) != 2 || !(d.Interval[0] < d.Interval[1]) {
		return errNoInterval
	}
	g, err := point.New(d.Formula, d.Interval[0], d.Interval[1], point.Options{Params: d.Params})
	if err != nil {
		return formulaError("point-forecast generator", err, false)
	}
	r.point, r.params = g, g.Program().Params()
	return nil
}

func (r *Rule) openPayout() error {
	d := r.d
	p, err := payout.New(d.Formula, payout.Options{Outcomes: d.N(), Ordered: d.Ordered, Weights: d.Weights, Params: d.Params})
	if err != nil {
		return formulaError("payout", err, true)
	}
	r.payout, r.params = p, p.Program(1).Params()
	return nil
}

func (r *Rule) openPointPayout() error {
	d := r.d
	if len(d.Interval) != 2 || !(d.Interval[0] < d.Interval[1]) {
		return errNoInterval
	}
	prog, err := formula.CompileString(d.Formula, PointPayoutScope(d.Params))
	if err == nil {
		r.pointPay, err = pointcheck.NewPayout(d.Formula, d.Params)
	}
	if err != nil {
		return formulaError("payout", err, false)
	}
	r.pointProg, r.params = prog, prog.Params()
	return nil
}

// PointPayoutScope is the formula scope of a point-forecast payout: the
// report x and the outcome y, as verify/pointcheck compiles it.
func PointPayoutScope(params map[string]float64) formula.Scope {
	return formula.Scope{Vars: []string{"x", "y"}, Params: params}
}

// Design is a copy of the design the rule was opened from.
func (r *Rule) Design() *design.Design { return r.d.Clone() }

// Mode is the design's mode.
func (r *Rule) Mode() design.Mode { return r.d.Mode }

// Params are the formula's parameters with the values in force.
func (r *Rule) Params() []formula.ParamValue { return r.params }

// Warnings are remarks a user should see beside the rule's numbers, such
// as an emphasis weight that makes the rule unbounded.
func (r *Rule) Warnings() []string { return r.warnings }

// OnInterval reports whether the rule is about a number on an interval
// (a point forecast) rather than a distribution over outcomes.
func (r *Rule) OnInterval() bool { return r.point != nil || r.pointPay != nil }

// IsPayout reports whether the formula is a payout under audit (more is
// better) rather than a rule's generator (less effort is better).
func (r *Rule) IsPayout() bool { return r.payout != nil || r.pointPay != nil }

// Outcomes is the Bregman rule of a generator or emphasis design; nil in
// every other mode.
func (r *Rule) Outcomes() *bregman.Rule { return r.outcomes }

// Point is the point-forecast generator of a point design; nil otherwise.
func (r *Rule) Point() *point.Generator { return r.point }

// Payout is the payout over outcomes of a payout design; nil otherwise.
func (r *Rule) Payout() *payout.Payout { return r.payout }

// PointPayout is the payout pay(x, y) of a point-payout design and its
// program; nil otherwise.
func (r *Rule) PointPayout() (*pointcheck.Payout, *formula.Program) { return r.pointPay, r.pointProg }

// NeedsOutcomesError is asking a rule over outcomes of a design in
// another mode.
type NeedsOutcomesError struct{ Mode design.Mode }

func (e *NeedsOutcomesError) Error() string {
	return fmt.Sprintf("this command needs a generator rule over outcomes, and the design is in %s mode", e.Mode)
}

// OverOutcomes is the Bregman rule the money side (tables, backtests,
// risk) works on, or a *NeedsOutcomesError naming the design's mode.
func (r *Rule) OverOutcomes() (*bregman.Rule, error) {
	if r.outcomes == nil {
		return nil, &NeedsOutcomesError{Mode: r.d.Mode}
	}
	return r.outcomes, nil
}

// FormulaRole says, for the record, what the design's formula is.
func (r *Rule) FormulaRole() string {
	if r.d.Mode == design.ModeEmphasis {
		return "the emphasis weight w(c) of a yes/no rule, integrated twice into its generator (Schervish 1989), normalised so that a certain, correct forecast costs 0"
	}
	return "the generator H(p), concave; efforts by the Bregman construction L(p, k) = H(p) + dH_k - <dH, p>"
}

// Kind names the kind of formula the way reports introduce it:
// "generator", "emphasis", "point", "payout", "point-payout".
func (r *Rule) Kind() string {
	if r.d.Mode == "" {
		return string(design.ModeGenerator)
	}
	return string(r.d.Mode)
}

// Statement says what the design's formula is in one line, with its
// parameters (the formula's defaults, overridden by the design) after it,
// e.g. "emphasis w(c) = c^(a-1) * (1-c)^(b-1) with a = 2, b = 1". The
// parameter lines are the ones the formula parser reads as such.
func (r *Rule) Statement() string {
	kind := "generator H = "
	switch r.d.Mode {
	case design.ModeEmphasis:
		kind = "emphasis w(c) = "
	case design.ModePoint:
		kind = "point-forecast phi(x) = "
	case design.ModePayout, design.ModePointPayout:
		kind = "payout = "
	}
	paramLine := map[int]bool{}
	if f, err := formula.Parse(r.d.Formula); err == nil {
		for _, p := range f.Params {
			paramLine[p.At.Line] = true
		}
	}
	var expr []string
	for i, line := range strings.Split(r.d.Formula, "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.HasPrefix(line, "#") || paramLine[i+1] {
			continue
		}
		expr = append(expr, line)
	}
	s := kind + strings.Join(expr, " ")
	if len(r.params) == 0 {
		return s
	}
	params := slices.Clone(r.params)
	slices.SortFunc(params, func(a, b formula.ParamValue) int { return strings.Compare(a.Name, b.Name) })
	ps := make([]string, len(params))
	for i, p := range params {
		ps[i] = p.Name + " = " + strconv.FormatFloat(p.Value, 'g', -1, 64)
	}
	return s + " with " + strings.Join(ps, ", ")
}
