package tui

import (
	"context"
	"fmt"
	"time"

	"scorewright"
	"scorewright/internal/pool"
	"scorewright/verify/certify"
)

// CertificateView is the certificate line of the checks pane: what the
// interval certificate (verify/certify) proved about the design.
type CertificateView struct {
	// Kind is "certified"; Verdict the certificate's (strictly-proper,
	// proper, epsilon-proper, improper or undecided); Statement says what
	// was proved, or what share of the simplex when time ran out.
	Kind, Verdict, Statement string
	// Headline is the verdict as the pane heads it
	// (scorewright.CertificateHeadline): for an epsilon-proper payout,
	// with what epsilon-proper means.
	Headline string
	// Epsilon is an epsilon-proper payout's epsilon.
	Epsilon float64
}

// defaultCertifyDeadline keeps the pane responsive: the grid's verdict
// waits for the certificate at most this long.
const defaultCertifyDeadline = 3 * time.Second

func (s Settings) certifyDeadline() time.Duration {
	if s.CertifyDeadline == 0 {
		return defaultCertifyDeadline
	}
	return s.CertifyDeadline
}

// certifyDesign runs the certificate of a design after its grid check,
// reporting progress as the share of the simplex (or interval) proved;
// nil when no certificate method applies (a point-forecast payout) or
// certificates are off (a negative deadline). A cancelled context ends it
// at once.
func certifyDesign(ctx context.Context, r *scorewright.Rule, s Settings, progress pool.Progress) *CertificateView {
	if s.certifyDeadline() < 0 {
		return nil
	}
	res, err := r.Certify(ctx, certifySettings(s, progress))
	if err != nil {
		return nil
	}
	return certificateView(res)
}

func certifySettings(s Settings, progress pool.Progress) certify.Settings {
	return certify.Settings{Deadline: s.certifyDeadline(), Progress: progress}
}

func certificateView(res *certify.Result) *CertificateView {
	return &CertificateView{Kind: string(res.Kind), Verdict: string(res.Verdict), Statement: res.Statement(),
		Headline: scorewright.CertificateHeadline(res.Verdict, res.Epsilon), Epsilon: res.Epsilon}
}

// certificateLines are the pane's lines for c.
func certificateLines(st Styles, c *CertificateView) []string {
	if c == nil {
		return nil
	}
	vs, kind := st.Pass, c.Kind
	switch c.Verdict {
	case "improper":
		vs = st.Fail
	case string(certify.Undecided):
		// Nothing was proved: the line must not read "(certified)".
		vs, kind = st.Dim, "not certified"
	}
	return []string{
		fmt.Sprintf("Certificate %s (%s)", vs.Render(c.headline()), kind),
		st.Dim.Render("  " + c.Statement),
	}
}

// headline is the verdict as the pane heads it; a view built without one
// shows the bare verdict.
func (c *CertificateView) headline() string {
	if c.Headline != "" {
		return c.Headline
	}
	return c.Verdict
}
