package design

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"reflect"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
	gotoml "github.com/pelletier/go-toml/v2"

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
	d, err := decodeNamed(b, path)
	if err != nil {
		return nil, err
	}
	d.Dir = folderOf(path)
	return d, nil
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
			// "TOML syntax" says what kind of file was expected: a CSV or a
			// table opened by mistake otherwise reads as a puzzle about
			// dots and equals signs.
			return nil, fmt.Errorf("line %d: TOML syntax: %s (a design file is TOML, as scorewright saves it)", pe.Position.Line, pe.Message)
		}
		return nil, typeError(b, err)
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
	mt, known := traits(d.Mode)
	if !known {
		if d.Mode == "" {
			return fmt.Errorf("mode: missing; one of %s", modeList())
		}
		return fmt.Errorf("mode: %q is not one of %s", d.Mode, modeList())
	}
	if mt.withInterval != "" && d.Interval != nil {
		return fmt.Errorf(`mode: a payout with an interval is a point-forecast payout; say mode = %q`, mt.withInterval)
	}
	if !mt.onInterval {
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
	if mt.outcomes > 0 && d.N() != mt.outcomes {
		return fmt.Errorf("mode: %s designs are for %d outcomes, the design has %d", d.Mode, mt.outcomes, d.N())
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
		// A zero weight still gives a proper rule (a nonnegative
		// combination of concave terms is concave); it is strict only
		// where the remaining terms are, which the checks decide. An
		// all-zero vector leaves no rule.
		positive := false
		for i, w := range d.Weights {
			if !(w >= 0) || math.IsInf(w, 0) {
				return fmt.Errorf("weights: entry %d is %g; weights must be nonnegative and finite", i+1, w)
			}
			positive = positive || w > 0
		}
		if !positive {
			return errors.New("weights: every entry is 0; at least one weight must be positive")
		}
	}
	for name, v := range d.Params {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("params.%s: %g is not a finite number", name, v)
		}
	}
	if mt.onInterval {
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
	if t, _ := traits(d.Mode); t.withInterval != "" && len(d.Interval) == 2 {
		d.Mode = t.withInterval
	}
}

