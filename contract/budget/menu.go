package budget

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"scorewright/generator/formula"
	"scorewright/internal/inputfile"
	"scorewright/internal/num"
	"scorewright/internal/simplex"
)

// gridSize is the number of points of the simplex grid of step 1/K over n
// outcomes, C(K+n-1, n-1), in floating point so that a count too large
// to enumerate can still be said.
func gridSize(n, K int) float64 {
	c := 1.0
	for i := 1; i < n; i++ {
		c = c * float64(K+i) / float64(i)
	}
	return math.Round(c)
}

// MaxMenu is the largest menu a table is built for. A contract annex with
// more rows is unreadable, and the re-check compares every item with every
// other.
const MaxMenu = 5000

// Menu is the list of reports a contract allows, in table order.
type Menu struct {
	// Reports are probability vectors over the outcomes.
	Reports [][]float64
	// Desc says in words how the menu was made.
	Desc string
	// Clamp, when positive, makes the rule pay every report as if it had
	// said max(p_k, Clamp) for every outcome, rescaled to sum to 1 (see
	// ClampReport). It is the second way out for a rule that is infinite
	// where a report gives an outcome probability 0; it bends honesty near
	// the boundary, and Recheck measures by how much.
	Clamp float64
}

// Outcomes is the number of outcomes of the menu's reports.
func (m *Menu) Outcomes() int {
	if len(m.Reports) == 0 {
		return 0
	}
	return len(m.Reports[0])
}

// StepMenu returns the menu of reports on a grid of step 1/K over n
// outcomes: for n = 2 the event probabilities 0, step, 2·step, ..., 1; for
// n > 2 every report whose entries are multiples of step. step must be 1/K
// for a whole K (0.05, 0.1, 0.25, ...).
//
// With reportFloor > 0 every entry below the floor is raised to it and the
// difference is taken from the report's largest entry (the first, if
// several are equal), so that the menu starts at the floor and the other
// grid values stay as they read; reports that become equal are kept once.
func StepMenu(n int, step, reportFloor float64) (*Menu, error) {
	if n < 2 || n > formula.MaxOutcomes {
		return nil, fmt.Errorf("menu: %d outcomes; need 2..%d", n, formula.MaxOutcomes)
	}
	if !(step > 0) || step > 0.5 {
		return nil, fmt.Errorf("menu: report step %g; it must be in (0, 0.5]", step)
	}
	k := math.Round(1 / step)
	if math.Abs(k*step-1) > 1e-9 {
		return nil, fmt.Errorf("menu: report step %g does not divide 1; use 1/K for a whole K (0.05, 0.1, 0.2, 0.25, ...)", step)
	}
	if err := checkFloor("report floor", reportFloor, n); err != nil {
		return nil, err
	}
	K := int(k)
	if c := simplex.Count(n, K); c < 0 || c > MaxMenu {
		return nil, fmt.Errorf("menu: a step of 1/%d over %d outcomes gives %.0f reports, more than %d; use a coarser step or a menu file", K, n, gridSize(n, K), MaxMenu)
	}
	grid := simplex.Vectors(n, K)
	m := &Menu{}
	seen := map[string]bool{}
	for _, p := range grid {
		if reportFloor > 0 {
			raiseToFloor(p, reportFloor)
		}
		key := reportKey(p)
		if seen[key] {
			continue
		}
		seen[key] = true
		m.Reports = append(m.Reports, p)
	}
	if n == 2 {
		lo, hi := m.Reports[0][0], m.Reports[len(m.Reports)-1][0]
		m.Desc = fmt.Sprintf("probability of "+firstOutcome+" in steps of %s from %s to %s (%d reports)",
			short(step), short(lo), short(hi), len(m.Reports))
	} else {
		m.Desc = fmt.Sprintf("every report with entries in steps of 1/%d over %d outcomes (%d reports)", K, n, len(m.Reports))
	}
	if reportFloor > 0 {
		m.Desc += fmt.Sprintf("; report floor %s: entries below it raised to it, the difference taken from the largest entry", short(reportFloor))
	}
	return m, nil
}

// firstOutcome stands for the event in a two-outcome menu description
// until the fit, which knows the labels, names it.
const firstOutcome = "the first outcome"

func short(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }

// checkFloor refuses a floor or clamp that cannot hold for every entry.
func checkFloor(what string, v float64, n int) error {
	if math.IsNaN(v) || v < 0 || v*float64(n) >= 1 {
		return fmt.Errorf("menu: %s %g; it must be in [0, 1/%d) so that a report can give every outcome at least that much", what, v, n)
	}
	return nil
}

