package point

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"scorewright/generator/lottery"
	"scorewright/generator/table"
)

// TableSpec says how a point-forecast rule is turned into a payment table:
// rows are the reports on the menu, columns the outcome values.
type TableSpec struct {
	// Floor and Cap bound every payment in the table. A perfect forecast
	// (D = 0) is paid Cap, the worst cell Floor.
	Floor, Cap float64
	// Step is the spacing of the report menu from Lo; 0 means (Hi-Lo)/20.
	Step float64
	// Columns is the number of outcome values, Lo..Hi evenly; 0 means 11.
	Columns int
	// Unit is the currency rounding unit; 0 means no rounding.
	Unit float64
	// Rounding is "nearest" (default), "down" or "up".
	Rounding string
}

// Table is a payment table for point forecasts. Pay[i][j] is what report
// Reports[i] earns when the outcome is Outcomes[j]; the rule is
// pay = A - B D(y, x) before rounding.
type Table struct {
	Reports  []float64   `json:"reports"`
	Outcomes []float64   `json:"outcomes"`
	Pay      [][]float64 `json:"pay"`
	A        float64     `json:"A"`
	B        float64     `json:"B"`
	// Kind is what Pay holds: money, or after Lottery the chance of
	// winning the prize.
	Kind string `json:"kind"`
	// Notes explain how to read the table.
	Notes []string `json:"notes"`
	// Cautions close every export.
	Cautions []string `json:"caution"`
}

// ErrUnbounded is returned when D is infinite or NaN somewhere on the
// table, so no finite budget fits.
var ErrUnbounded = errors.New("point: the effort is not finite on the table")

// BuildTable fits the rule to the budget over the menu × outcome grid.
// It honours ctx between rows.
func (g *Generator) BuildTable(ctx context.Context, spec TableSpec) (*Table, error) {
	if !(spec.Cap > spec.Floor) {
		return nil, fmt.Errorf("point: cap %g must exceed floor %g", spec.Cap, spec.Floor)
	}
	step := spec.Step
	if step == 0 {
		step = (g.Hi - g.Lo) / 20
	}
	if !(step > 0) {
		return nil, fmt.Errorf("point: menu step %g must be positive", step)
	}
	rows := int(math.Floor((g.Hi-g.Lo)/step*(1+1e-12))) + 1
	if rows > 10000 {
		return nil, fmt.Errorf("point: a step of %g gives %d reports; at most 10000", step, rows)
	}
	cols := spec.Columns
	if cols == 0 {
		cols = 11
	}
	if cols < 2 || cols > 1000 {
		return nil, fmt.Errorf("point: %d outcome columns; need 2..1000", cols)
	}
	t := &Table{Reports: make([]float64, rows), Outcomes: make([]float64, cols), Kind: string(table.KindMoney), Cautions: table.Caution()}
	for i := range t.Reports {
		t.Reports[i] = math.Min(g.Lo+float64(i)*step, g.Hi)
	}
	for j := range t.Outcomes {
		t.Outcomes[j] = g.Lo + (g.Hi-g.Lo)*float64(j)/float64(cols-1)
	}
	ev := g.NewEvaluator()
	d := make([][]float64, rows)
	var worst float64
	for i, x := range t.Reports {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		d[i] = make([]float64, cols)
		for j, y := range t.Outcomes {
			v := ev.Divergence(y, x)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("%w: D(y = %g, x = %g) = %v", ErrUnbounded, y, x, v)
			}
			d[i][j] = v
			worst = math.Max(worst, v)
		}
	}
	if worst == 0 {
		return nil, errors.New("point: the effort is zero everywhere on the table; the generator is affine")
	}
	t.A, t.B = spec.Cap, (spec.Cap-spec.Floor)/worst
	t.Pay = make([][]float64, rows)
	for i := range d {
		t.Pay[i] = make([]float64, cols)
		for j, v := range d[i] {
			t.Pay[i][j] = round(t.A-t.B*v, spec.Unit, spec.Rounding, spec.Floor, spec.Cap)
		}
	}
	t.Notes = []string{
		fmt.Sprintf("pay = %.6g - %.6g * D(y, x), D from phi = %s on [%g, %g]", t.A, t.B, g.Source, g.Lo, g.Hi),
		"for an outcome between two columns, pay by linear interpolation between them: the part of the pay that depends on the report is affine in the outcome, so with interpolation the best menu report is still the one nearest the mean in the rule's divergence D(mean, x)",
		"paying each column's value for a whole bin instead makes the best report the mean of the binned outcome, which can differ from the mean by up to half a bin",
	}
	if spec.Unit > 0 {
		t.Notes = append(t.Notes, fmt.Sprintf("payments rounded to %g (%s); rounding can make neighbouring reports tie", spec.Unit, roundingName(spec.Rounding)))
	}
	return t, nil
}

