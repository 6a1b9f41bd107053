package tui

import "testing"

// A certificate that proved proper (strictness on part of the simplex
// only) does not replace the grid's strictly proper: it has shown no two
// reports that tie. With the grid saying proper (a tie it found), the
// certificate's proper stands, certified.
func TestWeakerCertificateKeepsTheGridsVerdict(t *testing.T) {
	p := ChecksPane{report: &CheckReport{Verdict: "strictly-proper"}}
	p.certified(&CertificateView{Kind: "certified", Verdict: "proper"})
	if got, kind := p.report.Final(), p.report.Kind(); got != "strictly-proper" || kind != "grid evidence" {
		t.Errorf("grid strictly proper, certificate proper: shown %s (%s), want strictly-proper (grid evidence)", got, kind)
	}
	p = ChecksPane{report: &CheckReport{Verdict: "proper"}}
	p.certified(&CertificateView{Kind: "certified", Verdict: "proper"})
	if got, kind := p.report.Final(), p.report.Kind(); got != "proper" || kind != "certified" {
		t.Errorf("grid proper, certificate proper: shown %s (%s), want proper (certified)", got, kind)
	}
}
