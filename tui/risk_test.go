package tui

import (
	"time"

	"math"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/charmbracelet/x/exp/teatest"

	"scorewright/generator/design"

	"scorewright/contract/risk"
)

var keyCtrlR = tea.KeyMsg{Type: tea.KeyCtrlR}

// openRisk opens the risk view and lets its first run finish.
func openRisk(t testing.TB, m *Model) {
	t.Helper()
	press(t, m, keyCtrlR)
	if !m.RiskShown() || m.Risk() == nil {
		t.Fatalf("risk view shown %v, result %v:\n%s", m.RiskShown(), m.Risk(), m.View())
	}
}

// The frost demo is the quadratic rule (power, g = 2) paid 40 - 20·L on
// the 0.05 menu (L = 2(1 - p)^2 ranges over [0, 2], cap 40). The
// values below are what `scorewright distort --outcomes frost,clear
// --generator '1 - sum(p^2)' --floor 0 --cap 40 --step 0.05 --unit 0.1
// --utility crra:2 --wealth 40` prints (run by hand): the largest
// distortion is 9.52 points, at belief 0.14, report 0.235165; with
// crra:0 it is 1.1e-14 points.
func TestRiskFrostCRRA(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	openRisk(t, m)
	if in := m.RiskInputs(); in.Kind != risk.CRRA || in.Coef != 1 || in.Wealth != 40 {
		t.Fatalf("default inputs %+v, want CRRA 1, wealth 40", in)
	}
	press(t, m, keyDown, keyRight, keyRight) // coefficient 1 -> 1.5 -> 2
	r := m.Risk()
	if r.Inputs.Coef != 2 || m.RiskRunning() {
		t.Fatalf("inputs %+v, running %v", r.Inputs, m.RiskRunning())
	}
	lg := r.Curve.Largest
	if len(r.Curve.Points) != 99 || math.Abs(lg.Size-9.516472419222255) > 1e-6 || lg.Belief[0] != 0.14 || math.Abs(lg.Report[0]-0.23516472419222248) > 1e-6 {
		t.Errorf("CRRA 2: %d points, largest %+v; scorewright distort gives 9.5165 at 0.14 -> 0.235165", len(r.Curve.Points), lg)
	}
	if v := m.View(); !strings.Contains(v, "Largest distortion 9.52 probability points, at belief 0.14") {
		t.Errorf("view lacks the largest distortion:\n%s", v)
	}
	// A risk-averse forecaster shades toward the centre: the report lies
	// between the belief and 1/2 at every belief of the curve.
	for _, p := range r.Curve.Points {
		q, x := p.Belief[0], p.Report[0]
		if (x-q)*(0.5-q) < -1e-9 || math.Abs(x-0.5) > math.Abs(q-0.5)+1e-9 {
			t.Errorf("belief %v: report %v not shaded toward 1/2", q, x)
		}
	}
	// Coefficient 0 is the linear utility: no distortion anywhere.
	press(t, m, keyLeft, keyLeft, keyLeft, keyLeft)
	r = m.Risk()
	if r.Inputs.Coef != 0 || r.Curve.Largest.Size > 1e-6 {
		t.Errorf("coefficient %v: largest %v points, want none", r.Inputs.Coef, r.Curve.Largest.Size)
	}
	if v := m.View(); !strings.Contains(v, "risk-neutral") {
		t.Errorf("view at coefficient 0:\n%s", v)
	}
}

