package verify

import (
	"context"
	"math"
	"strings"
	"testing"

	"scorewright/internal/pool"
	"scorewright/internal/simplex"
)

// TestProvedStreamPairs: under a proof the stream gives every boundary
// belief exactly the full stream's result, and every interior belief the
// best two of the boundary reports and its honest report, by brute force.
func TestProvedStreamPairs(t *testing.T) {
	for _, src := range []string{"1 - sum(p^2)", "-sum(p*ln(p))", "sum(p^2)", "0"} {
		for n := 2; n <= 4; n++ {
			g, err := simplex.Full(n, map[int]int{2: 60, 3: 14, 4: 7}[n])
			if err != nil {
				t.Fatal(err)
			}
			m := menuOf(t, src, g)
			got, pairs, err := provedStream(context.Background(), g, m, 2, pool.NewMeter(nil, 0))
			if err != nil {
				t.Fatal(err)
			}
			full, err := streamFull(context.Background(), g, m, 2, pool.NewMeter(nil, 0))
			if err != nil {
				t.Fatal(err)
			}
			nb := 0
			for i := range got {
				if g.Boundary[i] {
					nb++
					if !sameBest(got[i], full[i]) {
						t.Fatalf("%s n=%d boundary belief %v: %+v, full stream %+v", src, n, g.Point(i), got[i], full[i])
					}
					continue
				}
				want := best{math.Inf(1), math.Inf(1), -1, -1}
				for j := range got {
					if !g.Boundary[j] && j != i {
						continue
					}
					var phi float64
					for k, x := range g.Point(i) {
						phi += x * m.rows[j*n+k]
					}
					switch {
					case phi < want.m1:
						want = best{phi, want.m1, int32(j), want.arg}
					case phi < want.m2:
						want.m2, want.arg2 = phi, int32(j)
					}
				}
				if !sameBest(got[i], want) {
					t.Fatalf("%s n=%d interior belief %v: %+v, brute force %+v", src, n, g.Point(i), got[i], want)
				}
			}
			G := int64(g.Len())
			if wantPairs := int64(nb)*G + (G-int64(nb))*int64(nb+1); pairs != wantPairs {
				t.Errorf("%s n=%d: %d pairs, want %d", src, n, pairs, wantPairs)
			}
		}
	}
}

// TestCheckRestsOnProof: a proof of strict properness gives the verdict
// the full check gives for strictly proper rules, now of kind certified
// and with fewer pairs; a proof handed in for a rule whose H is convex
// does not hide it, because concavity and the boundary pairs still run.
func TestCheckRestsOnProof(t *testing.T) {
	proof := &Proof{Verdict: StrictlyProper, Statement: "a test's proof"}
	for _, src := range []string{"1 - sum(p^2)", "-sum(p*ln(p))", "-sqrt(sum(p^2))"} {
		r := rule(t, src, 3)
		full, err := CheckRule(context.Background(), r, Settings{Resolution: 30})
		if err != nil {
			t.Fatal(err)
		}
		rep, err := CheckRule(context.Background(), r, Settings{Resolution: 30, Proof: proof})
		if err != nil {
			t.Fatal(err)
		}
		if full.Verdict != StrictlyProper || rep.Verdict != StrictlyProper || rep.Proof != proof || full.Proof != nil {
			t.Errorf("%s: full %s, with proof %s (proof %v)", src, full.Verdict, rep.Verdict, rep.Proof)
		}
		if rep.Grid.Pairs >= full.Grid.Pairs || full.Grid.Pairs != int64(full.Grid.Points)*int64(full.Grid.Points) {
			t.Errorf("%s: %d pairs with the proof, %d without", src, rep.Grid.Pairs, full.Grid.Pairs)
		}
		if c := rep.Check(NameProperness); !strings.Contains(c.Note, "a test's proof") {
			t.Errorf("%s: properness note %q", src, c.Note)
		}
	}
	rep, err := CheckRule(context.Background(), rule(t, "sum(p^2)", 3), Settings{Resolution: 30, Proof: proof})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != Improper || rep.Proof != nil || !strings.Contains(strings.Join(rep.Notes, " "), "contradicts the proof") {
		t.Errorf("convex H under a false proof: %s, proof %v, notes %q", rep.Verdict, rep.Proof, rep.Notes)
	}
}
