package optimum

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// mesh is a simplicial mesh of the probability simplex for n = 2
// (segments) or n = 3 (triangles): the grid G is piecewise linear on.
type mesh struct {
	n      int
	points [][]float64
	cells  [][]int
	// vertex[k] is the point index of the vertex e_k.
	vertex []int
	// locate returns the cell holding q (and -1 when none does, which
	// cannot happen for a point of the simplex).
	locate func(q []float64) int
}

// binaryMesh is the grid 0, 1/K, ..., 1 in the event probability with the
// prior's event probability added as a node, so that G can bend there.
func binaryMesh(K int, prior float64) *mesh {
	xs := make([]float64, 0, K+2)
	for i := 0; i <= K; i++ {
		xs = append(xs, float64(i)/float64(K))
	}
	if !onGrid(prior, K) {
		xs = append(xs, prior)
		sort.Float64s(xs)
	}
	m := &mesh{n: 2}
	for _, x := range xs {
		m.points = append(m.points, []float64{x, 1 - x})
	}
	for i := 0; i+1 < len(xs); i++ {
		m.cells = append(m.cells, []int{i, i + 1})
	}
	// e_1 is event probability 1 (the last point), e_2 is 0.
	m.vertex = []int{len(xs) - 1, 0}
	m.locate = func(q []float64) int {
		i := sort.SearchFloat64s(xs, q[0]) - 1
		return min(max(i, 0), len(m.cells)-1)
	}
	return m
}

// onGrid says whether x is (within rounding) a multiple of 1/K.
func onGrid(x float64, K int) bool {
	r := x * float64(K)
	return math.Abs(r-math.Round(r)) < 1e-9
}

// ternaryMesh is the uniform triangulation of the triangle into K² cells
// (grid points (i, j, K-i-j)/K), with the prior added as a node: the cell
// holding it is split in three, or the two cells beside the edge holding
// it in two each.
func ternaryMesh(K int, prior []float64) (*mesh, error) {
	m := &mesh{n: 3}
	index := map[[2]int]int{}
	for i := 0; i <= K; i++ {
		for j := 0; i+j <= K; j++ {
			index[[2]int{i, j}] = len(m.points)
			m.points = append(m.points, []float64{float64(i) / float64(K), float64(j) / float64(K), float64(K-i-j) / float64(K)})
		}
	}
	m.vertex = []int{index[[2]int{K, 0}], index[[2]int{0, K}], index[[2]int{0, 0}]}
	// Uniform cells: "up" (i,j),(i+1,j),(i,j+1) and "down"
	// (i+1,j),(i,j+1),(i+1,j+1). cellOf finds the uniform cell of q.
	up := map[[2]int]int{}
	down := map[[2]int]int{}
	for i := 0; i < K; i++ {
		for j := 0; i+j < K; j++ {
			up[[2]int{i, j}] = len(m.cells)
			m.cells = append(m.cells, []int{index[[2]int{i, j}], index[[2]int{i + 1, j}], index[[2]int{i, j + 1}]})
			if i+j+1 < K {
				down[[2]int{i, j}] = len(m.cells)
				m.cells = append(m.cells, []int{index[[2]int{i + 1, j}], index[[2]int{i, j + 1}], index[[2]int{i + 1, j + 1}]})
			}
		}
	}
	cellOf := func(q []float64) int {
		a, b := q[0]*float64(K), q[1]*float64(K)
		i, j := int(math.Floor(a)), int(math.Floor(b))
		i, j = min(max(i, 0), K-1), min(max(j, 0), K-1)
		for i+j > K-1 {
			if i > j {
				i--
			} else {
				j--
			}
		}
		if a-float64(i)+b-float64(j) > 1 {
			if c, ok := down[[2]int{i, j}]; ok {
				return c
			}
		}
		return up[[2]int{i, j}]
	}
	// children[c] are the cells a split uniform cell c became.
	children := map[int][]int{}
	if err := m.insert(prior, cellOf(prior), children); err != nil {
		return nil, err
	}
	m.locate = func(q []float64) int {
		c := cellOf(q)
		kids, ok := children[c]
		if !ok {
			return c
		}
		best, bv := kids[0], math.Inf(-1)
		for _, k := range kids {
			lam, err := m.barycentric(k, q)
			if err != nil {
				continue
			}
			if v := minOf(lam); v > bv {
				best, bv = k, v
			}
		}
		return best
	}
	return m, nil
}

