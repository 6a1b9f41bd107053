package design

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"

	"scorewright/generator/formula"
	"scorewright/internal/inputfile"
	"scorewright/internal/safefile"
	"scorewright/internal/textsafe"
)

// MaxFileBytes bounds a design file. A design is a few hundred bytes; the
// bound leaves room for the longest formula the language takes and more.
const MaxFileBytes = 4 << 20

// Load reads and validates a design file. Only a regular file of at most
// MaxFileBytes is read: a device or pipe is refused at once.
func Load(path string) (*Design, error) { return LoadContext(context.Background(), path) }

// LoadContext is Load that stops reading when ctx is cancelled (the
// workbench's open dialog, left with esc).
func LoadContext(ctx context.Context, path string) (*Design, error) {
	f, err := inputfile.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	b, err := inputfile.ReadAllContext(ctx, f, path, MaxFileBytes)
	if err != nil {
		return nil, err
	}
	return decodeNamed(b, path)
}

// Read reads and validates design TOML from r, at most MaxFileBytes of it;
// name is used in error messages.
func Read(r io.Reader, name string) (*Design, error) {
	b, err := inputfile.ReadAll(r, name, MaxFileBytes)
	if err != nil {
		return nil, err
	}
	return decodeNamed(b, name)
}

// decodeNamed is Decode with name in its error.
func decodeNamed(b []byte, name string) (*Design, error) {
	d, err := Decode(b)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return d, nil
}

// Decode parses and validates design TOML.
func Decode(b []byte) (*Design, error) {
	var d Design
	// A byte-order mark from a Windows editor is not part of the TOML.
	b = bytes.TrimPrefix(b, []byte("\ufeff"))
	md, err := toml.Decode(string(b), &d)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, fmt.Errorf("line %d: %s", pe.Position.Line, pe.Message)
		}
		return nil, typeError(err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		keys := make([]string, len(und))
		for i, k := range und {
			keys[i] = k.String()
		}
		return nil, fmt.Errorf("unknown key %s (a typo, or a file from a newer scorewright?)", strings.Join(keys, ", "))
	}
	d.upgrade()
	// The title goes into annex headings and terminal lines: one line, no
	// escape sequences, so it can neither push a warning out of view nor
	// draw a line of its own.
	d.Title = textsafe.OneLine(d.Title)
	if err := d.Validate(); err != nil {
		return nil, err
	}
	return &d, nil
}

// Validate checks a design for problems a user must fix, naming the field.
func (d *Design) Validate() error {
	switch {
	case d.Version == 0:
		return errors.New("version: missing (this build writes version 1)")
	case d.Version < 0:
		return fmt.Errorf("version: %d is not a version; this build writes version %d", d.Version, SchemaVersion)
	case d.Version > SchemaVersion:
		return fmt.Errorf("version: %d is newer than this build understands (%d)", d.Version, SchemaVersion)
	}
	if !slices.Contains(Modes, d.Mode) {
		if d.Mode == "" {
			return fmt.Errorf("mode: missing; one of %s", modeList())
		}
		return fmt.Errorf("mode: %q is not one of %s", d.Mode, modeList())
	}
	if d.Mode == ModePayout && d.Interval != nil {
		return fmt.Errorf(`mode: a payout with an interval is a point-forecast payout; say mode = %q`, ModePointPayout)
	}
	if !d.Mode.OnInterval() {
		if n := d.N(); n < 2 || n > formula.MaxOutcomes {
			return fmt.Errorf("outcomes: %d labels; need 2..%d", n, formula.MaxOutcomes)
		}
		seen := map[string]bool{}
		for i, l := range d.Labels {
			if err := CheckLabel(l); err != nil {
				return fmt.Errorf("outcomes: label %d %w", i+1, err)
			}
			if seen[l] {
				return fmt.Errorf("outcomes: label %q appears twice", l)
			}
			seen[l] = true
		}
	}
	if d.Mode == ModeEmphasis && d.N() != 2 {
		return fmt.Errorf("mode: emphasis designs are for 2 outcomes, the design has %d", d.N())
	}
	if strings.TrimSpace(d.Formula) == "" && d.Preset == "" {
		return errors.New("formula: empty, and no preset named")
	}
	if len(d.Formula) > formula.MaxSource {
		return fmt.Errorf("formula: %d bytes; a formula may be at most %d bytes (64 KiB)", len(d.Formula), formula.MaxSource)
	}

	if d.Weights != nil {
		if len(d.Weights) != d.N() {
			return fmt.Errorf("weights: %d given for %d outcomes", len(d.Weights), d.N())
		}
		for i, w := range d.Weights {
			if !(w > 0) || math.IsInf(w, 0) {
				return fmt.Errorf("weights: entry %d is %g; weights must be positive and finite", i+1, w)
			}
		}
	}
	for name, v := range d.Params {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("params.%s: %g is not a finite number", name, v)
		}
	}
	if d.Mode.OnInterval() {
		if len(d.Interval) != 2 || !(d.Interval[0] < d.Interval[1]) || math.IsInf(d.Interval[0], 0) || math.IsInf(d.Interval[1], 0) {
			return errors.New("interval: point designs need interval = [lo, hi] with lo < hi")
		}
	}
	if err := d.Contract.Validate(d.N()); err != nil {
		return err
	}
	return d.ValidateBudget()
}

