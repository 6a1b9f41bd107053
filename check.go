package scorewright

import (
	"context"
	"errors"
	"fmt"

	"scorewright/presets"
	"scorewright/verify"
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
		rep, err := pointcheck.CheckGenerator(ctx, r.point, PointSettings(s))
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
		rep, err := pointcheck.AuditPayout(ctx, r.pointPay, lo, hi, PointSettings(s), cands)
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

// PointSettings are verify's settings as verify/pointcheck takes them:
// the same resolution, tolerance and progress.
func PointSettings(s verify.Settings) pointcheck.Settings {
	ps := pointcheck.Settings{Resolution: s.Resolution, Tolerance: s.Tolerance}
	if s.Progress != nil {
		ps.Progress = func(done, total int) { s.Progress(int64(done), int64(total)) }
	}
	return ps
}

// Certificate is the seam for an exact proof of properness, as opposed
// to the grid evidence of Check. The certify work fills it in.
type Certificate struct {
	// Kind says what was proved and how.
	Kind string
	// Notes are the steps of the proof a reader can follow.
	Notes []string
}

// ErrNoCertificate says no certificate method applies to the rule (yet).
var ErrNoCertificate = errors.New("no certificate method applies to this rule; its verdict is grid evidence")

// Certify tries to prove the rule proper exactly. No method is wired in
// yet: it returns ErrNoCertificate for every design, and callers fall
// back to Check's grid evidence.
func (r *Rule) Certify(ctx context.Context) (*Certificate, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return nil, fmt.Errorf("%s design: %w", r.Kind(), ErrNoCertificate)
}
