package scorewright

import (
	"context"
	"errors"
	"fmt"

	"scorewright/generator/bregman"
	"scorewright/generator/emphasis"
	"scorewright/presets"
	"scorewright/verify"
	"scorewright/verify/certify"
	"scorewright/verify/pointcheck"
)

// Findings are what a check or an audit found; one of the three reports
// is set, the one the design's mode produces.
type Findings struct {
	// Rule is the check of a rule over outcomes (generator, emphasis).
	Rule *verify.Report
	// Audit is the audit of a payout over outcomes.
	Audit *verify.AuditReport
	// Point is the check of a point-forecast generator or the audit of a
	// point-forecast payout.
	Point *pointcheck.Report
}

// Failed reports whether the rule was found improper or a check failed:
// the command line's exit status 1.
func (f *Findings) Failed() bool {
	switch {
	case f.Rule != nil:
		return f.Rule.Verdict == verify.Improper || f.Rule.Failed()
	case f.Audit != nil:
		return f.Audit.Verdict == verify.Improper || f.Audit.Failed()
	case f.Point != nil:
		return f.Point.Failed()
	}
	return false
}

// ErrRuleNotPayout is Audit asked of a rule design: a rule is checked.
var ErrRuleNotPayout = errors.New("a rule's generator is not a payout to audit; check it")

// Check examines a rule design on a grid of beliefs: a rule over
// outcomes with verify.CheckRule, a point-forecast generator with
// verify/pointcheck. A payout design is refused with a
// *NeedsOutcomesError: a payout is audited, not checked.
func (r *Rule) Check(ctx context.Context, s verify.Settings) (*Findings, error) {
	switch {
	case r.outcomes != nil:
		rep, err := verify.CheckRule(ctx, r.outcomes, s)
		if err != nil {
			return nil, err
		}
		return &Findings{Rule: rep}, nil
	case r.point != nil:
		rep, err := pointcheck.CheckGenerator(ctx, r.point, s)
		if err != nil {
			return nil, err
		}
		return &Findings{Point: rep}, nil
	}
	return nil, &NeedsOutcomesError{Mode: r.d.Mode}
}

// Audit examines a payout design: is honesty the best report, the
// honesty gap and where, and the preset the payout is an affine image
// of, if any, among the presets that fit the design. A rule design is
// refused with ErrRuleNotPayout.
func (r *Rule) Audit(ctx context.Context, s verify.Settings) (*Findings, error) {
	d := r.d
	switch {
	case r.payout != nil:
		var cands []verify.Candidate
		for _, c := range presets.Rules(d.N(), d.Ordered, d.Weights) {
			cands = append(cands, verify.Candidate(c))
		}
		rep, err := verify.Audit(ctx, r.payout, cands, s)
		if err != nil {
			return nil, err
		}
		return &Findings{Audit: rep}, nil
	case r.pointPay != nil:
		lo, hi := d.Interval[0], d.Interval[1]
		var cands []pointcheck.Candidate
		for _, g := range presets.PointGenerators(lo, hi) {
			cands = append(cands, pointcheck.Candidate(g))
		}
		rep, err := pointcheck.AuditPayout(ctx, r.pointPay, lo, hi, s, cands)
		if err != nil {
			return nil, err
		}
		return &Findings{Point: rep}, nil
	}
	return nil, ErrRuleNotPayout
}

// Examine checks a rule design and audits a payout design, whichever the
// design's mode calls for: what the workbench's checks pane shows.
func (r *Rule) Examine(ctx context.Context, s verify.Settings) (*Findings, error) {
	if r.IsPayout() {
		return r.Audit(ctx, s)
	}
	return r.Check(ctx, s)
}

// ErrNoCertificate says no certificate method applies to the rule; its
// verdict stays grid evidence.
var ErrNoCertificate = errors.New("no certificate method applies to this rule; its verdict is grid evidence")

// Certify proves the design's verdict by interval arithmetic
// (verify/certify): over the whole simplex, a generator formula's
// concavity (proper, strictly proper or improper) or a payout's honesty
// to within s.Epsilon; over [0, 1], an emphasis weight's sign (Schervish
// 1989); over the interval, a point forecast's generator's concavity.
// Within the deadline it may only prove a share; the result says so. A
// point-forecast payout gives ErrNoCertificate: its honesty is a
// statement about every distribution on the interval, not a box search
// over reports, and only the grid's evidence stands for it.
func (r *Rule) Certify(ctx context.Context, s certify.Settings) (*certify.Result, error) {
	switch {
	case r.payout != nil:
		return certify.Payout(ctx, r.payout, s)
	case r.point != nil:
		return certify.Point(ctx, r.point.Program(), r.point.Lo, r.point.Hi, s)
	case r.outcomes != nil:
		switch g := r.outcomes.Gen.(type) {
		case *bregman.Formula:
			return certify.Rule(ctx, r.outcomes, s)
		case *emphasis.Generator:
			return certify.Emphasis(ctx, g.Program(), s)
		}
	}
	return nil, fmt.Errorf("%s design: %w", r.Kind(), ErrNoCertificate)
}
