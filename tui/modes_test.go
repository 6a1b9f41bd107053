package tui

import (
	"math"
	"strings"
	"testing"

	"github.com/charmbracelet/x/exp/golden"

	"scorewright/generator/design"
)

func TestModeSwitchOffersAPayout(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyDown, keyDown, keyRight)
	d := m.Design()
	if d.Mode != design.ModePayout || !strings.Contains(d.Formula, "hit") {
		t.Fatalf("mode %s formula %q", d.Mode, d.Formula)
	}
	if !strings.Contains(m.View(), "pay per outcome") {
		t.Fatal("picture does not show pay for a payout")
	}
	press(t, m, keyLeft)
	if got := m.Design().Formula; got != DemoFrost().Formula {
		t.Fatalf("back in generator mode the formula is %q", got)
	}
}

// Emphasis mode: the beta weight with a = b = 1 is the quadratic rule up
// to scale (Buja, Stuetzle & Shen 2005), so the workbench draws it, the
// checks pass and the budget fits.
func TestEmphasisMode(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyRight, keyRight) // generator → payout → emphasis
	d := m.Design()
	if d.Mode != design.ModeEmphasis || !strings.Contains(d.Formula, "c^(a-1)") {
		t.Fatalf("mode %s formula %q", d.Mode, d.Formula)
	}
	v := m.View()
	for _, want := range []string{"emphasis weight w(c)", "✓ compiles", "Verdict strictly-proper", "menu re-check passed"} {
		if !strings.Contains(v, want) {
			t.Errorf("view lacks %q:\n%s", want, v)
		}
	}
	// Half squared error (Buja et al. 2005, a = b = 1): at report 0.3 the
	// efforts are (1-0.3)^2/2 = 0.245 and 0.3^2/2 = 0.045.
	eff := make([]float64, 2)
	m.comp.newSampler().scores(eff, []float64{0.3, 0.7})
	if math.Abs(eff[0]-0.245) > 1e-9 || math.Abs(eff[1]-0.045) > 1e-9 {
		t.Errorf("efforts at 0.3: %v, want 0.245, 0.045", eff)
	}
	// With three outcomes the emphasis mode is skipped.
	press(t, m, keyLeft, keyLeft, keyUp, keyUp, runes("+"), keyDown, keyDown, keyRight, keyRight)
	if got := m.Design().Mode; got == design.ModeEmphasis {
		t.Fatal("emphasis offered for 3 outcomes")
	}
}

// Point mode: squared error on [0, 100] (Savage 1971; Gneiting 2011):
// the effort of report x when y happens is (y - x)^2, the checks pass and
// the budget pane shows the point table.
func TestPointMode(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyRight, keyRight, keyRight) // → point
	d := m.Design()
	if d.Mode != design.ModePoint || d.Formula != design.ModePoint.Sample() || len(d.Interval) != 2 {
		t.Fatalf("mode %s formula %q interval %v", d.Mode, d.Formula, d.Interval)
	}
	v := m.View()
	for _, want := range []string{"Interval", "[0, 100]", "effort by report", "Verdict strictly-proper", "report \\ outcome"} {
		if !strings.Contains(v, want) {
			t.Errorf("view lacks %q:\n%s", want, v)
		}
	}
	// D(y, x) = (y - x)^2 for phi = -x^2 (derived by hand: phi(x) - 2x(y - x) + y^2).
	ev := m.comp.point.NewEvaluator()
	if got := ev.Divergence(75, 30); math.Abs(got-2025) > 1e-9 {
		t.Errorf("D(75, 30) = %v, want 2025", got)
	}
	// Edit the interval.
	press(t, m, keyUp, keyUp, keyEnter)
	for i := 0; i < 10; i++ {
		press(t, m, keyBack)
	}
	press(t, m, runes("10, 20"), keyEnter)
	if iv := m.Design().Interval; iv[0] != 10 || iv[1] != 20 {
		t.Fatalf("interval %v", iv)
	}
	golden.RequireEqual(t, []byte(m.View()))
	// Next, the point payout audit keeps the interval; then back to
	// outcomes: the probability step comes back.
	press(t, m, keyDown, keyDown, keyRight)
	if d := m.Design(); d.Mode != design.ModePointPayout || len(d.Interval) != 2 || d.Interval[0] != 10 {
		t.Fatalf("after point: mode %s interval %v", d.Mode, d.Interval)
	}
	press(t, m, keyRight)
	if d := m.Design(); d.Mode != design.ModeGenerator || d.Budget.Step != 0.05 {
		t.Fatalf("back to generator: mode %s step %v", d.Mode, d.Budget.Step)
	}
}

// Payout audit: the sample payout 10 - 5 sum (p - hit)^2 is the quadratic
// rule scaled by 5 and shifted by 10 (its effort is the Brier sum, Brier
// 1950), so the audit passes and names it; the linear rule p[y] is
// improper (common practice).
func TestPayoutAudit(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyRight)
	r := m.CheckReport()
	if r == nil || r.Verdict == "improper" {
		t.Fatalf("sample payout: %+v", r)
	}
	if !strings.Contains(strings.Join(r.Notes, "\n"), "quadratic") {
		t.Errorf("not identified as the quadratic rule: %q", r.Notes)
	}
	press(t, m, keyDown, keyEnter)
	for i := 0; i < 80; i++ {
		press(t, m, keyBack)
	}
	press(t, m, runes("p[y]"), keyEsc)
	r = m.CheckReport()
	if r == nil || r.Verdict != "improper" {
		t.Fatalf("linear payout verdict: %+v", r)
	}
	if !strings.Contains(m.View(), "✗ properness") {
		t.Errorf("the failing check is not shown:\n%s", m.View())
	}
}

// The linear rule over three outcomes, as the workbench shows it. Derived
// by hand: under belief q the best report is the vertex of the likeliest
// outcome, so the gap is max_k q_k - sum_k q_k^2; at q = (2/3, 1/6, 1/6)
// that is 2/3 - 1/2 = 1/6.
func TestGoldenLinearAudit80x24(t *testing.T) {
	d := DemoHarvest()
	d.Mode, d.Formula, d.Preset = design.ModePayout, "p[y]", ""
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	s := m.comp.newSampler()
	if got := gapOnGrid(s, gridScores(s, 3, 6), []float64{2.0 / 3, 1.0 / 6, 1.0 / 6}); math.Abs(got-1.0/6) > 1e-12 {
		t.Errorf("gap %v, want 1/6", got)
	}
	if r := m.CheckReport(); r == nil || r.Verdict != "improper" {
		t.Fatalf("verdict: %+v", r)
	}
	golden.RequireEqual(t, []byte(m.View()))
}

// In payout mode the budget pane says why there is no table in the
// workbench's words, not a command's.
func TestPayoutModeBudgetSaysWhy(t *testing.T) {
	d := DemoFrost()
	d.Mode, d.Preset, d.Formula = design.ModePayout, "", "10 - 5*sum((p - hit)^2)"
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	if err := m.budget.err; err == nil || strings.Contains(err.Error(), "command") || !strings.Contains(err.Error(), "Mode row") {
		t.Errorf("budget pane error: %v", err)
	}
}
