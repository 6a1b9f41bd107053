package emphasis

import (
	"fmt"
	"math"
	"strings"
)

// Span is a stretch [Lo, Hi] of grid points with the same trouble.
type Span struct{ Lo, Hi float64 }

// String writes the span as a range of c.
func (s Span) String() string {
	if s.Lo == s.Hi {
		return fmt.Sprintf("c = %.6g", s.Lo)
	}
	return fmt.Sprintf("c in [%.6g, %.6g]", s.Lo, s.Hi)
}

// Diagnostics is what New found out about a weight. The grid check is
// evidence, not proof: a weight negative only between grid points passes.
type Diagnostics struct {
	// Grid is the number of points of (0, 1) at which w was evaluated:
	// Grid midpoints (i + 1/2)/Grid plus the panel knots near both ends.
	Grid int
	// Negative lists the stretches of grid points where w < 0; the rule
	// is then not proper.
	Negative []Span
	// MinWeight is the smallest weight seen on the grid, at MinAt.
	MinWeight, MinAt float64
	// NonFinite lists stretches where w is NaN or infinite inside (0, 1).
	NonFinite []Span
	// YesAtZero is the fit of (1-c) w(c) as c -> 0. When it diverges the
	// effort L(p, yes) grows without limit as the report p -> 0.
	YesAtZero EndFit
	// NoAtOne is the fit of c w(c) as c -> 1. When it diverges L(p, no)
	// grows without limit as p -> 1.
	NoAtOne EndFit
}

// UnboundedAtZero reports whether L(p, yes) is unbounded as p -> 0.
func (d Diagnostics) UnboundedAtZero() bool { return d.YesAtZero.Diverges() }

// UnboundedAtOne reports whether L(p, no) is unbounded as p -> 1.
func (d Diagnostics) UnboundedAtOne() bool { return d.NoAtOne.Diverges() }

// Problem returns an error naming where the weight is negative or not
// finite, or nil when the grid found neither.
func (d Diagnostics) Problem() error {
	var parts []string
	if len(d.Negative) > 0 {
		parts = append(parts, fmt.Sprintf("negative at %s (smallest %.4g at c = %.6g), which makes the rule improper", spans(d.Negative), d.MinWeight, d.MinAt))
	}
	if len(d.NonFinite) > 0 {
		parts = append(parts, fmt.Sprintf("not finite at %s", spans(d.NonFinite)))
	}
	if parts == nil {
		return nil
	}
	return fmt.Errorf("emphasis weight is %s (checked at %d points of (0, 1))", strings.Join(parts, "; "), d.Grid)
}

// Warnings are the remarks a user should read before paying with the rule:
// at which end it is unbounded.
func (d Diagnostics) Warnings() []string {
	var w []string
	if d.UnboundedAtZero() {
		w = append(w, fmt.Sprintf("unbounded near 0: (1-c)·w(c) ~ c^%.3g is not integrable at c = 0, so the effort of a report p when the event happens grows without limit as p -> 0; use a report floor", d.YesAtZero.Beta))
	}
	if d.UnboundedAtOne() {
		w = append(w, fmt.Sprintf("unbounded near 1: c·w(c) ~ (1-c)^%.3g is not integrable at c = 1, so the effort of a report p when the event does not happen grows without limit as p -> 1; use a report floor", d.NoAtOne.Beta))
	}
	return w
}

func spans(s []Span) string {
	const most = 4
	var b []string
	for i, x := range s {
		if i == most {
			b = append(b, fmt.Sprintf("and %d more stretches", len(s)-most))
			break
		}
		b = append(b, x.String())
	}
	return strings.Join(b, ", ")
}

// diagnose evaluates w on the grid and collects negative and non-finite
// stretches.
func diagnose(e *Evaluator, grid int) Diagnostics {
	if grid <= 0 {
		grid = 2000
	}
	var pts []float64
	for _, k := range e.g.knots {
		if k < 1.0/midPanels {
			pts = append(pts, k)
		}
	}
	for i := 0; i < grid; i++ {
		pts = append(pts, (float64(i)+0.5)/float64(grid))
	}
	for _, k := range e.g.knots {
		if k > 1-1.0/midPanels {
			pts = append(pts, k)
		}
	}
	d := Diagnostics{Grid: len(pts), MinWeight: math.Inf(1)}
	var neg, bad *Span
	for _, c := range pts {
		w := e.Weight(c)
		if w < d.MinWeight {
			d.MinWeight, d.MinAt = w, c
		}
		neg = extend(&d.Negative, neg, c, w < 0)
		bad = extend(&d.NonFinite, bad, c, math.IsNaN(w) || math.IsInf(w, 0))
	}
	return d
}

// extend grows the open span cur with c when hit, or closes it.
func extend(list *[]Span, cur *Span, c float64, hit bool) *Span {
	if !hit {
		return nil
	}
	if cur == nil {
		*list = append(*list, Span{c, c})
		return &(*list)[len(*list)-1]
	}
	cur.Hi = c
	return cur
}
