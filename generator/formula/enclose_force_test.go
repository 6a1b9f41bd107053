package formula

import (
	"testing"

	"scorewright/internal/interval"
)

// A forced comparison encloses the branch extended to the whole box: on
// p1 in [0.2, 0.5], if(p1 < 0.5, -p1^2, 7) is -p1^2 except at 0.5, and
// forced true it encloses [-0.25, -0.04] (derived by hand) with no kink;
// unforced the box is kinked. At the break 0.5 the quantity p1 - 0.5 is
// exactly 0, and the two branches of if(p1 < 0.5, -(p1 - 0.5)^2,
// -2*(p1 - 0.5)^2) meet there with value 0 and slope 0.
func TestForcedComparison(t *testing.T) {
	prog, err := CompileString("if(p1 < 0.5, -p1^2, 7)", Scope{Outcomes: 2})
	if err != nil {
		t.Fatal(err)
	}
	e := prog.NewEncloser()
	box := []interval.Interval{{Lo: 0.2, Hi: 0.5}, {Lo: 0.5, Hi: 0.8}}
	var en Enclosure
	e.Enclose(&en, box, 2)
	if !en.Kinked {
		t.Fatal("unforced: the break on the box's face must leave it kinked")
	}
	if !e.ForceComparison(0, true) {
		t.Fatal("switch 0 is a comparison")
	}
	e.Enclose(&en, box, 2)
	if en.Kinked || en.Value.Lo > -0.25 || en.Value.Hi < -0.04 || en.Value.Hi > -0.039 {
		t.Errorf("forced: kinked %v, value %v, want about [-0.25, -0.04]", en.Kinked, en.Value)
	}
	e.ClearForced()
	if affine, holds := prog.ComparisonSwitch(0); !affine || !holds(-1) || holds(0) {
		t.Errorf("p1 < 0.5: affine %v", affine)
	}

	c1, _ := CompileString("if(p1 < 0.5, -(p1 - 0.5)^2, -2*(p1 - 0.5)^2)", Scope{Outcomes: 2})
	e = c1.NewEncloser()
	e.Enclose(&en, []interval.Interval{interval.Point(0.5), interval.Point(0.5)}, 1)
	if q, ok := e.ComparisonQuantity(0); !ok || q.Lo != 0 || q.Hi != 0 {
		t.Errorf("quantity at the break %v, want [0, 0]", q)
	}
	if found, v, g := e.BranchesMeet(0); !found || !v || !g {
		t.Errorf("branches at 0.5: found %v, same value %v, same gradient %v; want all", found, v, g)
	}
}
