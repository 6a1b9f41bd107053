package verify

import (
	"context"
	"fmt"
	"testing"
)

// TestPrunedChecksAreFullChecks: a whole check (and a whole audit) with
// the pruned streams gives the report, finding for finding and number for
// number, that the same check gives visiting every pair: the full stream
// and the plain off-grid scan, the brute force of the pair search. Rules
// of every kind (prunedRules: strictly proper, flat, improper, kinked,
// singular on the boundary, undefined somewhere, constant) at n = 2..4,
// payouts proper and not at n = 2 and 3.
func TestPrunedChecksAreFullChecks(t *testing.T) {
	ctx := context.Background()
	res := map[int]int{2: 400, 3: 40, 4: 12} // several leaves of reports each, so boxes are pruned
	for n := 2; n <= 4; n++ {
		for _, src := range prunedRules {
			if n < 3 && src == "-sum(p*ln(p)) + 2*p1*p2" {
				continue
			}
			r := rule(t, src, n)
			s := Settings{Resolution: res[n]}
			got, err := CheckRule(ctx, r, s)
			if err != nil {
				t.Fatal(err)
			}
			s.everyPair = true
			want, err := CheckRule(ctx, r, s)
			if err != nil {
				t.Fatal(err)
			}
			if g, w := fmt.Sprintf("%+v", *got), fmt.Sprintf("%+v", *want); g != w {
				t.Errorf("n=%d %s: pruned check\n%s\nevery pair\n%s", n, src, g, w)
			}
		}
	}
	payouts := []string{
		"10 - 5*sum((p - hit)^2)",
		"p[y]",
		"ln(p[y])",
		"if(abs(p1 - 0.3) < 0.05, 2, 0) + p[y]",
		"sqrt(p[y])",
		"2*p[y] - sum(p^2)",
		"1 - p[y] + sum(hit*p)",
	}
	for n := 2; n <= 3; n++ {
		for _, src := range payouts {
			p := pay(t, src, n)
			s := Settings{Resolution: res[n]}
			got, err := Audit(ctx, p, nil, s)
			if err != nil {
				t.Fatal(err)
			}
			s.everyPair = true
			want, err := Audit(ctx, p, nil, s)
			if err != nil {
				t.Fatal(err)
			}
			if g, w := fmt.Sprintf("%+v", *got), fmt.Sprintf("%+v", *want); g != w {
				t.Errorf("n=%d %s: pruned audit and every-pair audit differ", n, src)
			}
		}
	}
}