// Lottery rewrites the table in place as chances of winning a prize of
// Cap - Floor (see package lottery), with the explanation, the settling
// rule and the extra caution.
func (t *Table) Lottery(floor, cap float64) error {
	if t.Kind != string(table.KindMoney) {
		return fmt.Errorf("point: the table holds %s, not money", t.Kind)
	}
	for i, row := range t.Pay {
		for j, v := range row {
			c, err := lottery.Chance(v, floor, cap)
			if err != nil {
				return fmt.Errorf("%w (report %g, outcome %g)", err, t.Reports[i], t.Outcomes[j])
			}
			t.Pay[i][j] = c
		}
	}
	t.Kind = string(lottery.KindChance)
	t.Notes = append(t.Notes, fmt.Sprintf("each cell is the chance of winning a prize of %g: (pay - %g)/%g", cap-floor, floor, cap-floor), lottery.Why, lottery.Draw)
	t.Cautions = append(t.Cautions, lottery.Caution)
	return nil
}

func roundingName(mode string) string {
	if mode == "" {
		return "nearest"
	}
	return mode
}

// round rounds v to the unit in the given mode and keeps it in [lo, hi].
func round(v, unit float64, mode string, lo, hi float64) float64 {
	if unit > 0 {
		q := v / unit
		switch mode {
		case "down":
			q = math.Floor(q + 1e-9)
		case "up":
			q = math.Ceil(q - 1e-9)
		default:
			q = math.Round(q)
		}
		v = q * unit
	}
	return math.Min(math.Max(v, lo), hi)
}

// WriteCSV writes the table as CSV: '#' comment lines with the notes and
// the caution, a header row "report \ outcome" followed by the outcome
// values, then one row per report.
func (t *Table) WriteCSV(w io.Writer) error {
	for _, n := range t.Notes {
		if _, err := fmt.Fprintf(w, "# note: %s\n", n); err != nil {
			return err
		}
	}
	for _, c := range t.Cautions {
		if _, err := fmt.Fprintf(w, "# caution: %s\n", c); err != nil {
			return err
		}
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(t.header()); err != nil {
		return err
	}
	for i := range t.Reports {
		if err := cw.Write(t.row(i)); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteMarkdown writes the table as a Markdown table followed by the notes
// and the caution.
func (t *Table) WriteMarkdown(w io.Writer) error {
	var b strings.Builder
	b.WriteString("| " + strings.Join(t.header(), " | ") + " |\n|")
	for range t.header() {
		b.WriteString("---:|")
	}
	b.WriteString("\n")
	for i := range t.Reports {
		b.WriteString("| " + strings.Join(t.row(i), " | ") + " |\n")
	}
	b.WriteString("\n")
	for _, n := range t.Notes {
		b.WriteString("- " + n + "\n")
	}
	for _, c := range t.Cautions {
		b.WriteString("- **Caution:** " + c + "\n")
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func (t *Table) header() []string {
	head := []string{"report \\ outcome"}
	for _, y := range t.Outcomes {
		head = append(head, fmtNum(y))
	}
	return head
}

func (t *Table) row(i int) []string {
	row := []string{fmtNum(t.Reports[i])}
	for _, p := range t.Pay[i] {
		row = append(row, fmtNum(p))
	}
	return row
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }
