package tui

import (
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/charmbracelet/x/exp/teatest"

	"scorewright/contract/backtest/history"
	"scorewright/contract/research/study"
	"scorewright/generator/design"
)

var keyCtrlY = tea.KeyMsg{Type: tea.KeyCtrlY}

// openResearch opens the research view and lets its first study finish.
func openResearch(t testing.TB, m *Model) *study.Report {
	t.Helper()
	press(t, m, keyCtrlY)
	if !m.research.Shown() || m.research.Result() == nil {
		t.Fatalf("research view shown %v, result %v:\n%s", m.research.Shown(), m.research.Result(), m.View())
	}
	return m.research.Result()
}

func row(t testing.TB, rep *study.Report, name string) study.Row {
	t.Helper()
	for _, r := range rep.All() {
		if r.Name == name {
			return r
		}
	}
	t.Fatalf("no row %q", name)
	return study.Row{}
}

func betaMADForTest(a, b float64) float64 {
	la, _ := math.Lgamma(a)
	lb, _ := math.Lgamma(b)
	lab, _ := math.Lgamma(a + b)
	return math.Exp(math.Ln2 + a*math.Log(a) + b*math.Log(b) - (la + lb - lab) - (a+b+1)*math.Log(a+b))
}

// The frost demo is the quadratic rule paid 40 - 20·L on the 0.05 menu.
// Under the view's default model, a Beta posterior with kappa 10 around
// 1/2, research is worth 20·2·(1/4)/11 = 10/11 per forecast (derived by
// hand from the Beta variance), 100 forecasts a season; the best rule is
// V-shaped with gain (MAD/2)·40/(1/2) (Hartline, Li, Shan & Wu, EC 2022;
// MAD of Beta(5, 5) by Johnson, Kotz & Balakrishnan's formula). The same
// inputs to `scorewright research --outcomes frost,clear --preset power
// --param g=2 --floor 0 --cap 40 --step 0.05 --kappa 10` give the same.
func TestResearchFrost(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	rep := openResearch(t, m)
	d := row(t, rep, "power (design)")
	if math.Abs(d.Gain.PerForecast-10.0/11) > 1e-10 || math.Abs(d.Gain.Season.Gain-1000.0/11) > 1e-8 {
		t.Errorf("design gain %v per forecast, %v a season; want 10/11 and 1000/11", d.Gain.PerForecast, d.Gain.Season.Gain)
	}
	if want := betaMADForTest(5, 5) / 2 * 80; rep.Optimum == nil || math.Abs(rep.Optimum.Row.Gain.PerForecast-want) > 1e-6 {
		t.Errorf("optimum %+v, want gain %v", rep.Optimum, want)
	}
	v := m.View()
	for _, s := range []string{"Research —", "best for research", "research (esc: back)", "power (design)"} {
		if !strings.Contains(v, s) {
			t.Errorf("view lacks %q:\n%s", s, v)
		}
	}
	for i, l := range strings.Split(v, "\n") {
		if w := ansi.StringWidth(l); w > 80 || i >= 24 {
			t.Errorf("line %d is %d wide (or beyond 24 lines): %q", i, w, l)
		}
	}
	// Kappa 10 -> 15: the gain becomes 20·2·(1/4)/16 = 0.625.
	press(t, m, keyDown, keyRight)
	if in := m.research.Inputs(); in.Kappa != 15 {
		t.Fatalf("kappa %v, want 15", in.Kappa)
	}
	if g := row(t, m.research.Result(), "power (design)").Gain.PerForecast; math.Abs(g-0.625) > 1e-10 {
		t.Errorf("kappa 15: gain %v, want 0.625", g)
	}
	press(t, m, tea.KeyMsg{Type: tea.KeyEsc})
	if m.research.Shown() {
		t.Error("esc did not close the view")
	}
}

