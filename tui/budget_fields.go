package tui

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"scorewright/generator/design"
	"scorewright/generator/formula"
	"scorewright/internal/num"
)

// budgetField is one editable line of the budget pane: a field of the
// design's budget, or one the table depends on (weights, currency, season).
type budgetField struct {
	// help is the short help beside the value; hint the longer one shown
	// while the value is typed.
	label, help, hint string
	// show is the value as the pane prints it; edit the text the input
	// starts from (show when nil).
	show, edit func(d *design.Design) string
	// parse sets the field of d (a trial copy) from typed text.
	parse func(d *design.Design, s string) error
	// step moves the field of d (a trial copy) one step; nil: typed only.
	step func(d *design.Design, up, fine bool) error
	// off says why the field does not apply to d ("" when it does).
	off func(d *design.Design) string
}

// errNoStep is a step refused with nothing to say but the field's own help.
var errNoStep = errors.New("type a value: enter")

// Steps the fields with a list cycle through.
var (
	probSteps  = []float64{0.01, 0.02, 0.025, 0.05, 0.1, 0.125, 0.2, 0.25, 0.5}
	unitSteps  = []float64{0, 0.01, 0.05, 0.1, 0.25, 0.5, 1, 5, 10}
	floorSteps = []float64{0, 0.001, 0.005, 0.01, 0.02, 0.05}
	roundModes = []string{"nearest", "down", "up"}
)

// fmtNum prints a field's number the short way.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }

// parseNum reads a finite number.
func parseNum(s string) (float64, error) {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a finite number", strings.TrimSpace(s))
	}
	return v, nil
}

// numberField is a plain number field stepped by ±step (a tenth with
// shift), or through steps when given.
func numberField(label, help string, at func(d *design.Design) *float64, step float64, steps []float64) budgetField {
	return budgetField{label: label, help: help,
		show:  func(d *design.Design) string { return fmtNum(*at(d)) },
		edit:  func(d *design.Design) string { return strconv.FormatFloat(*at(d), 'g', -1, 64) },
		parse: func(d *design.Design, s string) error { v, err := parseNum(s); *at(d) = v; return err },
		step: func(d *design.Design, up, fine bool) error {
			if steps != nil {
				*at(d) = nextStep(steps, *at(d), up)
				return nil
			}
			s := step
			if fine {
				s /= 10
			}
			if !up {
				s = -s
			}
			*at(d) = math.Round((*at(d)+s)*1e9) / 1e9
			return nil
		}}
}

// notOnInterval is the off test of fields only rules over outcomes have.
func notOnInterval(d *design.Design) string {
	if d.Mode.OnInterval() {
		return "not for point-forecast tables"
	}
	return ""
}

// fieldsFor lists the fields that apply to d: a point-forecast table has
// no mean pay, menu file, report floor, clamp or weights, so those rows go.
func fieldsFor(d *design.Design) []budgetField {
	var out []budgetField
	for _, f := range budgetFields() {
		if f.off == nil || f.off(d) != notOnInterval(d) || !d.Mode.OnInterval() {
			out = append(out, f)
		}
	}
	return out
}

// budgetFields lists the pane's fields, fresh on each call.
func budgetFields() []budgetField {
	floor := numberField("Floor", "smallest payment", func(d *design.Design) *float64 { return &d.Budget.Floor }, 1, nil)
	capf := numberField("Cap", "largest payment", func(d *design.Design) *float64 { return &d.Budget.Cap }, 1, nil)
	step := numberField("Step", "report menu step", func(d *design.Design) *float64 { return &d.Budget.Step }, 0, probSteps)
	step.step = stepMenuStep
	step.show = func(d *design.Design) string {
		if d.Mode.OnInterval() && d.Budget.Step == 0 {
			return "auto" // the table's default: a twentieth of the interval
		}
		if d.Budget.Menu != "" && d.Budget.Step == 0 {
			return "menu file" // the Menu field's file replaces the grid
		}
		return fmtNum(d.Budget.Step)
	}
	step.parse = func(d *design.Design, s string) error {
		v, err := parseNum(s)
		d.Budget.Step = v
		if err == nil && v != 0 {
			d.Budget.Menu = "" // the step's grid replaces a menu file
		}
		return err
	}
	unit := numberField("Unit", "rounding unit", func(d *design.Design) *float64 { return &d.Budget.Unit }, 0, unitSteps)
	unit.hint = "payments are whole multiples of this (0: no rounding)"
	step.hint = "reports on a grid of this step (1/K); replaces a menu file"
	rfloor := numberField("R.floor", "smallest report p", func(d *design.Design) *float64 { return &d.Budget.ReportFloor }, 0, floorSteps)
	rfloor.off = func(d *design.Design) string {
		if d.Budget.Menu != "" && !d.Mode.OnInterval() {
			return "not used with a menu file"
		}
		return notOnInterval(d)
	}
	rfloor.hint = "each report gives every outcome at least this (0: none)"
	clamp := numberField("Clamp", "pay each p as ≥ it", func(d *design.Design) *float64 { return &d.Budget.Clamp }, 0, floorSteps)
	clamp.off = notOnInterval
	clamp.hint = "paid as if each p were at least this (0: none); bends honesty near 0"
	return []budgetField{floor, capf, meanField(), referenceField(), step, menuField(), rfloor, clamp, unit, roundingField(),
		weightsField(), termsBudgetField("Currency"), termsBudgetField("Forecasts")}
}