// ValidateBudget checks the budget as this design reads it: in the modes
// on an interval the menu step is in the units of the interval (at most
// its width), in every other mode a probability step.
func (d *Design) ValidateBudget() error {
	if !d.Mode.OnInterval() {
		if err := d.Budget.Validate(); err != nil {
			return err
		}
		if n := d.N(); n >= 2 && d.Budget.Clamp*float64(n) >= 1 {
			return fmt.Errorf("budget.clamp: %g; with %d outcomes it must be below 1/%d", d.Budget.Clamp, n, n)
		}
		return nil
	}
	if d.Budget.Clamp != 0 || d.Budget.Menu != "" {
		return errors.New("budget.clamp and budget.menu are for rules over outcomes; a point-forecast menu is budget.step in the units of the interval")
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
	}{{"floor", b.Floor}, {"cap", b.Cap}, {"step", b.Step}, {"unit", b.Unit}, {"report_floor", b.ReportFloor}, {"clamp", b.Clamp}} {
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
	if b.Clamp < 0 || b.Clamp >= 0.5 {
		return fmt.Errorf("budget.clamp: %g; must be in [0, 0.5) (0: none)", b.Clamp)
	}
	if err := checkMenuPath(b.Menu); err != nil {
		return err
	}
	if b.Menu != "" && b.Step != 0 {
		return fmt.Errorf("budget: menu %q and step %g are both set; the menu file replaces the step's grid, so give one", b.Menu, b.Step)
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

// MaxMenuPath bounds the menu file's name.
const MaxMenuPath = 4096

// checkMenuPath says what is wrong with a menu file name, or returns nil.
func checkMenuPath(p string) error {
	switch {
	case len(p) > MaxMenuPath:
		return fmt.Errorf("budget.menu: a path of %d bytes; at most %d", len(p), MaxMenuPath)
	case !utf8.ValidString(p) || strings.ContainsAny(p, "\n\r\x00"):
		return errors.New("budget.menu: the path must be one line of text")
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
// A relative menu path is written relative to the new file's folder, so
// that it names the same menu file; once written, d takes that folder and
// path (and the schema version when it had none).
func (d *Design) Save(path string, overwrite bool) error {
	c := d.Clone()
	c.MoveTo(folderOf(path))
	if c.Version == 0 {
		c.Version = SchemaVersion
	}
	b, err := c.Encode()
	if err != nil {
		return err
	}
	if err := safefile.Write(path, b, overwrite); err != nil {
		return err
	}
	d.Version, d.Dir, d.Budget.Menu = c.Version, c.Dir, c.Budget.Menu
	return nil
}

// FieldError is a value of the wrong type in a design file, with where it
// is: "line 3: outcomes: expected a list, found text".
type FieldError struct {
	// Line and Column locate the value, from 1.
	Line, Column int
	// Key is the value's dotted key, e.g. "budget.cap".
	Key string
	// Want and Found say in words what the key takes and what the file
	// gives ("a list", "text", "a number", ...).
	Want, Found string
}

func (e *FieldError) Error() string {
	return fmt.Sprintf("line %d: %s: expected %s, found %s", e.Line, e.Key, e.Want, e.Found)
}

// typeError turns err, a value BurntSushi/toml could not store in the
// design, into a *FieldError. That decoder reports such a value only in
// the text of a plain error; go-toml/v2 reports it as a *DecodeError with
// the key and the position, so src is decoded again with it, once, on this
// error path only. What the key takes is read from the Design type and
// what the file gives from the document itself. When the second decoder
// does not name the same kind of fault, err is returned unchanged.
func typeError(src []byte, err error) error {
	var de *gotoml.DecodeError
	if !errors.As(gotoml.Unmarshal(src, new(Design)), &de) || len(de.Key()) == 0 {
		return err
	}
	var doc map[string]any
	if gotoml.Unmarshal(src, &doc) != nil {
		return err
	}
	want, found, ok := mismatch(reflect.TypeFor[Design](), lookup(doc, de.Key()), de.Key())
	if !ok {
		return err
	}
	line, col := de.Position()
	return &FieldError{Line: line, Column: col, Key: strings.Join(de.Key(), "."), Want: want, Found: found}
}

// lookup is the value at key in a generically decoded document, nil when
// there is none.
func lookup(doc map[string]any, key []string) any {
	var v any = doc
	for _, k := range key {
		m, ok := v.(map[string]any)
		if !ok {
			return nil
		}
		v = m[k]
	}
	return v
}

// mismatch follows key through t by the fields' toml names and says what
// the field there takes and what v is, descending into the first element
// of a list that does not fit; ok is false when nothing there is amiss.
func mismatch(t reflect.Type, v any, key []string) (want, found string, ok bool) {
	for _, k := range key {
		t = deref(t)
		switch t.Kind() {
		case reflect.Struct:
			f, has := fieldByTOMLName(t, k)
			if !has {
				return "", "", false
			}
			t = f.Type
		case reflect.Map:
			t = t.Elem()
		default:
			return "", "", false
		}
	}
	t = deref(t)
	if l, isList := v.([]any); isList && (t.Kind() == reflect.Slice || t.Kind() == reflect.Array) {
		for _, e := range l {
			if w, f, bad := mismatch(t.Elem(), e, nil); bad {
				return w, f, true
			}
		}
		return "", "", false
	}
	want, found = kindWords(t.Kind()), valueWords(v)
	if _, whole := v.(int64); whole && want == "a number" {
		return "", "", false // a float field takes a whole number
	}
	return want, found, v != nil && want != found
}

func deref(t reflect.Type) reflect.Type {
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	return t
}

// fieldByTOMLName is the field of struct t whose toml tag names it k.
func fieldByTOMLName(t reflect.Type, k string) (reflect.StructField, bool) {
	for i := range t.NumField() {
		f := t.Field(i)
		if name, _, _ := strings.Cut(f.Tag.Get("toml"), ","); name == k {
			return f, true
		}
	}
	return reflect.StructField{}, false
}

// kindWords names what a field of kind k takes, in the file's words.
func kindWords(k reflect.Kind) string {
	switch k {
	case reflect.Slice, reflect.Array:
		return "a list"
	case reflect.Float32, reflect.Float64:
		return "a number"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return "a whole number"
	case reflect.String:
		return "text"
	case reflect.Bool:
		return "true or false"
	case reflect.Map, reflect.Struct:
		return "a table"
	}
	return k.String()
}

// valueWords names the kind of a generically decoded TOML value. A whole
// number is also a number: a float field takes it.
func valueWords(v any) string {
	switch v.(type) {
	case []any:
		return "a list"
	case float64:
		return "a number"
	case int64:
		return "a whole number"
	case string:
		return "text"
	case bool:
		return "true or false"
	case map[string]any:
		return "a table"
	case nil:
		return "nothing"
	}
	return "a date or time"
}
