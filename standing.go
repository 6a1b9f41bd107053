package scorewright

import (
	"scorewright/contract/table"
	"scorewright/verify"
	"scorewright/verify/certify"
)

// Standing is the verdict that stands once a grid check and a certificate
// have both spoken, with its kind: what the command's `verdict:` line, its
// JSON and the workbench's header all print, so that none of them can head
// a report with the grid's verdict while the certificate below proves the
// opposite.
type Standing struct {
	// Verdict is the verdict that stands.
	Verdict verify.Verdict
	// Kind is certify.Certified when the verdict is the certificate's
	// proof, certify.GridEvidence when it is the grid's.
	Kind certify.Kind
	// Basis says, when the grid and the certificate disagree, which one
	// the verdict rests on and why; "" when they agree or only one spoke.
	Basis string
	// Epsilon is the certificate's epsilon when the verdict is
	// certify.EpsilonProper.
	Epsilon float64
}

// StandingVerdict combines a grid verdict with a certificate's verdict
// (cert "" when no certificate ran; epsilon its epsilon, read only for an
// epsilon-proper payout). A proof of impropriety stands whatever the grid
// says: its witness is checked in interval arithmetic, and a grid that
// samples can miss a bump between its points. A grid finding of
// impropriety stands against a proof of properness (its witness is a
// computed misreport; the contradiction is itself a finding). A proof of
// properness without strictness does not undo the grid's strictness: it
// has not shown two reports that tie. Otherwise a certificate that decided
// stands, and an undecided one leaves the grid's verdict as grid evidence.
func StandingVerdict(grid, cert verify.Verdict, epsilon float64) Standing {
	switch {
	case cert == "" || cert == certify.Undecided:
		return Standing{Verdict: grid, Kind: certify.GridEvidence}
	case cert == verify.Improper:
		s := Standing{Verdict: verify.Improper, Kind: certify.Certified}
		if grid != verify.Improper {
			s.Basis = "the certificate's witness; the grid, which samples, found none"
		}
		return s
	case grid == verify.Improper:
		return Standing{Verdict: verify.Improper, Kind: certify.GridEvidence,
			Basis: "the grid's witness, against the certificate's " + string(cert)}
	case cert == verify.Proper && grid == verify.StrictlyProper:
		return Standing{Verdict: grid, Kind: certify.GridEvidence,
			Basis: "the certificate proved proper; strictness is the grid's"}
	case cert == verify.StrictlyProper && grid == verify.Proper:
		return Standing{Verdict: cert, Kind: certify.Certified,
			Basis: "the certificate proved strictness; the grid's tie is within its tolerance"}
	}
	return Standing{Verdict: cert, Kind: certify.Certified, Epsilon: epsilon}
}

// Words is the standing verdict as the command's `verdict:` line writes
// it: "improper (certified: the certificate's witness; ...)",
// "strictly-proper (certified)", "epsilon-proper to 0.001 (certified)".
func (s Standing) Words() string {
	v := string(s.Verdict)
	if s.Verdict == certify.EpsilonProper {
		v = certify.EpsilonVerdict(s.Epsilon)
	}
	if s.Basis != "" {
		return v + " (" + string(s.Kind) + ": " + s.Basis + ")"
	}
	return v + " (" + string(s.Kind) + ")"
}

// RecordedKind is the verdict kind a payment table records once a
// certificate ran on its rule: "certified strictly proper", "certified
// proper" or "certified epsilon-proper to 0.001", as the certificate
// proved it, so a record never says "certified" without saying whether
// strictness was proved. It is table.GridEvidence when the certificate
// proved no honesty (undecided, improper) or the grid's witness of
// impropriety stands against it (grid "" when no grid check ran).
func RecordedKind(grid, cert verify.Verdict, epsilon float64) string {
	if !certify.Proved(cert) || grid == verify.Improper {
		return table.GridEvidence
	}
	switch cert {
	case verify.StrictlyProper:
		return "certified strictly proper"
	case certify.EpsilonProper:
		return "certified " + certify.EpsilonVerdict(epsilon)
	}
	return "certified proper"
}
