package verify

import (
	"context"
	"fmt"
	"math"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/internal/pool"
	"scorewright/internal/simplex"
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

// streamSizes adds the sizes of the performance targets to benchSizes.
var streamSizes = append([]struct{ n, k int }{{2, 20000}, {3, 400}}, benchSizes...)

// BenchmarkStream is the pair stream, best and second best tracked for
// every grid belief, on all cores: "full" visits every pair, "pruned" is
// what the checks run (identical results, TestPrunedStreamIsFullStream).
// ns/pair is per pair of the full grid, G², for both, so the two compare
// directly; visited is the share of pairs the pruned stream evaluated.
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
				for range b.N {
					if _, err := run(context.Background(), g, m, 0, pr); err != nil {
						b.Fatal(err)
					}
				}
				b.StopTimer()
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/pairs, "ns/pair")
				if kind == "pruned" {
					b.ReportMetric(visitedShare(g, m), "visited")
				}
			})
		}
	}
}

// visitedShare is the share of the G² pairs the pruned stream evaluates.
func visitedShare(g *simplex.Grid, m *menu) float64 {
	t := newReportTree(g, m)
	var v float64
	for i := 0; i < g.Len(); i++ {
		_, c := t.walk(g.Point(i), m.infinite && g.Boundary[i])
		v += float64(c)
	}
	return v / float64(g.Len()) / float64(g.Len())
}

// fusedLoop is the plain reference: the same multiply-adds and a running
// minimum, one core, nothing else (verify/testdata/fused.c is the same
// loop in C).
func fusedLoop(q, rows []float64, n, G int) float64 {
	var total float64
	for i := 0; i < G; i++ {
		qi := q[i*n : (i+1)*n]
		best := math.Inf(1)
		for j := 0; j < G; j++ {
			r := rows[j*n : (j+1)*n]
			var s float64
			for k := range qi {
				s += qi[k] * r[k]
			}
			if s < best {
				best = s
			}
		}
		total += best
	}
	return total
}

var sink float64

func BenchmarkFusedLoop(b *testing.B) {
	for _, sz := range benchSizes {
		b.Run(fmt.Sprintf("n=%d/K=%d", sz.n, sz.k), func(b *testing.B) {
			g, m := benchMenu(b, sz.n, sz.k)
			pairs := float64(g.Len()) * float64(g.Len())
			b.ResetTimer()
			for range b.N {
				sink += fusedLoop(g.Coords, m.rows, sz.n, g.Len())
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/pairs, "ns/pair")
		})
	}
}

// BenchmarkCheckRule is the whole check as the command runs it.
func BenchmarkCheckRule(b *testing.B) {
	for _, sz := range benchSizes {
		b.Run(fmt.Sprintf("n=%d/K=%d", sz.n, sz.k), func(b *testing.B) {
			f, err := bregman.NewFormula("-sum(p*ln(p))", bregman.Options{Outcomes: sz.n})
			if err != nil {
				b.Fatal(err)
			}
			r := &bregman.Rule{Gen: f}
			pairs := float64(simplex.Count(sz.n, sz.k))
			pairs *= pairs
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				if _, err := CheckRule(context.Background(), r, Settings{Resolution: sz.k}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/pairs, "ns/pair")
		})
	}
}
