package budget

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"scorewright/generator/design"
	"scorewright/internal/pool"
)

// The clamp lets the log rule price a menu that includes 0 and 1, and
// costs honesty near the boundary. The gap found is recomputed here from
// -ln directly (log generator identity, L(p, k) = -ln p_k).
func TestClampGapMeasured(t *testing.T) {
	m := stepMenu(t, 2, 0.1, 0)
	m.Clamp = 0.01
	f, rc := fit(t, rule(t, "-sum(p*ln(p))", 2), m, design.Budget{Floor: 0, Cap: 50, Unit: 0.01})
	g := rc.ClampGap
	if g == nil || !(g.Max > 0) {
		t.Fatalf("no clamp gap measured: %+v", g)
	}
	clamp := func(p []float64) []float64 {
		a, b := math.Max(p[0], 0.01), math.Max(p[1], 0.01)
		return []float64{a / (a + b), b / (a + b)}
	}
	cross := func(q, p []float64) float64 { return -q[0]*math.Log(p[0]) - q[1]*math.Log(p[1]) }
	want := f.B * (cross(g.Belief, clamp(g.Belief)) - cross(g.Belief, clamp(g.Best)))
	if math.Abs(g.Max-want) > 1e-9 {
		t.Errorf("gap %.12g, recomputed %.12g", g.Max, want)
	}
	// A forecaster who believes in a small but positive chance does better
	// by reporting certainty than by reporting the belief.
	if g.Belief[0] >= 0.01 && g.Belief[1] >= 0.01 {
		t.Errorf("gap found outside the clamp zone at %v", g.Belief)
	}
	// Without a clamp the same search finds nothing for the report floor
	// menu (a proper rule has no gap): check that a floor menu has none.
	fl := stepMenu(t, 2, 0.1, 0.01)
	_, rc2 := fit(t, rule(t, "-sum(p*ln(p))", 2), fl, design.Budget{Floor: 0, Cap: 50})
	if rc2.ClampGap != nil {
		t.Errorf("a menu without clamp reports a clamp gap")
	}
}

// Step 0.2 and unit 25 on the Brier table of [0, 100]: by hand,
// pay(0.4) = (100 - 100·0.36, 100 - 100·0.16) = (64, 84) -> (75, 75) and
// pay(0.6) = (84, 64) -> (75, 75): two identical rows, a tie of margin 0
// exactly. Nothing beats them, so the smallest margin is 0.
func TestCoarseRoundingTiesCaught(t *testing.T) {
	m := stepMenu(t, 2, 0.2, 0)
	f, rc := fit(t, rule(t, "1 - sum(p^2)", 2), m, design.Budget{Floor: 0, Cap: 100, Unit: 25})
	if rc.Passed {
		t.Fatalf("coarse rounding passed: %s", rc.Verdict(f))
	}
	if rc.MinMargin != 0 {
		t.Errorf("smallest margin %g, want 0", rc.MinMargin)
	}
	i4, i6 := item(t, m, 0.4), item(t, m, 0.6)
	if !contains(rc.Ties, i4) || !contains(rc.Ties, i6) {
		t.Errorf("ties %v do not include items 0.4 and 0.6", rc.Ties)
	}
	// Identical rows: neither is ever the unique best, exactly.
	if !contains(rc.NeverChosen, i4) || !contains(rc.NeverChosen, i6) {
		t.Errorf("never chosen %v do not include items 0.4 and 0.6", rc.NeverChosen)
	}
	// Item 0.2 pays (25, 100): 100 - 75x, above item 0 (100 - 100x) for
	// x > 0 and above item 0.4 (75) for x < 1/3 (derived by hand).
	if c := rc.Cells[item(t, m, 0.2)]; math.Abs(c.Lo) > 1e-6 || math.Abs(c.Hi-1.0/3) > 1e-6 {
		t.Errorf("cell of 0.2: %+v, want (0, 1/3)", c)
	}
	tb := f.Table(rc, Info{})
	if len(tb.Meta.Warnings) == 0 || tb.Meta.Passed {
		t.Errorf("a failed table carries no warning")
	}
}

func TestTableWithoutRecheck(t *testing.T) {
	f, err := FitRule(rule(t, "1 - sum(p^2)", 2), stepMenu(t, 2, 0.1, 0), design.Budget{Cap: 100, Unit: 1})
	if err != nil {
		t.Fatal(err)
	}
	tb := f.Table(nil, Info{})
	if tb.Meta.Passed || len(tb.Meta.Warnings) == 0 || tb.Meta.Verdict != "not re-checked" {
		t.Errorf("an unchecked table reads %+v", tb.Meta)
	}
}