// A changed input cancels the running study and its late answers are
// dropped; an edit of the design marks the shown result stale.
func TestResearchStaleRun(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	openResearch(t, m)
	old := m.research.job.run
	_, cmd := m.Update(keyDown)
	settle(t, m, cmd)
	_, cmd = m.Update(keyRight) // starts a new run; not settled yet
	if m.research.job.run == old || !m.research.Running() {
		t.Fatalf("no new run after a step (run %d, running %v)", m.research.job.run, m.research.Running())
	}
	late := researchRunMsg{run: old, msg: researchDoneMsg{rep: &study.Report{Labels: []string{"x", "y"}}}}
	m.Update(late)
	if r := m.research.Result(); r != nil && len(r.Rows) == 0 {
		t.Error("a late answer of the replaced run was taken")
	}
	settle(t, m, cmd)
	if m.research.Running() || m.research.Inputs().Kappa != 15 {
		t.Errorf("running %v, inputs %+v", m.research.Running(), m.research.Inputs())
	}
	m.research.Edited(m.d)
	if !m.research.stale {
		t.Error("an edit did not mark the result stale")
	}
}

// The harvest demo (three ordered outcomes, the ranked rule) is compared
// with the presets for three outcomes, and the best rule is found on the
// triangle; there is no chart for n = 3.
func TestResearchHarvest(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 120, 40)
	rep := openResearch(t, m)
	if rep.Optimum == nil || len(rep.Optimum.Result.Pieces) < 2 {
		t.Fatalf("optimum %+v", rep.Optimum)
	}
	for _, r := range rep.Rows {
		if r.Gain.PerForecast > rep.Optimum.Row.Gain.PerForecast+1e-7*55 {
			t.Errorf("%s gains %v, above the best rule's %v", r.Name, r.Gain.PerForecast, rep.Optimum.Row.Gain.PerForecast)
		}
	}
	if v := m.View(); !strings.Contains(v, "ranked (design)") || strings.Contains(v, "what a posterior is worth") {
		t.Errorf("view:\n%s", v)
	}
}

// A payout design has no rule over outcomes to study: the view says so.
func TestResearchRefusesPayout(t *testing.T) {
	d := DemoFrost()
	d.Mode, d.Preset, d.Formula = design.ModePayout, "", "10 - 5*sum((p - hit)^2)"
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyCtrlY)
	if v := m.View(); !strings.Contains(v, "works on rules over outcomes") || strings.Contains(v, "waiting for the design") {
		t.Errorf("view:\n%s", v)
	}
}

// A whole session through a real program: open the view, wait for the
// study, step the model to a signal, wait again, quit.
func TestResearchFlow(t *testing.T) {
	m := testModel(t, nil, Settings{})
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(80, 24))
	o := &outputWatch{t: t, tm: tm}
	o.wait("Verdict strictly-proper")
	o.act()
	tm.Send(keyCtrlY)
	o.wait("study done")
	o.act()
	tm.Send(keyRight)
	o.wait("study done: signal, accuracy 0.75")
	tm.Send(runes("q"))
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	if r := fm.research.Result(); r == nil || !strings.HasPrefix(r.Model, "one signal") {
		t.Fatalf("final result %+v", r)
	}
}

// Golden research views: the frost chart and table at both sizes, the
// harvest table at 80×24.
func TestGoldenResearchFrost80x24(t *testing.T)   { goldenResearch(t, nil, 80, 24) }
func TestGoldenResearchFrost120x40(t *testing.T)  { goldenResearch(t, nil, 120, 40) }
func TestGoldenResearchHarvest80x24(t *testing.T) { goldenResearch(t, DemoHarvest(), 80, 24) }

func goldenResearch(t *testing.T, d *design.Design, w, h int) {
	m := testModel(t, d, Settings{})
	start(t, m, w, h)
	openResearch(t, m)
	golden.RequireEqual(t, []byte(m.View()))
}

