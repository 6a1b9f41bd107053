package budget

import (
	"errors"
	"fmt"
	"math"

	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/simplex"
)

// Fit is a rule fitted to a budget on a menu: pay = A - B·L(p, k) with
// B > 0, then rounded to the currency unit.
type Fit struct {
	// A and B define the exact payment A - B·L(p, k) before rounding.
	A, B float64
	// Unit is the currency rounding unit; 0 means no rounding.
	Unit float64
	// Rounding is the rounding mode: "nearest" (halves away from zero),
	// "down" or "up".
	Rounding string
	// Clamp is the menu's clamp (0: none); see ClampReport.
	Clamp float64
	// ReportFloor is the budget's report floor (0: none): a truthful
	// forecaster whose belief gives an outcome less reports the belief
	// raised to it (FloorReport), and is paid for that.
	ReportFloor float64
	// Floor is the smallest exact payment over the menu. Cap is the
	// largest: the budget's cap, or what a mean-pay fit produced.
	Floor, Cap float64
	// MeanPay and Reference are the mean-pay target and its reference
	// belief, when the fit aimed at one.
	MeanPay   *float64
	Reference []float64
	// Menu is the menu the fit was made on; Labels name the outcomes.
	Menu   *Menu
	Labels []string
	// Efforts[i][k] is L(report i, k) less Shift, at the clamped report
	// when the menu has a clamp.
	Efforts [][]float64
	// Pays[i][k] is Pay(Efforts[i][k]): the table.
	Pays [][]float64
	// MinPay and MaxPay are the smallest and largest payments in the
	// rounded table. MaxPay is the buyer's worst case for one forecast.
	MinPay, MaxPay float64
	// Truthful is the expected exact payment of a truthful forecaster,
	// A - B·H(q) (at the report raised to the report floor and clamped,
	// which is what such a forecaster is paid for), over beliefs q.
	Truthful TruthfulRange
	// ReferencePay is the expected exact payment of a truthful forecaster
	// at the reference (uniform unless one was stated), paid for the
	// reference raised to the report floor and clamped.
	ReferencePay float64

	// Shift is the sum of the number literals of the generator's outermost
	// sum (bregman.Formula.WithoutConstantTerms). Every effort is computed
	// without it, so that "1e12 + 1 - sum(p^2)" pays what "1 - sum(p^2)"
	// pays; A is stated with it, for the rule as given.
	Shift float64

	// rule is the rule computed with (constant terms taken out), given
	// the rule as the caller gave it.
	rule, given *bregman.Rule
	round       Rounder
	// Payment is computed as base + B·(anchor - L), or Cap - B·(L - low)
	// in the half of the effort range nearer the smallest menu effort low:
	// the same line as A - B·L, anchored at both ends so that the floor
	// and the cap come out exactly (B·(Lmax - Lmin) is the cap only up to
	// float noise: 50.00000000000001).
	base, anchor, low float64
}

// TruthfulRange is the range of A - B·H(q) over beliefs q on a grid.
type TruthfulRange struct {
	Min, Max             float64
	MinBelief, MaxBelief []float64
	// Grid describes the beliefs searched.
	Grid string
}

// UnboundedError says that the rule's effort is not finite at a menu
// item, so no budget can hold it.
type UnboundedError struct {
	// Report is the menu item, Outcome the outcome (0-based) and Label its
	// name; Effort is the value found (+Inf or NaN).
	Report  []float64
	Outcome int
	Label   string
	Effort  float64
	// AtZero is true when the report gives the outcome probability 0:
	// then a report floor or a clamp is the way out.
	AtZero bool
}

// Error says where the rule is infinite and the two ways out.
func (e *UnboundedError) Error() string {
	s := fmt.Sprintf("the rule's effort is %v at report %s when %q happens", e.Effort, num.Format(e.Report), e.Label)
	if e.AtZero {
		return s + ": the rule is unbounded where a report gives an outcome probability 0, so no budget can hold it; " +
			"two ways out: a report floor (the menu starts at, say, 1 %, so every report gives each outcome at least that), " +
			"or a clamp (every report is paid as if each probability were at least, say, 1 %; this bends honesty near the boundary, and the re-check measures by how much)"
	}
	return s + ": the generator is not finite there, so no budget can hold it"
}

