package tui

import (
	"context"
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"

	"scorewright/generator/design"
	"scorewright/internal/pool"
)

// checksText is the checks pane's body as plain text.
func checksText(m *Model) string { return ansi.Strip(m.checks.View()) }

// At 80×24 the checks do not all fit; each one is reachable with ↓, and
// enter shows its full text, every line of which can be scrolled into
// view; ←/→ reach the verdict and notes entry too.
func TestChecksPaneReachesEveryCheck(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyTab, keyTab)
	r := m.CheckReport()
	if r == nil || len(r.Rows) < 4 {
		t.Fatalf("report %+v", r)
	}
	if v := checksText(m); !strings.Contains(v, "more (↑/↓, enter: full text)") {
		t.Fatalf("a cut list does not say so:\n%s", v)
	}
	for i, c := range r.Rows {
		if v := checksText(m); !strings.Contains(v, "›✓ "+c.Name) && !strings.Contains(v, "›✗ "+c.Name) {
			t.Errorf("check %d (%s) selected but not shown:\n%s", i, c.Name, v)
		}
		press(t, m, keyEnter)
		seen := map[string]bool{}
		for range 40 { // scroll through the whole text
			for _, l := range strings.Split(checksText(m), "\n") {
				seen[strings.Trim(l, "│┃╎ ")] = true
			}
			press(t, m, keyDown)
		}
		for _, l := range m.checks.detailLines() {
			if !seen[strings.TrimSpace(l)] {
				t.Errorf("check %s: line %q of its full text never shows", c.Name, l)
			}
		}
		if !strings.Contains(strings.Join(m.checks.detailText(), "\n"), c.Note) {
			t.Errorf("check %s: full text lacks its note %q", c.Name, c.Note)
		}
		press(t, m, keyEsc, keyDown)
	}
	// The last entry is the verdict and notes, with the certificate's
	// whole statement.
	press(t, m, keyEnter)
	if txt := strings.Join(m.checks.detailText(), " "); !strings.Contains(txt, r.Certificate.Statement) || !strings.Contains(txt, "("+r.Kind()+")") || r.Certified != (r.Certificate.Verdict == "strictly-proper" || r.Certificate.Verdict == "proper") {
		t.Errorf("verdict entry: %q", txt)
	}
	press(t, m, keyRight)
	if m.checks.sel != 0 || !strings.Contains(checksText(m), "Check 1 of") {
		t.Errorf("→ from the last entry: sel %d\n%s", m.checks.sel, checksText(m))
	}
}

// The picture keeps a readable height at 80×24 whichever pane has the
// focus, and the screen still fits.
func TestPictureHeightAt80x24(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	for p := range int(paneCount) {
		m.setFocus(pane(p))
		m.layout()
		if h := m.picture.h; h < 11 {
			t.Errorf("focus %d: picture %d rows high", p, h)
		}
		if lines := strings.Split(m.View(), "\n"); len(lines) != 24 {
			t.Errorf("focus %d: %d lines", p, len(lines))
		}
	}
}

// The full text of a check, at both sizes.
func TestGoldenChecksDetail80x24(t *testing.T) { goldenChecksDetail(t, 80, 24) }

func TestGoldenChecksDetail120x40(t *testing.T) { goldenChecksDetail(t, 120, 40) }

func goldenChecksDetail(t *testing.T, w, h int) {
	m := testModel(t, nil, Settings{})
	start(t, m, w, h)
	m.setFocus(paneChecks)
	m.layout()
	press(t, m, keyDown, keyDown, keyDown, keyEnter)
	golden.RequireEqual(t, []byte(m.View()))
}

// The help lists the keys this pane and the budget pane added.
func TestHelpNamesNewKeys(t *testing.T) {
	m := testModel(t, nil, Settings{})
	txt := ansi.Strip(helpText(m.st, m.keys, 70))
	for _, want := range []string{"find a unit or cap the re-check passes with", "take proposal 1", "take proposal 2",
		"its full text", "the other checks", "TIE or BEATEN"} {
		if !strings.Contains(txt, want) {
			t.Errorf("help lacks %q", want)
		}
	}
}

// The workbench hands a certificate's proof to the grid, as check
// --certify does: a proved rule's verdict is certified; a rule the
// certificate does not prove proper stays grid evidence.
// The verdicts are the textbook ones (from memory): 1 - sum(p^2) is
// strictly proper, sum(p^2) (a convex H) improper.
func TestCheckerRestsOnProof(t *testing.T) {
	for _, c := range []struct {
		formula   string
		certified bool
	}{{"1 - sum(p^2)", true}, {"sum(p^2)", false}} {
		d := DemoFrost()
		d.Preset, d.Formula = "", c.formula
		r, err := verifyChecker(context.Background(), d, Settings{Resolution: 40}, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.formula, err)
		}
		if r.Certified != c.certified || r.Certificate == nil {
			t.Errorf("%s: certified %v (want %v), certificate %+v", c.formula, r.Certified, c.certified, r.Certificate)
		}
		if want := map[bool]string{true: "certified", false: "grid evidence"}[c.certified]; r.Kind() != want {
			t.Errorf("%s: kind %q, want %q", c.formula, r.Kind(), want)
		}
	}
}

// Should the grid ever find a witness against a proof, the header shows
// the grid's improper verdict as grid evidence, not the certificate's
// "certified", and an export does not record the rule as certified.
func TestHeaderShowsAContradictedProofAsImproper(t *testing.T) {
	contradicting := func(ctx context.Context, d *design.Design, s Settings, progress pool.Progress) (*CheckReport, error) {
		return &CheckReport{Verdict: "improper", Resolution: 10, Points: 11,
			Rows:        []CheckRow{{Name: "properness", Passed: false, Worst: 0.5}},
			Certificate: &CertificateView{Kind: "certified", Verdict: "strictly-proper", Statement: "certified strictly proper"}}, nil
	}
	m := testModel(t, nil, Settings{Checker: contradicting})
	start(t, m, 80, 24)
	if h := ansi.Strip(m.verdictWords()); !strings.Contains(h, "improper, grid evidence") {
		t.Errorf("header verdict %q", h)
	}
	if _, certified := m.checks.proof(); certified {
		t.Error("an export would record a contradicted proof as certified")
	}
}