// CARA on the quadratic rule, derived by hand: pay_y = A - 2B(1-p)^2,
// pay_n = A - 2Bp^2, and the first-order condition of
// q u(pay_y) + (1-q) u(pay_n) with u = -exp(-a x)/a is
// q(1-p) / ((1-q)p) = exp(2aB(2p - 1)). With B = 20 and the view's first
// CARA coefficient a = 0.04 (twice the step 1/(2·40) rounded to 0.02):
// 2aB = 1.6.
func TestRiskFrostCARA(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	openRisk(t, m)
	press(t, m, keyRight)                                                          // utility: CRRA -> CARA
	press(t, m, keyDown, keyDown, keyDown, keyRight, keyRight, keyRight, keyRight) // belief 0.5 -> 0.7
	r := m.Risk()
	if r.Inputs.Kind != risk.CARA || math.Abs(r.Inputs.Coef-0.04) > 1e-12 || r.Chosen.Belief[0] != 0.7 {
		t.Fatalf("inputs %+v, belief %v", r.Inputs, r.Chosen.Belief)
	}
	q := 0.7
	f := func(p float64) float64 { return math.Log(q*(1-p)/((1-q)*p)) - 1.6*(2*p-1) }
	lo, hi := 0.5, 0.7 // f(0.5) > 0 > f(0.7): the root shades 0.7 toward 1/2
	for range 100 {
		if mid := (lo + hi) / 2; f(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	if got := r.Chosen.Report[0]; math.Abs(got-lo) > 1e-6 {
		t.Errorf("CARA 0.04 at belief 0.7: best report %v, the first-order condition gives %v", got, lo)
	}
}

// Harvest outlook (n = 3): a table along the three directions; the
// uniform belief's best report is symmetric in below/above, because the
// ranked rule is.
func TestRiskHarvest(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 120, 40)
	openRisk(t, m)
	r := m.Risk()
	if len(r.Curve.Points) != 27 || len(r.Toward) != 27 {
		t.Fatalf("%d curve points, %d directions", len(r.Curve.Points), len(r.Toward))
	}
	if c := r.Chosen.Report; math.Abs(c[0]-c[2]) > 1e-6 {
		t.Errorf("uniform belief: report %v not symmetric", c)
	}
	v := m.View()
	for _, want := range []string{"toward", "below", "near", "above", "largest", "ctrl+t"} {
		if !strings.Contains(v, want) {
			t.Errorf("view lacks %q:\n%s", want, v)
		}
	}
	// The belief moves through the uniform one and the curve's.
	press(t, m, keyUp, keyRight)
	if got := m.Risk().Chosen.Belief; got[0] != 0.4 {
		t.Errorf("next belief %v, want (0.4, 0.3, 0.3)", got)
	}
}

// Designs the view cannot take say why; an edit marks the result stale
// and reruns it; a stale answer is dropped.
func TestRiskFollowsTheDesign(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	openRisk(t, m)
	first := m.Risk()
	// Change the budget (cap 40 -> 50) from the panes: the view reruns
	// once the edit waited out the debounce.
	press(t, m, keyCtrlR, keyTab, keyTab, keyTab, keyDown, keyRight)
	if m.d.Budget.Cap == 40 {
		t.Fatalf("the cap did not change: %+v", m.d.Budget)
	}
	press(t, m, keyCtrlR)
	if r := m.Risk(); r == first || r.Inputs.Wealth != m.d.Budget.Cap {
		t.Errorf("after the edit: result %+v, wealth should follow the cap %v", r.Inputs, m.d.Budget.Cap)
	}
	// A stale answer: a run replaced by the next input's run is dropped.
	before := m.Risk()
	_, stale := m.Update(keyRight) // utility CRRA -> CARA: a run starts
	_, cur := m.Update(keyRight)   // CARA -> CRRA: a new run replaces it
	settle(t, m, stale)
	if m.Risk() != before || !m.RiskRunning() {
		t.Errorf("the replaced run's answer was taken: %+v", m.Risk().Inputs)
	}
	settle(t, m, cur)
	if r := m.Risk(); r == before || r.Inputs.Kind != risk.CRRA || m.RiskRunning() {
		t.Errorf("the current run's answer was not taken: %+v", r.Inputs)
	}
	// A payout design has no fitted rule: the view says so.
	m2 := testModel(t, nil, Settings{})
	start(t, m2, 80, 24)
	press(t, m2, keyDown, keyDown, keyRight, keyCtrlR)
	if v := m2.View(); !strings.Contains(v, "works on rules over outcomes") {
		t.Errorf("payout design in the risk view:\n%s", v)
	}
}

// A whole session through a real program on the frost demo: open the
// risk view, set CRRA 2, wait for the curve and its largest distortion
// (the 9.52 points `scorewright distort` prints for the same inputs, see
// TestRiskFrostCRRA), step the coefficient to 0 and see none, quit.
func TestRiskFlow(t *testing.T) {
	m := testModel(t, nil, Settings{})
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(80, 24))
	o := &outputWatch{t: t, tm: tm}
	o.wait("Verdict strictly-proper")
	o.act()
	tm.Send(keyCtrlR)
	o.wait("truthful report")
	o.act()
	tm.Send(keyDown)
	tm.Send(keyRight)
	tm.Send(keyRight)
	o.wait("risk-averse (CRRA 2)")
	o.wait("Largest distortion 9.52 probability points")
	o.act()
	for range 4 {
		tm.Send(keyLeft)
	}
	o.wait("risk-neutral")
	tm.Send(runes("q"))
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	r := fm.Risk()
	if r == nil || r.Inputs.Coef != 0 || !(r.Curve.Largest.Size < 1e-6) {
		t.Fatalf("final risk result %+v", r)
	}
	if !fm.RiskShown() {
		t.Error("the view should still be open")
	}
}

