package research

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mathext"
)

// Quadrature sets how finely a Beta distribution is integrated. The zero
// value means the defaults.
type Quadrature struct {
	// Nodes is the Gauss–Legendre order on each panel (default 10).
	Nodes int
	// Ends is the number of geometric panels at each end of the
	// probability scale (default 40: down to 2^-41 of the mass).
	Ends int
	// Middle is the number of equal panels between the two ends
	// (default 8).
	Middle int
}

func (o Quadrature) withDefaults() Quadrature {
	if o.Nodes <= 0 {
		o.Nodes = 10
	}
	if o.Ends <= 0 {
		o.Ends = 40
	}
	if o.Middle <= 0 {
		o.Middle = 8
	}
	return o
}

// Describe says in words how the Beta expectations are integrated.
func (o Quadrature) Describe() string {
	o = o.withDefaults()
	return fmt.Sprintf("Gauss–Legendre of order %d on panels of the cumulative probability, graded geometrically over %d halvings toward each end of both the probability and its cumulative, with %d equal panels between",
		o.Nodes, o.Ends, o.Middle)
}

// betaNode is one quadrature node of a Beta(a, b) distribution: the value
// x, its complement 1 - x computed without cancellation, and the weight.
type betaNode struct {
	x, xc, w float64
}

// betaRule integrates over a Beta(a, b) distribution in the variable
// u = F(x), its cumulative probability: E[f(x)] = ∫_0^1 f(F⁻¹(u)) du. The
// density's end singularities (a or b below 1) vanish in u, and f∘F⁻¹ is
// bounded for every bounded f, so composite Gauss–Legendre converges for
// every a, b. The panel ends are graded geometrically toward u = 0 and
// u = 1 and, mapped through F, toward x = 0 and x = 1 as well: with a or b
// far below 1, F⁻¹ climbs from near 0 to near 1 inside a sliver of u that
// only the x-grading resolves. Nodes in the upper half come from the
// mirrored distribution, so 1 - x keeps its digits near x = 1. The weights
// sum to 1.
func betaRule(a, b float64, o Quadrature) []betaNode {
	o = o.withDefaults()
	ends := []float64{0, 1}
	for j := 2; j <= o.Ends+1; j++ {
		d := math.Ldexp(1, -j)
		ends = append(ends, d, 1-d,
			mathext.RegIncBeta(a, b, d), 1-mathext.RegIncBeta(b, a, d))
	}
	for i := 1; i < o.Middle; i++ {
		ends = append(ends, float64(i)/float64(o.Middle))
	}
	// The mean too: the best rule for research bends there (package
	// optimum), and a kink inside a panel costs Gauss–Legendre its order.
	ends = append(ends, mathext.RegIncBeta(a, b, 0.5), mathext.RegIncBeta(a, b, a/(a+b)))
	sort.Float64s(ends)
	x := make([]float64, o.Nodes)
	w := make([]float64, o.Nodes)
	var nodes []betaNode
	for i := 0; i+1 < len(ends); i++ {
		lo, hi := ends[i], ends[i+1]
		if !(hi > lo) {
			continue
		}
		quad.Legendre{}.FixedLocations(x, w, lo, hi)
		for k, u := range x {
			if u <= 0.5 {
				v := mathext.InvRegIncBeta(a, b, u)
				nodes = append(nodes, betaNode{x: v, xc: 1 - v, w: w[k]})
			} else {
				// x = 1 - y with y ~ Beta(b, a) at 1 - u.
				v := mathext.InvRegIncBeta(b, a, 1-u)
				nodes = append(nodes, betaNode{x: 1 - v, xc: v, w: w[k]})
			}
		}
	}
	return nodes
}