// stepMenuStep steps the menu step: through probSteps over outcomes, in
// hundredths of the interval for point forecasts.
func stepMenuStep(d *design.Design, up, _ bool) error {
	d.Budget.Menu = ""
	if !d.Mode.OnInterval() || len(d.Interval) != 2 {
		d.Budget.Step = nextStep(probSteps, d.Budget.Step, up)
		return nil
	}
	w := d.Interval[1] - d.Interval[0]
	s := w / 100
	if !up {
		s = -s
	}
	d.Budget.Step = math.Max(0, math.Round((d.Budget.Step+s)/w*100)*w/100)
	return nil
}

// meanField is the mean pay target; none leaves the cap in charge.
func meanField() budgetField {
	return budgetField{label: "Mean", help: "truthful mean pay", hint: "an honest forecaster's mean pay at Ref.; 0: none, the cap rules", off: notOnInterval,
		show: func(d *design.Design) string {
			if d.Budget.MeanPay == nil {
				return "none"
			}
			return fmtNum(*d.Budget.MeanPay)
		},
		edit: func(d *design.Design) string {
			if d.Budget.MeanPay == nil {
				return "0"
			}
			return strconv.FormatFloat(*d.Budget.MeanPay, 'g', -1, 64)
		},
		parse: func(d *design.Design, s string) error {
			v, err := parseNum(s)
			setMean(d, v)
			return err
		},
		step: func(d *design.Design, up, fine bool) error {
			b := &d.Budget
			s := 1.0
			if fine {
				s = 0.1
			}
			switch {
			case b.MeanPay == nil && !up:
				return errors.New("no mean pay is set")
			case b.MeanPay == nil:
				// From none: three quarters of the way from floor to cap,
				// what the quadratic rule pays a uniform belief.
				setMean(d, math.Round(b.Floor+0.75*(b.Cap-b.Floor)))
			case !up && *b.MeanPay-s <= b.Floor:
				setMean(d, 0) // stepping to the floor clears the mean pay
			case up:
				setMean(d, math.Round((*b.MeanPay+s)*1e9)/1e9)
			default:
				setMean(d, math.Round((*b.MeanPay-s)*1e9)/1e9)
			}
			return nil
		}}
}

// setMean sets the mean pay target; v <= 0 clears it and the reference
// belief that goes with it.
func setMean(d *design.Design, v float64) {
	if v <= 0 {
		d.Budget.MeanPay, d.Budget.Reference = nil, nil
		return
	}
	d.Budget.MeanPay = &v
}

// referenceField is the belief the mean pay is taken at.
func referenceField() budgetField {
	return budgetField{label: "Ref.", help: "mean pay's belief", hint: "the belief the mean pay is taken at, q1, q2, … (blank: uniform)",
		off: func(d *design.Design) string {
			if why := notOnInterval(d); why != "" {
				return why
			}
			if d.Budget.MeanPay == nil {
				return "set a mean pay first"
			}
			return ""
		},
		show: func(d *design.Design) string { return vecText(d.Budget.Reference, "uniform") },
		edit: func(d *design.Design) string { return vecText(d.Budget.Reference, "") },
		parse: func(d *design.Design, s string) error {
			q, err := distOrBlank(s, d.N(), "reference belief")
			d.Budget.Reference = q
			return err
		}}
}

// vecText is a vector as typed, q1, q2, …; none when nil.
func vecText(v []float64, none string) string {
	if v == nil {
		return none
	}
	return strings.Trim(num.Format(v), "()")
}

