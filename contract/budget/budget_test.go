package budget

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/generator/design"
)

func rule(t testing.TB, src string, n int) *bregman.Rule {
	r := bregmantest.Rule(t, src, bregman.Options{Outcomes: n})
	if n == 2 {
		r.Labels = []string{"frost", "clear"}
	}
	return r
}

func stepMenu(t testing.TB, n int, step, floor float64) *Menu {
	t.Helper()
	m, err := StepMenu(n, step, floor)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func fit(t testing.TB, r *bregman.Rule, m *Menu, b design.Budget) (*Fit, *Recheck) {
	t.Helper()
	f, err := FitRule(r, m, b)
	if err != nil {
		t.Fatal(err)
	}
	rc, err := f.Recheck(context.Background(), RecheckSettings{})
	if err != nil {
		t.Fatal(err)
	}
	return f, rc
}

func item(t testing.TB, m *Menu, p float64) int {
	t.Helper()
	for i, r := range m.Reports {
		if math.Abs(r[0]-p) < 1e-12 {
			return i
		}
	}
	t.Fatalf("no menu item %g", p)
	return -1
}

// Quadratic rule, two outcomes, floor 0, cap 100, step 0.1, unit 1.
//
// Derived by hand from Brier (1950), Monthly Weather Review 78:1-3, whose
// multi-category score is sum_i (f_i - o_i)^2. The generator 1 - sum p^2
// gives, for a report p of the event ("frost"),
//
//	L(p, frost) = (p - 1)^2 + ((1 - p) - 0)^2 = 2(1 - p)^2
//	L(p, clear) = (p - 0)^2 + ((1 - p) - 1)^2 = 2p^2,
//
// so over the menu 0, 0.1, ..., 1 the effort runs from Lmin = 0 to
// Lmax = 2. Spanning [0, 100]: B = (100 - 0) / (2 - 0) = 50 and
// A = cap + B·Lmin = 100. Hence pay(p, frost) = 100 - 100(1 - p)^2 and
// pay(p, clear) = 100 - 100p^2; at p = 0.7: 100 - 9 = 91 and
// 100 - 49 = 51.
func TestQuadraticBrierTable(t *testing.T) {
	m := stepMenu(t, 2, 0.1, 0)
	f, rc := fit(t, rule(t, "1 - sum(p^2)", 2), m, design.Budget{Floor: 0, Cap: 100, Unit: 1, Rounding: "nearest"})
	if math.Abs(f.A-100) > 1e-9 || math.Abs(f.B-50) > 1e-9 {
		t.Errorf("A, B = %g, %g; want 100, 50 (derived by hand above)", f.A, f.B)
	}
	if len(m.Reports) != 11 {
		t.Fatalf("menu has %d items, want 11", len(m.Reports))
	}
	cases := []struct{ p, frost, clear float64 }{
		{0.7, 91, 51}, // the reading, derived above
		{0, 0, 100},
		{0.5, 75, 75},
		{0.1, 19, 99},
		{1, 100, 0},
	}
	for _, c := range cases {
		i := item(t, m, c.p)
		if got := f.Pays[i]; got[0] != c.frost || got[1] != c.clear {
			t.Errorf("pay at p = %g: %v, want [%g %g]", c.p, got, c.frost, c.clear)
		}
	}
	for i, r := range m.Reports {
		p := r[0]
		want := [2]float64{math.Round(100 - 100*(1-p)*(1-p)), math.Round(100 - 100*p*p)}
		if f.Pays[i][0] != want[0] || f.Pays[i][1] != want[1] {
			t.Errorf("pay at p = %g: %v, want %v", p, f.Pays[i], want)
		}
	}
	if !rc.Passed || rc.MinMargin <= 0 {
		t.Errorf("re-check failed on the step-0.1 Brier table: %s", rc.Verdict(f))
	}
	// Truthful expected pay A - B·H(q) = 100 - 50·2q(1-q): 75 at q = 1/2,
	// 100 at certainty (derived by hand).
	if math.Abs(f.Truthful.Min-75) > 1e-9 || math.Abs(f.Truthful.Max-100) > 1e-9 {
		t.Errorf("truthful range [%g, %g], want [75, 100]", f.Truthful.Min, f.Truthful.Max)
	}
	// On the table, a forecaster with a belief in [0.45, 0.55] picks item
	// 0.5, whose row (75, 75) is flat, and expects 75, the least; one who
	// is certain expects 100 (derived by hand from the rows above).
	if mp := rc.MenuPay; mp.Min != 75 || mp.Max != 100 || mp.MinBelief[0] < 0.45 || mp.MinBelief[0] > 0.55 {
		t.Errorf("expected pay on the menu %+v, want 75 at 1/2 up to 100", mp)
	}
	if f.MaxPay != 100 || f.MinPay != 0 {
		t.Errorf("buyer's worst case %g, smallest pay %g; want 100, 0", f.MaxPay, f.MinPay)
	}
	// Belief cells, derived by hand: item 0.7 pays (91, 51), so a belief x
	// expects 51 + 40x from it; item 0.6 (84, 64) gives 64 + 20x and item
	// 0.8 (96, 36) gives 36 + 60x. They cross at x = 13/20 and x = 3/4, so
	// the cell of 0.7 is the open interval (0.65, 0.75), up to the tie
	// tolerance; the 1/1000 grid has 99 beliefs inside it (0.651..0.749).
	c := rc.Cells[item(t, m, 0.7)]
	if !c.Exact || c.Beliefs != 99 || math.Abs(c.Lo-0.65) > 1e-6 || math.Abs(c.Hi-0.75) > 1e-6 {
		t.Errorf("cell of 0.7: %+v, want (0.65, 0.75) with 99 grid beliefs", c)
	}
}

// A payer pays an off-menu report exactly as the table formula would:
// pay(0.73, frost) = 100 - 100·0.27^2 = 92.71 -> 93 (unit 1, nearest),
// pay(0.73, clear) = 100 - 100·0.73^2 = 46.71 -> 47 (derived by hand as
// above).
func TestPayerOffMenu(t *testing.T) {
	f, _ := fit(t, rule(t, "1 - sum(p^2)", 2), stepMenu(t, 2, 0.1, 0), design.Budget{Floor: 0, Cap: 100, Unit: 1})
	got := f.NewPayer().Pay(make([]float64, 2), []float64{0.73, 0.27})
	if got[0] != 93 || got[1] != 47 {
		t.Errorf("pay at 0.73: %v, want [93 47]", got)
	}
	// A forecaster who believes 0.73 and may only use the menu picks the
	// nearest item, 0.7 (the quadratic rule's divergence is squared
	// distance, and the unit-1 table equals the exact one at every item).
	if i := f.BestItem([]float64{0.73, 0.27}); f.Menu.Reports[i][0] != 0.7 {
		t.Errorf("best item for 0.73: %v", f.Menu.Reports[i])
	}
	pr := f.NewPayer()
	dst := make([]float64, 2)
	for i, r := range f.Menu.Reports {
		if pr.Pay(dst, r); dst[0] != f.Pays[i][0] || dst[1] != f.Pays[i][1] {
			t.Errorf("payer at menu item %v: %v, table %v", r, dst, f.Pays[i])
		}
	}
}

// Log rule with a 1 % report floor, fitted to [0, 50], unit 0.01.
// L(p, frost) = -ln p (log generator identity; Good 1952). The menu runs
// from 0.01 to 0.99, so Lmin = -ln 0.99 and Lmax = -ln 0.01:
// B = 50 / (ln 0.99 - ln 0.01) and A = 50 + B·ln 0.99 ... computed below
// with math.Log, independently of the engine.
func TestLogRuleReportFloor(t *testing.T) {
	m := stepMenu(t, 2, 0.05, 0.01)
	if first, last := m.Reports[0][0], m.Reports[len(m.Reports)-1][0]; first != 0.01 || math.Abs(last-0.99) > 1e-15 || len(m.Reports) != 21 {
		t.Fatalf("menu from %g to %g with %d items; want 0.01 .. 0.99, 21 items", first, last, len(m.Reports))
	}
	f, rc := fit(t, rule(t, "-sum(p*ln(p))", 2), m, design.Budget{Floor: 0, Cap: 50, Unit: 0.01, ReportFloor: 0.01})
	B := 50 / (math.Log(0.99) - math.Log(0.01))
	A := 50 - B*math.Log(0.99) // pay = A + B ln p, and pay(0.99) = 50
	if math.Abs(f.B-B) > 1e-9 || math.Abs(f.A-A) > 1e-9 {
		t.Errorf("A, B = %.12g, %.12g; want %.12g, %.12g", f.A, f.B, A, B)
	}
	for i, r := range m.Reports {
		for k := range 2 {
			want := A + B*math.Log(r[k])
			// Rounding to 0.01 moves an amount by at most half a unit.
			if got := f.Pays[i][k]; math.Abs(got-want) > 0.005+1e-9 || math.Abs(got*100-math.Round(got*100)) > 1e-6 {
				t.Errorf("pay(%v, %d) = %v, want %.4f rounded to 0.01", r, k, got, want)
			}
		}
	}
	if got := f.Pays[0][0]; got != 0 {
		t.Errorf("pay at the floor report for frost = %v, want the budget floor 0", got)
	}
	if !rc.Passed {
		t.Errorf("re-check: %s", rc.Verdict(f))
	}
}

func TestUnboundedRuleRefused(t *testing.T) {
	_, err := FitRule(rule(t, "-sum(p*ln(p))", 2), stepMenu(t, 2, 0.1, 0), design.Budget{Floor: 0, Cap: 50})
	var ue *UnboundedError
	if !errors.As(err, &ue) || !ue.AtZero || !math.IsInf(ue.Effort, 1) {
		t.Fatalf("want an UnboundedError at a zero probability, got %v", err)
	}
	for _, want := range []string{"report floor", "clamp", "unbounded"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message lacks %q: %s", want, err)
		}
	}
}

