package budget

import (
	"context"
	"errors"
	"fmt"
	"math"

	"scorewright/generator/bregman"
	"scorewright/generator/design"
	"scorewright/internal/numfmt"
	"scorewright/internal/pool"
)

// ProposalUnits are the currency units a proposal chooses from, coarse to
// fine: the round amounts a contract is written in.
func ProposalUnits() []float64 {
	return []float64{100, 50, 25, 20, 10, 5, 2, 1, 0.5, 0.25, 0.2, 0.1, 0.05, 0.02, 0.01, 0.005, 0.002, 0.001}
}

// capSteps is how many steps the cap search takes at most: steps of a
// hundredth of the range from floor to cap (rounded up to whole rounding
// units), up to five times the range.
const capSteps = 500

// Proposal is a budget the menu re-check passes with, one field changed
// from the budget asked about.
type Proposal struct {
	// Field names what changed: "unit", "cap" or "mean pay". Budget is the
	// whole budget with the change.
	Field  string
	Budget design.Budget
	// MinMargin is the re-check's smallest margin with Budget.
	MinMargin float64
	// Tried is how many budgets were fitted and checked.
	Tried int
	// NoLarger, when set, says that the budget asked about fails and no
	// larger cap (or mean pay) searched at its unit passes: this
	// proposal changes the unit only.
	NoLarger *CapSearch
}

// CapSearch is the cap (or mean pay) search of a failing budget that
// found nothing: every multiple of Grain from From to To was tried at
// Unit, To being the most the search goes to (five times the range);
// Tried is how many.
type CapSearch struct {
	Field                 string
	From, To, Grain, Unit float64
	Tried                 int
}

// Describe says in a line that nothing searched passes.
func (c *CapSearch) Describe() string {
	return fmt.Sprintf("no larger %s passes at unit %g: %ss %g to %g tried in steps of %g (up to five times the range)", c.Field, c.Unit, c.Field, c.From, c.To, c.Grain)
}

// Describe says the proposal in a line.
func (p *Proposal) Describe() string {
	switch p.Field {
	case "unit":
		s := fmt.Sprintf("unit %g: the coarsest currency unit the re-check passes with (margin %s)", p.Budget.Unit, numfmt.Margin(p.MinMargin))
		if p.NoLarger != nil {
			s += "; " + p.NoLarger.Describe()
		}
		return s
	case "cap":
		return fmt.Sprintf("cap %g: the smallest cap the re-check passes with at unit %g (margin %s)", p.Budget.Cap, p.Budget.Unit, numfmt.Margin(p.MinMargin))
	}
	return fmt.Sprintf("mean pay %g: the smallest mean pay the re-check passes with at unit %g (margin %s)", *p.Budget.MeanPay, p.Budget.Unit, numfmt.Margin(p.MinMargin))
}

// ErrNoProposal says that no budget searched passes the re-check; the
// error Propose returns wraps it with what was searched.
var ErrNoProposal = errors.New("no budget searched makes the menu re-check pass")

// noProposal is ErrNoProposal with the words for what was searched.
type noProposal struct{ rounded bool }

func (e noProposal) Error() string {
	if e.rounded {
		return "no currency unit down to 0.001 and no larger cap (up to five times the range) makes the menu re-check pass; look at the rule or the menu rather than the rounding"
	}
	// Unrounded, a larger cap only rescales the table (pay = A - B·L with
	// a larger B), and a positive rescaling keeps every report's rank.
	return "no currency unit down to 0.001 makes the menu re-check pass, and without a rounding unit a larger cap only rescales the table, which leaves the re-check as it is; look at the rule or the menu"
}

func (e noProposal) Is(target error) bool { return target == ErrNoProposal }

// Propose searches for budgets close to b that the re-check passes with,
// each changing one field of b:
//
//   - the coarsest currency unit of the ladder (at most half the range
//     from floor to cap), the rest of b kept: a coarser unit is an easier
//     contract, and it costs the buyer nothing;
//   - when b itself fails and has a unit, the smallest cap above b's at
//     b's unit, or the smallest mean pay for a mean-pay budget: a larger
//     one only costs the buyer more. Every multiple of CapGrain above b's
//     is tried in turn, up to five times the range, so no smaller cap of
//     that grain passes (passing need not be monotone in the cap, so the
//     search does not skip).
//
// A candidate passes when every menu item is the strict best report for
// the belief that is that item, which is what decides Recheck's Passed.
// progress, when set, is told candidates tried of the most there can be.
// With no candidate passing the error is ErrNoProposal.
func Propose(ctx context.Context, r *bregman.Rule, m *Menu, b design.Budget, progress pool.Progress) ([]Proposal, error) {
	first, err := FitRule(r, m, b)
	if err != nil {
		return nil, err
	}
	passes := func(ctx context.Context, c design.Budget) (float64, bool, error) {
		f, err := FitRule(r, m, c)
		if err != nil {
			return 0, false, err
		}
		return menuMargin(ctx, f)
	}
	return Search(ctx, b, first.Cap, passes, progress)
}

