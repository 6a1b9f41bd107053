package optimum

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"

	"scorewright/contract/research"
)

// Settings choose the grid. The zero value means the defaults.
type Settings struct {
	// Grid is K, the mesh step 1/K (default 100 for n = 2, 8 for n = 3).
	Grid int
}

// DefaultGrid is the grid used when Settings.Grid is 0.
func DefaultGrid(n int) int {
	if n == 2 {
		return 100
	}
	return 8
}

// MaxGrid is the largest K accepted for n outcomes: for n = 3 the dense
// simplex method takes tens of seconds beyond it (see BENCHMARKS.md); for
// n = 2 the slope form keeps four rows at any grid.
func MaxGrid(n int) int {
	if n == 2 {
		return 2000
	}
	return 16
}

// Result is the best bounded rule for research on the grid.
type Result struct {
	// Floor and Cap are the budget; Prior the base rate.
	Floor, Cap float64
	Prior      []float64
	// Gain is E[G(q)] - G(q0) of the rule in currency, measured on its
	// pieces; LPValue is the program's value (equal within the
	// relaxation, about 1e-8 of cap - floor).
	Gain, LPValue float64
	// Pieces are the distinct affine pieces of G: Pieces[i][k] is what the
	// rule pays when outcome k happens for a report in piece i.
	Pieces [][]float64
	// Grid is K; Nodes, Cells and Rows the mesh and program sizes.
	Grid, Nodes, Cells, Rows int
	// Points and Values are the mesh nodes and G there (for drawing).
	Points [][]float64
	Values []float64
	// Centroids holds one report inside each cell: a menu that contains
	// them sees every piece's payments, so a budget fit on it keeps the
	// rule's payments within the budget at every report.
	Centroids [][]float64
	// Model describes the research model the rule was optimised for.
	Model string
}

// ErrNoInformation says every posterior of the model is the base rate,
// so no rule pays anything for research and there is no optimum to name.
var ErrNoInformation = errors.New("optimum: under this research model every posterior is the base rate, so research is worth nothing under any rule")

// Solve finds the convex piecewise-linear G on the grid with payments in
// [floor, cap] that maximises the expected gain from research under post,
// for n = 2 or 3. gonum's simplex method cannot be interrupted: when ctx
// ends first Solve returns ctx.Err() at once and the abandoned solve runs
// to its end in the background.
func Solve(ctx context.Context, post *research.Posterior, floor, cap float64, s Settings) (*Result, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	n := post.Outcomes()
	if n != 2 && n != 3 {
		return nil, fmt.Errorf("optimum: the best bounded rule is found for 2 or 3 outcomes, not %d", n)
	}
	if !(cap > floor) || math.IsInf(cap-floor, 0) {
		return nil, fmt.Errorf("optimum: the cap %g must be a finite amount above the floor %g", cap, floor)
	}
	K := s.Grid
	if K == 0 {
		K = DefaultGrid(n)
	}
	if K < 2 || K > MaxGrid(n) {
		return nil, fmt.Errorf("optimum: grid %d is outside 2..%d for %d outcomes", K, MaxGrid(n), n)
	}
	var m *mesh
	if n == 2 {
		m = binaryMesh(K, post.Prior[0])
	} else {
		var err error
		if m, err = ternaryMesh(K, post.Prior); err != nil {
			return nil, err
		}
	}
	obj, err := objective(m, post)
	if err != nil {
		return nil, err
	}
	informative := false
	for _, c := range obj {
		if math.Abs(c) > 1e-12 {
			informative = true
		}
	}
	if !informative {
		return nil, ErrNoInformation
	}
	rows, rhs, relax := constraints(m, K)
	type answer struct {
		y   []float64
		err error
	}
	done := make(chan answer, 1)
	go func() {
		var y []float64
		var err error
		if n == 2 {
			y, err = solveBinary(m, obj, rows, rhs, relax)
		} else {
			y, err = solveLP(obj, rows, rhs, relax)
		}
		done <- answer{y, err}
	}()
	var a answer
	select {
	case <-ctx.Done():
		return nil, ctx.Err()
	case a = <-done:
	}
	if a.err != nil {
		return nil, a.err
	}
	used := len(rows)
	if n == 2 {
		used -= len(m.points) - 2 // the convexity rows are the slope form's δ >= 0
	}
	return result(m, post, a.y, obj, floor, cap, K, used)
}

