package verify

import (
	"context"
	"fmt"
	"math"
	"testing"

	"scorewright/generator/payout"
)

// TestIdentifyFittedParameter: payouts built from the power and
// pseudospherical rules at parameters other than the presets' defaults
// (g = 3, a = 3) are identified with the parameter fitted.
//
// Derived by hand. Gneiting & Raftery (2007), Sec. 3, give the power score
// S = g p_y^(g-1) - (g-1) sum_i p_i^g and the pseudospherical score
// S = p_y^(a-1) / ||p||_a^(a-1), with ||p||_a = (sum_i p_i^a)^(1/a).
// The power preset's generator is H = (1 - sum p^g) / (g - 1), with
// dH/dp_i = -g p_i^(g-1) / (g - 1), so its effort is
// L(p, k) = H + dH/dp_k - sum_i p_i dH/dp_i, which is
// (1 + (g-1) sum p^g - g p_k^(g-1)) / (g - 1),
// and its score -L = (S - 1) / (g - 1): the normalisation that makes
// g -> 1 the log rule. Hence 5 + 2 S = 7 + 2 (g - 1) (-L): scale 2(g-1)
// (1 at g = 1.5) and shift 7, not 2 and 5. The pseudospherical preset's
// generator H = -||p||_a has dH/dp_i = -(p_i / ||p||_a)^(a-1), so
// L = -||p||_a - (p_k/||p||_a)^(a-1) + ||p||_a = -S exactly: 5 + 2 S has
// scale 2 and shift 5.
func TestIdentifyFittedParameter(t *testing.T) {
	cases := []struct {
		src, preset, param string
		n                  int
		value              float64
		scale, shift       float64
	}{
		{"5 + 2*(1.5*p[y]^0.5 - 0.5*sum(p^1.5))", "power", "g", 3, 1.5, 1, 7},
		{"5 + 2*(1.5*p[y]^0.5 - 0.5*sum(p^1.5))", "power", "g", 2, 1.5, 1, 7},
		{"5 + 2*(4*p[y]^3 - 3*sum(p^4))", "power", "g", 3, 4, 6, 7},
		// g = 0.5 < 1: S then rewards the opposite (its honest expectation
		// sum q^g is concave), so the payout subtracts it:
		// 7 - 2 S = 5 - 2(g - 1)(-L) = 5 + 1·(-L), scale 1, shift 5.
		{"7 - 2*(0.5*p[y]^(-0.5) + 0.5*sum(p^0.5))", "power", "g", 3, 0.5, 1, 5},
		{"5 + 2*p[y]^1.5/sum(p^2.5)^(1.5/2.5)", "pseudospherical", "a", 3, 2.5, 2, 5},
		{"5 + 2*p[y]^1.5/sum(p^2.5)^(1.5/2.5)", "pseudospherical", "a", 4, 2.5, 2, 5},
		{"5 + 2*p[y]^0.5/sum(p^1.5)^(0.5/1.5)", "pseudospherical", "a", 3, 1.5, 2, 5},
	}
	for _, c := range cases {
		rep, err := Audit(context.Background(), pay(t, c.src, c.n), presetCandidates(t, c.n), Settings{Resolution: map[int]int{2: 200, 3: 40, 4: 12}[c.n]})
		if err != nil {
			t.Fatal(err)
		}
		id := rep.Identified
		if rep.Verdict == Improper || id == nil {
			t.Errorf("%q n=%d: verdict %s, not identified; fits %+v", c.src, c.n, rep.Verdict, rep.Fits)
			continue
		}
		if id.Preset != c.preset || id.Param != c.param || math.Abs(id.Value-c.value) > 1e-6 ||
			math.Abs(id.Scale-c.scale) > 1e-6 || math.Abs(id.Shift-c.shift) > 1e-6 {
			t.Errorf("%q n=%d: identified %+v, want %s with %s = %g, scale %g, shift %g", c.src, c.n, *id, c.preset, c.param, c.value, c.scale, c.shift)
		}
		if want := fmt.Sprintf(" with %s = %g", c.param, c.value); id.WithParam() != want {
			t.Errorf("%q: WithParam %q, want %q", c.src, id.WithParam(), want)
		}
	}
}