// Passes fits budget c and says whether its rounded table passes the
// re-check, with the smallest margin.
type Passes func(ctx context.Context, c design.Budget) (margin float64, passed bool, err error)

// Search is Propose's search over the budgets near b for any table that
// passes decides: units of the ladder up to half the range from b's floor
// to capNow (the cap the table has; a mean-pay fit's largest payment),
// then caps (or mean pays) above it. Point-forecast tables use it with
// their own re-check.
func Search(ctx context.Context, b design.Budget, capNow float64, passes Passes, progress pool.Progress) (props []Proposal, err error) {
	span := capNow - b.Floor
	units := ProposalUnits()
	meter := pool.NewMeter(progress, int64(len(units)+1+capSteps))
	defer func() { meter.Finish(err == nil) }()
	s := &search{ctx: ctx, passes: passes, meter: meter}
	for _, u := range units {
		if u > span/2 {
			continue
		}
		c := b
		c.Unit = u
		p, err := s.try("unit", c)
		if err != nil {
			return nil, err
		}
		if p != nil {
			props = append(props, *p)
			break
		}
	}
	now, err := s.try("unit", b)
	if now != nil && len(props) == 0 {
		props = append(props, *now) // b's own unit is the coarsest found
	}
	if err != nil || now != nil || b.Unit == 0 {
		return done(props, err, b.Unit > 0)
	}
	from, field := capNow, "cap"
	if b.MeanPay != nil {
		from, field = *b.MeanPay, "mean pay"
	}
	grain := CapGrain(from-b.Floor, b.Unit)
	first := math.Floor(from/grain+1e-9) + 1 // the first multiple above
	tried := &CapSearch{Field: field, Grain: grain, Unit: b.Unit}
	for k := 0; k < capSteps; k++ {
		c := b
		// a cap (or mean pay) as a person writes it: a whole number of grains
		v := math.Round((first+float64(k))*grain*1e6) / 1e6
		if v > from+4*(from-b.Floor)+1e-9 {
			break // five times the range
		}
		if k == 0 {
			tried.From = v
		}
		tried.To, tried.Tried = v, k+1
		if b.MeanPay != nil {
			c.MeanPay = &v
		} else {
			c.Cap = v
		}
		p, err := s.try(field, c)
		if err != nil {
			return nil, err
		}
		if p != nil {
			return append(props, *p), nil
		}
	}
	if tried.Tried > 0 {
		for i := range props {
			props[i].NoLarger = tried
		}
	}
	return done(props, nil, true)
}

// CapGrain is the step of the cap search over a range span at rounding
// unit: a whole number of units, the smallest at least a hundredth of the
// range, so that five times the range is at most capSteps steps.
func CapGrain(span, unit float64) float64 {
	if !(unit > 0) {
		return span / 100
	}
	return unit * math.Max(1, math.Ceil(span/100/unit-1e-9))
}

// done is a search's answer: err, or ErrNoProposal when nothing passed
// (rounded: the search had a unit, so larger caps were tried too).
func done(props []Proposal, err error, rounded bool) ([]Proposal, error) {
	if err == nil && len(props) == 0 {
		err = noProposal{rounded}
	}
	if err != nil {
		return nil, err
	}
	return props, nil
}

// search is one proposal search: its test and what it tried.
type search struct {
	ctx    context.Context
	passes Passes
	meter  *pool.Meter
	tried  int
}

// try checks budget c and returns it as a proposal if it passes, nil if
// not.
func (s *search) try(field string, c design.Budget) (*Proposal, error) {
	s.tried++
	s.meter.Add(1)
	if err := s.ctx.Err(); err != nil {
		return nil, err
	}
	mg, ok, err := s.passes(s.ctx, c)
	if err != nil || !ok {
		return nil, err
	}
	return &Proposal{Field: field, Budget: c, MinMargin: mg, Tried: s.tried}, nil
}

// menuMargin is the menu part of the re-check: each item against every
// other for the belief that is that item, on the rounded table; margins
// within the tie tolerance count as ties, as in Recheck.
func menuMargin(ctx context.Context, f *Fit) (least float64, passed bool, err error) {
	pays, tol := f.flatPays(0)
	n := len(f.Labels)
	least = math.Inf(1)
	for i, p := range f.Menu.Reports {
		if i%64 == 0 && ctx.Err() != nil {
			return 0, false, ctx.Err()
		}
		mg, _ := margin(pays, n, p, i)
		if math.Abs(mg) <= tol {
			mg = 0
		}
		least = math.Min(least, mg)
	}
	return least, least > 0, nil
}
