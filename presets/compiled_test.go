package presets

import (
	"math"
	"slices"
	"testing"
)

// Which presets are candidates depends on the outcomes: ranked needs
// order, weighted-quadratic needs weights, beta is an emphasis rule, not
// a generator.
func TestRulesFitTheOutcomes(t *testing.T) {
	names := func(rs []NamedRule) []string {
		var out []string
		for _, r := range rs {
			if r.Rule == nil || r.Rule.Outcomes() == 0 {
				t.Errorf("%s compiled to nothing", r.Name)
			}
			out = append(out, r.Name)
		}
		return out
	}
	plain := names(Rules(3, false, nil))
	for _, want := range []string{"log", "quadratic", "spherical", "pseudospherical", "power"} {
		if !slices.Contains(plain, want) {
			t.Errorf("unordered, unweighted: %v lacks %s", plain, want)
		}
	}
	for _, not := range []string{"ranked", "weighted-quadratic", "beta"} {
		if slices.Contains(plain, not) {
			t.Errorf("unordered, unweighted: %v has %s", plain, not)
		}
	}
	all := names(Rules(3, true, []float64{1, 2, 3}))
	for _, want := range []string{"ranked", "weighted-quadratic"} {
		if !slices.Contains(all, want) {
			t.Errorf("ordered, weighted: %v lacks %s", all, want)
		}
	}
	var points []string
	for _, p := range PointGenerators(0, 100) {
		points = append(points, p.Name)
	}
	if !slices.Contains(points, "squared-error") || len(points) < 3 {
		t.Errorf("point presets on [0, 100]: %v", points)
	}
}

// The power and pseudospherical presets come as families with their one
// parameter (defaults g = 3, a = 3, from their formulas); At builds other
// members. Derived by hand: the power effort is
// (1 + (g-1) sum p^g - g p_k^(g-1)) / (g - 1), at g = 2 the Brier effort
// sum_i (p_i - [i = k])^2 = 1 + sum p^2 - 2 p_k (Brier 1950): 0.98, 0.78,
// 0.38 at p = (0.2, 0.3, 0.5), where sum p^2 = 0.38.
func TestRulesFamilies(t *testing.T) {
	want := map[string]string{"power": "g", "pseudospherical": "a"}
	for _, r := range Rules(3, false, nil) {
		param, family := want[r.Name]
		if !family {
			if r.At != nil || r.Param != "" {
				t.Errorf("%s: a family with parameter %q", r.Name, r.Param)
			}
			continue
		}
		if r.Param != param || r.Value != 3 || r.At == nil || !(r.Lo < r.Value && r.Value < r.Hi) {
			t.Errorf("%s: param %q = %g in [%g, %g], At set %v", r.Name, r.Param, r.Value, r.Lo, r.Hi, r.At != nil)
			continue
		}
		if r.Name != "power" {
			continue
		}
		m, err := r.At(2)
		if err != nil {
			t.Fatal(err)
		}
		eff := make([]float64, 3)
		m.NewScorer().Efforts(eff, []float64{0.2, 0.3, 0.5})
		for k, w := range []float64{0.98, 0.78, 0.38} {
			if math.Abs(eff[k]-w) > 1e-12 {
				t.Errorf("power at g = 2: effort %v, want (0.98, 0.78, 0.38)", eff)
				break
			}
		}
	}
}
