package certify

import (
	"strings"
	"testing"

	"scorewright/verify"
)

// min(p1, p2) over two outcomes is concave and piecewise linear, so it is
// proper and nowhere strictly concave, in the interior as much as at the
// faces (derived by hand). The certificate's statement must not place the
// missing strictness "next to the faces".
func TestFlatGeneratorStatement(t *testing.T) {
	res := certifyFormula(t, "min(p1, p2)", 2, Settings{})
	if res.Verdict != verify.Proper {
		t.Fatalf("verdict %s, want proper", res.Verdict)
	}
	st := res.Statement()
	if strings.Contains(st, "next to the faces, where") || !strings.Contains(st, "flat along some direction") {
		t.Errorf("statement %q", st)
	}
}
