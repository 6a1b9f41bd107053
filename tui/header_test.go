package tui

import (
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
)

func headerOf(m *Model) string { return strings.SplitN(m.View(), "\n", 2)[0] }

// The header names the design and states the verdict with its kind: the
// interval certificate makes it "certified", without one it is "grid
// evidence"; an edit says it is being checked again and marks the design
// as edited.
func TestHeaderStatesVerdictAndKind(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	h := headerOf(m)
	if !strings.Contains(h, "Orchard co-operative: frost-night forecasts") || !strings.Contains(h, "✓ strictly proper, certified") || !strings.Contains(h, "not saved yet") {
		t.Fatalf("header %q", h)
	}
	grid := testModel(t, nil, Settings{CertifyDeadline: -1})
	start(t, grid, 80, 24)
	if h := headerOf(grid); !strings.Contains(h, "✓ strictly proper, grid evidence") {
		t.Fatalf("header without a certificate %q", h)
	}
	// An edit: the header says checking until the new verdict lands.
	_, cmd := m.Update(runes("+"))
	if h := headerOf(m); !strings.Contains(h, "checking") || !strings.Contains(h, "edited") {
		t.Fatalf("header after an edit %q", h)
	}
	settle(t, m, cmd)
	if h := headerOf(m); !strings.Contains(h, "strictly proper") {
		t.Fatalf("header once checked %q", h)
	}
	// A formula that does not compile is not checked, and says so.
	press(t, m, keyDown, keyDown, keyDown, keyEnter, keyEnd, runes(" +"), keyEsc)
	if h := headerOf(m); !strings.Contains(h, "✗ not checked") {
		t.Fatalf("header for a broken formula %q", h)
	}
	// A view that replaces the panes is named, with the way back.
	press(t, m, tea.KeyMsg{Type: tea.KeyF2})
	if h := headerOf(m); !strings.Contains(h, "terms (esc: back)") {
		t.Fatalf("header in the terms view %q", h)
	}
}

// The footer is the workbench's own key line: key, what it does, wide
// gaps, no dots between, and "? all keys" first; it never passes the
// screen's width.
func TestFooterKeyLine(t *testing.T) {
	for _, w := range []int{80, 120} {
		m := testModel(t, nil, Settings{})
		start(t, m, w, 24)
		lines := strings.Split(m.View(), "\n")
		f := lines[len(lines)-1]
		if !strings.HasPrefix(f, "? all keys   tab next pane   q quit") || strings.Contains(f, "•") {
			t.Errorf("footer at %d columns: %q", w, f)
		}
		if len([]rune(strings.TrimRight(f, " "))) > w {
			t.Errorf("footer wider than %d: %q", w, f)
		}
	}
}

// A payout's certificate proves honesty only to within epsilon: the
// quadratic payout is proper (Brier 1950), and the header and the checks
// pane say "epsilon proper" with what it means, never plainly "proper,
// certified".
func TestHeaderSaysEpsilonProper(t *testing.T) {
	d := DemoHarvest()
	d.Mode, d.Formula, d.Preset = design.ModePayout, "10 - 5*sum((p - hit)^2)", ""
	m := testModel(t, d, Settings{})
	start(t, m, 120, 40)
	r := m.CheckReport()
	if r == nil || r.Certificate == nil || r.Certificate.Verdict != "epsilon-proper" {
		t.Fatalf("certificate: %+v", r)
	}
	if h := headerOf(m); !strings.Contains(h, "✓ epsilon proper, certified") {
		t.Errorf("header %q", h)
	}
	if v := m.View(); !strings.Contains(v, "Certificate epsilon-proper to 0.001 (no report gains more than") {
		t.Errorf("checks pane:\n%s", v)
	}
	if !strings.HasPrefix(r.Certificate.Statement, "certified epsilon-proper to 0.001: no report gains more than 0.001 anywhere") {
		t.Errorf("statement %q", r.Certificate.Statement)
	}
}

// A bump of width 1e-6 between the grid points makes the rule improper
// (its curvature 2·1e-10/1e-12 = 200 beats the quadratic's -2, derived by
// hand): the grid misses it, the certificate proves it, and the header and
// the verdict entry say improper, certified, resting on the certificate's
// witness, as `scorewright check --certify` does.
func TestHeaderSaysCertifiedImproperWhereTheGridMissed(t *testing.T) {
	d := NewDesign()
	d.Formula = "1 - sum(p^2) + 1e-10*exp(-(p1 - 0.3141)^2/1e-12)"
	m := testModel(t, d, Settings{CertifyDeadline: 10 * time.Second})
	start(t, m, 80, 24)
	r := m.CheckReport()
	if r == nil || r.Verdict != "strictly-proper" || r.Certificate == nil || r.Certificate.Verdict != "improper" {
		t.Fatalf("grid and certificate: %+v", r)
	}
	if h := headerOf(m); !strings.Contains(h, "✗ improper, certified") {
		t.Errorf("header %q", h)
	}
	sel := m.checks
	sel.sel = len(r.Rows) // the verdict and notes entry
	txt := strings.Join(sel.detailText(), "\n")
	if !strings.Contains(txt, "Verdict improper (certified: the certificate's witness") || !strings.Contains(txt, "Grid verdict strictly-proper (grid evidence)") {
		t.Errorf("verdict entry:\n%s", txt)
	}
}
