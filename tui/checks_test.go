package tui

import (
	"context"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/charmbracelet/x/exp/teatest"

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
	if txt := strings.Join(m.checks.detailText(), " "); !strings.Contains(txt, r.Certificate.Statement) || !strings.Contains(txt, "("+r.Kind()+")") || r.Certified() != (r.Certificate.Verdict == "strictly-proper" || r.Certificate.Verdict == "proper") {
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

// The certificate runs as its own job after the grid and gives every
// mode's verdict its kind, as `check --certify` and `audit --certify`
// state it: a rule, a payout audit and a point forecast the certificate
// decides are "certified" in the checks pane and the header; with the
// certificate off they are grid evidence. The verdicts are the textbook
// ones (from memory): 1 - sum(p^2) is strictly proper, sum(p^2) (a convex
// H) improper, the quadratic payout 10 - 5·sum((p - hit)^2) strictly proper (proved
// epsilon-proper by the certificate), the linear payout p[y] improper, and phi(x) = -x^2 (the squared
// error) strictly proper for a mean.
func TestCertificateKindEveryMode(t *testing.T) {
	point := &design.Design{Version: 1, Title: "loaves", Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 40},
		Budget: design.Budget{Floor: 0, Cap: 20}}
	for _, c := range []struct {
		name    string
		d       *design.Design
		verdict string
		grid    string // the grid's verdict, when it is not the certificate's
	}{
		{"quadratic", withFormula(design.ModeGenerator, "1 - sum(p^2)"), "strictly-proper", ""},
		{"convex", withFormula(design.ModeGenerator, "sum(p^2)"), "improper", ""},
		// The payout certificate proves that no report gains more than its
		// epsilon, not strict properness (the grid's "strictly" stays grid
		// evidence, in the full text).
		{"quadratic payout", withFormula(design.ModePayout, "10 - 5*sum((p - hit)^2)"), "epsilon-proper", "strictly-proper"},
		{"linear payout", withFormula(design.ModePayout, "p[y]"), "improper", ""},
		{"point", point, "strictly-proper", ""},
	} {
		for _, off := range []bool{false, true} {
			set := Settings{Resolution: 40}
			if off {
				set.CertifyDeadline = -1
			}
			m := testModel(t, c.d.Clone(), set)
			start(t, m, 120, 40)
			r := m.checks.report
			if r == nil {
				t.Fatalf("%s: no report (err %v)", c.name, m.checks.err)
			}
			want, verdict := "certified", c.verdict
			if off {
				want = "grid evidence"
				if c.grid != "" {
					verdict = c.grid
				}
			}
			if r.Kind() != want || r.Final() != verdict {
				t.Errorf("%s (certificate off %v): %s (%s), want %s (%s); certificate %+v", c.name, off, r.Final(), r.Kind(), verdict, want, r.Certificate)
			}
			if h := ansi.Strip(m.View()); !strings.Contains(h, strings.ReplaceAll(verdict, "-", " ")+", "+want) {
				t.Errorf("%s: the header does not say %q:\n%s", c.name, verdict+", "+want, h)
			}
		}
	}
}

// withFormula is the frost demo with its own formula in mode.
func withFormula(mode design.Mode, formula string) *design.Design {
	d := DemoFrost()
	d.Mode, d.Preset, d.Formula = mode, "", formula
	return d
}

// The grid's verdict shows as soon as the grid ends, while the
// certificate still runs (held open here): the header says the proof is
// running; an edit cancels the certificate job, and the next one's answer
// lands.
func TestGridVerdictBeforeCertificate(t *testing.T) {
	hold := make(chan struct{})
	var stopped atomic.Int64
	cert := func(ctx context.Context, d *design.Design, s Settings, progress pool.Progress) (*CertificateView, error) {
		progress(pool.Step{Done: 0.25, Total: 1, Unit: pool.UnitShare})
		select {
		case <-hold:
			return &CertificateView{Kind: "certified", Verdict: "strictly-proper", Statement: "held open by the test"}, nil
		case <-ctx.Done():
			stopped.Add(1)
			return nil, ctx.Err()
		}
	}
	fc := &fakeChecker{points: 100}
	m := testModel(t, nil, Settings{Checker: fc.check, Certifier: cert})
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(120, 40))
	o := &outputWatch{t: t, tm: tm}
	o.wait("test-pass")
	o.wait("proof running")
	o.act()
	tm.Send(runes("+")) // an outcome more: a new design
	waitFor(t, func() bool { return stopped.Load() == 1 })
	o.wait("outcome 3")
	o.wait("proof running") // the new design's grid is done, its proof runs
	o.act()
	close(hold)
	o.wait("held open by the test")
	tm.Send(keyCtrlC)
	tm.Send(keyCtrlC)
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	if r := fm.checks.report; r == nil || r.Kind() != "certified" || fm.Design().N() != 3 {
		t.Errorf("after the proof: %+v", r)
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
	if _, kind := m.checks.proof(); kind != "grid evidence" {
		t.Error("an export would record a contradicted proof as certified")
	}
}
