package presets

import (
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
