// Package risk finds the report a forecaster with a concave (or convex)
// utility of money gives under a proper scoring rule paid in money, and
// how far it strays from their belief.
//
// A proper rule makes the truthful report maximise expected pay; a
// forecaster who maximises expected utility of initial wealth plus pay
// instead shades the report — towards the centre when risk-averse, away
// from it when risk-seeking. With pay = A - B L(p, k) and utility u, the
// forecaster maximises sum_k q_k u(W + A - B L(p, k)) over reports p. The
// maximisation runs in softmax coordinates (so every report stays in the
// simplex, above the contract's report floor) with BFGS from gonum's
// optimize and exact gradients from the generator's Hessian:
// dL(p, k)/dp_j = H_kj - (H p)_j.
package risk

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Kind is a family of utility functions.
type Kind string

// Utility families.
const (
	// Linear: u(x) = x, risk-neutral.
	Linear Kind = "linear"
	// CRRA: constant relative risk aversion R, u(x) = x^(1-R)/(1-R), ln x
	// at R = 1; needs positive wealth x.
	CRRA Kind = "crra"
	// CARA: constant absolute risk aversion a, u(x) = -exp(-a x)/a; wealth
	// does not change the report.
	CARA Kind = "cara"
)

// Utility is a utility of final wealth.
type Utility struct {
	Kind Kind
	// Coef is R for CRRA and a for CARA; positive is risk-averse,
	// negative risk-seeking, 0 the linear utility.
	Coef float64
}

// ParseUtility reads "crra:R", "cara:A" or "linear".
func ParseUtility(s string) (Utility, error) {
	s = strings.TrimSpace(s)
	if s == "linear" {
		return Utility{Kind: Linear}, nil
	}
	kind, v, ok := strings.Cut(s, ":")
	if !ok {
		return Utility{}, fmt.Errorf("utility %q: want crra:R, cara:A or linear", s)
	}
	c, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
	if err != nil || math.IsNaN(c) || math.IsInf(c, 0) {
		return Utility{}, fmt.Errorf("utility %q: %q is not a finite number", s, v)
	}
	switch Kind(strings.ToLower(strings.TrimSpace(kind))) {
	case CRRA:
		return Utility{Kind: CRRA, Coef: c}, nil
	case CARA:
		return Utility{Kind: CARA, Coef: c}, nil
	}
	return Utility{}, fmt.Errorf("utility %q: unknown family %q; want crra or cara", s, kind)
}

// String describes the utility in words, for reports.
func (u Utility) String() string {
	switch {
	case u.Kind == Linear || u.Coef == 0:
		return "linear (risk-neutral)"
	case u.Kind == CRRA:
		return fmt.Sprintf("CRRA, relative risk aversion %g", u.Coef)
	}
	return fmt.Sprintf("CARA, absolute risk aversion %g", u.Coef)
}

// normalised is u rescaled around the reference wealth ref so that values
// are of order 1 there; each rescaling is a positive affine map
// of u, so it has the same maximiser. It returns v(x) and the slope dv/dx.
func (u Utility) normalised(x, ref float64) (v, d float64) {
	switch {
	case u.Kind == Linear || u.Coef == 0:
		return x - ref, 1
	case u.Kind == CARA:
		a := u.Coef
		e := math.Exp(-a * (x - ref))
		return (1 - e) / a, e
	}
	// CRRA in units of ref: w = x/ref.
	if !(x > 0) {
		return math.Inf(-1), math.Inf(1)
	}
	w, r := x/ref, u.Coef
	if r == 1 {
		return math.Log(w), 1 / (w * ref)
	}
	return (math.Pow(w, 1-r) - 1) / (1 - r), math.Pow(w, -r) / ref
}
