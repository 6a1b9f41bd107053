// Package risk finds the report a forecaster with a concave (or convex)
// utility of money gives under a proper scoring rule paid in money, and
// how far it strays from their belief.
//
// A proper rule makes the truthful report maximise expected pay; a
// forecaster who maximises expected utility of initial wealth plus pay
// instead shades the report — towards the centre when risk-averse, away
// from it when risk-seeking. With pay = A - B L(p, k) and utility u, the
// forecaster maximises sum_k q_k u(W + A - B L(p, k)) over reports p that
// give each outcome at least the contract's report floor. The search
// compares reports by their certainty equivalent (money, computed without
// overflow for any coefficient), moves probability between two outcomes at
// a time with a bracketing line search (grid, golden section, then
// bisection on the first-order condition from the generator's exact
// Hessian, dL(p, k)/dp_j = H_kj - (H p)_j), and confirms the answer by the
// first-order (Karush–Kuhn–Tucker) condition. It cannot stall on a flat
// gradient: every step keeps the best value seen.
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
	// at R = 1; below R = 1 defined at zero wealth (u(0) = 0), from R = 1
	// on it needs positive wealth. R < 0 is risk-seeking.
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