// With the frost history loaded (as the backtest view loads it) the model
// input offers the spread of its forecasts. Under the quadratic rule paid
// 40 - 20·L the gain is 20·2·Var(forecast) (derived by hand: D = 2(q - q̄)²
// and the base rate is the mean forecast), the variance computed here
// straight from the file's valid rows.
func TestResearchHistoryModel(t *testing.T) {
	path := filepath.Join("..", "testdata", "histories", "orchard-frost.csv")
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h, err := history.NewReader(f, []string{"frost", "clear"}, history.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var xs []float64
	for {
		r, err := h.Next()
		if err == io.EOF {
			break
		}
		if err == nil {
			xs = append(xs, r.P[0])
		}
	}
	mean := 0.0
	for _, x := range xs {
		mean += x / float64(len(xs))
	}
	v := 0.0
	for _, x := range xs {
		v += (x - mean) * (x - mean) / float64(len(xs))
	}
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	m.research.SetHistory(path)
	openResearch(t, m)
	press(t, m, keyLeft) // Dirichlet -> history (backwards through the list)
	if in := m.research.Inputs(); in.Kind != "history" {
		t.Fatalf("model %q, want history", in.Kind)
	}
	rep := m.research.Result()
	if g := row(t, rep, "power (design)").Gain.PerForecast; math.Abs(g-40*v) > 1e-9 {
		t.Errorf("history gain %v, want 40·Var = %v (%d forecasts)", g, 40*v, len(xs))
	}
	if v := m.View(); !strings.Contains(v, "model history") || !strings.Contains(v, "orchard-frost.csv") {
		t.Errorf("view:\n%s", m.View())
	}
}

// The research view starts from the base rate the annex prices the
// contract at, and says where it came from: the contract's, else the
// budget's reference belief, else uniform (never "the design's" for a
// default the design does not state).
func TestResearchBaseRateFromTheContract(t *testing.T) {
	d := &design.Design{Labels: []string{"low", "mid", "high"}, Contract: design.Contract{BaseRate: []float64{0.2, 0.5, 0.3}}}
	in := defaultResearchInputs(d)
	if got := in.baseRate(d); len(got) != 3 || got[0] != 0.2 || got[1] != 0.5 || got[2] != 0.3 {
		t.Errorf("base rate %v, want the contract's (0.2, 0.5, 0.3)", got)
	}
	if got := in.baseRateFrom(d); got != " (the buyer's)" {
		t.Errorf("source %q", got)
	}
	d.Contract.BaseRate = nil
	if got := in.baseRateFrom(d); got != " (uniform)" {
		t.Errorf("source of the uniform default %q", got)
	}
	d.Budget.Reference = []float64{0.1, 0.6, 0.3}
	if got := in.baseRate(d); got[1] != 0.6 || in.baseRateFrom(d) != " (the budget's reference)" {
		t.Errorf("base rate %v from %q, want the reference belief", got, in.baseRateFrom(d))
	}
}

// A design whose budget names a menu file (and no step) is studied on
// that menu, the one its table is made on, instead of asking for a step.
// By hand: the quadratic rule 1 - sum p^2 on [5, 45] over the menu 0.25,
// 0.75 has loss sum (p_i - [i = k])^2 from 1/8 to 9/8, so B = 40.
func TestResearchOnTheDesignsMenuFile(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "m.csv"), []byte("0.25\n0.75\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	d := &design.Design{Version: design.SchemaVersion, Labels: []string{"wet", "dry"}, Mode: design.ModeGenerator,
		Formula: "1 - sum(p^2)", Budget: design.Budget{Floor: 5, Cap: 45, Menu: "m.csv"}, Dir: dir}
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	rep := openResearch(t, m)
	if rep.MenuFile != "2 reports listed in m.csv (the design's menu file)" {
		t.Errorf("menu %q", rep.MenuFile)
	}
	if b := row(t, rep, "this design").Fit.B; math.Abs(b-40) > 1e-9 {
		t.Errorf("B = %v, want 40 (the menu file's)", b)
	}
}

// The view starts at the contract's forecasts a season when the design
// states them, and the season steps reach that number again from either
// side (12 lies between the round steps 10 and 20).
func TestResearchSeasonStartsAtTheContracts(t *testing.T) {
	d := &design.Design{Version: design.SchemaVersion, Labels: []string{"wet", "dry"}, Mode: design.ModeGenerator,
		Formula: "1 - sum(p^2)", Budget: design.Budget{Floor: 5, Cap: 45, Step: 0.1}, Contract: design.Contract{Forecasts: 12}}
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	rep := openResearch(t, m)
	if f := row(t, rep, "this design").Gain.Season.Forecasts; f != 12 || !strings.Contains(m.View(), "12 a season") {
		t.Fatalf("season of %d forecasts, want the contract's 12:\n%s", f, m.View())
	}
	for range researchSeason {
		press(t, m, keyDown)
	}
	for i, c := range []struct {
		k    tea.KeyMsg
		want int
	}{{keyRight, 20}, {keyLeft, 12}, {keyLeft, 10}, {keyRight, 12}} {
		press(t, m, c.k)
		if got := m.research.Inputs().Forecasts; got != c.want {
			t.Fatalf("step %d: %d a season, want %d", i, got, c.want)
		}
	}
}