// TestIdentifyNotInAnyFamily: strictly proper payouts that are no affine
// image of any candidate, whatever its parameter, stay unidentified.
//
// Derived by hand. (1) The weighted Brier payout -sum_i w_i (p_i - hit_i)^2
// with w = (1, 2, 3) is strictly proper (the Bregman rule of
// sum w p (1 - p)), but not symmetric: at p = (1, 0, 0), y = 2 it pays
// -(1 + 2) = -3, at the mirrored p = (0, 0, 1), y = 2 it pays -(2 + 3) =
// -5, while every candidate (log, quadratic, spherical, and the power and
// pseudospherical families) scores mirrored pairs alike, and so does
// any shift + scale × its score. (2) ln p_y - sum (p - hit)^2 mixes the log
// and quadratic rules: along an edge its generator's curvature is
// -(1/p_1 + 1/p_2) - 4, which blows up like 1/p_1 near a vertex; a power
// member's, -g (p_1^(g-2) + p_2^(g-2)), does so only as g -> 1, the log
// rule, whose curvature has no constant part; the pseudospherical ones
// only as a -> 1, where the rule degenerates; the quadratic and spherical
// rules' stay bounded.
func TestIdentifyNotInAnyFamily(t *testing.T) {
	weighted, err := payout.New("-sum(w*(p - hit)^2)", payout.Options{Outcomes: 3, Weights: []float64{1, 2, 3}})
	if err != nil {
		t.Fatal(err)
	}
	for name, p := range map[string]*payout.Payout{"weighted Brier": weighted, "log + quadratic": pay(t, "ln(p[y]) - sum((p - hit)^2)", 3)} {
		rep, err := Audit(context.Background(), p, presetCandidates(t, 3), Settings{Resolution: 40})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict == Improper || rep.Identified != nil {
			t.Errorf("%s: verdict %s, identified %+v", name, rep.Verdict, rep.Identified)
		}
		// Not a near miss either: the families' best members stay far
		// above the tolerance.
		params := 0
		for _, f := range rep.Fits {
			if f.Note == "" {
				t.Errorf("%s: fit %+v accepted", name, f)
			}
			if f.Param != "" {
				params++
				if !(f.Residual > 1e-3) {
					t.Errorf("%s: %s%s comes within %g", name, f.Preset, f.WithParam(), f.Residual)
				}
			}
		}
		if params != 2 {
			t.Errorf("%s: %d fits with a fitted parameter, want 2 (power, pseudospherical): %+v", name, params, rep.Fits)
		}
	}
}

func TestIdentifyScaledQuadratic(t *testing.T) {
	// Derived by hand: the quadratic generator H = 1 - sum p^2 has effort
	// L(p, k) = sum_i (p_i - [i = k])^2 (Brier 1950, multi-category), so
	// pay = 7 - 3 * sum((p - hit)^2) = 7 - 3 L: shift 7, scale 3.
	for _, n := range []int{2, 3, 4} {
		rep, err := Audit(context.Background(), pay(t, "7 - 3*sum((p-hit)^2)", n), presetCandidates(t, n), Settings{Resolution: map[int]int{2: 200, 3: 40, 4: 12}[n]})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict != StrictlyProper {
			t.Errorf("n=%d: verdict %s", n, rep.Verdict)
		}
		id := rep.Identified
		if id == nil {
			t.Fatalf("n=%d: not identified; fits %+v", n, rep.Fits)
		}
		if id.Preset != "quadratic" || math.Abs(id.Scale-3) > 1e-9 || math.Abs(id.Shift-7) > 1e-9 {
			t.Errorf("n=%d: identified %+v, want quadratic with scale 3, shift 7", n, *id)
		}
		if rep.Gap.Max > 1e-9 {
			t.Errorf("n=%d: gap %g for a proper payout", n, rep.Gap.Max)
		}
	}
	// The same in large currency units: 1e9 - 5e8 L (derived as above).
	// Rounding in values of 1e9 is about 1e-7, so the tolerance scales with
	// the values and the verdict stays strictly proper.
	big, err := Audit(context.Background(), pay(t, "1e9 - 5e8*sum((p-hit)^2)", 2), presetCandidates(t, 2), Settings{Resolution: 400})
	if err != nil {
		t.Fatal(err)
	}
	if big.Verdict != StrictlyProper || big.Grid.Scale != 1e9 || big.Identified == nil || big.Identified.Preset != "quadratic" ||
		math.Abs(big.Identified.Scale/5e8-1) > 1e-9 || math.Abs(big.Identified.Shift/1e9-1) > 1e-9 {
		t.Errorf("large units: verdict %s, scale %g, identified %+v", big.Verdict, big.Grid.Scale, big.Identified)
	}
	// The log score ln p_y is the log rule with scale 1, shift 0
	// (L = -ln p_k, Good 1952); its infinities match the rule's.
	rep, err := Audit(context.Background(), pay(t, "ln(p[y])", 3), presetCandidates(t, 3), Settings{Resolution: 30})
	if err != nil {
		t.Fatal(err)
	}
	if id := rep.Identified; id == nil || id.Preset != "log" || math.Abs(id.Scale-1) > 1e-9 || math.Abs(id.Shift) > 1e-9 {
		t.Errorf("ln(p[y]): identified %+v, fits %+v", rep.Identified, rep.Fits)
	}
	// The linear rule is no preset.
	rep, err = Audit(context.Background(), pay(t, "p[y]", 3), presetCandidates(t, 3), Settings{Resolution: 30})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Identified != nil {
		t.Errorf("p[y] identified as %+v", *rep.Identified)
	}
}