// objective is, per node v, E[hat_v(q)] - hat_v(q0): the gain is
// R·Σ_v obj_v y_v with G = floor + R·y (the floor cancels: both hat sums
// are 1).
func objective(m *mesh, post *research.Posterior) ([]float64, error) {
	obj := make([]float64, len(m.points))
	add := func(q []float64, w float64) error {
		c := m.locate(q)
		lam, err := m.barycentric(c, q)
		if err != nil {
			return err
		}
		if minOf(lam) < -1e-9 {
			return errNoCell
		}
		for i, v := range m.cells[c] {
			obj[v] += w * lam[i]
		}
		return nil
	}
	for i, q := range post.Beliefs {
		if err := add(q, post.Weights[i]); err != nil {
			return nil, err
		}
	}
	if err := add(post.Prior, -1); err != nil {
		return nil, err
	}
	return obj, nil
}

// constraints returns the rows r·y <= rhs of the program in y = (G -
// floor)/(cap - floor): convexity across each interior facet, the cap at
// each vertex e_k, and the floor on the cells touching each face.
func constraints(m *mesh, K int) (rows [][]float64, rhs, relax []float64) {
	np := len(m.points)
	k2 := float64(K) * float64(K)
	for _, f := range m.facets() {
		lam, err := m.barycentric(f.a, m.points[f.far])
		if err != nil {
			continue
		}
		r := make([]float64, np)
		for i, v := range m.cells[f.a] {
			r[v] += lam[i]
		}
		r[f.far]--
		rows, rhs, relax = append(rows, r), append(rhs, 0), append(relax, perturb/k2)
	}
	for _, v := range m.vertex {
		r := make([]float64, np)
		r[v] = 1
		rows, rhs, relax = append(rows, r), append(rhs, 1), append(relax, perturb)
	}
	for k := range m.vertex {
		for c, cell := range m.cells {
			touches := false
			for _, v := range cell {
				if m.points[v][k] == 0 {
					touches = true
				}
			}
			if !touches {
				continue
			}
			mu, err := m.barycentric(c, unit(m.n, k))
			if err != nil {
				continue
			}
			r := make([]float64, np)
			for i, v := range cell {
				r[v] -= mu[i]
			}
			rows, rhs, relax = append(rows, r), append(rhs, 0), append(relax, perturb/float64(K))
		}
	}
	return rows, rhs, relax
}

// solveLP maximises obj·y subject to rows·y <= rhs, y >= 0, with rhs >= 0,
// in gonum's standard form min c·x, A x = b, x >= 0 with one slack per
// row, starting from the all-slack basis.
func solveLP(obj []float64, rows [][]float64, rhs, relax []float64) ([]float64, error) {
	nv, nr := len(obj), len(rows)
	A := mat.NewDense(nr, nv+nr, nil)
	for i, r := range rows {
		for j, v := range r {
			if v != 0 {
				A.Set(i, j, v)
			}
		}
		A.Set(i, nv+i, 1)
	}
	c := make([]float64, nv+nr)
	for j, v := range obj {
		c[j] = -v
	}
	basic := make([]int, nr)
	for i := range basic {
		basic[i] = nv + i
	}
	// Most right-hand sides are 0, so nearly every pivot would be
	// degenerate, and gonum's simplex then takes its anti-cycling path
	// (a condition number per candidate) or stalls on a singular basis.
	// Relaxing each row by a distinct tiny amount (at most perturb, a
	// fixed pattern, no randomness) makes the pivots strict; the
	// solution is then off by at most perturb·(cap - floor) in G, and
	// result rebuilds an exactly convex rule from it and measures its
	// gain directly.
	b := make([]float64, nr)
	for i, v := range rhs {
		b[i] = v + relax[i]*(1+float64((i*7919)%nr)/float64(nr))/2
	}
	_, x, err := lp.Simplex(c, A, b, 1e-12, basic)
	if err != nil {
		return nil, fmt.Errorf("optimum: the linear program did not solve: %v", err)
	}
	return x[:nv], nil
}