// Mean pay: quadratic, uniform reference, floor 0, target 60. By hand:
// H(1/2) = 1 - 1/2 = 1/2, Lmax = 2, so B = (60 - 0)/(2 - 1/2) = 40 and
// A = 0 + 40·2 = 80; a truthful forecaster at 1/2 expects 80 - 40/2 = 60,
// and the largest payment is 80.
func TestMeanPay(t *testing.T) {
	mp := 60.0
	f, _ := fit(t, rule(t, "1 - sum(p^2)", 2), stepMenu(t, 2, 0.1, 0), design.Budget{Floor: 0, MeanPay: &mp})
	if math.Abs(f.B-40) > 1e-9 || math.Abs(f.A-80) > 1e-9 || math.Abs(f.ReferencePay-60) > 1e-9 || math.Abs(f.Cap-80) > 1e-9 {
		t.Errorf("A %g B %g reference pay %g cap %g; want 80, 40, 60, 80", f.A, f.B, f.ReferencePay, f.Cap)
	}
	// Stated base rates (0.2, 0.8): H = 1 - 0.04 - 0.64 = 0.32, so
	// B = 60 / (2 - 0.32) (derived by hand).
	f2, _ := fit(t, rule(t, "1 - sum(p^2)", 2), stepMenu(t, 2, 0.1, 0), design.Budget{Floor: 0, MeanPay: &mp, Reference: []float64{0.2, 0.8}})
	if want := 60 / 1.68; math.Abs(f2.B-want) > 1e-9 {
		t.Errorf("B = %g, want %g", f2.B, want)
	}
}

