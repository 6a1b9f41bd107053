package scorewright

import (
	"testing"

	"scorewright/verify"
	"scorewright/verify/certify"
)

// The verdict that stands over every pair of a grid verdict and a
// certificate verdict, against the rules written out by hand (derived by
// hand from what each side can prove): a proof of impropriety wins, a grid
// witness of impropriety wins over a proof of properness, a proof of
// properness alone does not undo the grid's strictness, an undecided or
// absent certificate leaves the grid's evidence, otherwise the proof.
func TestStandingVerdict(t *testing.T) {
	grids := []verify.Verdict{verify.StrictlyProper, verify.Proper, verify.Improper}
	certs := []verify.Verdict{"", certify.Undecided, verify.StrictlyProper, verify.Proper, certify.EpsilonProper, verify.Improper}
	for _, g := range grids {
		for _, c := range certs {
			want, kind := c, certify.Certified
			switch {
			case c == "" || c == certify.Undecided:
				want, kind = g, certify.GridEvidence
			case c == verify.Improper:
			case g == verify.Improper:
				want, kind = g, certify.GridEvidence
			case g == verify.StrictlyProper && c == verify.Proper:
				want, kind = g, certify.GridEvidence
			}
			st := StandingVerdict(g, c, 0.001)
			if st.Verdict != want || st.Kind != kind {
				t.Errorf("grid %q, certificate %q: %s %s, want %s %s", g, c, st.Verdict, st.Kind, want, kind)
			}
			// They disagree exactly when the standing verdict is not
			// both sides' own; then the basis must say which stands.
			disagree := c != "" && c != certify.Undecided && c != g
			if disagree != (st.Basis != "") && !(c == certify.EpsilonProper && g != verify.Improper) {
				t.Errorf("grid %q, certificate %q: basis %q", g, c, st.Basis)
			}
		}
	}
	if w := StandingVerdict(verify.StrictlyProper, verify.Improper, 0).Words(); w != "improper (certified: the certificate's witness; the grid, which samples, found none)" {
		t.Errorf("words %q", w)
	}
	if w := StandingVerdict(verify.StrictlyProper, certify.EpsilonProper, 0.001).Words(); w != "epsilon-proper to 0.001 (certified)" {
		t.Errorf("words %q", w)
	}
}