// FitRule fits r to budget b on menu m. A budget with MeanPay aims the
// expected payment of a truthful forecaster at the reference belief (b.
// Reference, or uniform) and pays b.Floor at the menu's largest effort;
// otherwise the payments over the menu and every outcome span exactly
// [b.Floor, b.Cap]. Payments are then rounded to b.Unit in mode
// b.Rounding.
func FitRule(r *bregman.Rule, m *Menu, b design.Budget) (*Fit, error) {
	n := r.Outcomes()
	if err := checkMenu(m, n, b.ReportFloor); err != nil {
		return nil, err
	}
	rd, err := NewRounder(b.Unit, b.Rounding)
	if err != nil {
		return nil, err
	}
	given, shift := r, 0.0
	if g, ok := r.Gen.(*bregman.Formula); ok {
		// The same rule with its constant terms taken out before any
		// effort is computed, so that a constant cannot change a cent.
		g2, c, err := g.WithoutConstantTerms()
		if err != nil {
			return nil, err
		}
		shift = c
		r2 := *r
		r2.Gen, r = g2, &r2
	}
	f := &Fit{given: given, Shift: shift, Unit: b.Unit, Rounding: rd.mode, Clamp: m.Clamp, Menu: m, rule: r, round: rd}
	f.Labels = make([]string, n)
	for k := range f.Labels {
		f.Labels[k] = r.Label(k)
	}
	s := r.NewScorer()
	lmin, lmax, err := f.menuEfforts(s)
	if err != nil {
		return nil, err
	}
	ref, err := referenceBelief(b.Reference, n)
	if err != nil {
		return nil, err
	}
	// What a truthful forecaster at the reference is paid for: the report
	// raised to the report floor (the menu holds no lower entry), then
	// clamped.
	f.ReportFloor = b.ReportFloor
	href := s.Expected(ref, f.paidReport(make([]float64, n), ref))
	if err := f.scale(b, lmin, lmax, ref, href); err != nil {
		return nil, err
	}
	// Rounding keeps every payment within what the budget promises: the
	// floor, and the cap when one was given (a mean-pay fit promises none;
	// its top payment is where the fit lands).
	top := f.Cap
	if b.MeanPay != nil {
		top = math.Inf(1)
	}
	if f.round, err = f.round.Within(f.Floor, top); err != nil {
		return nil, fmt.Errorf("budget: %w", err)
	}
	f.Pays = make([][]float64, len(f.Efforts))
	f.MinPay, f.MaxPay = math.Inf(1), math.Inf(-1)
	for i, eff := range f.Efforts {
		row := make([]float64, n)
		for k, l := range eff {
			row[k] = f.round.Round(f.exact(l))
			f.MinPay, f.MaxPay = math.Min(f.MinPay, row[k]), math.Max(f.MaxPay, row[k])
		}
		f.Pays[i] = row
	}
	f.Truthful = f.truthfulRange(s)
	return f, nil
}

// checkMenu refuses a menu the fit cannot use: empty, of the wrong number
// of outcomes, below the report floor, or with a clamp out of range.
func checkMenu(m *Menu, n int, reportFloor float64) error {
	if m == nil || len(m.Reports) == 0 {
		return errors.New("budget: the menu is empty")
	}
	for i, p := range m.Reports {
		if len(p) != n {
			return fmt.Errorf("budget: menu report %d has %d entries for %d outcomes", i+1, len(p), n)
		}
	}
	if reportFloor > 0 {
		if err := m.CheckFloor(reportFloor); err != nil {
			return err
		}
	}
	return checkFloor("clamp", m.Clamp, n)
}