func TestBudgetErrors(t *testing.T) {
	r := rule(t, "1 - sum(p^2)", 2)
	m := stepMenu(t, 2, 0.1, 0)
	low := 5.0
	cases := []struct {
		name string
		b    design.Budget
		want string
	}{
		{"no cap", design.Budget{Floor: 0}, "cap above the floor"},
		{"mean below floor", design.Budget{Floor: 10, MeanPay: &low}, "above the floor"},
		{"bad rounding", design.Budget{Cap: 1, Rounding: "sideways"}, "rounding"},
		{"reference length", design.Budget{MeanPay: &low, Reference: []float64{1}}, "reference"},
	}
	for _, c := range cases {
		if _, err := FitRule(r, m, c.b); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
	if _, err := FitRule(rule(t, "0*p1", 2), m, design.Budget{Cap: 1}); err == nil || !strings.Contains(err.Error(), "cannot depend") {
		t.Errorf("a constant rule: %v", err)
	}
}

// Rounding modes. Halves away from zero is the common practice for
// "nearest" in commerce; 90.99999999999999 is how 100 - 100·0.3² comes out
// in binary floating point and must count as 91 in every mode.
func TestRounding(t *testing.T) {
	cases := []struct {
		x, unit float64
		mode    string
		want    float64
	}{
		{2.5, 1, RoundNearest, 3},
		{-2.5, 1, RoundNearest, -3},
		{2.4, 1, RoundNearest, 2},
		{2.6, 1, RoundDown, 2},
		{2.1, 1, RoundUp, 3},
		{-2.1, 1, RoundDown, -3},
		{90.99999999999999, 1, RoundDown, 91},
		{91.00000000000001, 1, RoundUp, 91},
		{0.125, 0.01, RoundNearest, 0.13}, // 12.5 hundredths, away from zero
		{0.12499999999999999, 0.01, RoundNearest, 0.13},
		{1.234, 0.05, RoundNearest, 1.25},
		{1.234, 0.05, RoundDown, 1.2},
		{7.3, 0, RoundNearest, 7.3},
		{12, 5, RoundNearest, 10},
		{12.5, 5, RoundNearest, 15},
		{0.95, 0.3, RoundNearest, 0.9}, // 3 units of 0.3, written 0.9
		{1234.5678, 0.25, RoundDown, 1234.5},
	}
	for _, c := range cases {
		r, err := NewRounder(c.unit, c.mode)
		if err != nil {
			t.Fatal(err)
		}
		if got := r.Round(c.x); got != c.want {
			t.Errorf("round(%v, %v, %s) = %v, want %v", c.x, c.unit, c.mode, got, c.want)
		}
	}
	for _, c := range []struct {
		unit float64
		want int
	}{{1, 0}, {0.01, 2}, {0.05, 2}, {0.125, 3}, {5, 0}, {0, -1}} {
		r, _ := NewRounder(c.unit, "")
		if got := r.Decimals(); got != c.want {
			t.Errorf("decimals(%v) = %d, want %d", c.unit, got, c.want)
		}
	}
}

func TestStepMenu(t *testing.T) {
	// Simplex grid counts C(K+n-1, n-1) (stars and bars, derived by hand).
	for _, c := range []struct {
		n    int
		step float64
		want int
	}{{2, 0.05, 21}, {3, 0.1, 66}, {4, 0.25, 35}, {3, 0.5, 6}} {
		m := stepMenu(t, c.n, c.step, 0)
		if len(m.Reports) != c.want {
			t.Errorf("n = %d step %g: %d items, want %d", c.n, c.step, len(m.Reports), c.want)
		}
		for _, p := range m.Reports {
			var s float64
			for _, x := range p {
				s += x
			}
			if math.Abs(s-1) > 1e-12 {
				t.Errorf("item %v sums to %v", p, s)
			}
		}
	}
	// Floor on three outcomes: (0, 0, 1) becomes (0.01, 0.01, 0.98).
	m := stepMenu(t, 3, 0.5, 0.01)
	found := false
	for _, p := range m.Reports {
		for _, x := range p {
			if x < 0.01 {
				t.Errorf("item %v below the floor", p)
			}
		}
		if p[0] == 0.01 && p[1] == 0.01 && math.Abs(p[2]-0.98) < 1e-15 {
			found = true
		}
	}
	if !found {
		t.Errorf("floor menu %v lacks (0.01, 0.01, 0.98)", m.Reports)
	}
	for _, c := range []struct {
		n           int
		step, floor float64
		want        string
	}{{2, 0.3, 0, "does not divide 1"}, {2, 0, 0, "(0, 0.5]"}, {3, 0.1, 0.4, "report floor"}, {12, 0.01, 0, "more than"}} {
		if _, err := StepMenu(c.n, c.step, c.floor); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("StepMenu(%d, %g, %g): %v, want %q", c.n, c.step, c.floor, err, c.want)
		}
	}
}

