package pointcheck

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"scorewright/verify"
)

// The pinball payout of level tau, -(tau - 1{y < x})(y - x), rewards the
// tau-quantile, not the mean. Derived by hand on [0, 1] for the two-point
// distribution weight 1-w on 0 and w on 1: the expected loss is linear in
// the report, so the best report is an end; at the mean w it is w(1-w), at
// report 1 it is (1-w)(1-tau), at report 0 w·tau. For w > 1-tau report 1
// gains (1-w)(w - (1-tau)), largest at w = 1 - tau/2 with gap (tau/2)^2:
// 0.16 for tau = 0.8 (weight 0.6 on 1), 0.133225 for tau = 0.73 (weight
// 0.635, between the weights any fixed list holds). Two-point
// distributions are where a point report's gap is largest.
func TestPinballGap(t *testing.T) {
	for _, tau := range []float64{0.8, 0.73} {
		p, err := NewPayout(fmt.Sprintf("-(%g - if(y < x, 1, 0))*(y - x)", tau), nil)
		if err != nil {
			t.Fatal(err)
		}
		r, err := AuditPayout(context.Background(), p, 0, 1, verify.Settings{}, nil)
		if err != nil {
			t.Fatal(err)
		}
		want, w := tau*tau/4, 1-tau/2
		g := r.Gap
		if r.Verdict != verify.Improper || math.Abs(g.Max-want) > 1e-9*want || math.Abs(g.BestReport-1) > 1e-9 ||
			math.Abs(g.Weights[1]-w) > 1e-4 || g.Outcomes[0] != 0 || g.Outcomes[1] != 1 {
			t.Errorf("tau %g: verdict %s, gap %+v; want %.9g at weight %g on 1, report 1", tau, r.Verdict, g, want, w)
		}
		if !strings.Contains(g.Precision, "9 significant digits") {
			t.Errorf("tau %g: precision %q", tau, g.Precision)
		}
	}
}
