package verify

import (
	"context"
	"fmt"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/payout"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
	"scorewright/presets"
)

// benchMenu builds the grid and the effort menu of the quadratic rule.
func benchMenu(b *testing.B, n, k int) (*simplex.Grid, *menu) {
	b.Helper()
	g, err := simplex.Full(n, k)
	if err != nil {
		b.Fatal(err)
	}
	f, err := bregman.NewFormula("1 - sum(p^2)", bregman.Options{Outcomes: n})
	if err != nil {
		b.Fatal(err)
	}
	sc := (&bregman.Rule{Gen: f}).NewScorer()
	m := newMenu(n, g.Len())
	for j := 0; j < g.Len(); j++ {
		sc.Efforts(m.rows[j*n:(j+1)*n], g.Point(j))
	}
	m.seal()
	return g, m
}

var benchSizes = []struct{ n, k int }{{3, 200}, {4, 40}}

// largerSizes are grids past n = 4, where every n has its own kernel.
var largerSizes = []struct{ n, k int }{{6, 12}, {8, 7}}

// streamSizes adds the sizes of the performance targets, and larger n,
// to benchSizes.
var streamSizes = append(append([]struct{ n, k int }{{2, 20000}, {3, 400}}, benchSizes...), largerSizes...)

// BenchmarkStream is the pair stream, best and second best tracked for
// every grid belief, on all cores: "full" visits every pair, "pruned" is
// what the checks run (identical results, TestPrunedStreamIsFullStream).
// ns/pair is per pair of the full grid, G², for both, so the two compare
// directly; visited is the share of pairs the pruned stream evaluated;
// cpu-s/op the process's CPU seconds per stream (all cores together).
func BenchmarkStream(b *testing.B) {
	for _, sz := range streamSizes {
		g, m := benchMenu(b, sz.n, sz.k)
		pairs := float64(g.Len()) * float64(g.Len())
		pr := pool.NewMeter(nil, 0)
		for _, kind := range []string{"full", "pruned"} {
			b.Run(fmt.Sprintf("n=%d/K=%d/%s", sz.n, sz.k, kind), func(b *testing.B) {
				if kind == "full" && pairs > 1e10 {
					b.Skip("full stream too long for a benchmark")
				}
				run := stream
				if kind == "full" {
					run = streamFull
				}
				b.ResetTimer()
				cpu := cpuSeconds()
				for range b.N {
					if _, err := run(context.Background(), g, m, 0, pr); err != nil {
						b.Fatal(err)
					}
				}
				b.StopTimer()
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/pairs, "ns/pair")
				b.ReportMetric((cpuSeconds()-cpu)/float64(b.N), "cpu-s/op")
				if kind == "pruned" {
					b.ReportMetric(visitedShare(g, m), "visited")
				}
			})
		}
	}
}

// visitedShare is the share of the G² pairs the pruned stream evaluates.
func visitedShare(g *simplex.Grid, m *menu) float64 {
	var count int64
	if _, err := streamPruned(context.Background(), g, m, 1, pool.NewMeter(nil, 0), &count); err != nil {
		panic(err)
	}
	return float64(count) / float64(g.Len()) / float64(g.Len())
}

// BenchmarkAuditAgainstCheck is the audit of the quadratic payout beside
// the check of the quadratic rule on the same grid (n = 3, K = 200): the
// target is an audit within 1.5 times the check. "audit-presets" also
// fits every preset, as the command does.
func BenchmarkAuditAgainstCheck(b *testing.B) {
	const n, k = 3, 200
	pay, err := payout.New("10 - 5*sum((p - hit)^2)", payout.Options{Outcomes: n})
	if err != nil {
		b.Fatal(err)
	}
	f, err := bregman.NewFormula("1 - sum(p^2)", bregman.Options{Outcomes: n})
	if err != nil {
		b.Fatal(err)
	}
	r := &bregman.Rule{Gen: f}
	var cands []Candidate
	for _, c := range presets.Rules(n, false, nil) {
		cands = append(cands, Candidate(c))
	}
	for _, kind := range []string{"check", "audit", "audit-presets"} {
		b.Run(kind, func(b *testing.B) {
			cpu := cpuSeconds()
			for range b.N {
				var err error
				if kind == "check" {
					_, err = CheckRule(context.Background(), r, Settings{Resolution: k})
				} else {
					var cs []Candidate
					if kind == "audit-presets" {
						cs = cands
					}
					_, err = Audit(context.Background(), pay, cs, Settings{Resolution: k})
				}
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric((cpuSeconds()-cpu)/float64(b.N), "cpu-s/op")
		})
	}
}

// BenchmarkKernel is the full stream's kernel alone, per pair and per
// outcome (CPU ns, which other jobs on the machine disturb less than wall
// time), at every n the engine takes: the target is
// every n within 1.5 times n = 3's cost.
func BenchmarkKernel(b *testing.B) {
	const reports, beliefs = 4096, 64
	for n := 2; n <= 12; n++ {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			rows := make([]float64, reports*n)
			for i := range rows {
				rows[i] = float64(i%17) / 17
			}
			q := make([]float64, beliefs*n)
			for i := range q {
				q[i] = 1 / float64(n)
			}
			b.ResetTimer()
			cpu := cpuSeconds()
			for range b.N {
				for i := 0; i < beliefs; i++ {
					kernelSink = scan(q[i*n:(i+1)*n], rows, n)
				}
			}
			per := (cpuSeconds() - cpu) * 1e9 / float64(b.N) / (reports * beliefs * float64(n))
			b.ReportMetric(per, "cpu-ns/pair-outcome")
		})
	}
}

var kernelSink best