// modeList is every mode quoted, for messages.
func modeList() string {
	q := make([]string, len(Modes))
	for i, m := range Modes {
		q[i] = strconv.Quote(string(m))
	}
	return strings.Join(q, ", ")
}

// upgrade rewrites what older files said in the words of this build: a
// payout with an interval was a point-forecast payout before that mode
// had its own name.
func (d *Design) upgrade() {
	if d.Mode == ModePayout && len(d.Interval) == 2 {
		d.Mode = ModePointPayout
	}
}

// ValidateBudget checks the budget as this design reads it: in the modes
// on an interval the menu step is in the units of the interval (at most
// its width), in every other mode a probability step.
func (d *Design) ValidateBudget() error {
	if !d.Mode.OnInterval() {
		return d.Budget.Validate()
	}
	b := d.Budget
	step := b.Step
	b.Step = 0
	if err := b.Validate(); err != nil {
		return err
	}
	if math.IsNaN(step) || step < 0 || len(d.Interval) == 2 && step > d.Interval[1]-d.Interval[0] {
		return fmt.Errorf("budget.step: %g; a point-forecast menu step must be positive and at most the interval's width", step)
	}
	return nil
}

// Validate checks budget fields for values that can never work.
func (b *Budget) Validate() error {
	fin := func(name string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("budget.%s: %g is not a finite number", name, v)
		}
		return nil
	}
	for _, f := range []struct {
		n string
		v float64
	}{{"floor", b.Floor}, {"cap", b.Cap}, {"step", b.Step}, {"unit", b.Unit}, {"report_floor", b.ReportFloor}} {
		if err := fin(f.n, f.v); err != nil {
			return err
		}
	}
	if b.Step < 0 || b.Step > 0.5 {
		return fmt.Errorf("budget.step: %g; the report step must be in (0, 0.5]", b.Step)
	}
	if b.Unit < 0 {
		return fmt.Errorf("budget.unit: %g; the rounding unit must be positive (or 0 for none)", b.Unit)
	}
	if b.ReportFloor < 0 || b.ReportFloor >= 0.5 {
		return fmt.Errorf("budget.report_floor: %g; must be in [0, 0.5)", b.ReportFloor)
	}
	switch b.Rounding {
	case "", "nearest", "down", "up":
	default:
		return fmt.Errorf(`budget.rounding: %q is not one of "nearest", "down", "up"`, b.Rounding)
	}
	if b.Reference != nil && b.MeanPay == nil {
		// Without a mean-pay target the fit never looks at it, and a
		// silently ignored base rate is a wrong table nobody notices.
		return errors.New("budget.reference: the belief a mean_pay target is set at; set budget.mean_pay with it, or leave it out")
	}
	if b.MeanPay == nil && b.Cap != 0 && !(b.Cap > b.Floor) {
		return fmt.Errorf("budget: cap %g must be above floor %g", b.Cap, b.Floor)
	}
	return nil
}

// Encode writes d as TOML.
func (d *Design) Encode() ([]byte, error) {
	var buf bytes.Buffer
	buf.WriteString("# scorewright design file\n")
	if err := toml.NewEncoder(&buf).Encode(d); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// Save writes d to path atomically. An existing file is replaced only when
// overwrite is true; otherwise Save returns an error wrapping safefile.ErrExists.
func (d *Design) Save(path string, overwrite bool) error {
	if d.Version == 0 {
		d.Version = SchemaVersion
	}
	b, err := d.Encode()
	if err != nil {
		return err
	}
	return safefile.Write(path, b, overwrite)
}

// tomlTypeErr is the TOML decoder's message for a value of the wrong type.
var tomlTypeErr = regexp.MustCompile(`^toml: line (\d+) \(last key "([^"]+)"\): incompatible types: TOML value has type (\w+); destination has type (\w+)$`)

// typeError rewrites the decoder's type-mismatch message in the file's
// own words ("line 3: outcomes: expected a list, found text"); other
// errors pass unchanged.
func typeError(err error) error {
	m := tomlTypeErr.FindStringSubmatch(err.Error())
	if m == nil {
		return err
	}
	words := map[string]string{"slice": "a list", "array": "a list", "float": "a number", "float64": "a number",
		"int": "a whole number", "int64": "a whole number", "integer": "a whole number", "string": "text", "bool": "true or false",
		"map": "a table", "struct": "a table", "ptr": "a number"}
	say := func(t string) string {
		if w, ok := words[t]; ok {
			return w
		}
		return t
	}
	return fmt.Errorf("line %s: %s: expected %s, found %s", m[1], m[2], say(m[4]), say(m[3]))
}