func contains(s []int, v int) bool {
	for _, x := range s {
		if x == v {
			return true
		}
	}
	return false
}

// Three outcomes: every simplex-grid item of the quadratic rule passes the
// re-check unrounded (a strictly proper rule; the exact margin for item q
// against r is B·|q - r|^2 > 0).
func TestThreeOutcomeRecheck(t *testing.T) {
	m := stepMenu(t, 3, 0.25, 0)
	f, rc := fit(t, rule(t, "1 - sum(p^2)", 3), m, design.Budget{Floor: 0, Cap: 10})
	if !rc.Passed || len(rc.NeverChosen) != 0 {
		t.Fatalf("re-check: %s; never chosen %v", rc.Verdict(f), rc.NeverChosen)
	}
	// Smallest margin: two neighbouring items differ by 1/4 in two
	// entries, |q - r|^2 = 2/16 = 1/8, and B = 10/2 = 5: margin 5/8.
	if math.Abs(rc.MinMargin-0.625) > 1e-9 {
		t.Errorf("smallest margin %g, want 0.625 (derived by hand)", rc.MinMargin)
	}
	sum := rc.TiedBeliefs
	for _, c := range rc.Cells {
		sum += c.Beliefs
	}
	if sum != rc.Beliefs {
		t.Errorf("cells cover %d of %d beliefs", sum, rc.Beliefs)
	}
}