func TestReadMenu(t *testing.T) {
	m, err := ReadMenu(strings.NewReader("# frost menu\n0.1\n\n0.5, 0.5\n0.9,0.1\n"), "menu.csv", 2)
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Reports) != 3 || m.Reports[0][1] != 0.9 {
		t.Errorf("reports %v", m.Reports)
	}
	for _, c := range []struct{ src, want string }{
		{"0.1\n0.2\nabc\n", "menu.csv:3: entry 1"},
		{"0.2,0.3,0.5\n0.5\n", "menu.csv:1: 3 entries"},
		{"0.1\n0.2\n0.1\n", "menu.csv:3: report (0.1, 0.9) repeats line 1"},
		{"0.1\n0.2\n0.6,0.6\n", "menu.csv:3: entries sum"},
		{"0.5\n", "at least 2"},
		{"0.5\n\"0.2\n", "menu.csv:2"},
	} {
		if _, err := ReadMenu(strings.NewReader(c.src), "menu.csv", 2); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want %q", c.src, err, c.want)
		}
	}
	fm, _ := ReadMenu(strings.NewReader("0.005\n0.5\n"), "m", 2)
	if _, err := FitRule(rule(t, "1 - sum(p^2)", 2), fm, design.Budget{Cap: 1, ReportFloor: 0.01}); err == nil || !strings.Contains(err.Error(), "below the report floor") {
		t.Errorf("file menu below the floor: %v", err)
	}
}