// solveBinary solves the n = 2 program in slope form: G at the nodes is
// y = T·x with x = (y_0, s+, s-, δ_1, ..., δ_{J-1}) >= 0, the value at 0,
// the first cell's slope s+ - s- and the slope's increase δ_i at each
// interior node, so G is convex by construction (δ >= 0) and only the
// cap and floor rows remain: four rows instead of one per node, which
// the dense simplex method solves in milliseconds at any grid.
func solveBinary(m *mesh, obj []float64, rows [][]float64, rhs, relax []float64) ([]float64, error) {
	J := len(m.points) - 1
	nv := J + 2
	T := make([][]float64, J+1)
	for i := range T {
		xi := m.points[i][0]
		t := make([]float64, nv)
		t[0], t[1], t[2] = 1, xi, -xi
		for l := 1; l < J; l++ {
			t[2+l] = math.Max(0, xi-m.points[l][0])
		}
		T[i] = t
	}
	mul := func(r []float64) []float64 {
		out := make([]float64, nv)
		for i, c := range r {
			if c == 0 {
				continue
			}
			for j, t := range T[i] {
				out[j] += c * t
			}
		}
		return out
	}
	// The convexity rows come first (one per interior node); the rest
	// are the cap and floor rows.
	skip := J - 1
	var brows [][]float64
	for _, r := range rows[skip:] {
		brows = append(brows, mul(r))
	}
	x, err := solveLP(mul(obj), brows, rhs[skip:], relax[skip:])
	if err != nil {
		return nil, err
	}
	y := make([]float64, J+1)
	for i, t := range T {
		for j, v := range t {
			y[i] += v * x[j]
		}
	}
	return y, nil
}

// perturb sets the relaxation of the rows, in units of cap - floor: a
// convexity row by perturb/K² (so that slopes, which the row bounds in
// steps of 1/K, drift by at most perturb over the K cells of a line), a
// floor row by perturb/K (its coefficients are up to K), a cap row by
// perturb.
const perturb = 1e-8

func unit(n, k int) []float64 {
	e := make([]float64, n)
	e[k] = 1
	return e
}

// result turns the program's solution into the rule: one affine piece
// per cell (its payments g_k, the cell's plane at e_k), pieces equal
// within merge tolerance merged, payments moved into the budget where the
// relaxation put them a hair outside. The rule is the maximum of the
// pieces — convex, so proper, whatever the rounding — and its gain is
// measured on it directly rather than taken from the program.
func result(m *mesh, post *research.Posterior, y, obj []float64, floor, cap float64, K, rows int) (*Result, error) {
	R := cap - floor
	r := &Result{Floor: floor, Cap: cap, Prior: append([]float64(nil), post.Prior...), Grid: K,
		Nodes: len(m.points), Cells: len(m.cells), Rows: rows, Points: m.points, Model: post.Describe}
	var lpv float64
	for v, yv := range y {
		lpv += obj[v] * yv
		r.Values = append(r.Values, floor+R*yv)
	}
	r.LPValue = R * lpv
	// The relaxation lets a payment drift by about perturb·R; more is a
	// defect.
	tol := 1e3 * perturb * R
	for c, cell := range m.cells {
		ctr := make([]float64, m.n)
		for _, v := range cell {
			for k := range ctr {
				ctr[k] += m.points[v][k] / float64(len(cell))
			}
		}
		r.Centroids = append(r.Centroids, ctr)
		g := make([]float64, m.n)
		for k := range g {
			mu, err := m.barycentric(c, unit(m.n, k))
			if err != nil {
				return nil, err
			}
			for i, v := range cell {
				g[k] += mu[i] * r.Values[v]
			}
			if g[k] < floor-tol || g[k] > cap+tol {
				return nil, fmt.Errorf("optimum: the solution pays %g for outcome %d on cell %d, outside [%g, %g]", g[k], k+1, c, floor, cap)
			}
			g[k] = math.Min(cap, math.Max(floor, tidy(g[k], R)))
			// A payment the relaxation left a hair from the floor or the
			// cap is at it: the exact optimum pays the bounds there.
			if g[k]-floor < tol {
				g[k] = floor
			} else if cap-g[k] < tol {
				g[k] = cap
			}
		}
		r.addPiece(g, tol)
	}
	r.Gain = post.Expect(r.Pay) - r.Pay(post.Prior)
	return r, nil
}

