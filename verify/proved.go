package verify

import (
	"context"
	"fmt"
	"math"

	"scorewright/internal/num"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// provedStream is the stream a proof of properness leaves (Settings.Proof):
// every boundary belief against every report (the pruned walk), and every
// interior belief against the boundary reports and its honest report. For
// an interior belief the proof settles every interior report; the boundary
// reports stay, because their efforts are limits computed apart from the
// formula the proof is about. The result for a boundary belief is the full
// stream's; for an interior one it is the best two over that subset, kept
// by (value, grid index) as the full stream keeps them. It returns the
// pairs it settled.
func provedStream(ctx context.Context, g *simplex.Grid, m *menu, w int, pr *pool.Meter) ([]best, int64, error) {
	n, G := m.n, g.Len()
	t := newReportTree(g, m)
	var bd []int32
	for j, b := range g.Boundary {
		if b {
			bd = append(bd, int32(j))
		}
	}
	sub := make([]float64, 0, len(bd)*n)
	for _, j := range bd {
		sub = append(sub, m.rows[int(j)*n:(int(j)+1)*n]...)
	}
	at := func(a int32) int32 {
		if a < 0 {
			return a
		}
		return bd[a]
	}
	out := make([]best, G)
	err := pool.Run(ctx, w, G, 16, func(_, lo, hi int) {
		for i := lo; i < hi; i++ {
			q := g.Point(i)
			if g.Boundary[i] {
				out[i], _ = t.settle(q, m, true)
			} else {
				b := best{m1: math.Inf(1), m2: math.Inf(1), arg: -1, arg2: -1}
				if len(bd) > 0 {
					b = scan(q, sub, n)
				}
				st := pruneState{b.m1, b.m2, at(b.arg), at(b.arg2)}
				st.offer(dotN(q, m.rows[i*n:(i+1)*n]), int32(i))
				out[i] = best{st.m1, st.m2, st.a1, st.a2}
			}
			pr.Add(int64(G))
		}
	})
	pairs := int64(len(bd))*int64(G) + int64(G-len(bd))*int64(len(bd)+1)
	return out, pairs, err
}

// provedNote words properness when a proof settled the interior pairs.
func provedNote(c CheckResult, p *Proof, boundaryReports int) string {
	return fmt.Sprintf("%s; on the grid the pairs the proof leaves were streamed (every boundary belief against every report, every interior belief against the %d boundary reports): no report beat the honest one there, the closest other falling short by %.6g at belief %s",
		p.Statement, boundaryReports, c.Margin, num.Format(c.MarginBelief))
}