func TestRecheckCancelled(t *testing.T) {
	f, err := FitRule(rule(t, "1 - sum(p^2)", 2), stepMenu(t, 2, 0.1, 0), design.Budget{Cap: 1})
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := f.Recheck(ctx, RecheckSettings{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled re-check returned %v", err)
	}
	calls := 0
	if _, err := f.Recheck(context.Background(), RecheckSettings{Workers: 1, Progress: func(pool.Step) { calls++ }}); err != nil || calls == 0 {
		t.Errorf("progress called %d times, err %v", calls, err)
	}
}

// The exact two-outcome cells agree with brute force: every belief on an
// odd grid (step 1/997, unrelated to the menu) picks, by BestItem, an item
// whose exact cell contains it, unless the belief sits on a tie.
func TestBinaryCellsAgainstBruteForce(t *testing.T) {
	for _, c := range []struct {
		src  string
		b    design.Budget
		step float64
	}{
		{"-sum(p*ln(p))", design.Budget{Floor: 0, Cap: 50, Unit: 0.01, ReportFloor: 0.01}, 0.05},
		{"1 - sum(p^2)", design.Budget{Floor: 0, Cap: 100, Unit: 5}, 0.05},
		{"-sqrt(sum(p^2))", design.Budget{Floor: 10, Cap: 20, Unit: 0.25}, 0.1},
	} {
		f, rc := fit(t, rule(t, c.src, 2), stepMenu(t, 2, c.step, c.b.ReportFloor), c.b)
		for g := 0; g <= 997; g++ {
			x := float64(g) / 997
			q := []float64{x, 1 - x}
			j := f.BestItem(q)
			cell := rc.Cells[j]
			if cell.Lo < cell.Hi && x >= cell.Lo-1e-9 && x <= cell.Hi+1e-9 {
				continue
			}
			// Not in j's cell: only allowed on a tie with another item.
			_, second, bv, sv := top2(flat(f.Pays), 2, q)
			if second < 0 || bv-sv > rc.Tolerance {
				t.Errorf("%s: belief %g picks %v, outside its cell (%g, %g)", c.src, x, f.Menu.Reports[j], cell.Lo, cell.Hi)
			}
		}
		// Conversely, a belief well inside a cell picks that cell's item.
		for i, cell := range rc.Cells {
			if !(cell.Lo < cell.Hi) {
				continue
			}
			for g := 0; g <= 997; g++ {
				x := float64(g) / 997
				if x > cell.Lo+1e-6 && x < cell.Hi-1e-6 {
					if j := f.BestItem([]float64{x, 1 - x}); j != i {
						t.Errorf("%s: belief %g inside the cell of %v picks %v", c.src, x, f.Menu.Reports[i], f.Menu.Reports[j])
					}
				}
			}
		}
	}
}

func flat(rows [][]float64) []float64 {
	var out []float64
	for _, r := range rows {
		out = append(out, r...)
	}
	return out
}

// TestClampGapAgainstClosedForm: log rule clamped at c = 0.01 on a 0.05
// menu fitted to [0, 50]. Derived by hand: a forecaster with belief
// q = (1 - e, e), e < c, is paid for the truthful report as for
// (1 - e, c)/(1 - e + c) and for the menu item (1, 0) as for
// (1, c)/(1 + c). The expected log efforts differ by
//
//	f(e) = -(1 - e) ln(1 - e) + ln((1 - e + c)/(1 + c)),
//
// positive on (0, c) (f(c/2) = 2.47e-5), so the clamp pays B·f(e) for
// reporting certainty. The search probes e = c/4, c/2, 3c/4, so it must
// find at least B·f(c/2) and at most B·max f.
func TestClampGapAgainstClosedForm(t *testing.T) {
	const c = 0.01
	m := stepMenu(t, 2, 0.05, 0)
	m.Clamp = c
	f, rc := fit(t, rule(t, "-sum(p*ln(p))", 2), m, design.Budget{Floor: 0, Cap: 50})
	gap := func(e float64) float64 { return -(1-e)*math.Log(1-e) + math.Log((1-e+c)/(1+c)) }
	best := 0.0
	for i := 1; i < 10000; i++ {
		best = math.Max(best, gap(c*float64(i)/10000))
	}
	lo, hi := f.B*gap(c/2), f.B*best
	if g := rc.ClampGap; g == nil || g.Max < lo-1e-12 || g.Max > hi+1e-12 {
		t.Fatalf("clamp gap %+v, want within [%.6g, %.6g]", g, lo, hi)
	}
	if math.Abs(lo-2.47e-5*f.B) > 0.01e-5*f.B {
		t.Errorf("f(c/2)·B = %g; the hand value is 2.47e-5·B = %g", lo, 2.47e-5*f.B)
	}
}

// One failing item is written in the singular. Quadratic rule on [0, 100]
// (A = 100, B = 50), menu 0, 0.45, 0.5, 0.55, 1, unit 5, by hand: 0.45
// pays (69.75, 79.75) -> (70, 80), 0.5 pays (75, 75), 0.55 pays
// (79.75, 69.75) -> (80, 70). At belief 0.5 the item 0.5 ties with 0.45
// and 0.55 (75 each), and everywhere the better of those two pays at
// least 75: 0.5 is the only failing item and the only one never chosen.
func TestOneFailingItemIsSingular(t *testing.T) {
	m := &Menu{Reports: [][]float64{{0, 1}, {0.45, 0.55}, {0.5, 0.5}, {0.55, 0.45}, {1, 0}}}
	f, rc := fit(t, rule(t, "1 - sum(p^2)", 2), m, design.Budget{Floor: 0, Cap: 100, Unit: 5})
	if rc.Passed || len(rc.Ties)+len(rc.Beaten) != 1 || len(rc.NeverChosen) != 1 {
		t.Fatalf("want one tie and one item never chosen: ties %v beaten %v never %v", rc.Ties, rc.Beaten, rc.NeverChosen)
	}
	if v := rc.Verdict(f); !strings.HasPrefix(v, "1 of the 5 menu items is not the strict best report") {
		t.Errorf("verdict %q", v)
	}
	var note string
	for _, n := range f.Notes(rc) {
		if strings.Contains(n, "unique best report for no belief") {
			note = n
		}
	}
	if !strings.HasPrefix(note, "1 menu item is the unique best report for no belief") {
		t.Errorf("never-chosen note %q", note)
	}
}

// StepTerms (the fit of a risk computation) applies the budget's clamp as
// the table does: the log rule on a step menu from 0 to 1 is then
// bounded. By hand: the clamped efforts run from ln 1.01 (report 1 when
// it happens) to ln 101 (report 0 when the event happens), so fitting
// [0, 10] gives B = 10 / ln 100.
func TestStepTermsAppliesTheClamp(t *testing.T) {
	tm, err := StepTerms(rule(t, "-sum(p*ln(p))", 2), design.Budget{Floor: 0, Cap: 10, Step: 0.1, Clamp: 0.01})
	if err != nil {
		t.Fatalf("clamped log rule refused: %v", err)
	}
	if want := 10 / math.Log(100); math.Abs(tm.Fit.B-want) > 1e-9 {
		t.Errorf("B = %.12g, want 10/ln 100 = %.12g", tm.Fit.B, want)
	}
}
