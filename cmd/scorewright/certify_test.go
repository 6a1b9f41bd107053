package main

import (
	"encoding/json"
	"strings"
	"testing"
)

type certifiedJSON struct {
	Verdict     string `json:"verdict"`
	Kind        string `json:"kind"`
	Certificate *struct {
		Kind    string  `json:"kind"`
		Verdict string  `json:"verdict"`
		Share   float64 `json:"share"`
		Witness *struct {
			Belief []float64 `json:"belief"`
			Report []float64 `json:"report"`
			Gain   float64   `json:"gain"`
		} `json:"witness"`
		Statement string `json:"statement"`
	} `json:"certificate"`
}

// The quadratic rule is strictly proper (Brier 1950): the certificate
// proves it, so the verdict rests on the proof (kind certified) and the
// grid streams only the pairs the proof leaves; without --certify the
// same verdict is grid evidence over all G² pairs.
func TestCheckCertify(t *testing.T) {
	code, out, errs := runCmd(t, "check", "--outcomes", "3", "--preset", "quadratic", "--resolution", "20", "--certify", "--deadline", "10s", "--json")
	if code != 0 {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var v struct {
		certifiedJSON
		Grid struct {
			Points int   `json:"points"`
			Pairs  int64 `json:"pairs"`
		} `json:"grid"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if v.Verdict != "strictly-proper" || v.Kind != "certified" || v.Certificate == nil || v.Certificate.Kind != "certified" || v.Certificate.Verdict != "strictly-proper" || v.Certificate.Share != 1 {
		t.Errorf("got %s", out[:min(len(out), 400)])
	}
	if G := int64(v.Grid.Points); v.Grid.Pairs <= 0 || v.Grid.Pairs >= G*G {
		t.Errorf("%d pairs streamed under the proof, of %d", v.Grid.Pairs, G*G)
	}
	code, out, _ = runCmd(t, "check", "--outcomes", "3", "--preset", "quadratic", "--resolution", "20", "--json")
	if code != 0 || !strings.Contains(out, `"kind": "grid evidence"`) || !strings.Contains(out, `"pairs": 53361`) {
		t.Errorf("without --certify: exit %d %s", code, out[:min(len(out), 400)])
	}
}

// A bump of width 1e-6 the grid cannot see makes the rule improper (its
// curvature 2·1e-10/1e-12 = 200 beats the quadratic's -2, derived by
// hand): the grid sees nothing, the certificate proves it improper, and
// the verdict heading the report, in text and JSON, is the certificate's
// (kind certified, resting on its witness), exit 1.
func TestCheckCertifyCatchesNarrowBump(t *testing.T) {
	args := []string{"check", "--outcomes", "2", "--generator", "1 - sum(p^2) + 1e-10*exp(-(p1 - 0.3141)^2/1e-12)", "--certify", "--deadline", "10s"}
	code, out, _ := runCmd(t, args...)
	if code != 1 || !strings.Contains(out, "\nverdict: improper (certified: the certificate's witness; the grid, which samples, found none)\n") ||
		!strings.Contains(out, "certificate (certified): improper") || !strings.Contains(out, "properness     passed") {
		t.Errorf("exit %d\n%s", code, out)
	}
	code, out, _ = runCmd(t, append(args, "--json")...)
	var v certifiedJSON
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if code != 1 || v.Verdict != "improper" || v.Kind != "certified" || v.Certificate == nil || v.Certificate.Witness == nil {
		t.Errorf("exit %d: %s", code, out[:min(len(out), 600)])
	}
}

// A jackpot of 5 on reports within 1e-7 of p1 = 0.3141: the audit's grid
// misses it, the certificate finds a belief gaining more than 4.
func TestAuditCertifyCatchesJackpot(t *testing.T) {
	code, out, _ := runCmd(t, "audit", "--outcomes", "2", "--payout", "1 - sum((p - hit)^2) + if(abs(p1 - 0.3141) < 1e-7, 5, 0)", "--certify", "--json")
	var v certifiedJSON
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if code != 1 || v.Certificate == nil || v.Certificate.Verdict != "improper" || v.Certificate.Witness == nil || v.Certificate.Witness.Gain < 4 {
		t.Errorf("exit %d: %s", code, out[:min(len(out), 600)])
	}
}

// A payout certificate proves honesty only to within epsilon, and says
// so wherever it is printed: the quadratic payout 10 - 5·sum((p - hit)^2)
// is proper (Brier 1950), and the certificate proves that no report gains
// more than its tolerance, 1e-3 as --epsilon sets it. Neither the text
// nor the JSON may call it plainly proper.
func TestAuditCertificateSaysEpsilon(t *testing.T) {
	args := []string{"audit", "--outcomes", "3", "--payout", "10 - 5*sum((p - hit)^2)", "--certify", "--epsilon", "0.001"}
	code, out, errs := runCmd(t, args...)
	if code != 0 || !strings.Contains(out, "certificate (certified): epsilon-proper to 0.001 (no report gains more than 0.001 anywhere)\n") ||
		!strings.Contains(out, "certified epsilon-proper to 0.001: no report gains more than 0.001 anywhere (a smaller gain is not ruled out)") {
		t.Errorf("exit %d: %s%s", code, out, errs)
	}
	code, out, _ = runCmd(t, append(args, "--json")...)
	var v certifiedJSON
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if code != 0 || v.Certificate == nil || v.Certificate.Verdict != "epsilon-proper" || !strings.HasPrefix(v.Certificate.Statement, "certified epsilon-proper to 0.001: ") {
		t.Errorf("exit %d: %s", code, out[:min(len(out), 600)])
	}
}

// A point generator is certified on its interval: -x^4 is strictly
// concave on [0, 1] (its curvature -12x² vanishes only at 0), so
// strictly proper (issue 10; Savage 1971); x^3 is convex there, improper
// (exit 1). A point-forecast payout is refused with the reason.
func TestCertifyPointMode(t *testing.T) {
	code, out, errs := runCmd(t, "check", "--interval", "0,1", "--generator", "-x^4", "--certify")
	if code != 0 || !strings.Contains(out, "certificate (certified): strictly-proper") || !strings.Contains(out, "verdict: strictly-proper (certified)\n") {
		t.Errorf("exit %d: %s%s", code, out, errs)
	}
	code, out, _ = runCmd(t, "check", "--interval", "0,1", "--generator", "x^3", "--certify")
	if code != 1 || !strings.Contains(out, "certificate (certified): improper") {
		t.Errorf("exit %d: %s", code, out)
	}
	code, _, errs = runCmd(t, "audit", "--interval", "0,1", "--payout", "-(x - y)^2", "--certify")
	if code != 2 || !strings.Contains(errs, "grid only") {
		t.Errorf("exit %d: %s", code, errs)
	}
}

// An emphasis weight is certified by its sign (Schervish 1989): the
// step 0 below 0.3, 1 above, is proper but not strictly.
func TestCertifyEmphasis(t *testing.T) {
	code, out, errs := runCmd(t, "check", "--outcomes", "2", "--emphasis", "if(c < 0.3, 0, 1)", "--certify")
	if code != 0 || !strings.Contains(out, "certificate (certified): proper") || !strings.Contains(out, "ties") {
		t.Errorf("exit %d: %s%s", code, out, errs)
	}
}

// table --certify records the verdict kind with what was certified:
// "certified strictly proper" for the quadratic rule (Brier 1950, strictly
// proper); "certified proper" for -(p1 - p2)^4, whose curvature
// -48(2p1 - 1)^2 vanishes at p1 = 1/2 (derived by hand), so the
// certificate proves concavity everywhere but strictness only off a
// neighbourhood of that point; grid evidence without the flag.
func TestTableRecordsVerdictKind(t *testing.T) {
	code, out, errs := runCmd(t, "table", "--outcomes", "3", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.25", "--format", "csv", "--certify")
	if code != 0 || !strings.Contains(out, "# verdict kind: certified strictly proper\n") || !strings.Contains(out, "# certificate: certified strictly proper") {
		t.Errorf("exit %d %s\n%s", code, errs, out)
	}
	code, out, errs = runCmd(t, "table", "--outcomes", "2", "--generator", "-(p1-p2)^4", "--floor", "0", "--cap", "100", "--step", "0.25", "--format", "csv", "--certify")
	if code != 0 || !strings.Contains(out, "# verdict kind: certified proper\n") || !strings.Contains(out, "# certificate: certified proper over the whole simplex") {
		t.Errorf("exit %d %s\n%s", code, errs, out)
	}
	code, out, _ = runCmd(t, "table", "--outcomes", "3", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.25", "--format", "csv")
	if code != 0 || !strings.Contains(out, "# verdict kind: grid evidence\n") {
		t.Errorf("exit %d\n%s", code, out)
	}
}

// A certificate that proves nothing says so: the spherical payout over 4
// outcomes is not decided in 50 ms (it was not in 60 s), and its line must
// not read "(certified)" for the verdict undecided.
func TestUndecidedCertificateIsNotCalledCertified(t *testing.T) {
	code, out, errs := runCmd(t, "audit", "--outcomes", "4", "--payout", "p[y]/sqrt(sum(p^2))", "--resolution", "8", "--certify", "--deadline", "50ms")
	if code != 0 || !strings.Contains(out, "certificate (not certified): undecided") || strings.Contains(out, "(certified): undecided") {
		t.Errorf("exit %d: %s%s", code, out, errs)
	}
}

// A certificate that proves concavity but strictness only on part of the
// simplex does not make the verdict "proper": -(p1 - p2)^4 is strictly
// concave (its curvature -48(2p - 1)^2 vanishes at p = 1/2 only, an
// isolated zero; derived by hand), so strictly proper, which the grid
// finds; the verdict line keeps it, as grid evidence, under a
// certificate that proved proper.
func TestPartlyStrictCertificateKeepsTheGridsStrictness(t *testing.T) {
	code, out, errs := runCmd(t, "check", "--outcomes", "2", "--generator", "-(p1-p2)^4", "--resolution", "200", "--certify")
	if code != 0 || !strings.Contains(out, "verdict: strictly-proper (grid evidence: the certificate proved proper; strictness is the grid's)") || strings.Contains(out, "verdict: proper") {
		t.Errorf("exit %d: %s%s", code, out, errs)
	}
}
