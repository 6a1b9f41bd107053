package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"time"

	"scorewright"
	"scorewright/contract/table"
	"scorewright/internal/num"
	"scorewright/internal/pool"
	"scorewright/verify"
	"scorewright/verify/certify"
)

// certifyFlags ask check and audit for a certificate besides the grid.
type certifyFlags struct {
	on       bool
	deadline time.Duration
	epsilon  float64
}

const certifyUsage = "[--certify [--deadline 30s] [--epsilon E]]"

func addCertifyFlags(fs *flag.FlagSet) *certifyFlags {
	c := &certifyFlags{}
	fs.BoolVar(&c.on, "certify", false, "also prove the verdict over the whole simplex (or interval) by interval arithmetic, or say what share of it was proved")
	fs.DurationVar(&c.deadline, "deadline", certify.DefaultDeadline, "time allowed for --certify")
	fs.Float64Var(&c.epsilon, "epsilon", 0, "audit --certify: the gain a report may have and still count as honest (0: a hundredth of a percent of the payments' spread)")
	return c
}

func (c *certifyFlags) settings(e *env) (certify.Settings, error) {
	if c.deadline <= 0 {
		return certify.Settings{}, usagef("--deadline must be positive, got %s", c.deadline)
	}
	if c.epsilon < 0 {
		return certify.Settings{}, usagef("--epsilon must not be negative, got %g", c.epsilon)
	}
	s := certify.Settings{Deadline: c.deadline, Epsilon: c.epsilon}
	if isTerminal(e.stderr) {
		s.Progress = func(p pool.Step) {
			if p.Last {
				fmt.Fprint(e.progressOut(), "\r\033[K")
				return
			}
			fmt.Fprintf(e.progressOut(), "\rcertifying: %s proved, %d boxes, %s of %s ", pct(p.Done), p.Items, p.Elapsed.Round(100*time.Millisecond), c.deadline)
		}
	}
	return s, nil
}

func pct(x float64) string { return fmt.Sprintf("%.4g%%", 100*x) }

// certificateJSON is the certificate in the commands' JSON: its kind is
// always "certified"; the verdict is undecided when it could not finish.
type certificateJSON struct {
	Kind        certify.Kind   `json:"kind"`
	Verdict     verify.Verdict `json:"verdict"`
	Share       num.Float      `json:"share"`
	StrictShare *num.Float     `json:"strict_share,omitempty"`
	Epsilon     *num.Float     `json:"epsilon,omitempty"`
	Boxes       int            `json:"boxes"`
	Open        int            `json:"open_boxes"`
	Stopped     string         `json:"stopped,omitempty"`
	Seconds     num.Float      `json:"seconds"`
	Witness     *witnessJSON   `json:"witness,omitempty"`
	Statement   string         `json:"statement"`
	Unavailable string         `json:"unavailable,omitempty"`
}

type witnessJSON struct {
	Belief []num.Float `json:"belief"`
	Report []num.Float `json:"report"`
	Gain   num.Float   `json:"gain"`
	Reason string      `json:"reason"`
}

func toCertificateJSON(r *certify.Result, payoutMode bool) *certificateJSON {
	out := &certificateJSON{Kind: r.Kind, Verdict: r.Verdict, Share: num.Float(r.Share), Boxes: r.Boxes, Open: r.Open,
		Stopped: r.Stopped, Seconds: num.Float(r.Elapsed.Seconds()), Statement: r.Statement()}
	if payoutMode {
		eps := num.Float(r.Epsilon)
		out.Epsilon = &eps
	} else {
		st := num.Float(r.StrictShare)
		out.StrictShare = &st
	}
	if w := r.Witness; w != nil {
		out.Witness = &witnessJSON{Belief: num.Floats(w.Belief), Report: num.Floats(w.Report), Gain: num.Float(w.Gain), Reason: w.Reason}
	}
	return out
}

// certificate runs the certificate when c asks for one: nil when not;
// a design no certificate method applies to (an emphasis weight) gives a
// certificate that says so, not an error. improper is set when the
// certificate proved the rule improper, which makes the exit status 1.
func certificate(ctx context.Context, e *env, r *scorewright.Rule, c *certifyFlags) (cert *certificateJSON, improper bool, err error) {
	if c == nil || !c.on {
		return nil, false, nil
	}
	s, err := c.settings(e)
	if err != nil {
		return nil, false, err
	}
	res, err := r.Certify(ctx, s)
	switch {
	case errors.Is(err, scorewright.ErrNoCertificate):
		return &certificateJSON{Kind: certify.Certified, Verdict: certify.Undecided, Unavailable: err.Error(),
			Statement: "no certificate: " + err.Error()}, false, nil
	case err != nil:
		return nil, false, usagef("certify: %v", err)
	}
	return toCertificateJSON(res, r.IsPayout()), res.Verdict == verify.Improper, nil
}

// refuseCertifyOnInterval is the usage error for --certify on a point
// forecast's payout, which the certificate does not cover (a point
// generator it does).
func refuseCertifyOnInterval(r *scorewright.Rule, c *certifyFlags) error {
	if c != nil && c.on && r.OnInterval() && r.IsPayout() {
		return usagef("--certify covers generators (over outcomes or on an interval), emphasis weights and payouts over outcomes; a point-forecast payout is checked on the grid only, since its honesty is over every distribution on the interval")
	}
	return nil
}

// printCertificate writes the certificate's lines under the grid report.
func printCertificate(w io.Writer, c *certificateJSON) {
	if c == nil {
		return
	}
	var eps float64
	if c.Epsilon != nil {
		eps = float64(*c.Epsilon)
	}
	// An undecided certificate proved no verdict: its line must not
	// read "(certified)".
	kind := string(c.Kind)
	if c.Verdict == certify.Undecided {
		kind = "not certified"
	}
	fmt.Fprintf(w, "\ncertificate (%s): %s\n", kind, scorewright.CertificateHeadline(c.Verdict, eps))
	fmt.Fprintf(w, "               %s\n", c.Statement)
}

// certifyRecord runs the certificate for a table when asked and writes
// what it proved into the table's record: the verdict kind says what was
// certified (scorewright.RecordedKind: "certified strictly proper",
// "certified proper", for a payout "certified epsilon-proper to E") when
// the rule was proved honest over the whole simplex; otherwise it stays
// "grid evidence" with the certificate's statement beside it.
func certifyRecord(e *env, r *scorewright.Rule, m *table.Meta, c *certifyFlags) error {
	if c == nil || !c.on {
		return nil
	}
	if err := refuseCertifyOnInterval(r, c); err != nil {
		return err
	}
	ctx, stop := interruptible()
	defer stop()
	cert, _, err := certificate(ctx, e, r, c)
	if err != nil {
		return err
	}
	var eps float64
	if cert.Epsilon != nil {
		eps = float64(*cert.Epsilon)
	}
	m.Certificate = cert.Statement
	m.VerdictKind = scorewright.RecordedKind("", cert.Verdict, eps)
	return nil
}