// distOrBlank reads a probability vector over n outcomes, or nil from a
// blank; what names it in the error.
func distOrBlank(s string, n int, what string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	q, err := num.ParseDistribution(s, n)
	if err != nil {
		return nil, fmt.Errorf("%s: %v", what, err)
	}
	return q, nil
}

// menuField names a CSV file of reports that replaces the step's grid.
func menuField() budgetField {
	return budgetField{label: "Menu", help: "CSV of reports", hint: "a CSV file, one report a line, relative to the design file's folder (blank: the step's grid)", off: notOnInterval,
		show: func(d *design.Design) string {
			if d.Budget.Menu == "" {
				return "step grid"
			}
			return d.Budget.Menu
		},
		edit: func(d *design.Design) string { return d.Budget.Menu },
		parse: func(d *design.Design, s string) error {
			d.Budget.Menu = strings.TrimSpace(s)
			if d.Budget.Menu != "" {
				d.Budget.Step = 0 // the file replaces the step's grid
			} else if d.Budget.Step == 0 {
				d.Budget.Step = 0.05
			}
			return nil
		}}
}

// roundingField cycles the rounding mode.
func roundingField() budgetField {
	mode := func(d *design.Design) string {
		if d.Budget.Rounding == "" {
			return "nearest"
		}
		return d.Budget.Rounding
	}
	return budgetField{label: "Rounding", help: "nearest/down/up", hint: "how payments are rounded to the unit: nearest, down or up",
		show: mode,
		parse: func(d *design.Design, s string) error {
			d.Budget.Rounding = strings.ToLower(strings.TrimSpace(s))
			return nil
		},
		step: func(d *design.Design, up, _ bool) error {
			i := 0
			for j, m := range roundModes {
				if m == mode(d) {
					i = j
				}
			}
			if up {
				i = (i + 1) % len(roundModes)
			} else {
				i = (i + len(roundModes) - 1) % len(roundModes)
			}
			d.Budget.Rounding = roundModes[i]
			return nil
		}}
}

// weightsField is the outcome weights (w inside sum of the formula).
func weightsField() budgetField {
	return budgetField{label: "Weights", help: "outcome weights", hint: "outcome weights w1, w2, … for w in the formula (blank: none)", off: notOnInterval,
		show: func(d *design.Design) string { return vecText(d.Weights, "none") },
		edit: func(d *design.Design) string { return vecText(d.Weights, "") },
		parse: func(d *design.Design, s string) error {
			if strings.TrimSpace(s) == "" {
				d.Weights = nil
				return nil
			}
			w, err := num.ParseVector(s)
			if err != nil {
				return fmt.Errorf("weights: %v", err)
			}
			// As `scorewright table` refuses them: weights the formula never
			// reads change nothing, and a saved design would not run there.
			if f, err := formula.Parse(d.Formula); err == nil && !f.Uses("w") {
				return errors.New("weights: the formula does not use the outcome weights w, so they would change nothing; use a weighted preset or a formula with w inside sum")
			}
			d.Weights = w
			return nil
		}}
}

// termsBudgetField is a field of the annex's terms (tui/terms.go) that the
// budget pane edits too, because the cost of the contract depends on it.
func termsBudgetField(label string) budgetField {
	var tf termsField
	for _, f := range termsFields() {
		if f.label == label {
			tf = f
		}
	}
	help := map[string]string{"Currency": "labels amounts", "Forecasts": "per season"}[label]
	f := budgetField{label: label, help: help, hint: tf.help,
		show: func(d *design.Design) string {
			if v := tf.get(d); v != "" {
				return v
			}
			return "not stated"
		},
		edit:  tf.get,
		parse: func(d *design.Design, s string) error { return tf.set(d, strings.TrimSpace(s)) },
	}
	if label == "Forecasts" {
		f.step = func(d *design.Design, up, fine bool) error {
			s := 10
			if fine {
				s = 1
			}
			if !up {
				s = -s
			}
			d.Contract.Forecasts = max(0, d.Contract.Forecasts+s)
			return nil
		}
	}
	return f
}

// validField checks a trial design after a field changed: the budget, the
// contract and the weights. Only a problem the edit brought is refused,
// so an unrelated fault of the design (a formula being typed) never
// blocks the budget.
func validField(before, trial *design.Design) error {
	errOf := func(d *design.Design) error {
		if err := d.ValidateBudget(); err != nil {
			return err
		}
		if err := d.Contract.Validate(d.N()); err != nil {
			return err
		}
		return d.Validate()
	}
	err := errOf(trial)
	if err == nil {
		return nil
	}
	if old := errOf(before); old != nil && old.Error() == err.Error() {
		return nil
	}
	return err
}
