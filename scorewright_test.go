package scorewright

import (
	"testing"

	"scorewright/generator/design"
)

func TestStatement(t *testing.T) {
	two := []string{"yes", "no"}
	cases := []struct {
		d    design.Design
		want string
	}{
		{design.Design{Mode: design.ModeGenerator, Labels: two, Formula: "1 - sum(p^2)"}, "generator H = 1 - sum(p^2)"},
		{design.Design{Mode: design.ModeGenerator, Labels: two, Formula: "# power\ng = 1.5\n(1 - sum(p^g)) / (g - 1)", Params: map[string]float64{"g": 3}},
			"generator H = (1 - sum(p^g)) / (g - 1) with g = 3"},
		{design.Design{Mode: design.ModeEmphasis, Labels: two, Formula: "a = 1\nb = 1\nc^(a-1) * (1-c)^(b-1)", Params: map[string]float64{"a": 2}},
			"emphasis w(c) = c^(a-1) * (1-c)^(b-1) with a = 2, b = 1"},
	}
	for _, c := range cases {
		r, err := Open(&c.d)
		if err != nil {
			t.Fatalf("%q: %v", c.d.Formula, err)
		}
		if got := r.Statement(); got != c.want {
			t.Errorf("Statement(%q) = %q, want %q", c.d.Formula, got, c.want)
		}
	}
}