// menuEfforts fills f.Efforts, the effort of every menu report (clamped)
// for every outcome, and returns their range; an effort that is not
// finite is an *UnboundedError, and a range of zero an error too.
func (f *Fit) menuEfforts(s *bregman.Scorer) (lmin, lmax float64, err error) {
	n := len(f.Labels)
	cp := make([]float64, n)
	lmin, lmax = math.Inf(1), math.Inf(-1)
	f.Efforts = make([][]float64, len(f.Menu.Reports))
	for i, p := range f.Menu.Reports {
		eff := make([]float64, n)
		s.Efforts(eff, ClampReport(cp, p, f.Clamp))
		for k, l := range eff {
			if math.IsNaN(l) || math.IsInf(l, 0) {
				return 0, 0, &UnboundedError{Report: p, Outcome: k, Label: f.Labels[k], Effort: l, AtZero: cp[k] == 0}
			}
			lmin, lmax = math.Min(lmin, l), math.Max(lmax, l)
		}
		f.Efforts[i] = eff
	}
	if !(lmax-lmin > 1e-12*math.Max(1, math.Abs(lmax))) {
		return 0, 0, fmt.Errorf("budget: the rule's effort is %.10g for every report on the menu and every outcome, so pay cannot depend on the forecast", lmax)
	}
	return lmin, lmax, nil
}

// referenceBelief is the budget's reference belief, checked, or the
// uniform one.
func referenceBelief(ref []float64, n int) ([]float64, error) {
	switch {
	case ref == nil:
		ref = make([]float64, n)
		for k := range ref {
			ref[k] = 1 / float64(n)
		}
	case len(ref) != n:
		return nil, fmt.Errorf("budget: the reference belief has %d entries for %d outcomes", len(ref), n)
	default:
		if err := num.CheckDistribution(ref, num.SimplexTolerance); err != nil {
			return nil, fmt.Errorf("budget: reference belief: %v", err)
		}
	}
	return ref, nil
}

// scale sets B (and A, the floor, the cap and the reference pay) so that
// the payments over the menu's effort range [lmin, lmax] fit the budget:
// span [floor, cap], or pay a truthful forecaster at the reference
// (expected effort href) the mean pay with the floor at lmax.
func (f *Fit) scale(b design.Budget, lmin, lmax float64, ref []float64, href float64) error {
	f.base, f.anchor, f.low = b.Floor, lmax, lmin
	switch {
	case b.MeanPay != nil:
		mp := *b.MeanPay
		if !(mp > b.Floor) || math.IsInf(mp, 0) {
			return fmt.Errorf("budget: the target mean payment %g must be above the floor %g", mp, b.Floor)
		}
		if math.IsNaN(href) || math.IsInf(href, 0) {
			return fmt.Errorf("budget: the rule's entropy at the reference belief %s is %v", num.Format(ref), href)
		}
		den := lmax - href
		if !(den > 1e-12*math.Max(1, math.Abs(lmax))) {
			return fmt.Errorf("budget: a truthful forecaster at the reference belief %s already has the menu's largest effort; no B > 0 reaches a mean payment above the floor", num.Format(ref))
		}
		f.B = (mp - b.Floor) / den
		f.MeanPay, f.Reference = &mp, append([]float64(nil), ref...)
	case b.Cap > b.Floor:
		f.B = (b.Cap - b.Floor) / (lmax - lmin)
	default:
		return errors.New("budget: give a cap above the floor, or a target mean payment with a floor")
	}
	// A is stated for the efforts of the rule as given.
	f.A = f.base + f.B*(f.anchor+f.Shift)
	f.Floor = b.Floor
	f.Cap = f.base + f.B*(lmax-lmin)
	if b.MeanPay == nil {
		f.Cap = b.Cap
	}
	f.ReferencePay = f.exact(href)
	if !(f.B > 0) || math.IsInf(f.B, 0) || math.IsInf(f.A, 0) {
		return fmt.Errorf("budget: the fit gives B = %g, A = %g; the budget and the rule's range do not fit together", f.B, f.A)
	}
	return nil
}

// paidReport writes into dst the report a truthful forecaster with belief
// q is paid for: q raised to the report floor, then clamped.
func (f *Fit) paidReport(dst, q []float64) []float64 {
	if f.ReportFloor > 0 {
		FloorReport(dst, q, f.ReportFloor)
		q = dst
	}
	return ClampReport(dst, q, f.Clamp)
}

// exact is the unrounded payment for an effort of the rule less its
// constant terms (f.rule).
func (f *Fit) exact(effort float64) float64 {
	if effort-f.low < f.anchor-effort && f.Cap > f.base {
		return f.Cap - f.B*(effort-f.low)
	}
	return f.base + f.B*(f.anchor-effort)
}

