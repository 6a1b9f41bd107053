// Package simplex enumerates and samples points of the probability simplex
// on a lattice of resolution K (every coordinate a multiple of 1/K), the
// grids on which scorewright's checks look for trouble.
//
// Points are stored flat, n floats per point, so that a check can stream
// over them without chasing pointers.
package simplex

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Grid is a list of points of the simplex over N outcomes, flat: point i
// is Coords[i*N : (i+1)*N].
type Grid struct {
	// N is the number of outcomes, K the resolution.
	N, K int
	// Coords holds the points, N floats each.
	Coords []float64
	// Boundary marks points with some coordinate exactly 0.
	Boundary []bool
	// Sampled is true when the points are a random sample of the lattice
	// rather than all of it.
	Sampled bool
}

// Len is the number of points.
func (g *Grid) Len() int { return len(g.Boundary) }

// Point returns point i (a view into Coords; do not modify).
func (g *Grid) Point(i int) []float64 { return g.Coords[i*g.N : (i+1)*g.N : (i+1)*g.N] }

// Count returns the number of lattice points C(K+n-1, n-1), or -1 when it
// exceeds 2^53 (no grid that large can be enumerated anyway).
func Count(n, k int) int64 {
	if n < 1 || k < 0 {
		return 0
	}
	c := 1.0
	for i := 1; i < n; i++ {
		c = c * float64(k+i) / float64(i)
		if c > 1<<53 {
			return -1
		}
	}
	return int64(math.Round(c))
}

// Resolution is the largest k <= kmax (and at least 1) whose lattice over
// n outcomes has at most limit points: the finest grid a bounded amount
// of work can afford.
func Resolution(n, kmax int, limit float64) int {
	k := kmax
	for k > 1 {
		if c := Count(n, k); c >= 0 && float64(c) <= limit {
			break
		}
		k--
	}
	return k
}

// MaxFull is the most points Full enumerates: 2^26 points keep the
// coordinates of 12 outcomes under 8 GiB, already more than a pair check
// can stream in a working day.
const MaxFull = 1 << 26

// Full returns every lattice point of resolution k over n outcomes, in
// descending lexicographic order of their integer coordinates (the first
// vertex first).
func Full(n, k int) (*Grid, error) {
	if n < 2 {
		return nil, fmt.Errorf("simplex: need at least 2 outcomes, got %d", n)
	}
	if k < 1 {
		return nil, fmt.Errorf("simplex: resolution must be at least 1, got %d", k)
	}
	c := Count(n, k)
	if c < 0 || c > MaxFull {
		return nil, fmt.Errorf("simplex: %d outcomes at resolution %d is too many points to enumerate", n, k)
	}
	g := &Grid{N: n, K: k, Coords: make([]float64, 0, int(c)*n), Boundary: make([]bool, 0, int(c))}
	lattice(n, k, true, g.add)
	return g, nil
}

// Vectors returns every lattice point of resolution k over n outcomes as
// its own slice, in ascending lexicographic order of the integer
// coordinates (for n = 2: the first outcome's probability ascending), the
// order report menus are listed in. Entries are computed as i/k, so 7/10
// is the float64 nearest 0.7. The caller bounds the count (Count).
func Vectors(n, k int) [][]float64 {
	var out [][]float64
	lattice(n, k, false, func(comp []int) {
		p := make([]float64, n)
		for i, c := range comp {
			p[i] = float64(c) / float64(k)
		}
		out = append(out, p)
	})
	return out
}

// lattice calls visit with the integer coordinates of every lattice point
// of resolution k over n outcomes, in lexicographic order, descending or
// ascending; comp is reused between calls.
func lattice(n, k int, descending bool, visit func(comp []int)) {
	comp := make([]int, n)
	var rec func(pos, left int)
	rec = func(pos, left int) {
		if pos == n-1 {
			comp[pos] = left
			visit(comp)
			return
		}
		for i := 0; i <= left; i++ {
			v := i
			if descending {
				v = left - i
			}
			comp[pos] = v
			rec(pos+1, left-v)
		}
	}
	rec(0, k)
}

func (g *Grid) add(comp []int) {
	b := false
	for _, c := range comp {
		g.Coords = append(g.Coords, float64(c)/float64(g.K))
		if c == 0 {
			b = true
		}
	}
	g.Boundary = append(g.Boundary, b)
}

// Sample returns a sample of the lattice of resolution k: the n vertices,
// then count points drawn uniformly from the simplex (a flat Dirichlet)
// and rounded to the lattice, a quarter of them on a random face so that
// the boundary is examined too. Points are distinct; on a lattice too
// small to hold count of them, fewer are returned. The same seed gives the
// same points.
func Sample(n, k, count int, seed uint64) (*Grid, error) {
	if n < 2 {
		return nil, fmt.Errorf("simplex: need at least 2 outcomes, got %d", n)
	}
	if k < 1 || count < 0 {
		return nil, fmt.Errorf("simplex: resolution %d and sample size %d must be positive", k, count)
	}
	rng := rand.New(rand.NewPCG(seed, 0x5c0e))
	g := &Grid{N: n, K: k, Sampled: true, Coords: make([]float64, 0, (n+count)*n), Boundary: make([]bool, 0, n+count)}
	comp := make([]int, n)
	for v := 0; v < n; v++ {
		clear(comp)
		comp[v] = k
		g.add(comp)
	}
	x := make([]float64, n)
	seen := map[string]bool{}
	key := func(c []int) string { return fmt.Sprint(c) }
	for v := 0; v < n; v++ {
		clear(comp)
		comp[v] = k
		seen[key(comp)] = true
	}
	for s, tries := 0, 0; s < count && tries < 20*count; tries++ {
		var sum float64
		face := tries%4 == 3
		for i := range x {
			x[i] = rng.ExpFloat64()
			if face && rng.IntN(2) == 0 {
				x[i] = 0
			}
			sum += x[i]
		}
		if sum == 0 {
			x[rng.IntN(n)], sum = 1, 1
		}
		Round(comp, x, sum, k)
		if seen[key(comp)] {
			continue // a repeated point would look like a tie
		}
		seen[key(comp)] = true
		g.add(comp)
		s++
	}
	return g, nil
}

// Round writes into comp the lattice point of resolution k nearest to
// x/sum by largest remainders: integer parts first, then the leftover
// units to the coordinates with the largest fractional parts.
func Round(comp []int, x []float64, sum float64, k int) {
	left := k
	for i, v := range x {
		comp[i] = int(math.Floor(v / sum * float64(k)))
		left -= comp[i]
	}
	for ; left > 0; left-- {
		best, bf := 0, -1.0
		for i, v := range x {
			f := v/sum*float64(k) - float64(comp[i])
			if f > bf {
				best, bf = i, f
			}
		}
		comp[best]++
	}
}

// FromSquares maps unconstrained parameters theta to the simplex by
// p_k = theta_k^2 / sum theta^2. Every point of the simplex, boundary
// included, is reached, which lets a local optimiser walk onto a face.
// A zero theta maps to the centre.
func FromSquares(p, theta []float64) {
	var s float64
	for _, t := range theta {
		s += t * t
	}
	if s == 0 || math.IsInf(s, 0) || s != s {
		for i := range p {
			p[i] = 1 / float64(len(p))
		}
		return
	}
	for i, t := range theta {
		p[i] = t * t / s
	}
}

// ToSquares is the inverse of FromSquares on the simplex: theta = sqrt(p).
func ToSquares(theta, p []float64) {
	for i, v := range p {
		theta[i] = math.Sqrt(math.Max(v, 0))
	}
}