// TestFitHitsFloorAndCapExactly: unrounded, the menu's largest effort pays
// the floor and its smallest the cap, bit for bit. The log rule clamped at
// 0.01 on a 0.05 menu fitted to [0, 50] gives B = 50/(Lmax - Lmin), and
// floor + B·(Lmax - Lmin) is 50.00000000000001 in floats; the table must
// read 50 (derived by hand: the cap is the definition of the fit).
func TestFitHitsFloorAndCapExactly(t *testing.T) {
	m := stepMenu(t, 2, 0.05, 0)
	m.Clamp = 0.01
	for _, c := range []struct {
		src        string
		m          *Menu
		floor, cap float64
	}{
		{"-sum(p*ln(p))", m, 0, 50},
		{"-sum(p*ln(p))", stepMenu(t, 2, 0.05, 0.01), 3, 47.3},
		{"1 - sum(p^2)", stepMenu(t, 2, 0.1, 0), 0.1, 0.7},
	} {
		f, err := FitRule(rule(t, c.src, 2), c.m, design.Budget{Floor: c.floor, Cap: c.cap})
		if err != nil {
			t.Fatal(err)
		}
		if f.MinPay != c.floor || f.MaxPay != c.cap {
			t.Errorf("%s on [%g, %g]: payments span [%v, %v]", c.src, c.floor, c.cap, f.MinPay, f.MaxPay)
		}
	}
}

// With a report floor the truthful forecaster at the vertex (1, 0) is paid
// for the floored report (0.99, 0.01): A + B ln 0.99 = 50, the cap, not
// A - B·H(1, 0) = A (derived by hand from the fit above). The note must
// name the formula that gives its number.
func TestTruthfulNoteNamesTheFlooredReport(t *testing.T) {
	m := stepMenu(t, 2, 0.05, 0.01)
	f, rc := fit(t, rule(t, "-sum(p*ln(p))", 2), m, design.Budget{Floor: 0, Cap: 50, Unit: 0.01, ReportFloor: 0.01})
	if math.Abs(f.Truthful.Max-50) > 1e-9 {
		t.Errorf("truthful maximum %.12g, want 50", f.Truthful.Max)
	}
	note := f.Notes(rc)[0]
	if strings.Contains(note, "A - B·H(q)") || !strings.Contains(note, "raised to the report floor") {
		t.Errorf("note %q", note)
	}
}