// Pay returns A - B·effort rounded to the unit as the table pays it.
// The effort is the rule's as given (Rule), constant terms included.
func (f *Fit) Pay(effort float64) float64 { return f.round.Round(f.exact(effort - f.Shift)) }

// Exact returns A - B·effort without rounding.
func (f *Fit) Exact(effort float64) float64 { return f.exact(effort - f.Shift) }

// Decimals is the number of decimals that writes every payment exactly,
// or -1 when payments are not rounded.
func (f *Fit) Decimals() int { return f.round.Decimals() }

// RoundingDesc says in words how payments are rounded.
func (f *Fit) RoundingDesc() string { return f.round.Describe() }

// Rule is the rule the fit was made for.
func (f *Fit) Rule() *bregman.Rule { return f.given }

// Payer pays arbitrary reports (not only menu items) exactly as the table
// formula does: clamp, effort, A - B·L, rounding. A Payer is used by one
// goroutine and does not allocate.
type Payer struct {
	f      *Fit
	s      *bregman.Scorer
	cp, ef []float64
}

// NewPayer returns a Payer for f.
func (f *Fit) NewPayer() *Payer {
	n := len(f.Labels)
	return &Payer{f: f, s: f.rule.NewScorer(), cp: make([]float64, n), ef: make([]float64, n)}
}

// Pay writes into dst the rounded payment of report p for each outcome
// and returns dst. Where the rule is infinite (a report that gives an
// outcome probability 0 under an unbounded rule, with no clamp) the
// payment is -Inf: the caller decides what to do with such a forecast.
func (p *Payer) Pay(dst, report []float64) []float64 {
	p.s.Efforts(p.ef, ClampReport(p.cp, report, p.f.Clamp))
	for k, l := range p.ef {
		dst[k] = p.f.round.Round(p.f.exact(l))
	}
	return dst
}

// BestItem returns the index of the menu item with the highest expected
// payment on the rounded table for a forecaster whose belief is q (the
// first, if several tie): the report a contract that only accepts menu
// items should expect from that forecaster. It does not allocate.
func (f *Fit) BestItem(q []float64) int {
	if len(q) != len(f.Labels) {
		panic(fmt.Sprintf("budget: belief has %d entries for %d outcomes", len(q), len(f.Labels)))
	}
	best, bv := -1, math.Inf(-1)
	for i, row := range f.Pays {
		if v := bregman.Dot(q, row); v > bv {
			best, bv = i, v
		}
	}
	return best
}

// truthfulRange searches the expected pay of a truthful forecaster,
// A - B·H(q) (at the report the contract pays for q: raised to the report
// floor, clamped), over a grid of beliefs. H is concave,
// so the largest truthful pay is at a vertex and the grid finds it; the
// smallest is where H peaks, which the grid finds to within its spacing.
func (f *Fit) truthfulRange(s *bregman.Scorer) TruthfulRange {
	n := len(f.Labels)
	K := simplex.Resolution(n, 1000, 20000)
	tr := TruthfulRange{Min: math.Inf(1), Max: math.Inf(-1)}
	cp := make([]float64, n)
	skipped := 0
	// The grid, plus the uniform belief (where symmetric generators peak)
	// and the menu items.
	beliefs := simplex.Vectors(n, K)
	uniform := make([]float64, n)
	for k := range uniform {
		uniform[k] = 1 / float64(n)
	}
	beliefs = append(beliefs, uniform)
	beliefs = append(beliefs, f.Menu.Reports...)
	for _, q := range beliefs {
		v := f.exact(s.Expected(q, f.paidReport(cp, q)))
		if math.IsNaN(v) || math.IsInf(v, 0) {
			skipped++
			continue
		}
		if v < tr.Min {
			tr.Min, tr.MinBelief = v, q
		}
		if v > tr.Max {
			tr.Max, tr.MaxBelief = v, q
		}
	}
	tr.Grid = fmt.Sprintf("beliefs on a simplex grid of step 1/%d (%.0f points), the uniform belief and the menu items", K, gridSize(n, K))
	if skipped > 0 {
		tr.Grid += fmt.Sprintf("; %d beliefs where the rule is not finite left out", skipped)
	}
	return tr
}
