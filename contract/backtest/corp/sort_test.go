package corp

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// sortByX orders groups as a comparison sort does, on menus, continuous
// probabilities, zeros of both signs, ones, and sizes on both sides of
// radixFrom.
func TestSortByXIsASort(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 3))
	for _, n := range []int{0, 1, 2, radixFrom - 1, radixFrom, radixFrom + 1, 1000, 20000} {
		for kind := range 3 {
			groups := make([]Group, n)
			for i := range groups {
				var x float64
				switch kind {
				case 0: // a 5 % menu
					x = float64(rng.IntN(21)) / 20
				case 1: // continuous
					x = rng.Float64()
				default: // the ends, with -0
					x = []float64{0, math.Copysign(0, -1), 1, 0.5}[rng.IntN(4)]
				}
				groups[i] = Group{X: x, Count: 1 + rng.IntN(5), Hits: i}
			}
			xs := make([]float64, n)
			for i, g := range groups {
				xs[i] = g.X
			}
			sort.Float64s(xs) // the reference order
			got := sortByX(append([]Group(nil), groups...))
			if len(got) != n {
				t.Fatalf("n %d kind %d: %d groups out", n, kind, len(got))
			}
			seen := map[int]bool{}
			for i, g := range got {
				if g.X != xs[i] {
					t.Fatalf("n %d kind %d: position %d holds %v, want %v", n, kind, i, g.X, xs[i])
				}
				if g != groups[g.Hits] || seen[g.Hits] {
					t.Fatalf("n %d kind %d: group %+v altered or repeated", n, kind, g)
				}
				seen[g.Hits] = true
			}
		}
	}
}
