// Package budget turns a proper scoring rule into money a contract can
// promise: it builds the report menu the contract allows, fits
// pay = A - B·L(p, k) (B > 0) to a budget, rounds payments to a currency
// unit, and re-checks that scaling and rounding left every menu item the
// strict best report for a forecaster who believes it.
//
// An affine change of pay with B > 0 keeps a rule proper, so the fit
// itself costs no honesty; a finite menu, rounding and a clamp can, and
// the re-check measures by how much. The re-check compares every menu item
// with every other, and for two outcomes finds the belief cells exactly;
// what is searched over beliefs (cells for more outcomes, the truthful pay
// range, a clamp's honesty gap) is computed on a stated grid with a stated
// tolerance: evidence, not proof.
package budget