// FloorReport writes into dst the report a menu with a report floor records
// for p: every entry below floor raised to it, the difference taken from the
// largest entry — the same rule StepMenu applies to its items. It returns dst.
func FloorReport(dst, p []float64, floor float64) []float64 {
	if len(dst) != len(p) {
		panic("budget: FloorReport length mismatch")
	}
	copy(dst, p)
	raiseToFloor(dst, floor)
	return dst
}

// raiseToFloor lifts entries below floor to floor, taking the difference
// from the largest entry.
func raiseToFloor(p []float64, floor float64) {
	big := 0
	for i, x := range p {
		if x > p[big] {
			big = i
		}
	}
	for i, x := range p {
		if i != big && x < floor {
			p[big] -= floor - x
			p[i] = floor
		}
	}
}

// reportKey identifies a report up to float noise, for removing repeats.
func reportKey(p []float64) string {
	var b strings.Builder
	for _, x := range p {
		b.WriteString(strconv.FormatFloat(x, 'g', 12, 64))
		b.WriteByte(',')
	}
	return b.String()
}

// MaxMenuBytes bounds a menu file: MaxMenu reports of twelve numbers with
// many digits each fit several times over.
const MaxMenuBytes = 8 << 20

// FileMenu reads a menu from a CSV file: one report per line, n
// probabilities separated by commas (for n = 2 a single number is the
// event's probability). Blank lines and lines starting with '#' are
// skipped. Errors name the file and line.
func FileMenu(path string, n int) (*Menu, error) {
	f, err := inputfile.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadMenu(f, path, n)
}

// ReadMenu reads a menu in FileMenu's format from r; name is used in
// error messages.
func ReadMenu(r io.Reader, name string, n int) (*Menu, error) {
	br := bufio.NewReader(inputfile.Limit(r, name, MaxMenuBytes))
	// A byte-order mark from a spreadsheet is skipped, as in histories.
	if b, err := br.Peek(3); err == nil && string(b) == "\ufeff" {
		br.Discard(3)
	}
	cr := csv.NewReader(br)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	m := &Menu{}
	seen := map[string]int{}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) && !errors.Is(err, inputfile.ErrTooLarge) {
				return nil, fmt.Errorf("%s:%d: %v", name, pe.Line, pe.Err)
			}
			if errors.Is(err, inputfile.ErrTooLarge) {
				return nil, err
			}
			return nil, fmt.Errorf("%s: %v", name, err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue
		}
		p, err := num.ParseDistribution(strings.Join(rec, ","), n)
		if err != nil {
			return nil, fmt.Errorf("%s:%d: %v", name, line, err)
		}
		key := reportKey(p)
		if first, ok := seen[key]; ok {
			return nil, fmt.Errorf("%s:%d: report %s repeats line %d", name, line, num.Format(p), first)
		}
		seen[key] = line
		m.Reports = append(m.Reports, p)
		if len(m.Reports) > MaxMenu {
			return nil, fmt.Errorf("%s:%d: more than %d reports", name, line, MaxMenu)
		}
	}
	if len(m.Reports) < 2 {
		return nil, fmt.Errorf("%s: %d reports; a menu needs at least 2", name, len(m.Reports))
	}
	m.Desc = fmt.Sprintf("%d reports listed in %s", len(m.Reports), name)
	return m, nil
}

// CheckFloor reports the first menu item with an entry below floor.
func (m *Menu) CheckFloor(floor float64) error {
	for i, p := range m.Reports {
		for k, x := range p {
			if x < floor-1e-12 {
				return fmt.Errorf("menu: report %d %s gives outcome %d probability %g, below the report floor %g", i+1, num.Format(p), k+1, x, floor)
			}
		}
	}
	return nil
}

// ClampReport writes into dst the report the rule is evaluated at when
// the menu has a clamp c > 0: every entry raised to at least c, then all
// divided by their sum so that the result is again a probability vector.
// Reports whose entries are all at least c are unchanged. With c <= 0 it
// copies p.
func ClampReport(dst, p []float64, c float64) []float64 {
	if dst == nil {
		dst = make([]float64, len(p))
	}
	if len(dst) != len(p) {
		panic("budget: ClampReport length mismatch")
	}
	if c <= 0 {
		copy(dst, p)
		return dst
	}
	var sum float64
	changed := false
	for i, x := range p {
		if x < c {
			x, changed = c, true
		}
		dst[i] = x
		sum += x
	}
	if !changed {
		copy(dst, p)
		return dst
	}
	for i := range dst {
		dst[i] /= sum
	}
	return dst
}