// Golden risk views: the frost curve at both sizes (CRRA 2), the
// harvest table at both sizes.
func TestGoldenRiskFrost80x24(t *testing.T)    { goldenRisk(t, nil, 80, 24) }
func TestGoldenRiskFrost120x40(t *testing.T)   { goldenRisk(t, nil, 120, 40) }
func TestGoldenRiskHarvest80x24(t *testing.T)  { goldenRisk(t, DemoHarvest(), 80, 24) }
func TestGoldenRiskHarvest120x40(t *testing.T) { goldenRisk(t, DemoHarvest(), 120, 40) }

func goldenRisk(t *testing.T, d *design.Design, w, h int) {
	m := testModel(t, d, Settings{})
	start(t, m, w, h)
	openRisk(t, m)
	press(t, m, keyDown, keyRight, keyRight)
	golden.RequireEqual(t, []byte(m.View()))
}

// CRRA needs positive final wealth: stepping the wealth to -5 under a
// floor of 0 is refused with the reason, and no older result is shown.
func TestRiskCRRANeedsWealth(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	openRisk(t, m)
	press(t, m, keyDown, keyDown)
	for range 9 {
		press(t, m, keyLeft)
	}
	if w := m.RiskInputs().Wealth; w != -5 {
		t.Fatalf("wealth %v, want -5 (nine steps of 5 below 40)", w)
	}
	v := m.View()
	if !strings.Contains(v, "CRRA utility needs positive final wealth") || strings.Contains(v, "Largest distortion") {
		t.Errorf("view:\n%s", v)
	}
}

// The risk view is a component: it owns its inputs and steps them on its
// own keys, says when a run is due, and keeps the wealth the user chose
// through an edit of the design (while an untouched wealth follows the
// budget).
func TestRiskViewOwnsItsInputs(t *testing.T) {
	d := DemoFrost()
	v := NewRiskView(testStyles(t), DefaultKeyMap(), d)
	before := v.in
	if h, c := v.Update(keyDown, d); !h || c || v.sel != riskCoef {
		t.Fatalf("↓ chose %v (handled %v, changed %v)", v.sel, h, c)
	}
	if _, c := v.Update(keyRight, d); !c || !(v.in.Coef > before.Coef) || !v.inputsChanged() {
		t.Fatalf("→ on the coefficient: %+v, changed %v", v.in, c)
	}
	v.started()
	if v.inputsChanged() {
		t.Fatal("a started run is not for the inputs shown")
	}
	wider := d.Clone()
	wider.Budget.Cap *= 2
	v.designChanged(wider)
	if v.in.Wealth != defaultRiskInputs(wider).Wealth {
		t.Fatalf("an untouched wealth did not follow the budget: %v", v.in.Wealth)
	}
	v.Update(keyDown, d) // wealth
	v.Update(keyRight, d)
	chosen := v.in.Wealth
	v.designChanged(d)
	if v.in.Wealth != chosen {
		t.Fatalf("the wealth the user chose moved with the budget: %v, want %v", v.in.Wealth, chosen)
	}
	if h, _ := v.Update(runes("q"), d); h {
		t.Fatal("the view took q, which must reach the workbench")
	}
}