// insert adds point v inside cell c (found in the uniform grid) as a node,
// splitting the cells around it; cells of the uniform grid that are split
// map to their pieces in children. A point at a node changes nothing.
func (m *mesh) insert(v []float64, c int, children map[int][]int) error {
	lam, err := m.barycentric(c, v)
	if err != nil {
		return err
	}
	const tol = 1e-12
	zero := -1
	for i, l := range lam {
		if l > 1-tol {
			return nil // a grid node already
		}
		if l < tol {
			zero = i
		}
	}
	p := len(m.points)
	m.points = append(m.points, append([]float64(nil), v...))
	split := func(c int, skip int) {
		old := m.cells[c]
		var kids []int
		for i := range old {
			if i == skip {
				continue
			}
			cell := append([]int(nil), old...)
			cell[i] = p
			if len(kids) == 0 {
				m.cells[c] = cell
				kids = append(kids, c)
			} else {
				kids = append(kids, len(m.cells))
				m.cells = append(m.cells, cell)
			}
		}
		children[c] = kids
	}
	if zero < 0 {
		split(c, -1)
		return nil
	}
	// On the edge opposite vertex zero: split this cell and the one
	// across the edge (if any), each in two.
	a, b := m.cells[c][(zero+1)%3], m.cells[c][(zero+2)%3]
	split(c, zero)
	for d := range m.cells {
		if d == c || children[d] != nil {
			continue
		}
		if i := opposite(m.cells[d], a, b); i >= 0 {
			split(d, i)
			break
		}
	}
	return nil
}

// opposite returns the position in cell of the vertex that is neither a
// nor b, when the cell holds both; else -1.
func opposite(cell []int, a, b int) int {
	has, other := 0, -1
	for i, v := range cell {
		if v == a || v == b {
			has++
		} else {
			other = i
		}
	}
	if has == 2 {
		return other
	}
	return -1
}

// barycentric returns the coordinates λ of q in cell c: q = Σ λ_i v_i with
// Σ λ_i = 1 (the vertices and q lie on the simplex, so the n×n system of
// their coordinates is enough).
func (m *mesh) barycentric(ci int, q []float64) ([]float64, error) {
	cell := m.cells[ci]
	if m.n == 2 {
		x0, x1 := m.points[cell[0]][0], m.points[cell[1]][0]
		t := (q[0] - x0) / (x1 - x0)
		return []float64{1 - t, t}, nil
	}
	// n = 3: λ1, λ2 from the first two coordinates of q - v0 =
	// λ1 (v1 - v0) + λ2 (v2 - v0), by Cramer's rule.
	v0, v1, v2 := m.points[cell[0]], m.points[cell[1]], m.points[cell[2]]
	a, b := v1[0]-v0[0], v2[0]-v0[0]
	c, d := v1[1]-v0[1], v2[1]-v0[1]
	det := a*d - b*c
	if det == 0 {
		return nil, fmt.Errorf("optimum: a cell of the grid is degenerate")
	}
	x, y := q[0]-v0[0], q[1]-v0[1]
	l1 := (x*d - b*y) / det
	l2 := (a*y - x*c) / det
	return []float64{1 - l1 - l2, l1, l2}, nil
}

// facet is an interior facet: cells a and b share all vertices but one;
// far is b's vertex not in a.
type facet struct{ a, b, far int }

// facets lists the interior facets of the mesh.
func (m *mesh) facets() []facet {
	seen := map[string]int{}
	var out []facet
	for c, cell := range m.cells {
		for skip := range cell {
			key := facetKey(cell, skip)
			if d, ok := seen[key]; ok {
				far := -1
				for _, v := range cell {
					if !contains(m.cells[d], v) {
						far = v
					}
				}
				out = append(out, facet{a: d, b: c, far: far})
				continue
			}
			seen[key] = c
		}
	}
	return out
}

func facetKey(cell []int, skip int) string {
	var vs []int
	for i, v := range cell {
		if i != skip {
			vs = append(vs, v)
		}
	}
	sort.Ints(vs)
	return fmt.Sprint(vs)
}

func contains(s []int, v int) bool {
	for _, x := range s {
		if x == v {
			return true
		}
	}
	return false
}

func minOf(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}

var errNoCell = errors.New("optimum: a posterior lies in no cell of the grid")