// tidy rounds a payment to 9 significant digits of the budget's range R:
// the relaxation leaves noise near 1e-9·R in the last digits, and a
// formula reads better without it. Any payments in the budget make a
// valid rule, so this changes the gain by about 1e-9·R at most.
func tidy(v, R float64) float64 {
	q := math.Pow(10, math.Floor(math.Log10(R))-8)
	return math.Round(v/q) * q
}

// Pay is G(q) = max over pieces of Σ_k g_k q_k: what a truthful forecaster
// with belief q expects under the rule.
func (r *Result) Pay(q []float64) float64 {
	best := math.Inf(-1)
	for _, g := range r.Pieces {
		var s float64
		for k, v := range g {
			s += v * q[k]
		}
		best = math.Max(best, s)
	}
	return best
}

func (r *Result) addPiece(g []float64, tol float64) {
	for _, p := range r.Pieces {
		same := true
		for k := range p {
			if math.Abs(p[k]-g[k]) > tol {
				same = false
			}
		}
		if same {
			return
		}
	}
	r.Pieces = append(r.Pieces, g)
}

// Formula is the optimum as a generator in the formula language, effort
// orientation: H = -max over pieces of Σ_k g_k p_k, so that the rule pays
// A - B·L with L(p, k) = -g_k and, fitted to the same budget, B = 1.
func (r *Result) Formula() string {
	return "-" + r.maxExpr()
}

// Mix is the optimum blended with the quadratic rule fitted to the same
// budget (pay cap - (R/2)·Σ_i (p_i - [i = k])², R = cap - floor): G_mix =
// (1 - share)·G + share·G_quadratic. Payments are the same blend, so they
// stay in the budget, and for share > 0 the rule is strictly proper.
func (r *Result) Mix(share float64) string {
	R := r.Cap - r.Floor
	return fmt.Sprintf("-%s*%s - %s*(%s - %s*(1 - sum(p^2)))", num(1-share), r.maxExpr(), num(share), num(r.Cap), num(R/2))
}

func (r *Result) maxExpr() string {
	var parts []string
	for _, g := range r.Pieces {
		parts = append(parts, affine(g))
	}
	if len(parts) == 1 {
		return "(" + parts[0] + ")"
	}
	return "max(" + strings.Join(parts, ", ") + ")"
}

// affine writes Σ_k g_k p_k.
func affine(g []float64) string {
	var b strings.Builder
	for k, v := range g {
		if v == 0 {
			continue // 0·p_k adds nothing
		}
		switch {
		case b.Len() == 0:
			b.WriteString(num(v))
		case v < 0:
			b.WriteString(" - " + num(-v))
		default:
			b.WriteString(" + " + num(v))
		}
		fmt.Fprintf(&b, "*p%d", k+1)
	}
	if b.Len() == 0 {
		return "0"
	}
	return b.String()
}

// num writes v in the shortest form that reads back to the same float.
func num(v float64) string {
	return strconv.FormatFloat(v, 'g', -1, 64)
}
